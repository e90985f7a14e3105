import type { ModeState } from '../scenario/types.js';
import type { ModelParameters } from './parameters.js';

/**
 * Conversions between the original coordinates (x, x') and the rotating frame (u, v) of
 * docs/model.md, 'The frame', with theta_j = omega_j tau:
 *   x = u cos + v sin,  x'/omega = -u sin + v cos   <=>   u = x cos - (x'/omega) sin,  v = x sin + (x'/omega) cos.
 * The complex amplitude is a = u - i v, so x = Re(a e^{i theta}).
 */
export function rotatingFromOriginal(params: ModelParameters, tau: number, state: ModeState[][], out?: Float64Array): Float64Array {
  const m = params.modes;
  const y = out ?? new Float64Array(2 * params.nodes * m);
  for (let k = 0; k < params.nodes; k++) {
    for (let j = 0; j < m; j++) {
      const w = params.omega[j];
      const c = Math.cos(w * tau);
      const s = Math.sin(w * tau);
      const { x, xdot } = state[k][j];
      const i = k * m + j;
      y[2 * i] = x * c - (xdot / w) * s;
      y[2 * i + 1] = x * s + (xdot / w) * c;
    }
  }
  return y;
}

export function originalFromRotating(params: ModelParameters, tau: number, y: Float64Array): ModeState[][] {
  const m = params.modes;
  const cos = Array.from(params.omega, (w) => Math.cos(w * tau));
  const sin = Array.from(params.omega, (w) => Math.sin(w * tau));
  const nodes: ModeState[][] = [];
  for (let k = 0; k < params.nodes; k++) {
    const modes: ModeState[] = [];
    for (let j = 0; j < m; j++) {
      const i = k * m + j;
      const u = y[2 * i];
      const v = y[2 * i + 1];
      modes.push({ x: u * cos[j] + v * sin[j], xdot: params.omega[j] * (v * cos[j] - u * sin[j]) });
    }
    nodes.push(modes);
  }
  return nodes;
}

/** Complex amplitude a = u - i v of node k, mode j. */
export function amplitudeOf(y: Float64Array, modes: number, k: number, j: number): { re: number; im: number } {
  const i = k * modes + j;
  return { re: y[2 * i], im: -y[2 * i + 1] };
}

/** Add delta (complex) to the amplitude of node k, mode j. */
export function addToAmplitude(y: Float64Array, modes: number, k: number, j: number, re: number, im: number): void {
  const i = k * modes + j;
  y[2 * i] += re;
  y[2 * i + 1] -= im;
}
