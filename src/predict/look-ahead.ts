/**
 * Where the guiding system goes from a given state: integrate a private copy forward in slow
 * time (Dormand-Prince 5(4)) and, whenever the flow has nearly stopped in a co-rotating frame,
 * try Newton from there; the first stable locked state found is the destination. A state that
 * never settles within the time or evaluation budget is reported as not settled (unlocked, or
 * locking more slowly than the budget allows).
 *
 * On the way the neighbour phase differences of the starting state's carrying mode are
 * unwrapped (phase-excursion.ts), sampled often enough that none can move by pi unseen, so the
 * result says whether the way there passes through a cycle slip, as the soak verdicts define it.
 */
import { DormandPrince } from '../integrate/dormand-prince.js';
import type { GuideModel } from './guide-model.js';
import { activePhaseGenerators, applyPhaseGenerator } from './phase-orbits.js';
import { lockedStateStability, solveLockedState, type LockedStability, type LockedState } from './locked-state.js';
import { accumulateExcursion, SLIP_EXCURSION } from '../observe/phase-excursion.js';
import { carryingMode } from '../observe/amplitudes.js';
import { CoupledPairs } from '../observe/coupled-pairs.js';
import { wrapAngle } from '../util/angles.js';
import { dot, squaredNorm } from '../util/linear-algebra.js';
import { LOCK_TOLERANCE } from '../observe/lock-detector.js';

export interface LookAheadOptions {
  /** Longest look-ahead in slow time; default 400 coupling relaxation times (see couplingRate). */
  maxSlowTime?: number;
  /** Largest number of field evaluations; default 40000. */
  maxEvaluations?: number;
  /**
   * Distance (rad, every watched phase difference) within which the way counts as arrived at the
   * destination, for the transit time; default LOCK_TOLERANCE, the session's default lock tolerance.
   */
  arrivalTolerance?: number;
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
  /** Largest total move of a coupled pair's phase difference (carrying mode of the start), radians. */
  maxPhaseExcursion: number;
  /** maxPhaseExcursion reached pi: a cycle slip on the way. */
  slipped: boolean;
  /**
   * Slow time from the start after which every watched phase difference stays within the
   * arrival tolerance of the destination's; null when it did not settle. Resolved to the
   * watch's sampling (at least eight samples per coupling time).
   */
  transitSlowTime: number | null;
}

/** The fastest phase-coupling rate (see GuideModel.couplingRate). */
export function couplingRate(model: GuideModel): number {
  return model.couplingRate();
}

/** Relative size of the flow left after the best common rotation per generator is taken out. */
function rotatingSpeed(model: GuideModel, y: Float64Array, velocity: Float64Array, scratch: Float64Array): number {
  const modes = model.modes;
  model.field(y, velocity);
  const total = squaredNorm(y);
  for (const g of activePhaseGenerators(y, modes, model.parts())) {
    applyPhaseGenerator(g, modes, y, scratch);
    const size = squaredNorm(scratch);
    const rate = size > 0 ? dot(scratch, velocity) / size : 0;
    for (let i = 0; i < y.length; i++) velocity[i] -= rate * scratch[i];
  }
  return Math.sqrt(squaredNorm(velocity) / Math.max(total, 1e-300));
}

/**
 * Largest share of a turn a neighbour phase difference may move between two samples, judged
 * from its rate at the last sample; and at least this many samples per coupling time, because
 * the rate can jump (a node whose amplitude dips turns its phase fast).
 */
const SAMPLE_TURN = 1 / 8;
const SAMPLES_PER_CHUNK = 8;

/**
 * Phase differences of the coupled pairs (coupled-pairs.ts) of one mode and the fastest rate at
 * which any of them changes, from the state and its velocity (a = x - i y, so
 * arg' = (y x' - x y') / |a|^2): the lock detector's differences, so that a slip here is a slip
 * there.
 */
class PhaseDifferenceWatch {
  private readonly last: Float64Array;
  private readonly offsets: Float64Array;
  private readonly phase: Float64Array;
  private readonly rate: Float64Array;
  private largest = 0;

  constructor(
    readonly pairs: CoupledPairs,
    private readonly nodes: number,
    private readonly modes: number,
    readonly mode: number,
  ) {
    this.last = new Float64Array(pairs.size);
    this.offsets = new Float64Array(pairs.size);
    this.phase = new Float64Array(nodes);
    this.rate = new Float64Array(nodes);
  }

