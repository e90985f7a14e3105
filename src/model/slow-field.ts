import type { ModelParameters } from './parameters.js';
import { MAX_NODES, RING_CONSTANTS, RING_PER_NODE, ringTwoModes } from './ring-kernel.js';

/** Above this in-degree a node's links are summed through the general CSR lists. */
const SLOTS = 2;

/**
 * The rotating-frame vector field f(y, theta) of docs/model.md, 'The frame', without the factor eps:
 * y' = eps f(y, theta) with y = [u_00, v_00, u_01, v_01, ...] (node-major, mode-minor) and
 *   x = u cos(theta_j) + v sin(theta_j),   x' = omega_j (-u sin(theta_j) + v cos(theta_j)),
 *   u' = -(eps F / omega_j) sin(theta_j),   v' = (eps F / omega_j) cos(theta_j).
 * The full integrator and the torus average both call this one kernel, so the guiding system
 * always averages exactly the right-hand side that the full system integrates.
 *
 * Harmonic content (used by the fitted integrator, checked by a test): F is odd in (x, x') and
 * of degree 3, so f is a trigonometric polynomial in the angles of total degree 0, 2 or 4 only.
 *
 * Speed: the hot loops are specialised for one and two modes on graphs whose nodes have at most
 * two incoming links (rings, broken rings, chains); missing slots point at the node itself, where
 * the coupling term w (s_l - s_k) vanishes whatever w is. Everything mutable (link weights,
 * detuning, coupling constants, gains, losses) is read from the parameters on every call.
 */
export class SlowField {
  /** Total degree of f in the angles; only even degrees occur. */
  static readonly HARMONIC_DEGREE = 4;

  private readonly signal: Float64Array;
  private readonly signalRate: Float64Array;
  /** x and x' per node and mode, interleaved like y. */
  private readonly motion: Float64Array;
  /** Per node: the two neighbour slots (source node and link index). */
  private readonly fromA: Int32Array;
  private readonly fromB: Int32Array;
  private readonly linkA: Int32Array;
  private readonly linkB: Int32Array;
  private readonly slotted: boolean;
  /** The slots form a ring (slot A = node k - 1, slot B = node k + 1, or k itself one-way): ring-kernel.ts runs it. */
  private readonly ring: 'two-way' | 'one-way' | null;
  /** The ring kernel's snapshot of the parameters (ring-kernel.ts), taken by `prepare`. */
  private readonly ringData: Float64Array;
  /** The ring kernel's base and running sum when only F is wanted. */
  private readonly zeros: Float64Array;
  private readonly discard: Float64Array;
  /** a and b of the ring kernel's call. */
  private readonly stageWeights = new Float64Array(2);

  constructor(readonly params: ModelParameters) {
    const n = params.nodes;
    const size = 2 * n * params.modes;
    this.signal = new Float64Array(n);
    this.signalRate = new Float64Array(n);
    this.motion = new Float64Array(size);
    this.fromA = new Int32Array(n);
    this.fromB = new Int32Array(n);
    this.linkA = new Int32Array(n);
    this.linkB = new Int32Array(n);
    let slotted = params.linkWeight.length > 0;
    for (let k = 0; k < n; k++) {
      const first = params.inStart[k];
      const degree = params.inStart[k + 1] - first;
      if (degree > SLOTS) slotted = false;
      this.fromA[k] = degree > 0 ? params.inFrom[first] : k;
      this.linkA[k] = degree > 0 ? params.inLink[first] : 0;
      this.fromB[k] = degree > 1 ? params.inFrom[first + 1] : k;
      this.linkB[k] = degree > 1 ? params.inLink[first + 1] : 0;
    }
    this.slotted = slotted;
    this.ring = slotted && params.modes === 2 && n <= MAX_NODES ? ringKind(this.fromA, this.fromB) : null;
    this.ringData = new Float64Array(this.ring ? RING_CONSTANTS + RING_PER_NODE * n : 0);
    this.zeros = new Float64Array(this.ring ? size : 0);
    this.discard = new Float64Array(this.ring ? size : 0);
  }

