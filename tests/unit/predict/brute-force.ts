/**
 * An independent brute-force search for the stable locked states of the one-mode guiding system,
 * written for the catalogue tests without any of the engine's code. The field is the project's
 * reference closed form (README, "Rotating frame and the guiding system"), in slow time:
 *
 *   a'_k = (1/2) [ g (1 - |a_k|^2/4) a_k - d a_k + 2 i omega Delta_k a_k
 *                  + kappa sum_l A_kl (sigma - i rho/omega) (a_l - a_k) ]
 *
 * Many seeded random starts are integrated with classic RK4 (fixed step) until Newton, run in the
 * co-rotating frame a -> a e^{i Omega t} with the phase of one node held fixed, lands close to
 * the trajectory on a state whose finite-difference Jacobian has no eigenvalue with positive real
 * part once the one zero eigenvalue of the phase symmetry is set aside; those states are
 * collected up to a common phase. Symmetries are found by trying every permutation.
 */
import { EigenvalueDecomposition, Matrix, solve } from 'ml-matrix';

export interface OneModeNetwork {
  nodes: number;
  /** weight[k][l] = A_kl, the weight of the link carrying node l into node k. */
  weight: number[][];
  detuning: number[];
  gain: number;
  loss: number;
  omega: number;
  kappa: number;
  sigma: number;
  rho: number;
}

/** Complex amplitudes a_k = re[k] + i im[k]. */
export interface Amplitudes {
  re: Float64Array;
  im: Float64Array;
}

export interface FoundState {
  a: Amplitudes;
  /** Common rotation rate Omega (slow time). */
  rate: number;
  /** Largest real part of the Jacobian's eigenvalues with the phase zero set aside. */
  margin: number;
}

/** The reference field (module header), out = a'. */
export function referenceField(net: OneModeNetwork, a: Amplitudes, out: Amplitudes): Amplitudes {
  const { nodes, weight, detuning, gain, loss, omega, kappa, sigma, rho } = net;
  const cRe = kappa * sigma;
  const cIm = (-kappa * rho) / omega;
  for (let k = 0; k < nodes; k++) {
    let sRe = 0;
    let sIm = 0;
    for (let l = 0; l < nodes; l++) {
      const w = weight[k][l];
      if (w === 0) continue;
      sRe += w * (a.re[l] - a.re[k]);
      sIm += w * (a.im[l] - a.im[k]);
    }
    const m2 = a.re[k] ** 2 + a.im[k] ** 2;
    const grow = gain * (1 - m2 / 4) - loss;
    const turn = 2 * omega * detuning[k];
    out.re[k] = 0.5 * (grow * a.re[k] - turn * a.im[k] + cRe * sRe - cIm * sIm);
    out.im[k] = 0.5 * (grow * a.im[k] + turn * a.re[k] + cRe * sIm + cIm * sRe);
  }
  return out;
}

const amplitudes = (n: number): Amplitudes => ({ re: new Float64Array(n), im: new Float64Array(n) });
const copyOf = (a: Amplitudes): Amplitudes => ({ re: Float64Array.from(a.re), im: Float64Array.from(a.im) });

/** Mulberry32 (common practice): the test's own seeded generator. */
export function seededUniform(seed: number): () => number {
  let t = seed >>> 0;
  return () => {
    t = (t + 0x6d2b79f5) >>> 0;
    let r = Math.imul(t ^ (t >>> 15), 1 | t);
    r ^= r + Math.imul(r ^ (r >>> 7), 61 | r);
    return ((r ^ (r >>> 14)) >>> 0) / 4294967296;
  };
}

/** One classic RK4 step of size h, in place. */
function rk4Step(net: OneModeNetwork, a: Amplitudes, h: number, scratch: Amplitudes[]): void {
  const [k1, k2, k3, k4, probe] = scratch;
  const n = net.nodes;
  const stage = (from: Amplitudes, scale: number): Amplitudes => {
    for (let k = 0; k < n; k++) {
      probe.re[k] = a.re[k] + scale * from.re[k];
      probe.im[k] = a.im[k] + scale * from.im[k];
    }
    return probe;
  };
  referenceField(net, a, k1);
  referenceField(net, stage(k1, h / 2), k2);
  referenceField(net, stage(k2, h / 2), k3);
  referenceField(net, stage(k3, h), k4);
  for (let k = 0; k < n; k++) {
    a.re[k] += (h / 6) * (k1.re[k] + 2 * k2.re[k] + 2 * k3.re[k] + k4.re[k]);
    a.im[k] += (h / 6) * (k1.im[k] + 2 * k2.im[k] + 2 * k3.im[k] + k4.im[k]);
  }
}

