import type { NoiseOutput } from '../../src/protocol/noise-output.js';
import { parseScenario } from '../../src/scenario/parse.js';
import { InputError } from '../../src/util/input-error.js';
import { noiseOfScenario } from '../commands/noise.js';

/**
 * The frequency-domain prediction a soak report draws beside the soak's own statistics: `syncring
 * noise` on the scenario the soak ran (from its log header), for the pattern its initial state
 * settles into. Where the analysis does not apply (no noise, an unstable or unsettled start, a
 * network too large) the report says why instead.
 */
export type ReportNoisePrediction = { output: NoiseOutput; unavailable: null } | { output: null; unavailable: string };

export function predictSoakNoise(scenario: unknown): ReportNoisePrediction {
  try {
    return { output: noiseOfScenario(parseScenario(scenario, 'the soak scenario'), 'the soak scenario', {}), unavailable: null };
  } catch (error) {
    if (error instanceof InputError) return { output: null, unavailable: error.message };
    throw error;
  }
}

/** log-log interpolation of a predicted deviation table at tau (null outside it). */
export function predictedAt(taus: readonly number[], values: readonly number[], tau: number): number | null {
  for (let i = 0; i + 1 < taus.length; i++) {
    if (taus[i] <= tau && tau <= taus[i + 1]) {
      const a = Math.log(tau / taus[i]) / Math.log(taus[i + 1] / taus[i]);
      return Math.exp(Math.log(values[i]) * (1 - a) + Math.log(values[i + 1]) * a);
    }
  }
  return null;
}