  /**
   * Take the snapshot of the mutable parameters that `evaluatePrepared` and `combinePrepared`
   * read. A scheme calls it once per run (parameters change only between runs) and saves
   * reading them node by node in every evaluation; `evaluate` takes it itself.
   */
  prepare(): void {
    if (!this.ring) return;
    const p = this.params;
    const data = this.ringData;
    data[0] = p.omega[0];
    data[1] = p.omega[1];
    data[2] = p.gain[0];
    data[3] = p.gain[1];
    data[4] = p.loss[0];
    data[5] = p.loss[1];
    data[6] = p.strength * p.reactive;
    data[7] = p.strength * p.dissipative;
    for (let k = 0; k < p.nodes; k++) {
      const d = RING_CONSTANTS + RING_PER_NODE * k;
      data[d] = p.linkWeight[this.linkA[k]];
      data[d + 1] = this.ring === 'one-way' ? 0 : p.linkWeight[this.linkB[k]];
      data[d + 2] = p.detuning[k];
    }
  }

  /** out = f(y, theta) where cos/sin hold cos(theta_j), sin(theta_j) per mode. */
  evaluate(cos: Float64Array, sin: Float64Array, y: Float64Array, out: Float64Array): void {
    this.prepare();
    this.run(cos, sin, y, out, 0, out, out, 0, out, true);
  }

  /** `evaluate` on the parameters as the last `prepare` saw them. */
  evaluatePrepared(cos: Float64Array, sin: Float64Array, y: Float64Array, out: Float64Array): void {
    this.run(cos, sin, y, out, 0, out, out, 0, out, true);
  }

  /**
   * One fused Runge-Kutta stage on the parameters as the last `prepare` saw them: with
   * F = f(yIn, theta), write next = base + a F and accOut = accIn + b F, element by element.
   * yIn is read completely before anything is written, so next may be yIn, and accOut may be
   * accIn; base and accIn are read per element.
   */
  combinePrepared(
    cos: Float64Array,
    sin: Float64Array,
    yIn: Float64Array,
    base: Float64Array,
    a: number,
    next: Float64Array,
    accIn: Float64Array,
    b: number,
    accOut: Float64Array,
  ): void {
    this.run(cos, sin, yIn, base, a, next, accIn, b, accOut, false);
  }

  /** `plain`: write F itself into `next` (the other outputs are not touched). */
  private run(
    cos: Float64Array,
    sin: Float64Array,
    yIn: Float64Array,
    base: Float64Array,
    a: number,
    next: Float64Array,
    accIn: Float64Array,
    b: number,
    accOut: Float64Array,
    plain: boolean,
  ): void {
    if (this.ring) {
      // F itself is 0 + 1 F (the sign of an exact zero aside), with the sum thrown away.
      const weights = this.stageWeights;
      weights[0] = plain ? 1 : a;
      weights[1] = plain ? 0 : b;
      const n = this.params.nodes;
      if (plain) ringTwoModes(n, this.ringData, cos, sin, yIn, this.zeros, next, this.zeros, this.discard, weights);
      else ringTwoModes(n, this.ringData, cos, sin, yIn, base, next, accIn, accOut, weights);
      return;
    }
    this.computeMotion(cos, sin, yIn);
    const m = this.params.modes;
    if (this.slotted && m === 2) this.forcesTwoModes(cos, sin, base, a, next, accIn, b, accOut, plain);
    else if (this.slotted && m === 1) this.forcesOneMode(cos[0], sin[0], base, a, next, accIn, b, accOut, plain);
    else this.forcesGeneral(cos, sin, base, a, next, accIn, b, accOut, plain);
  }

