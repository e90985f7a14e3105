/**
 * Live prediction after a perturbation: does the guiding system's current locked pattern persist
 * under the new parameters, with what margin, and if not, what does it become?
 *
 * 1. Persistence: the current locked state is continued (pseudo-arclength, continuation.ts) along
 *    the straight line from the previous parameters (h = 0) to the new ones (h = 1). Reaching
 *    h = 1 with a stable state means the pattern persists, deformed; a fold, Hopf or branch point
 *    on the way means it is lost there (the fraction h says how far the change could have gone).
 *    At h = 1 the state is solved once more with the new graph's connected parts, so a link break
 *    that splits the graph gets its extra phase freedom.
 * 2. Basin: a fault is a jump, so a private copy of the guiding system is also integrated
 *    forward from the actual state under the new parameters (look-ahead.ts). The pattern only
 *    persists when that way passes no cycle slip and does not settle elsewhere; with strong
 *    reactive coupling a jump well inside the locking range can still throw the phases over.
 * 3. Destination: when the pattern is lost (or the state was kicked, or was not locked), the
 *    same look-ahead says where it settles, if it does within its budget.
 * Each result is cached by the new parameter set and the current pattern's label, so toggling a
 * fault back and forth costs nothing the second time. The predictor owns its own parameters and
 * never writes to a session's.
 */
import type { ModelParameters } from '../model/parameters.js';
import type { Scenario } from '../scenario/types.js';
import type { PatternKind } from '../pattern/classify.js';
import { carryingMode, modeAmplitudes } from '../observe/amplitudes.js';
import { CoupledPairs } from '../observe/coupled-pairs.js';
import { GuideModel, copyParameters, parameterFingerprint } from './guide-model.js';
import { homotopy, setParameter, snapshotParameters, type ParameterSnapshot } from './continuation-parameter.js';
import { continueBranch, type LimitKind } from './continuation.js';
import { lockedStateStability, solveLockedState, type LockedStability, type LockedState, type Verdict } from './locked-state.js';
import { describeLockedState, durationOf, type Duration } from './describe.js';
import { wrapAngle } from '../util/angles.js';
import { lookAhead } from './look-ahead.js';
import { sameUpToSymmetry } from './catalogue.js';
import { LOCK_TOLERANCE } from '../observe/lock-detector.js';

export type LiveVerdict = 'persists' | 'lost' | 'marginal' | 'not-locked' | 'unknown';

export interface PatternLabel {
  kind: PatternKind | 'unlocked';
  q?: number;
  mode: number;
  locked: boolean;
}

export interface PredictedPattern {
  kind: PatternKind | 'unlocked';
  q?: number;
  mode: number;
  /** False when the look-ahead did not settle on a locked state within its budget. */
  locked: boolean;
  stability: Verdict | null;
  stable: boolean | null;
  margin: number | null;
  /** e-folding time 1/|margin| of the slowest perturbation (not a settling time). */
  timeConstant: Duration | null;
  /**
   * How long the look-ahead took to arrive within the lock tolerance of this state, from the
   * perturbation; null when no look-ahead reached it (not predicted).
   */
  transit: Duration | null;
  phaseDifferences: number[];
  meanAmplitude: number[];
  frequencyShiftPpm: (number | null)[];
  /** Output frequency against the wanted mode's nominal frequency (ppm), null when unknown. */
  outputOffsetPpm: number | null;
}

/** A type alias rather than an interface, so readers may treat it as a plain record. */
export type LivePrediction = {
  /** tau at which the prediction was made. */
  tau: number;
  verdict: LiveVerdict;
  /** The guide's pattern when the perturbation arrived. */
  current: PatternLabel;
  /** The predicted pattern under the new parameters: the current one continued, or its successor. */
  pattern: PredictedPattern | null;
  /** Margin of the predicted pattern (slow time), null when unknown. */
  margin: number | null;
  /** Where on the way from the previous to the new parameters the current pattern was lost. */
  lostAt: { fraction: number; kind: LimitKind } | null;
  /** The look-ahead from the actual state under the new parameters: how long, whether it settled, whether it slipped a cycle. */
  lookAhead: { slowTime: number; settled: boolean; slipped: boolean; maxPhaseExcursion: number; transitSlowTime: number | null } | null;
  /** Largest move of a coupled pair's phase difference from the state before the perturbation to the predicted one (rad). */
  shift: number | null;
  fromCache: boolean;
  message: string;
};