  /** Reads the phases and their rates; returns the fastest pair-difference rate. */
  read(y: Float64Array, velocity: Float64Array): number {
    const { nodes, modes, mode, phase, rate } = this;
    for (let k = 0; k < nodes; k++) {
      const i = 2 * (k * modes + mode);
      const x = y[i],
        v = y[i + 1];
      phase[k] = Math.atan2(-v, x);
      rate[k] = (v * velocity[i] - x * velocity[i + 1]) / Math.max(x * x + v * v, 1e-300);
    }
    const ends = this.pairs.ends;
    let fastest = 0;
    for (let p = 0; p < this.pairs.size; p++) fastest = Math.max(fastest, Math.abs(rate[ends[2 * p + 1]] - rate[ends[2 * p]]));
    return fastest;
  }

  differences(out: Float64Array): Float64Array {
    const { phase } = this;
    const ends = this.pairs.ends;
    for (let p = 0; p < this.pairs.size; p++) out[p] = wrapAngle(phase[ends[2 * p + 1]] - phase[ends[2 * p]]);
    return out;
  }

  /** Takes the differences just read as where the excursions are measured from; returns a copy of them. */
  begin(): Float64Array {
    return Float64Array.from(this.differences(this.last));
  }

  /** Unwraps the differences just read (written to `out`) onto the running excursions, keeping the largest. */
  accumulate(out: Float64Array): void {
    this.largest = Math.max(this.largest, accumulateExcursion(this.last, this.offsets, this.differences(out), this.pairs.watched));
  }

  /** Largest total move of a watched difference so far (rad). */
  get maxExcursion(): number {
    return this.largest;
  }
}

/** The last sample time after which every sample stays within `tolerance` of `destination` (wrapped). */
function arrivalTime(times: readonly number[], samples: readonly Float64Array[], destination: Float64Array, tolerance: number): number {
  let arrival = 0;
  for (let i = samples.length - 1; i >= 0; i--) {
    const s = samples[i];
    let far = false;
    for (let k = 0; k < s.length && !far; k++) far = Math.abs(wrapAngle(s[k] - destination[k])) > tolerance;
    if (far) {
      arrival = i + 1 < times.length ? times[i + 1] : times[i];
      break;
    }
  }
  return arrival;
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
  const { nodes, modes } = model.params;
  const pairs = new CoupledPairs(model.params);
  const watch = new PhaseDifferenceWatch(pairs, nodes, modes, carryingMode(start, nodes, modes));
  const differences = new Float64Array(pairs.size);
  const arrivalTolerance = options.arrivalTolerance ?? LOCK_TOLERANCE;
  // the watched differences over time, for the transit time once the destination is known
  const sampleTimes: number[] = [];
  const samples: Float64Array[] = [];
  let t = 0;
  /** Field evaluations beside the integrator's: the slip watch's readings and the Newton probes. */
  let ownEvaluations = 0;
  const spent = (): number => solver.evaluations + ownEvaluations;
  /** Reads phases and their rates at y; returns the time to the next sample. */
  const look = (): number => {
    model.field(y, velocity);
    ownEvaluations++;
    const fastest = watch.read(y, velocity);
    return Math.min(chunk / SAMPLES_PER_CHUNK, fastest > 0 ? (2 * Math.PI * SAMPLE_TURN) / fastest : chunk);
  };
  /** One watched sample: unwraps the differences and returns the time to the next sample. */
  const sample = (): number => {
    const next = look();
    watch.accumulate(differences);
    sampleTimes.push(t);
    samples.push(Float64Array.from(differences));
    return next;
  };
  const result = (
    settled: boolean,
    state: Float64Array,
    locked: LockedState | null,
    stability: LockedStability | null,
  ): LookAheadResult => ({
    settled,
    slowTime: t,
    evaluations: spent(),
    state,
    locked,
    stability,
    maxPhaseExcursion: watch.maxExcursion,
    slipped: watch.maxExcursion >= SLIP_EXCURSION,
    transitSlowTime: settled ? arrivalTime(sampleTimes, samples, pairs.stateDifferences(state, modes, watch.mode), arrivalTolerance) : null,
  });
  let interval = look();
  sampleTimes.push(0);
  samples.push(watch.begin());
  while (t < maxSlowTime && spent() < maxEvaluations) {
    const end = t + chunk;
    let failed = false;
    while (t < end && spent() < maxEvaluations) {
      const next = Math.min(end, t + interval);
      if (!solver.integrate(t, next, y)) {
        failed = true;
        break;
      }
      t = next;
      interval = sample();
    }
    if (failed || t < end) break;
    if (rotatingSpeed(model, y, velocity, scratch) > 1e-2 * rate) continue;
    const locked = solveLockedState(model.field, y, model.modes, { parts, maxIterations: 12 });
    ownEvaluations += 2 * n * (locked.iterations + 1);
    if (!locked.converged) continue;
    const stability = lockedStateStability(model.field, locked, model.modes, model.accuracy);
    ownEvaluations += 2 * n;
    if (stability.verdict === 'stable') return result(true, locked.state, locked, stability);
  }
  return result(false, y, null, null);
}