  /** x, x' per node and mode and the node signals s_k, s'_k. */
  private computeMotion(cos: Float64Array, sin: Float64Array, y: Float64Array): void {
    const { signal, signalRate, motion } = this;
    const n = this.params.nodes;
    const m = this.params.modes;
    const omega = this.params.omega;
    if (m === 2) {
      const c0 = cos[0],
        s0 = sin[0],
        c1 = cos[1],
        s1 = sin[1],
        w0 = omega[0],
        w1 = omega[1];
      for (let k = 0, i = 0; k < n; k++, i += 4) {
        const u0 = y[i],
          v0 = y[i + 1],
          u1 = y[i + 2],
          v1 = y[i + 3];
        const x0 = u0 * c0 + v0 * s0;
        const r0 = w0 * (v0 * c0 - u0 * s0);
        const x1 = u1 * c1 + v1 * s1;
        const r1 = w1 * (v1 * c1 - u1 * s1);
        motion[i] = x0;
        motion[i + 1] = r0;
        motion[i + 2] = x1;
        motion[i + 3] = r1;
        signal[k] = x0 + x1;
        signalRate[k] = r0 + r1;
      }
    } else if (m === 1) {
      const c = cos[0],
        s = sin[0],
        w = omega[0];
      for (let k = 0, i = 0; k < n; k++, i += 2) {
        const u = y[i],
          v = y[i + 1];
        const x = u * c + v * s;
        const r = w * (v * c - u * s);
        motion[i] = x;
        motion[i + 1] = r;
        signal[k] = x;
        signalRate[k] = r;
      }
    } else {
      for (let k = 0; k < n; k++) {
        let s = 0;
        let sd = 0;
        for (let j = 0; j < m; j++) {
          const i = 2 * (k * m + j);
          const u = y[i],
            v = y[i + 1];
          const x = u * cos[j] + v * sin[j];
          const r = omega[j] * (v * cos[j] - u * sin[j]);
          motion[i] = x;
          motion[i + 1] = r;
          s += x;
          sd += r;
        }
        signal[k] = s;
        signalRate[k] = sd;
      }
    }
  }

  private forcesTwoModes(
    cos: Float64Array,
    sin: Float64Array,
    base: Float64Array,
    a: number,
    next: Float64Array,
    accIn: Float64Array,
    b: number,
    accOut: Float64Array,
    plain: boolean,
  ): void {
    const p = this.params;
    const { signal, signalRate, motion, fromA, fromB, linkA, linkB } = this;
    const weight = p.linkWeight;
    const detuning = p.detuning;
    const kr = p.strength * p.reactive;
    const ks = p.strength * p.dissipative;
    const w0 = p.omega[0],
      w1 = p.omega[1];
    const g0 = p.gain[0],
      g1 = p.gain[1],
      d0 = p.loss[0],
      d1 = p.loss[1];
    const q0 = 2 * w0 * w0,
      q1 = 2 * w1 * w1;
    const su0 = -sin[0] / w0,
      sv0 = cos[0] / w0,
      su1 = -sin[1] / w1,
      sv1 = cos[1] / w1;
    const n = p.nodes;
    for (let k = 0, i = 0; k < n; k++, i += 4) {
      const sk = signal[k],
        rk = signalRate[k];
      const la = fromA[k],
        lb = fromB[k];
      const wa = weight[linkA[k]],
        wb = weight[linkB[k]];
      const coupling =
        kr * (wa * (signal[la] - sk) + wb * (signal[lb] - sk)) + ks * (wa * (signalRate[la] - rk) + wb * (signalRate[lb] - rk));
      const sustain = (1 - sk * sk) * rk;
      const dk = detuning[k];
      const f0 = g0 * sustain - d0 * motion[i + 1] - q0 * dk * motion[i] + coupling;
      const f1 = g1 * sustain - d1 * motion[i + 3] - q1 * dk * motion[i + 2] + coupling;
      const fu0 = f0 * su0,
        fv0 = f0 * sv0,
        fu1 = f1 * su1,
        fv1 = f1 * sv1;
      if (plain) {
        next[i] = fu0;
        next[i + 1] = fv0;
        next[i + 2] = fu1;
        next[i + 3] = fv1;
        continue;
      }
      next[i] = base[i] + a * fu0;
      next[i + 1] = base[i + 1] + a * fv0;
      next[i + 2] = base[i + 2] + a * fu1;
      next[i + 3] = base[i + 3] + a * fv1;
      accOut[i] = accIn[i] + b * fu0;
      accOut[i + 1] = accIn[i + 1] + b * fv0;
      accOut[i + 2] = accIn[i + 2] + b * fu1;
      accOut[i + 3] = accIn[i + 3] + b * fv1;
    }
  }

