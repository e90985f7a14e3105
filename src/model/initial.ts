import type { Scenario } from '../scenario/types.js';
import { Random } from '../util/random.js';
import { addToAmplitude, rotatingFromOriginal } from './coordinates.js';
import type { ModelParameters } from './parameters.js';

/**
 * The rotating-frame state at tau = 0 for the scenario's initial form.
 * - state: taken as given (x, x' per node and mode);
 * - random: every mode of every node gets a uniformly random phase and a magnitude uniform in
 *   [A/2, A] (A = amplitude, or amplitude[j] per mode), from the seeded generator;
 * - pattern: mode `mode` gets a_k = amplitude e^{2 pi i q k / N}, the other mode stays at rest.
 */
export function initialRotatingState(scenario: Scenario, params: ModelParameters): Float64Array {
  const n = params.nodes;
  const m = params.modes;
  const init = scenario.initial;
  if ('state' in init) return rotatingFromOriginal(params, 0, init.state);
  const y = new Float64Array(2 * n * m);
  if ('random' in init) {
    const random = new Random(init.random.seed);
    for (let k = 0; k < n; k++) {
      for (let j = 0; j < m; j++) {
        const amplitude = init.random.amplitude;
        const scale = Array.isArray(amplitude) ? amplitude[j] : amplitude;
        const magnitude = scale * (0.5 + 0.5 * random.uniform());
        const phase = 2 * Math.PI * random.uniform();
        addToAmplitude(y, m, k, j, magnitude * Math.cos(phase), magnitude * Math.sin(phase));
      }
    }
    return y;
  }
  const { q, amplitude, mode } = init.pattern;
  for (let k = 0; k < n; k++) {
    const phase = (2 * Math.PI * q * k) / n;
    addToAmplitude(y, m, k, mode, amplitude * Math.cos(phase), amplitude * Math.sin(phase));
  }
  return y;
}