/** Above this many slow variables no live prediction is made (dense Jacobians, like the session's margin). */
export const LIVE_PREDICTION_SIZE_LIMIT = 160;
/** Predictions kept, the least recently used dropped first: bounds the memory; toggling a few faults back and forth needs two entries each. */
const CACHE_SIZE = 16;
/** Field evaluations the live look-ahead may spend (a few tenths of a second on the demo board). */
const LOOK_AHEAD_EVALUATIONS = 6000;
/** A predicted move of a phase difference below this (rad) is not worth a word in the message. */
const MOVE_WORTH_SAYING = 0.005;

// The continuation from the previous parameters (h = 0) to the new ones (h = 1), in h itself
// (the homotopy's scale is 1).
/**
 * Accepted steps at most: the prediction runs inside the session's tick after a perturbation, so
 * its work is bounded; a branch that needs more counts as lost there ('max-steps').
 */
const HOMOTOPY_MAX_STEPS = 80;
/** First step: a quarter of the way, so a change that disturbs nothing reaches h = 1 in a few steps; the continuation cuts the step where its corrector fails. */
const HOMOTOPY_INITIAL_STEP = 0.25;
/** Largest step: half the way. */
const HOMOTOPY_MAX_STEP = 0.5;
/** The branch's last point must sit at h = 1 to this much: the rounding of the continuation's landing on its range end. */
const HOMOTOPY_END_SLACK = 1e-9;
/**
 * Relative distance below which the look-ahead's destination and the continued state count as one
 * state. Both are Newton solutions, so one state found twice agrees far closer; distinct locked
 * states differ at order one (neighbouring twisted states by 2 pi / N in a phase difference).
 */
const SAME_STATE = 1e-3;

export interface LivePredictorState {
  previous: { detuning: number[]; linkWeight: number[]; strength: number; reactive: number; dissipative: number };
  cache: [string, LivePrediction][];
}

const labelText = (l: PatternLabel): string => `${l.locked ? l.kind : 'unlocked'}:${l.q ?? ''}:${l.mode}`;

export class LivePredictor {
  private readonly model: GuideModel;
  private previous: ParameterSnapshot;
  private readonly cache = new Map<string, LivePrediction>();

  /**
   * @param arrivalTolerance the lock tolerance (rad): the look-ahead has arrived once every phase
   *   difference stays this close to its destination, as the lock detector settles
   */
  constructor(
    scenario: Scenario,
    params: ModelParameters,
    private readonly arrivalTolerance = LOCK_TOLERANCE,
  ) {
    this.model = new GuideModel(scenario, params);
    this.previous = snapshotParameters(params);
  }

  /** The parameters the next prediction starts from (set after each prediction). */
  rememberParameters(params: ModelParameters): void {
    this.previous = snapshotParameters(params);
  }

  /**
   * Prediction for the guiding system under `params` (the new parameters), given the pattern it
   * was in: `before` is its state just before the perturbation (at rest on that pattern under the
   * previous parameters, the start of the continuation), `state` the state just after it (where
   * the look-ahead starts; different from `before` when the state itself was kicked). Kicked
   * results depend on the kick, so they are not cached.
   */
  predict(
    params: ModelParameters,
    before: Float64Array,
    state: Float64Array,
    current: PatternLabel,
    tau: number,
    kicked = false,
  ): LivePrediction {
    const from = this.previous;
    const to = snapshotParameters(params);
    this.previous = to;
    const key = `${parameterFingerprint(params)}|${labelText(current)}`;
    const cached = kicked ? undefined : this.cache.get(key);
    if (cached) {
      this.cache.delete(key);
      this.cache.set(key, cached);
      return { ...cached, tau, fromCache: true };
    }
    const prediction = this.compute(params, from, to, before, state, current, tau);
    if (!kicked) {
      this.cache.set(key, prediction);
      if (this.cache.size > CACHE_SIZE) this.cache.delete(this.cache.keys().next().value!);
    }
    return prediction;
  }

