/**
 * The field kernel of SlowField for two modes on a ring (slot A of node k is node k - 1, slot B
 * node k + 1, or node k itself on a one-way ring), in one pass over the nodes.
 *
 * Same arithmetic as the two-pass kernel (computeMotion, then forcesTwoModes), operation by
 * operation, so the results agree bit for bit (on a one-way ring, up to the sign of an exact
 * zero: slot B holds weight 0 instead of the node itself); only the memory traffic differs. The two-pass
 * form stores x, x' and the node signals and reads them back (with the neighbours' signals
 * through index arrays); here the signals of nodes k - 1, k, k + 1 travel in local variables
 * while the loop moves along the ring, so each stage reads y once per node and nothing else but
 * the weights and the detuning. V8 checks and bounds-checks every typed-array access, which
 * made the stored intermediates the larger part of the kernel's time (README, 'Performance');
 * a C compiler runs both forms at the same speed.
 *
 * Node 0 is read first and its signals kept, since with next === yIn (an RK4 stage writing its
 * own argument) its slot is overwritten before node N - 1 needs them.
 */

/** Layout of the kernel's parameter snapshot (SlowField.prepare): eight constants, then per node [w_A, w_B, delta_k]. */
export const RING_CONSTANTS = 8;
export const RING_PER_NODE = 3;
/** Most nodes the kernel takes (2^20 - 1, a bit mask): far above any ring a session runs. */
export const MAX_NODES = 0xfffff;

/**
 * next = base + a F and accOut = accIn + b F with F = f(yIn, theta), as SlowField.combine
 * describes. `data` is the parameter snapshot: omega_0, omega_1, gain_0, gain_1, loss_0, loss_1,
 * kappa rho, kappa sigma, then per node the weights of slots A and B and the detuning (one
 * array, so the loop checks one array instead of five). A one-way ring has weight 0 in slot B.
 * The loop has no branch on the kind of call: a flag tested per node cost 15 % (measured).
 * a and b come in stageWeights[0] and [1]: numbers passed to a function V8 does not inline are
 * boxed, an allocation per call that showed up as garbage collection in the profile.
 */
export function ringTwoModes(
  n: number,
  data: Float64Array,
  cos: Float64Array,
  sin: Float64Array,
  yIn: Float64Array,
  base: Float64Array,
  next: Float64Array,
  accIn: Float64Array,
  accOut: Float64Array,
  stageWeights: Float64Array,
): void {
  const cos0 = cos[0],
    sin0 = sin[0],
    cos1 = cos[1],
    sin1 = sin[1];
  const a = stageWeights[0],
    b = stageWeights[1];
  const w0 = data[0],
    w1 = data[1],
    g0 = data[2],
    g1 = data[3],
    d0 = data[4],
    d1 = data[5],
    kr = data[6],
    ks = data[7];
  const q0 = 2 * w0 * w0,
    q1 = 2 * w1 * w1;
  const su0 = -sin0 / w0,
    sv0 = cos0 / w0,
    su1 = -sin1 / w1,
    sv1 = cos1 / w1;
  // node N - 1 (the predecessor of node 0), then node 0
  const last = 4 * (n - 1);
  let u0 = yIn[last],
    v0 = yIn[last + 1],
    u1 = yIn[last + 2],
    v1 = yIn[last + 3];
  let signalPrev = u0 * cos0 + v0 * sin0 + (u1 * cos1 + v1 * sin1);
  let ratePrev = w0 * (v0 * cos0 - u0 * sin0) + w1 * (v1 * cos1 - u1 * sin1);
  u0 = yIn[0];
  v0 = yIn[1];
  u1 = yIn[2];
  v1 = yIn[3];
  let x0 = u0 * cos0 + v0 * sin0,
    r0 = w0 * (v0 * cos0 - u0 * sin0),
    x1 = u1 * cos1 + v1 * sin1,
    r1 = w1 * (v1 * cos1 - u1 * sin1);
  let sk = x0 + x1,
    rk = r0 + r1;
  const signalFirst = sk,
    rateFirst = rk;
  // Bounded so that V8's range analysis drops the overflow checks of the index arithmetic.
  const count = n & MAX_NODES;
  for (let k = 0; k < count; k++) {
    const i = 4 * k;
    let nx0 = 0,
      nr0 = 0,
      nx1 = 0,
      nr1 = 0,
      signalNext = signalFirst,
      rateNext = rateFirst;
    if (k + 1 < count) {
      const j = i + 4;
      const nu0 = yIn[j],
        nv0 = yIn[j + 1],
        nu1 = yIn[j + 2],
        nv1 = yIn[j + 3];
      nx0 = nu0 * cos0 + nv0 * sin0;
      nr0 = w0 * (nv0 * cos0 - nu0 * sin0);
      nx1 = nu1 * cos1 + nv1 * sin1;
      nr1 = w1 * (nv1 * cos1 - nu1 * sin1);
      signalNext = nx0 + nx1;
      rateNext = nr0 + nr1;
    }
    const d = 8 + 3 * k; // RING_CONSTANTS + RING_PER_NODE k, as literals V8 folds
    const wa = data[d],
      wb = data[d + 1],
      dk = data[d + 2];
    const coupling = kr * (wa * (signalPrev - sk) + wb * (signalNext - sk)) + ks * (wa * (ratePrev - rk) + wb * (rateNext - rk));
    const sustain = (1 - sk * sk) * rk;
    const f0 = g0 * sustain - d0 * r0 - q0 * dk * x0 + coupling;
    const f1 = g1 * sustain - d1 * r1 - q1 * dk * x1 + coupling;
    const fu0 = f0 * su0,
      fv0 = f0 * sv0,
      fu1 = f1 * su1,
      fv1 = f1 * sv1;
    next[i] = base[i] + a * fu0;
    next[i + 1] = base[i + 1] + a * fv0;
    next[i + 2] = base[i + 2] + a * fu1;
    next[i + 3] = base[i + 3] + a * fv1;
    accOut[i] = accIn[i] + b * fu0;
    accOut[i + 1] = accIn[i + 1] + b * fv0;
    accOut[i + 2] = accIn[i + 2] + b * fu1;
    accOut[i + 3] = accIn[i + 3] + b * fv1;
    signalPrev = sk;
    ratePrev = rk;
    sk = signalNext;
    rk = rateNext;
    x0 = nx0;
    r0 = nr0;
    x1 = nx1;
    r1 = nr1;
  }
}
