import type { ModelParameters } from '../model/parameters.js';
import { SlowField } from '../model/slow-field.js';
import { FittedAdamsScheme, fittedStabilityProblem, fittedStructure, type FittedStructure } from './fitted-adams.js';
import type { FittedWeights } from './fitted-weights.js';
import { Rk4Scheme } from './rk4-scheme.js';

/** 'auto' takes the fitted method wherever it applies (see fittedAdamsProblem in fitted-adams.ts), RK4 otherwise. */
export type MicroMethod = 'auto' | 'rk4' | 'fitted-adams';

export interface MicroStepperOptions {
  method?: MicroMethod;
}

/**
 * Full-system integrator on the rotating-frame system y' = eps f(y, omega tau). The carrier
 * e^{i omega tau} is carried exactly by the frame, so the linear oscillation has no numerical
 * damping at all (with eps = 0 the state does not change by a single bit); the numerical method
 * only sees the O(eps) slow field. Two methods, both stepping `stepsPerPeriod` equal steps per
 * carrier period of the fastest mode:
 *
 * - 'rk4': classic Runge-Kutta, nominal order 4, four evaluations per step; its error per
 *   unit tau is O(eps h^4) with a constant set by the field's fast harmonics (up to 4 omega).
 * - 'fitted-adams': trigonometrically fitted 11-step Adams-Bashforth method, one evaluation per
 *   step, exact on the drift and on the carrier harmonics 2 and 4 with their slow modulation
 *   (amplitude drift, beat of two close modes). Nominal order 11 as h -> 0, where it becomes the
 *   classical Adams-Bashforth method; in its working range (5 to 64 steps per period, not 6 or
 *   8) the error is set by what the fitted space leaves out, not by a power of h: O(eps^2) at a
 *   fixed slow time eps tau, against O(eps) for RK4. Each `advance` rebuilds its sample history
 *   from the state alone (30 extra evaluations), so it depends on nothing from earlier calls.
 *
 * 'auto' (the default) picks 'fitted-adams' when it applies to the nominal step and RK4
 * otherwise. An advance whose step the fitted method cannot take (a short final span, or
 * parameters changed beyond its stability limit) is done by RK4 with each step split so that
 * RK4 takes at least 16 steps per period. The angles at the step times come from a rotation
 * recurrence, recomputed exactly at the start of every `advance` and every 1024 steps.
 */
export class MicroStepper {
  readonly field: SlowField;
  /** Rotating-frame state [u, v] per node and mode. */
  readonly state: Float64Array;
  /** Nominal micro step (2 pi / (stepsPerPeriod * max omega)). */
  readonly nominalStep: number;
  /** Right-hand-side evaluations so far (four per RK4 step, one per fitted step plus history rebuilds). */
  evaluations = 0;
  /** The method this stepper uses for its nominal step. */
  readonly method: 'rk4' | 'fitted-adams';
  /** Steps taken by each method so far. */
  readonly stepsBy = { rk4: 0, 'fitted-adams': 0 };

  /** The time of `state`; moved only by advance and restore. */
  private clock = 0;
  /** Carrier period of the fastest mode. */
  private readonly period: number;
  private readonly rk4: Rk4Scheme;
  private readonly fitted: FittedAdamsScheme | null;
  /** The fitted method's structure check and weights for the last step seen (they cost ~0.5 ms). */
  private checkedStep = Number.NaN;
  private checked: FittedStructure | null = null;