  save(): LivePredictorState {
    const p = this.previous;
    return {
      previous: {
        detuning: Array.from(p.detuning),
        linkWeight: Array.from(p.linkWeight),
        strength: p.strength,
        reactive: p.reactive,
        dissipative: p.dissipative,
      },
      cache: [...this.cache.entries()].map(([k, v]) => [k, structuredClone(v)]),
    };
  }

  load(saved: LivePredictorState): void {
    const p = saved.previous;
    this.previous = {
      detuning: Float64Array.from(p.detuning),
      linkWeight: Float64Array.from(p.linkWeight),
      strength: p.strength,
      reactive: p.reactive,
      dissipative: p.dissipative,
    };
    this.cache.clear();
    for (const [k, v] of saved.cache) this.cache.set(k, structuredClone(v));
  }

  private compute(
    params: ModelParameters,
    from: ParameterSnapshot,
    to: ParameterSnapshot,
    before: Float64Array,
    state: Float64Array,
    current: PatternLabel,
    tau: number,
  ): LivePrediction {
    const model = this.model;
    const base = { tau, current, lostAt: null, lookAhead: null, shift: null, fromCache: false };
    if (model.size > LIVE_PREDICTION_SIZE_LIMIT) {
      return {
        ...base,
        verdict: 'unknown',
        pattern: null,
        margin: null,
        message: `not predicted: ${model.size} slow variables is above the live limit of ${LIVE_PREDICTION_SIZE_LIMIT}`,
      };
    }
    copyParameters(params, model.params);
    let lostAt: LivePrediction['lostAt'] = null;
    let continued: { locked: LockedState; stability: LockedStability } | null = null;
    if (current.locked) {
      const outcome = this.continueToNewParameters(from, to, before);
      if (outcome.kind === 'reached' && outcome.stability.verdict === 'marginal') {
        const pattern = this.predictedPattern(outcome.locked, outcome.stability, null);
        const message = `the ${describeLabel(current)} pattern continues but its stability is not resolved (|margin| <= ${outcome.stability.tolerance.toPrecision(2)})`;
        return {
          ...base,
          verdict: 'marginal',
          pattern,
          margin: pattern.margin,
          shift: largestShift(before, outcome.locked.state, model, current.mode),
          message,
        };
      }
      if (outcome.kind === 'reached' && outcome.stability.verdict === 'stable') continued = outcome;
      else
        lostAt = outcome.kind === 'reached' ? { fraction: 1, kind: 'branch-point' } : { fraction: outcome.fraction, kind: outcome.limit };
    }
    // The way there: a fault is a jump, so the continued state existing and being stable is not
    // enough; the state the ring is actually in must also lie in its basin (no cycle slip on the
    // way, no other destination). The look-ahead judges with the lock detector's definitions:
    // a slip is a move of pi, and arrival is within the lock tolerance.
    copyParameters(params, model.params);
    const ahead = lookAhead(model, state, { maxEvaluations: LOOK_AHEAD_EVALUATIONS, arrivalTolerance: this.arrivalTolerance });
    const lookAheadInfo = {
      slowTime: ahead.slowTime,
      settled: ahead.settled,
      slipped: ahead.slipped,
      maxPhaseExcursion: ahead.maxPhaseExcursion,
      transitSlowTime: ahead.transitSlowTime,
    };
    const settledOn = ahead.settled && ahead.locked && ahead.stability ? ahead.locked : null;
    if (continued) {
      const elsewhere =
        settledOn !== null &&
        !sameUpToSymmetry(
          settledOn.state,
          continued.locked.state,
          [identity(model.nodes)],
          model.nodes,
          model.modes,
          model.parts(),
          SAME_STATE,
        );
      if (!ahead.slipped && !elsewhere) {
        // Settled on the continued state, or still on the way within the budget without a slip.
        const pattern = this.predictedPattern(continued.locked, continued.stability, settledOn ? ahead.transitSlowTime : null);
        const shift = largestShift(before, continued.locked.state, model, current.mode);
        const moving = shift >= MOVE_WORTH_SAYING ? `, moving ${shift.toFixed(2)} rad to its continued state` : '';
        const arrival = settledOn
          ? `; the look-ahead arrives within ${this.arrivalTolerance} rad after ${ahead.transitSlowTime!.toPrecision(3)} slow time units`
          : `; no cycle slip in the ${ahead.slowTime.toPrecision(3)} slow time units looked ahead, not yet settled`;
        const message = `the ${describeLabel(current)} pattern persists${moving}${arrival} (margin ${continued.stability.margin.toPrecision(3)} in slow time)`;
        return { ...base, verdict: 'persists', pattern, margin: pattern.margin, lookAhead: lookAheadInfo, shift, message };
      }
    }
    const pattern = settledOn
      ? this.predictedPattern(settledOn, ahead.stability!, ahead.transitSlowTime)
      : this.unsettledPattern(ahead.state);
    const becomes = settledOn
      ? `becomes ${describeLabel(pattern)} after about ${ahead.transitSlowTime!.toPrecision(3)} slow time units (margin ${pattern.margin?.toPrecision(3)})`
      : `does not settle within ${ahead.slowTime.toPrecision(3)} slow time units (predicted unlocked)`;
    const shift = settledOn ? largestShift(before, settledOn.state, model, current.mode) : null;
    if (!current.locked) {
      return {
        ...base,
        verdict: 'not-locked',
        pattern,
        margin: pattern.margin,
        lookAhead: lookAheadInfo,
        shift,
        message: `the guide was not locked; it ${becomes}`,
      };
    }
    const slip = ahead.slipped ? ` with a cycle slip (a phase difference moves ${ahead.maxPhaseExcursion.toFixed(2)} rad)` : '';
    if (continued) {
      const why = ahead.slipped ? 'the jump throws the phases out of its basin' : 'the jump carries the state into another basin';
      return {
        ...base,
        verdict: 'lost',
        pattern,
        margin: pattern.margin,
        lookAhead: lookAheadInfo,
        shift,
        message: `the ${describeLabel(current)} pattern is lost although it still exists and is stable under the new parameters: ${why}${slip}; it ${becomes}`,
      };
    }
    const same = settledOn !== null && pattern.kind === current.kind && pattern.q === current.q && pattern.mode === current.mode;
    if (same && !ahead.slipped) {
      // The continuation could not carry it, but the guiding system returns to the same pattern
      // without a slip.
      return {
        ...base,
        verdict: 'persists',
        pattern,
        margin: pattern.margin,
        lookAhead: lookAheadInfo,
        shift,
        message: `the ${describeLabel(current)} pattern returns without a cycle slip (margin ${pattern.margin?.toPrecision(3)})`,
      };
    }
    const where = lostAt && lostAt.fraction < 1 ? ` at ${(100 * lostAt.fraction).toFixed(1)}% of the change (${lostAt.kind})` : '';
    return {
      ...base,
      verdict: 'lost',
      pattern,
      margin: pattern.margin,
      lostAt,
      lookAhead: lookAheadInfo,
      shift,
      message: `the ${describeLabel(current)} pattern is lost${where}${slip}; it ${becomes}`,
    };
  }