/** The best common rotation rate: Omega = sum Im(conj(a) a') / sum |a|^2. */
function rotationRate(net: OneModeNetwork, a: Amplitudes): number {
  const f = referenceField(net, a, amplitudes(net.nodes));
  let num = 0;
  let den = 0;
  for (let k = 0; k < net.nodes; k++) {
    num += a.re[k] * f.im[k] - a.im[k] * f.re[k];
    den += a.re[k] ** 2 + a.im[k] ** 2;
  }
  return num / den;
}

/** G(a) = F(a) - i Omega a as 2N reals (re parts, then im parts). */
function corotatingResidual(net: OneModeNetwork, a: Amplitudes, rate: number): Float64Array {
  const n = net.nodes;
  const f = referenceField(net, a, amplitudes(n));
  const out = new Float64Array(2 * n);
  for (let k = 0; k < n; k++) {
    out[k] = f.re[k] + rate * a.im[k];
    out[n + k] = f.im[k] - rate * a.re[k];
  }
  return out;
}

const norm = (v: ArrayLike<number>): number => Math.sqrt(Array.from(v).reduce((s, x) => s + x * x, 0));

/**
 * Newton for G(a, Omega) = 0 with node `fixed`'s phase held (Im a_fixed = 0 after turning the
 * guess so that a_fixed is real): unknowns Re a (N), Im a except at `fixed` (N - 1), Omega.
 */
export function newtonLocked(
  net: OneModeNetwork,
  guess: Amplitudes,
  maxIterations = 40,
): { a: Amplitudes; rate: number; residual: number } {
  const n = net.nodes;
  let fixed = 0;
  for (let k = 1; k < n; k++) if (guess.re[k] ** 2 + guess.im[k] ** 2 > guess.re[fixed] ** 2 + guess.im[fixed] ** 2) fixed = k;
  const turn = Math.atan2(guess.im[fixed], guess.re[fixed]);
  const a = amplitudes(n);
  for (let k = 0; k < n; k++) {
    a.re[k] = Math.cos(-turn) * guess.re[k] - Math.sin(-turn) * guess.im[k];
    a.im[k] = Math.sin(-turn) * guess.re[k] + Math.cos(-turn) * guess.im[k];
  }
  a.im[fixed] = 0;
  const imSlots = Array.from({ length: n }, (_, k) => k).filter((k) => k !== fixed);
  const pack = (x: Amplitudes, rate: number): Float64Array => Float64Array.from([...x.re, ...imSlots.map((k) => x.im[k]), rate]);
  const unpack = (z: ArrayLike<number>): { a: Amplitudes; rate: number } => {
    const x = amplitudes(n);
    for (let k = 0; k < n; k++) x.re[k] = z[k];
    imSlots.forEach((k, i) => (x.im[k] = z[n + i]));
    return { a: x, rate: z[2 * n - 1] };
  };
  let z = pack(a, rotationRate(net, a));
  const residualAt = (zz: ArrayLike<number>): Float64Array => {
    const u = unpack(zz);
    return corotatingResidual(net, u.a, u.rate);
  };
  let r = residualAt(z);
  for (let it = 0; it < maxIterations && norm(r) > 1e-12; it++) {
    const jac = new Matrix(2 * n, 2 * n);
    const h = 1e-7;
    for (let c = 0; c < 2 * n; c++) {
      const plus = Float64Array.from(z);
      const minus = Float64Array.from(z);
      plus[c] += h;
      minus[c] -= h;
      const rp = residualAt(plus);
      const rm = residualAt(minus);
      for (let i = 0; i < 2 * n; i++) jac.set(i, c, (rp[i] - rm[i]) / (2 * h));
    }
    let step: Matrix;
    try {
      step = solve(jac, Matrix.columnVector(Array.from(r, (x) => -x)));
    } catch {
      break;
    }
    let scale = 1;
    let next = z;
    let nextR = r;
    for (let halving = 0; halving < 8; halving++) {
      next = Float64Array.from(z, (x, i) => x + scale * step.get(i, 0));
      nextR = residualAt(next);
      if (norm(nextR) < norm(r)) break;
      scale /= 2;
    }
    if (!(norm(nextR) < norm(r))) break;
    z = next;
    r = nextR;
  }
  return { ...unpack(z), residual: norm(r) };
}

/** Largest real part of the eigenvalues of D G at a locked state, the eigenvalue nearest 0 (the phase direction) set aside. */
export function stabilityMargin(net: OneModeNetwork, a: Amplitudes, rate: number): number {
  const n = net.nodes;
  const jac = new Matrix(2 * n, 2 * n);
  const h = 1e-6;
  for (let c = 0; c < 2 * n; c++) {
    const plus = copyOf(a);
    const minus = copyOf(a);
    if (c < n) {
      plus.re[c] += h;
      minus.re[c] -= h;
    } else {
      plus.im[c - n] += h;
      minus.im[c - n] -= h;
    }
    const rp = corotatingResidual(net, plus, rate);
    const rm = corotatingResidual(net, minus, rate);
    for (let i = 0; i < 2 * n; i++) jac.set(i, c, (rp[i] - rm[i]) / (2 * h));
  }
  const eig = new EigenvalueDecomposition(jac);
  const values = eig.realEigenvalues.map((re, i) => ({ re, im: eig.imaginaryEigenvalues[i] }));
  let zero = 0;
  values.forEach((v, i) => {
    if (Math.hypot(v.re, v.im) < Math.hypot(values[zero].re, values[zero].im)) zero = i;
  });
  return Math.max(...values.filter((_, i) => i !== zero).map((v) => v.re));
}

