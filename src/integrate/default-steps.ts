import type { Scenario } from '../scenario/types.js';
import { ModelParameters } from '../model/parameters.js';
import { fittedStabilityProblem, fittedStructure } from './fitted-adams.js';

/** Steps per period at which the fitted Adams method runs by default. */
export const FITTED_DEFAULT_STEPS = 5;
/** Above this eps the fitted method's error (O(eps^2) at fixed slow time) is not reliably below 1e-7 per 1000 periods. */
export const FITTED_MAX_EPSILON = 1e-4;

/**
 * RK4's default micro steps per period. Its error has a bounded part of order eps h^4 (from the
 * field's fast harmonics) and an accumulating part of order eps^2 h^4 per unit tau, measured as
 * about 8.4e5 eps^2 / S^4 per 1000 periods at eps = 1e-3 (against SciPy DOP853 and a fine RK4
 * reference). S = 8 ceil(1700 sqrt(eps) / 8), at most 1024, keeps it near 1e-7 per 1000 periods;
 * S >= 8 also resolves the harmonics up to 4 omega.
 */
export function rk4DefaultSteps(epsilon: number): number {
  return Math.min(1024, 8 * Math.max(1, Math.ceil((1700 * Math.sqrt(epsilon)) / 8)));
}

/**
 * The default micro step of a scenario whose integrator section does not give one: the fitted
 * Adams method at 5 steps per period where it applies and eps <= 1e-4 (1.95e-10 relative error
 * per 1000 periods at eps = 1e-5, measured), RK4 by rk4DefaultSteps otherwise.
 */
export function defaultStepsPerPeriod(scenario: Scenario): number {
  const eps = scenario.epsilon;
  if (eps > 0 && eps <= FITTED_MAX_EPSILON) {
    const params = new ModelParameters(scenario);
    const h = (2 * Math.PI) / Math.max(...params.omega) / FITTED_DEFAULT_STEPS;
    const structure = fittedStructure(params, h);
    if (!structure.problem && !fittedStabilityProblem(params, h, structure.weightNorm)) return FITTED_DEFAULT_STEPS;
  }
  return rk4DefaultSteps(eps);
}
