import { AUTO_ERROR, envelopeTrouble, type EnvelopeHealth } from './validity.js';

/** What a session is asked to run. */
export type IntegratorRequest = 'micro' | 'envelope' | 'auto';
/** What actually runs. */
export type IntegratorMode = 'micro' | 'envelope';

export const INTEGRATOR_REQUESTS: readonly IntegratorRequest[] = ['micro', 'envelope', 'auto'];

export interface IntegratorChoice {
  mode: IntegratorMode;
  /** One sentence: why this mode runs. */
  reason: string;
}

/**
 * Cost per tick in SlowField evaluations (the unit both integrators spend). Measured on the
 * parity grid for N = 8, M = 2: one slow right-hand side costs 12 to 17 evaluations per torus
 * point (4 field samples plus the kernel product and the stencil) and one reconstruction 1 to 2
 * per point (1 field sample plus the weighted sum). Micro-stepping costs its method's evaluations
 * per step (4 for RK4, 1 for the fitted method).
 */
export const SLOW_RHS_COST_PER_POINT = 16;
export const RECONSTRUCTION_COST_PER_POINT = 2;
/** Slow right-hand sides per slow time unit without noise (measured 60 to 100 on ring problems). */
export const QUIET_RHS_PER_SLOW_UNIT = 100;
/** Evaluations of one restarted Dormand-Prince step (first rate plus six stages). */
const RESTARTED_STEP_RHS = 7;
/** The envelope must be at least this many times cheaper before 'auto' takes it. */
export const PAYOFF = 2;

export interface CostInputs {
  eps: number;
  /** Tick length in tau. */
  macroStep: number;
  /** Nominal micro step in tau. */
  microStep: number;
  /** Field evaluations per micro step. */
  microEvaluationsPerStep: number;
  /** Torus sample points of the envelope's field. */
  points: number;
  /** Noise or a detuning walk is on (chunks limited to noiseStep). */
  noisy: boolean;
  /** The envelope's splitting step in slow time. */
  noiseStep: number;
}

export interface CostEstimate {
  microPerTick: number;
  envelopePerTick: number;
}

export function estimateCosts(c: CostInputs): CostEstimate {
  const microPerTick = Math.max(1, Math.ceil(c.macroStep / c.microStep)) * c.microEvaluationsPerStep;
  const rhsPerSlowUnit = c.noisy ? Math.max(QUIET_RHS_PER_SLOW_UNIT, RESTARTED_STEP_RHS / c.noiseStep) : QUIET_RHS_PER_SLOW_UNIT;
  const envelopePerTick =
    RECONSTRUCTION_COST_PER_POINT * c.points + SLOW_RHS_COST_PER_POINT * c.points * rhsPerSlowUnit * c.eps * c.macroStep;
  return { microPerTick, envelopePerTick };
}

/**
 * The mode to run. 'micro' always gets micro steps. 'envelope' gets the envelope unless it
 * cannot be trusted (small divisor, indicator above the trust limit). 'auto' also demands an
 * estimated error at most `autoError` (AUTO_ERROR by default: as accurate as micro-stepping) and
 * a cost at least PAYOFF times lower. `hysteresis` (< 1) tightens the error bound when
 * switching back. `unavailable` says why the envelope cannot run at all (eps = 0, a field it
 * does not model).
 */
export function chooseIntegrator(
  request: IntegratorRequest,
  eps: number,
  health: EnvelopeHealth | null,
  costs: CostEstimate | null,
  unavailable: string | null,
  hysteresis = 1,
  autoError = AUTO_ERROR,
): IntegratorChoice {
  if (request === 'micro') return { mode: 'micro', reason: 'micro-stepping was requested' };
  if (unavailable || !health || !costs) return { mode: 'micro', reason: `the envelope cannot run: ${unavailable ?? 'no health figures'}` };
  const trouble = envelopeTrouble(health, eps);
  if (trouble) return { mode: 'micro', reason: `the envelope is not trusted here: ${trouble}` };
  const divisor =
    health.smallestDivisor === null
      ? 'no carried harmonic'
      : `smallest divisor ${(health.smallestDivisor / eps).toPrecision(3)} eps at ${health.harmonic}`;
  const figures = `${divisor}, indicator ${health.indicator.toExponential(2)}, estimated error ${health.estimatedError.toExponential(2)}`;
  if (request === 'envelope') return { mode: 'envelope', reason: `the envelope was requested and is trusted (${figures})` };
  if (health.estimatedError > autoError * hysteresis) {
    return {
      mode: 'micro',
      reason: `micro-stepping is more accurate here: the envelope's estimated error ${health.estimatedError.toExponential(2)} is above ${autoError * hysteresis}`,
    };
  }
  const ratio = costs.microPerTick / costs.envelopePerTick;
  if (ratio < PAYOFF) {
    return {
      mode: 'micro',
      reason: `micro-stepping is about as cheap (${Math.round(costs.microPerTick)} against about ${Math.round(costs.envelopePerTick)} field evaluations per tick)`,
    };
  }
  return {
    mode: 'envelope',
    reason: `the envelope is valid (${figures}) and about ${ratio.toPrecision(2)} times cheaper than micro-stepping`,
  };
}
