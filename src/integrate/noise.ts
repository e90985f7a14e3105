import type { ModelParameters } from '../model/parameters.js';
import type { Random } from '../util/random.js';

/**
 * White noise sqrt(q) dW on every x'' equation, integrated exactly over a macro step [t0, t1].
 * In the rotating frame it enters additively, du = -(sin(omega t)/omega) sqrt(q) dW and
 * dv = (cos(omega t)/omega) sqrt(q) dW, so its integral over the step is a Gaussian vector whose
 * 2 x 2 covariance per mode is known in closed form:
 *   Var u = (q/omega^2) int sin^2,  Var v = (q/omega^2) int cos^2,  Cov = -(q/omega^2) int sin cos.
 * The deterministic flow and this increment are combined by splitting (Lie-Trotter), which is
 * weakly first order in the macro step for additive noise (Kloeden and Platen 1992).
 */
export function addNoiseIncrement(params: ModelParameters, random: Random, t0: number, t1: number, y: Float64Array): void {
  const q = params.noiseIntensity;
  if (!(q > 0) || !(t1 > t0)) return;
  const m = params.modes;
  for (let j = 0; j < m; j++) {
    const w = params.omega[j];
    const span = t1 - t0;
    const sin2 = Math.sin(2 * w * t1) - Math.sin(2 * w * t0);
    const cos2 = Math.cos(2 * w * t1) - Math.cos(2 * w * t0);
    const scale = q / (w * w);
    const varU = scale * (span / 2 - sin2 / (4 * w));
    const varV = scale * (span / 2 + sin2 / (4 * w));
    const cov = scale * (cos2 / (4 * w));
    const l11 = Math.sqrt(Math.max(varU, 0));
    const l21 = l11 > 0 ? cov / l11 : 0;
    const l22 = Math.sqrt(Math.max(varV - l21 * l21, 0));
    for (let k = 0; k < params.nodes; k++) {
      const i = k * m + j;
      const z1 = random.normal();
      const z2 = random.normal();
      y[2 * i] += l11 * z1;
      y[2 * i + 1] += l21 * z1 + l22 * z2;
    }
  }
}

/** Random walk of every node's Delta_k over a step of length span (intensity per unit tau). */
export function addDetuningWalk(params: ModelParameters, random: Random, span: number): boolean {
  const walk = params.detuningWalk;
  if (!(walk > 0) || !(span > 0)) return false;
  const sigma = Math.sqrt(walk * span);
  for (let k = 0; k < params.nodes; k++) params.detuning[k] += sigma * random.normal();
  return true;
}