/** |a - e^{i phi} b| / |b| at the best phase phi. */
export function phaseAlignedDistance(a: Amplitudes, b: Amplitudes): number {
  let re = 0;
  let im = 0;
  let sa = 0;
  let sb = 0;
  for (let k = 0; k < a.re.length; k++) {
    re += a.re[k] * b.re[k] + a.im[k] * b.im[k];
    im += a.im[k] * b.re[k] - a.re[k] * b.im[k];
    sa += a.re[k] ** 2 + a.im[k] ** 2;
    sb += b.re[k] ** 2 + b.im[k] ** 2;
  }
  return Math.sqrt(Math.max(0, sa + sb - 2 * Math.hypot(re, im)) / sb);
}

export interface BruteForceResult {
  stable: FoundState[];
  /** How many starts settled on each of `stable`. */
  reached: number[];
  starts: number;
  /** Starts that reached a stable state within the time budget. */
  settled: number;
}

/**
 * Stable locked states reached from `starts` random starts (phases uniform, moduli uniform in
 * [1, 2]); integrated with RK4 step `step`, Newton tried every `checkEvery` time units, at most
 * `maxTime`. A state is stable when its margin is below -`marginFloor`.
 */
export function bruteForceStableStates(
  net: OneModeNetwork,
  options: { starts: number; seed: number; step?: number; checkEvery?: number; maxTime?: number; marginFloor?: number },
): BruteForceResult {
  const n = net.nodes;
  const step = options.step ?? 0.1;
  const checkEvery = options.checkEvery ?? 20;
  const maxTime = options.maxTime ?? 4000;
  const marginFloor = options.marginFloor ?? 1e-7;
  const random = seededUniform(options.seed);
  const scratch = Array.from({ length: 5 }, () => amplitudes(n));
  const stable: FoundState[] = [];
  const reached: number[] = [];
  let settled = 0;
  for (let s = 0; s < options.starts; s++) {
    const a = amplitudes(n);
    for (let k = 0; k < n; k++) {
      const phase = 2 * Math.PI * random();
      const modulus = 1 + random();
      a.re[k] = modulus * Math.cos(phase);
      a.im[k] = modulus * Math.sin(phase);
    }
    for (let t = 0; t < maxTime; t += checkEvery) {
      for (let i = 0; i < Math.round(checkEvery / step); i++) rk4Step(net, a, step, scratch);
      const polished = newtonLocked(net, a);
      if (!(polished.residual < 1e-10) || phaseAlignedDistance(polished.a, a) > 1e-2) continue;
      const margin = stabilityMargin(net, polished.a, polished.rate);
      if (!(margin < -marginFloor)) continue;
      settled++;
      const known = stable.findIndex((f) => phaseAlignedDistance(f.a, polished.a) < 1e-5);
      if (known >= 0) reached[known]++;
      else {
        stable.push({ a: polished.a, rate: polished.rate, margin });
        reached.push(1);
      }
      break;
    }
  }
  return { stable, reached, starts: options.starts, settled };
}

/** Every permutation p (p[k] = image of node k) keeping the weights and the detuning, by trying them all. */
export function bruteForceSymmetries(net: OneModeNetwork): Int32Array[] {
  const n = net.nodes;
  const found: Int32Array[] = [];
  const p = Int32Array.from({ length: n }, (_, k) => k);
  const used = new Uint8Array(n);
  const place = (k: number): void => {
    if (k === n) {
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (Math.abs(net.weight[p[i]][p[j]] - net.weight[i][j]) > 1e-12) return;
      found.push(Int32Array.from(p));
      return;
    }
    for (let c = 0; c < n; c++) {
      if (used[c] || Math.abs(net.detuning[c] - net.detuning[k]) > 1e-12) continue;
      used[c] = 1;
      p[k] = c;
      place(k + 1);
      used[c] = 0;
    }
  };
  place(0);
  return found;
}

/** (gamma.a)_{gamma(k)} = a_k. */
export function moved(a: Amplitudes, gamma: ArrayLike<number>): Amplitudes {
  const out = amplitudes(a.re.length);
  for (let k = 0; k < gamma.length; k++) {
    out.re[gamma[k]] = a.re[k];
    out.im[gamma[k]] = a.im[k];
  }
  return out;
}
