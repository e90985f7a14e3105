import type { ModelParameters } from '../model/parameters.js';
import type { Random } from '../util/random.js';

/** How a frame's noise was made: none, exact per-tick increments, or the averaged diffusion. */
export type NoiseModel = 'none' | 'exact-increments' | 'averaged-diffusion';

/**
 * The averaged diffusion of the slow variables: white noise sqrt(q) dW on x'' enters the
 * rotating frame as du = -(sin(omega tau)/omega) sqrt(q) dW, dv = (cos(omega tau)/omega) sqrt(q) dW.
 * Averaged over the carrier, sin^2 and cos^2 both have mean 1/2 and sin cos mean 0, so to leading
 * order u and v of mode j diffuse independently with variance q / (2 omega_j^2) per unit tau
 * (the averaging of stochastic systems, e.g. Freidlin and Wentzell, Random Perturbations of
 * Dynamical Systems, 2012, ch. 7). This is statistically, not pathwise, equivalent to the exact
 * increments of noise.ts: the same seed gives a different path.
 *
 * Adds the increment over a span of `span` in tau to `offset` (2 normal deviates per node and mode,
 * in state order).
 */
export function addAveragedDiffusion(params: ModelParameters, random: Random, span: number, offset: Float64Array): void {
  const q = params.noiseIntensity;
  if (!(q > 0) || !(span > 0)) return;
  const m = params.modes;
  for (let k = 0; k < params.nodes; k++) {
    for (let j = 0; j < m; j++) {
      const w = params.omega[j];
      const sigma = Math.sqrt((q * span) / (2 * w * w));
      const i = 2 * (k * m + j);
      offset[i] += sigma * random.normal();
      offset[i + 1] += sigma * random.normal();
    }
  }
}