  private forcesOneMode(
    c: number,
    s: number,
    base: Float64Array,
    a: number,
    next: Float64Array,
    accIn: Float64Array,
    b: number,
    accOut: Float64Array,
    plain: boolean,
  ): void {
    const p = this.params;
    const { signal, signalRate, fromA, fromB, linkA, linkB } = this;
    const weight = p.linkWeight;
    const detuning = p.detuning;
    const kr = p.strength * p.reactive;
    const ks = p.strength * p.dissipative;
    const w = p.omega[0];
    const g = p.gain[0],
      d = p.loss[0];
    const q = 2 * w * w;
    const su = -s / w,
      sv = c / w;
    const n = p.nodes;
    for (let k = 0, i = 0; k < n; k++, i += 2) {
      const sk = signal[k],
        rk = signalRate[k];
      const la = fromA[k],
        lb = fromB[k];
      const wa = weight[linkA[k]],
        wb = weight[linkB[k]];
      const coupling =
        kr * (wa * (signal[la] - sk) + wb * (signal[lb] - sk)) + ks * (wa * (signalRate[la] - rk) + wb * (signalRate[lb] - rk));
      const f = g * (1 - sk * sk) * rk - d * rk - q * detuning[k] * sk + coupling;
      const fu = f * su,
        fv = f * sv;
      if (plain) {
        next[i] = fu;
        next[i + 1] = fv;
        continue;
      }
      next[i] = base[i] + a * fu;
      next[i + 1] = base[i + 1] + a * fv;
      accOut[i] = accIn[i] + b * fu;
      accOut[i + 1] = accIn[i + 1] + b * fv;
    }
  }

  /** Any number of modes, any in-degree (links through the CSR lists). */
  private forcesGeneral(
    cos: Float64Array,
    sin: Float64Array,
    base: Float64Array,
    a: number,
    next: Float64Array,
    accIn: Float64Array,
    b: number,
    accOut: Float64Array,
    plain: boolean,
  ): void {
    const p = this.params;
    const { signal, signalRate, motion } = this;
    const { inStart, inFrom, inLink, linkWeight, gain, loss, detuning, omega } = p;
    const kr = p.strength * p.reactive;
    const ks = p.strength * p.dissipative;
    const n = p.nodes;
    const m = p.modes;
    for (let k = 0; k < n; k++) {
      const sk = signal[k],
        rk = signalRate[k];
      let pull = 0;
      let pullRate = 0;
      for (let e = inStart[k]; e < inStart[k + 1]; e++) {
        const w = linkWeight[inLink[e]];
        const l = inFrom[e];
        pull += w * (signal[l] - sk);
        pullRate += w * (signalRate[l] - rk);
      }
      const coupling = kr * pull + ks * pullRate;
      const sustain = (1 - sk * sk) * rk;
      const twoDelta = 2 * detuning[k];
      for (let j = 0; j < m; j++) {
        const i = 2 * (k * m + j);
        const w = omega[j];
        const f = gain[j] * sustain - loss[j] * motion[i + 1] - twoDelta * w * w * motion[i] + coupling;
        const fu = (-f * sin[j]) / w;
        const fv = (f * cos[j]) / w;
        if (plain) {
          next[i] = fu;
          next[i + 1] = fv;
          continue;
        }
        next[i] = base[i] + a * fu;
        next[i + 1] = base[i + 1] + a * fv;
        accOut[i] = accIn[i] + b * fu;
        accOut[i + 1] = accIn[i + 1] + b * fv;
      }
    }
  }
}

/** 'two-way' or 'one-way' if the slots form a ring of at least three nodes in ring order, else null. */
function ringKind(fromA: Int32Array, fromB: Int32Array): 'two-way' | 'one-way' | null {
  const n = fromA.length;
  if (n < 3) return null;
  let twoWay = true;
  let oneWay = true;
  for (let k = 0; k < n; k++) {
    if (fromA[k] !== (k - 1 + n) % n) return null;
    if (fromB[k] !== (k + 1) % n) twoWay = false;
    if (fromB[k] !== k) oneWay = false;
  }
  return twoWay ? 'two-way' : oneWay ? 'one-way' : null;
}
