import { wrapAngle } from '../util/angles.js';

/**
 * Per-tick observables of one system (full or guide) read off its rotating-frame state:
 * complex amplitude a = u - i v per node and mode, its modulus and phase, the wanted mode's
 * neighbour phase differences and the mode energies. Plain numbers, ready for JSON.
 */
export interface SystemObservables {
  /** |a_kj| per node, per mode. */
  amplitude: number[][];
  /** arg a_kj in (-pi, pi] per node, per mode. */
  phase: number[][];
  /** arg a_{k+1,0} - arg a_{k,0} wrapped to (-pi, pi], k = 0..N-1 with node N = node 0. */
  phaseDifferences: number[];
  /** sum_k |a_kj|^2 per mode. */
  modeEnergy: number[];
  /** The mode carrying most energy. */
  dominantMode: number;
}

export function readObservables(y: Float64Array, nodes: number, modes: number): SystemObservables {
  const amplitude: number[][] = [];
  const phase: number[][] = [];
  const modeEnergy = new Array<number>(modes).fill(0);
  for (let k = 0; k < nodes; k++) {
    const amps: number[] = [];
    const phases: number[] = [];
    for (let j = 0; j < modes; j++) {
      const i = k * modes + j;
      const re = y[2 * i];
      const im = -y[2 * i + 1];
      const r = Math.hypot(re, im);
      amps.push(r);
      phases.push(Math.atan2(im, re));
      modeEnergy[j] += r * r;
    }
    amplitude.push(amps);
    phase.push(phases);
  }
  const dominantMode = modeEnergy.indexOf(Math.max(...modeEnergy));
  return {
    amplitude,
    phase,
    phaseDifferences: neighbourPhaseDifferences(phase, 0),
    modeEnergy,
    dominantMode,
  };
}

/** arg a_{k+1,j} - arg a_{k,j} wrapped to (-pi, pi], cyclic over the nodes. */
export function neighbourPhaseDifferences(phase: number[][], mode: number): number[] {
  const n = phase.length;
  return phase.map((_, k) => wrapAngle(phase[(k + 1) % n][mode] - phase[k][mode]));
}

/** The mode carrying most energy (sum over nodes of |a_kj|^2) in a rotating-frame state. */
export function carryingMode(y: Float64Array, nodes: number, modes: number): number {
  let best = 0;
  let bestEnergy = -1;
  for (let j = 0; j < modes; j++) {
    let e = 0;
    for (let k = 0; k < nodes; k++) e += y[2 * (k * modes + j)] ** 2 + y[2 * (k * modes + j) + 1] ** 2;
    if (e > bestEnergy) [best, bestEnergy] = [j, e];
  }
  return best;
}

/** Real and imaginary parts of mode j's amplitudes (for the pattern classifier). */
export function modeAmplitudes(y: Float64Array, nodes: number, modes: number, mode: number): { re: Float64Array; im: Float64Array } {
  const re = new Float64Array(nodes);
  const im = new Float64Array(nodes);
  for (let k = 0; k < nodes; k++) {
    const i = k * modes + mode;
    re[k] = y[2 * i];
    im[k] = -y[2 * i + 1];
  }
  return { re, im };
}

export interface Divergence {
  /** Largest |a_full - a_guide| over nodes and modes. */
  max: number;
  /** max relative to the mean |a_full|. */
  relative: number;
  /**
   * The same after rotating the guide by the common phase that fits the full system best, per
   * mode: noise diffuses the common phase (a symmetry direction the guide cannot follow), so
   * this is the part of the gap that is a different pattern.
   */
  aligned: number;
}

/** Full-vs-guide gap of the slow variables (rotating-frame layout, `modes` per node). */
export function divergence(full: Float64Array, guide: Float64Array, modes = 1): Divergence {
  let max = 0;
  let sum = 0;
  for (let i = 0; i < full.length; i += 2) {
    max = Math.max(max, Math.hypot(full[i] - guide[i], full[i + 1] - guide[i + 1]));
    sum += Math.hypot(full[i], full[i + 1]);
  }
  let aligned = 0;
  for (let j = 0; j < modes; j++) {
    // least-squares phase: arg sum conj(g) f with a = u - i v
    let re = 0;
    let im = 0;
    for (let i = 2 * j; i < full.length; i += 2 * modes) {
      const fr = full[i];
      const fi = -full[i + 1];
      const gr = guide[i];
      const gi = -guide[i + 1];
      re += gr * fr + gi * fi;
      im += gr * fi - gi * fr;
    }
    const norm = Math.hypot(re, im);
    const c = norm > 0 ? re / norm : 1;
    const s = norm > 0 ? im / norm : 0;
    for (let i = 2 * j; i < full.length; i += 2 * modes) {
      const gr = guide[i];
      const gi = -guide[i + 1];
      aligned = Math.max(aligned, Math.hypot(full[i] - (c * gr - s * gi), -full[i + 1] - (s * gr + c * gi)));
    }
  }
  const mean = sum / (full.length / 2);
  return { max, relative: mean > 0 ? max / mean : 0, aligned };
}