  /** Continues the current state from the previous to the new parameters (see the module header). */
  private continueToNewParameters(
    from: ParameterSnapshot,
    to: ParameterSnapshot,
    state: Float64Array,
  ): { kind: 'reached'; locked: LockedState; stability: LockedStability } | { kind: 'lost'; fraction: number; limit: LimitKind } {
    const model = this.model;
    const spec = homotopy(from, to);
    let end: Float64Array = state;
    // a kick (or a noise change) leaves the parameters as they were: nothing to continue along
    if (!sameParameters(from, to))
      try {
        setParameter(model.params, spec, 0);
        // A perturbation is a jump, not a slow ramp: only the existence of the branch up to h = 1
        // matters on the way (folds); stability is judged once, at the end.
        const branch = continueBranch(model, state, spec, {
          directions: ['increasing'],
          range: { max: 1 },
          maxSteps: HOMOTOPY_MAX_STEPS,
          initialStep: HOMOTOPY_INITIAL_STEP,
          maxStep: HOMOTOPY_MAX_STEP,
          keepStates: true,
          monitorStability: false,
        });
        const limit = branch.limits.increasing!;
        if (limit.kind !== 'range') return { kind: 'lost', fraction: Math.min(1, Math.max(0, limit.parameter)), limit: limit.kind };
        const last = branch.points[branch.points.length - 1];
        if (!last.state || Math.abs(last.parameter - 1) > HOMOTOPY_END_SLACK)
          return { kind: 'lost', fraction: last.parameter, limit: 'step-failure' };
        end = Float64Array.from(last.state);
      } catch (error) {
        if (error instanceof RangeError) return { kind: 'lost', fraction: 0, limit: 'step-failure' };
        throw error;
      }
    setParameter(model.params, spec, 1);
    const locked = solveLockedState(model.field, end, model.modes, { parts: model.parts() });
    if (!locked.converged) return { kind: 'lost', fraction: 1, limit: 'step-failure' };
    return { kind: 'reached', locked, stability: lockedStateStability(model.field, locked, model.modes, model.accuracy) };
  }

