/**
 * Where the guiding system goes from a given state: integrate a private copy forward in slow
 * time (Dormand-Prince 5(4)) and, whenever the flow has nearly stopped in a co-rotating frame,
 * try Newton from there; the first stable locked state found is the destination. A state that
 * never settles within the time or evaluation budget is reported as not settled (unlocked, or
 * locking more slowly than the budget allows).
 */
import { DormandPrince } from '../integrate/dormand-prince.js';
import type { GuideModel } from './guide-model.js';
import { activePhaseGenerators, applyPhaseGenerator } from './phase-orbits.js';
import { lockedStateStability, solveLockedState, type LockedStability, type LockedState } from './locked-state.js';

export interface LookAheadOptions {
  /** Longest look-ahead in slow time; default 400 coupling relaxation times (see couplingRate). */
  maxSlowTime?: number;
  /** Largest number of field evaluations; default 40000. */
  maxEvaluations?: number;
}

export interface LookAheadResult {
  settled: boolean;
  /** Slow time integrated. */
  slowTime: number;
  evaluations: number;
  /** The last state reached (the destination itself when settled). */
  state: Float64Array;
  locked: LockedState | null;
  stability: LockedStability | null;
}

/** The fastest phase-coupling rate (see GuideModel.couplingRate). */
export function couplingRate(model: GuideModel): number {
  return model.couplingRate();
}

/** Relative size of the flow left after the best common rotation per generator is taken out. */
function rotatingSpeed(model: GuideModel, y: Float64Array, velocity: Float64Array, scratch: Float64Array): number {
  const modes = model.modes;
  model.field(y, velocity);
  let total = 0;
  for (let i = 0; i < y.length; i++) total += y[i] * y[i];
  for (const g of activePhaseGenerators(y, modes, model.parts())) {
    applyPhaseGenerator(g, modes, y, scratch);
    let along = 0;
    let size = 0;
    for (let i = 0; i < y.length; i++) {
      along += scratch[i] * velocity[i];
      size += scratch[i] * scratch[i];
    }
    const rate = size > 0 ? along / size : 0;
    for (let i = 0; i < y.length; i++) velocity[i] -= rate * scratch[i];
  }
  let speed = 0;
  for (let i = 0; i < y.length; i++) speed += velocity[i] * velocity[i];
  return Math.sqrt(speed / Math.max(total, 1e-300));
}

/** Follows the guiding system from `start` until it settles on a stable locked state (see the module header). */
export function lookAhead(model: GuideModel, start: Float64Array, options: LookAheadOptions = {}): LookAheadResult {
  const n = start.length;
  const rate = Math.max(couplingRate(model), 1e-3);
  const maxSlowTime = options.maxSlowTime ?? 400 / rate;
  const maxEvaluations = options.maxEvaluations ?? 40_000;
  const chunk = Math.min(maxSlowTime, 1 / rate);
  const y = Float64Array.from(start);
  const solver = new DormandPrince(n, (_t, state, dy) => model.field(state, dy), { rtol: 1e-7, atol: 1e-9, maxSteps: 20_000 });
  const velocity = new Float64Array(n);
  const scratch = new Float64Array(n);
  const parts = model.parts();
  let t = 0;
  let newtonEvaluations = 0;
  const spent = (): number => solver.evaluations + newtonEvaluations;
  while (t < maxSlowTime && spent() < maxEvaluations) {
    if (!solver.integrate(t, t + chunk, y)) break;
    t += chunk;
    if (rotatingSpeed(model, y, velocity, scratch) > 1e-2 * rate) continue;
    const locked = solveLockedState(model.field, y, model.modes, { parts, maxIterations: 12 });
    newtonEvaluations += 2 * n * (locked.iterations + 1);
    if (!locked.converged) continue;
    const stability = lockedStateStability(model.field, locked, model.modes, model.accuracy);
    newtonEvaluations += 2 * n;
    if (stability.verdict === 'stable') return { settled: true, slowTime: t, evaluations: spent(), state: locked.state, locked, stability };
  }
  return { settled: false, slowTime: t, evaluations: spent(), state: y, locked: null, stability: null };
}