  constructor(
    readonly params: ModelParameters,
    initial: Float64Array,
    stepsPerPeriod: number,
    options: MicroStepperOptions = {},
  ) {
    const size = 2 * params.nodes * params.modes;
    if (initial.length !== size) {
      throw new Error(
        `MicroStepper: initial state has ${initial.length} numbers, expected ${size} (2 x ${params.nodes} nodes x ${params.modes} modes)`,
      );
    }
    if (!(Number.isFinite(stepsPerPeriod) && stepsPerPeriod > 0)) {
      throw new Error(`MicroStepper: stepsPerPeriod must be a positive number (got ${stepsPerPeriod})`);
    }
    this.field = new SlowField(params);
    this.state = Float64Array.from(initial);
    this.period = (2 * Math.PI) / Math.max(...params.omega);
    this.nominalStep = this.period / stepsPerPeriod;
    this.rk4 = new Rk4Scheme(this.field);
    const requested = options.method ?? 'auto';
    if (requested !== 'auto' && requested !== 'rk4' && requested !== 'fitted-adams') {
      throw new Error(`MicroStepper: unknown method '${String(requested)}' (expected 'auto', 'rk4' or 'fitted-adams')`);
    }
    const structure = requested === 'rk4' ? null : fittedStructure(params, this.nominalStep);
    const problem = structure
      ? (structure.problem ?? fittedStabilityProblem(params, this.nominalStep, structure.weightNorm))
      : 'RK4 was requested';
    this.checked = structure;
    this.checkedStep = this.nominalStep;
    if (requested === 'fitted-adams' && problem) {
      throw new Error(`MicroStepper: the fitted Adams method cannot run at ${stepsPerPeriod} steps per period: ${problem}`);
    }
    this.method = problem ? 'rk4' : 'fitted-adams';
    this.fitted = problem ? null : new FittedAdamsScheme(params, this.field);
  }

  /** The time of `state`. */
  get tau(): number {
    return this.clock;
  }

  /**
   * Continue from `state` at `tau` (a checkpoint, an undone tick, a hand-over from the envelope).
   * Nothing else needs resetting: every advance rebuilds its history and angles from these two.
   */
  restore(state: ArrayLike<number>, tau: number): void {
    if (state.length !== this.state.length) {
      throw new RangeError(`MicroStepper.restore: the state has ${state.length} numbers, expected ${this.state.length}`);
    }
    this.state.set(state);
    this.clock = tau;
  }

  /** Number of equal micro steps `advance` will take to reach tauEnd. */
  stepsTo(tauEnd: number): number {
    // The relative slack absorbs rounding in tauEnd - tau when tau is large.
    return Math.max(1, Math.ceil(((tauEnd - this.clock) / this.nominalStep) * (1 - 1e-10)));
  }

  /** Integrate to tauEnd (> tau) in equal steps no longer than the nominal step. */
  advance(tauEnd: number): void {
    const span = tauEnd - this.clock;
    if (!(span > 0)) return;
    let steps = this.stepsTo(tauEnd);
    const fitted = this.fitted;
    if (fitted) {
      const h = span / steps;
      const weights = this.fittedWeightsFor(h);
      if (weights) {
        this.evaluations += fitted.run(this.state, this.clock, tauEnd, steps, weights);
        this.stepsBy['fitted-adams'] += steps;
        this.clock = tauEnd;
        return;
      }
      // A step the fitted method cannot take: RK4 stands in, refined so that it is not the
      // weak link (the nominal fitted step can be as coarse as 5 per period).
      steps *= Math.max(1, Math.ceil((FALLBACK_RK4_STEPS * h) / this.period - 1e-9));
    }
    this.evaluations += this.rk4.run(this.state, this.clock, tauEnd, steps);
    this.stepsBy.rk4 += steps;
    this.clock = tauEnd;
  }

  /** The fitted weights for step h if the fitted method can take it under the current parameters. */
  private fittedWeightsFor(h: number): FittedWeights | null {
    // Spans of equal macro ticks differ in their last bits. The weights are computed for h
    // rounded to 12 significant digits (a relative change below 1e-12, far under the method's
    // error), so they depend only on the step of this advance, never on which step happened to
    // be seen first: a session restored from a checkpoint computes exactly the same weights.
    const canonical = Number(h.toPrecision(12));
    if (canonical !== this.checkedStep) {
      this.checked = fittedStructure(this.params, canonical);
      this.checkedStep = canonical;
    }
    const checked = this.checked!;
    if (!checked.weights) return null;
    // Parameters may have changed since the last check (stronger coupling, larger detuning).
    return fittedStabilityProblem(this.params, canonical, checked.weightNorm) === null ? checked.weights : null;
  }
}

/** RK4 steps per period at least, when RK4 stands in for the fitted method. */
const FALLBACK_RK4_STEPS = 16;