  private predictedPattern(locked: LockedState, stability: LockedStability, transitSlowTime: number | null): PredictedPattern {
    const d = describeLockedState(this.model, locked, stability, []);
    const pattern: PredictedPattern = {
      kind: d.kind,
      mode: d.mode,
      locked: true,
      stability: d.stability,
      stable: d.stable,
      margin: d.margin,
      timeConstant: d.timeConstant,
      transit: transitSlowTime === null ? null : durationOf(transitSlowTime, this.model),
      phaseDifferences: d.phaseDifferences,
      meanAmplitude: d.meanAmplitude,
      frequencyShiftPpm: d.frequencyShiftPpm,
      outputOffsetPpm: d.outputOffsetPpm,
    };
    if (d.q !== undefined) pattern.q = d.q;
    return pattern;
  }

  private unsettledPattern(state: Float64Array): PredictedPattern {
    const { nodes, modes } = this.model.params;
    const mode = carryingMode(state, nodes, modes);
    const { re, im } = modeAmplitudes(state, nodes, modes, mode);
    const phases = Array.from(re, (r, k) => Math.atan2(im[k], r));
    return {
      kind: 'unlocked',
      mode,
      locked: false,
      stability: null,
      stable: null,
      margin: null,
      timeConstant: null,
      transit: null,
      phaseDifferences: phases.map((p, k) => {
        const d = phases[(k + 1) % nodes] - p;
        return Math.atan2(Math.sin(d), Math.cos(d));
      }),
      meanAmplitude: Array.from({ length: modes }, (_, j) => {
        let s = 0;
        for (let k = 0; k < nodes; k++) s += Math.hypot(state[2 * (k * modes + j)], state[2 * (k * modes + j) + 1]);
        return s / nodes;
      }),
      frequencyShiftPpm: new Array(modes).fill(null),
      outputOffsetPpm: null,
    };
  }
}

function sameParameters(a: ParameterSnapshot, b: ParameterSnapshot): boolean {
  const equal = (x: Float64Array, y: Float64Array) => x.length === y.length && x.every((v, i) => v === y[i]);
  return (
    a.strength === b.strength &&
    a.reactive === b.reactive &&
    a.dissipative === b.dissipative &&
    equal(a.detuning, b.detuning) &&
    equal(a.linkWeight, b.linkWeight)
  );
}

/** Largest |change| of a coupled pair's phase difference of `mode` from one rotating-frame state to another (rad). */
function largestShift(from: Float64Array, to: Float64Array, model: GuideModel, mode: number): number {
  const pairs = new CoupledPairs(model.params);
  const a = pairs.stateDifferences(from, model.modes, mode);
  const b = pairs.stateDifferences(to, model.modes, mode);
  let largest = 0;
  for (let p = 0; p < pairs.size; p++) if (pairs.watched[p]) largest = Math.max(largest, Math.abs(wrapAngle(b[p] - a[p])));
  return largest;
}

function identity(nodes: number): Int32Array {
  return Int32Array.from({ length: nodes }, (_, k) => k);
}

function describeLabel(l: { kind: string; q?: number; mode: number }): string {
  return `${l.kind}${l.q !== undefined ? ` q=${l.q}` : ''} (mode ${l.mode})`;
}
