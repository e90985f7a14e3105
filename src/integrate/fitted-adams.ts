import type { ModelParameters } from '../model/parameters.js';
import { SlowField } from '../model/slow-field.js';
import { CarrierAngles } from './carrier-angles.js';
import { fittedDimension, fittedWeights, type FittedSpace, type FittedWeights } from './fitted-weights.js';

/** Even harmonics of the carrier present in the field (SlowField.HARMONIC_DEGREE = 4). */
const HARMONICS = [2, 4] as const;
/** The largest |2 (omega_1 - omega_0)| * (history span) for which the modulated basis is used. */
const MAX_BEAT_PHASE = 1;
/**
 * Largest eps * h * sum|b_j| * (field stiffness) accepted. The method is explicit; its stability
 * region reaches |eps h lambda| ~ 1 / sum|b_j| to 2 / sum|b_j| (computed from the roots of its
 * characteristic polynomial), so this keeps every plausible eigenvalue well inside.
 */
const MAX_STABILITY_LOAD = 0.2;
/** Fewest steps per carrier period: below five the fitted harmonics alias onto each other. */
export const FITTED_MIN_STEPS = 5;
/** Most steps per carrier period: beyond this the fitted basis is nearly polynomial and ill-conditioned. */
export const FITTED_MAX_STEPS = 64;
/** Picard sweeps of the history rebuild. */
const REBUILD_SWEEPS = 2;
/** A harmonic d * omegaBar * h this close (in cycles) to a whole nonzero number of cycles per step aliases. */
const ALIAS_MARGIN = 0.05;

/** The fitted space for this model at step h (the carrier is the mean of the mode frequencies). */
export function fittedSpaceFor(params: ModelParameters, h: number): FittedSpace {
  const omegaBar = params.omega.reduce((sum, w) => sum + w, 0) / params.modes;
  return { phase: omegaBar * h, harmonics: HARMONICS, modulated: true };
}

/**
 * A crude scale of |df/dy| from the current parameters (a Lipschitz-type estimate, common
 * practice for choosing explicit steps): sustaining gain at the limit-cycle amplitude 2 per mode,
 * losses, detuning, and the coupling through the largest incoming weight.
 */
export function fieldStiffness(params: ModelParameters): number {
  let gain = 0;
  let loss = 0;
  let omega = 0;
  for (let j = 0; j < params.modes; j++) {
    gain = Math.max(gain, Math.abs(params.gain[j]));
    loss = Math.max(loss, Math.abs(params.loss[j]));
    omega = Math.max(omega, params.omega[j]);
  }
  let detuning = 0;
  let weight = 0;
  for (let k = 0; k < params.nodes; k++) {
    detuning = Math.max(detuning, Math.abs(params.detuning[k]));
    weight = Math.max(weight, Math.abs(params.inWeightSum[k]));
  }
  const amplitude = 2 * params.modes;
  const coupling = Math.abs(params.strength) * (Math.abs(params.reactive) / omega + Math.abs(params.dissipative)) * weight;
  return gain * (1 + (3 * amplitude * amplitude) / 4) + loss + 2 * detuning * omega + 2 * coupling;
}

/** The stability problem at step h with sum|b_j| = weightNorm (scaled weights), or null. */
export function fittedStabilityProblem(params: ModelParameters, h: number, weightNorm: number): string | null {
  const load = params.epsilon * h * weightNorm * fieldStiffness(params);
  if (load > MAX_STABILITY_LOAD) {
    return `eps = ${params.epsilon} is too large for this explicit method at this step (eps h sum|b| |df/dy| ~ ${load.toPrecision(3)}, limit ${MAX_STABILITY_LOAD})`;
  }
  return null;
}

/**
 * Why the fitted Adams method cannot take steps of length h on this model, or null if it can.
 * It needs one carrier (one mode, or two modes close enough that their harmonics beat slowly
 * over the sample history), a step count per period at which no harmonic up to 8 (products of
 * the field's degree-4 harmonics, met at second order in eps) aliases onto another, and a small
 * enough eps for an explicit method.
 */
export function fittedAdamsProblem(params: ModelParameters, h: number): string | null {
  const structure = fittedStructure(params, h);
  return structure.problem ?? fittedStabilityProblem(params, h, structure.weightNorm);
}

export interface FittedStructure {
  /** Why the method cannot run at this step whatever the parameters, or null. */
  problem: string | null;
  /** The weights for this step (null with a problem). */
  weights: FittedWeights | null;
  /** sum |b_j| of the scaled step weights. */
  weightNorm: number;
}

/** The checks that do not depend on mutable parameters, and the weights they need. */
export function fittedStructure(params: ModelParameters, h: number): FittedStructure {
  const fail = (problem: string) => ({ problem, weights: null, weightNorm: Number.NaN });
  const m = params.modes;
  if (m > 2) return fail(`it handles one or two modes, not ${m}`);
  if (!(h > 0)) return fail(`the step must be positive (got ${h})`);
  const space = fittedSpaceFor(params, h);
  const k = fittedDimension(space);
  const stepsPerPeriod = (2 * Math.PI) / space.phase;
  if (stepsPerPeriod < FITTED_MIN_STEPS - 1e-9 || stepsPerPeriod > FITTED_MAX_STEPS + 1e-9) {
    return fail(`it needs ${FITTED_MIN_STEPS} to ${FITTED_MAX_STEPS} steps per carrier period (got ${stepsPerPeriod.toFixed(2)})`);
  }
  for (const d of [2, 4, 6, 8]) {
    const cycles = (d * space.phase) / (2 * Math.PI);
    const nearest = Math.round(cycles);
    if (nearest >= 1 && Math.abs(cycles - nearest) < ALIAS_MARGIN) {
      return fail(
        `harmonic ${d} of the carrier advances ${cycles.toFixed(3)} cycles per step and aliases (use 5, 7, 9 or more steps per period, not 6 or 8)`,
      );
    }
  }
  if (m === 2) {
    const beat = 2 * Math.abs(params.omega[1] - params.omega[0]) * (k - 1) * h;
    if (beat > MAX_BEAT_PHASE) {
      return fail(
        `the two mode frequencies are too far apart for one fitted carrier (beat phase ${beat.toFixed(2)} rad over the history, limit ${MAX_BEAT_PHASE})`,
      );
    }
  }
  const weights = fittedWeights(space);
  if (!weights) return fail('its weights cannot be computed accurately at this step (sample times too close to aliasing)');
  return { problem: null, weights, weightNorm: weights.step.reduce((sum, w) => sum + Math.abs(w), 0) };
}

/**
 * Trigonometrically fitted Adams-Bashforth method on the rotating-frame system y' = eps f(y, tau):
 *   y_{n+1} = y_n + eps h sum_{j=0}^{k-1} b_j f(y_{n-j}, tau_{n-j}),   k = 11,
 * with weights that integrate exactly the functions of fitted-weights.ts (drift up to degree 2,
 * the carrier harmonics 2 and 4 and their linear modulation). One field evaluation per step.
 * The error is set by the parts of f(y(tau), tau) outside that space: the modulation of the
 * harmonics beyond linear order over the history (amplitude drift, the beat of two close modes)
 * and the harmonics up to 8 that the cubic nonlinearity makes at second order in eps.
 *
 * Every `run` starts from the state alone: the k - 1 past samples are rebuilt for the present
 * state by a backward collocation (first guess y(tau0 - j h) = y, then two Picard sweeps), which
 * costs 3k - 2 = 31 evaluations, the first step's included. So a run depends on nothing but
 * (y, tau0, tauEnd, steps, weights) and the parameters, exactly like a one-step method: noise
 * kicks, perturbations, undone steps and restored checkpoints between runs need no care.
 */
export class FittedAdamsScheme {
  readonly field: SlowField;
  readonly angles: CarrierAngles;
  private readonly size: number;
  private readonly k: number;
  /** eps * h * b_j, newest sample first. */
  private readonly stepWeights: Float64Array;
  /** Ring buffer of k samples, slot-major, and one view per slot (made once: stepping allocates nothing). */
  private readonly history: Float64Array;
  private readonly slots: Float64Array[];
  private readonly offsets: Int32Array;
  private readonly trial: Float64Array;
  /** First-guess samples of the history rebuild, one view per past time. */
  private readonly guesses: Float64Array;
  private readonly guessSlots: Float64Array[];
  private readonly guessOffsets: Int32Array;
  private readonly rowWeights: Float64Array;
  private readonly cosPast: Float64Array;
  private readonly sinPast: Float64Array;

  constructor(
    readonly params: ModelParameters,
    field?: SlowField,
  ) {
    this.field = field ?? new SlowField(params);
    this.angles = new CarrierAngles(params.omega);
    const size = 2 * params.nodes * params.modes;
    const k = fittedDimension({ phase: 1, harmonics: HARMONICS, modulated: true });
    this.size = size;
    this.k = k;
    this.stepWeights = new Float64Array(k);
    this.history = new Float64Array(k * size);
    this.slots = Array.from({ length: k }, (_, slot) => this.history.subarray(slot * size, (slot + 1) * size));
    this.offsets = new Int32Array(k);
    this.trial = new Float64Array(size);
    this.guesses = new Float64Array(k * size);
    this.guessSlots = Array.from({ length: k }, (_, j) => this.guesses.subarray(j * size, (j + 1) * size));
    this.guessOffsets = new Int32Array(k);
    this.rowWeights = new Float64Array(k);
    this.cosPast = new Float64Array(params.modes);
    this.sinPast = new Float64Array(params.modes);
  }

  /** Samples in the history (k). */
  get historyLength(): number {
    return this.k;
  }

  /** Evaluations of one history rebuild (k first guesses, k - 1 per Picard sweep); it also supplies the first step's. */
  get rebuildEvaluations(): number {
    return this.k + REBUILD_SWEEPS * (this.k - 1);
  }

  /**
   * `steps` equal steps from tau0 to tauEnd, updating y in place, with weights from
   * fittedStructure for (very nearly) this step; returns the evaluations used.
   */
  run(y: Float64Array, tau0: number, tauEnd: number, steps: number, weights: FittedWeights): number {
    const h = (tauEnd - tau0) / steps;
    if (weights.size !== this.k) throw new Error(`fitted Adams: weights for ${weights.size} samples, expected ${this.k}`);
    const eps = this.params.epsilon;
    for (let j = 0; j < this.k; j++) this.stepWeights[j] = eps * h * weights.step[j];
    const { field, angles, size, offsets, slots, history, stepWeights } = this;
    const k = this.k;
    // parameters change only between runs: one snapshot for the whole run (SlowField.prepare)
    field.prepare();
    let head = this.rebuildHistory(y, tau0, h, weights.back);
    let evaluations = this.rebuildEvaluations;
    angles.setStep(h);
    angles.reset(tau0);
    for (let step = 0; step < steps; step++) {
      if (step > 0) {
        // The newest sample of the first step came with the rebuilt history.
        head = head + 1 === k ? 0 : head + 1;
        field.evaluatePrepared(angles.cos, angles.sin, y, slots[head]);
        evaluations++;
      }
      for (let j = 0, slot = head; j < k; j++, slot = slot === 0 ? k - 1 : slot - 1) offsets[j] = slot * size;
      if (k === 11) addWeightedSum11(y, history, offsets, stepWeights, size);
      else addWeightedSum(y, history, offsets, stepWeights, size, k);
      if ((step + 1) % CarrierAngles.RESEED_STEPS === 0) angles.reset(tau0 + (step + 1) * h);
      else angles.advance();
    }
    return evaluations;
  }

  /**
   * Samples f(y(tau0 - j h), tau0 - j h), j = 0..k-1, of the trajectory through (tau0, y): first
   * guess y(tau0 - j h) = y, then Picard sweeps y(tau0 - j h) = y - eps h sum_i back_ji f_i.
   * Each sweep gains a factor of about eps h k |df/dy|; two make the rebuilt history as good as
   * a continued one (measured: chunking a run into one-period advances then changes the result
   * by less than 1 % of the method's own error at eps = 1e-3, by 1e-16 at 1e-5).
   * Sample j goes to slot (k - j) mod k; returns the slot of the newest (j = 0).
   */
  private rebuildHistory(y: Float64Array, tau0: number, h: number, back: Float64Array[]): number {
    const { field, size, guesses, guessSlots, guessOffsets, rowWeights, trial, slots, params } = this;
    const k = this.k;
    const scale = params.epsilon * h;
    for (let j = 0; j < k; j++) {
      this.pastAngles(tau0 - j * h);
      field.evaluatePrepared(this.cosPast, this.sinPast, y, guessSlots[j]);
    }
    slots[0].set(guessSlots[0]);
    for (let l = 0; l < k; l++) guessOffsets[l] = l * size;
    for (let sweep = 0; sweep < REBUILD_SWEEPS; sweep++) {
      if (sweep > 0) for (let j = 1; j < k; j++) guessSlots[j].set(slots[k - j]);
      for (let j = 1; j < k; j++) {
        for (let l = 0; l < k; l++) rowWeights[l] = -scale * back[j][l];
        trial.set(y);
        if (k === 11) addWeightedSum11(trial, guesses, guessOffsets, rowWeights, size);
        else addWeightedSum(trial, guesses, guessOffsets, rowWeights, size, k);
        this.pastAngles(tau0 - j * h);
        field.evaluatePrepared(this.cosPast, this.sinPast, trial, slots[k - j]);
      }
    }
    return 0;
  }

  private pastAngles(tau: number): void {
    const omega = this.params.omega;
    for (let j = 0; j < omega.length; j++) {
      this.cosPast[j] = Math.cos(omega[j] * tau);
      this.sinPast[j] = Math.sin(omega[j] * tau);
    }
  }
}

// The weighted history sum y += sum_j beta_j g_{n-j}: written out for the history length in use,
// since V8 runs the unrolled form several times faster than the double loop.

function addWeightedSum11(y: Float64Array, h: Float64Array, o: Int32Array, b: Float64Array, size: number): void {
  const o0 = o[0],
    o1 = o[1],
    o2 = o[2],
    o3 = o[3],
    o4 = o[4],
    o5 = o[5],
    o6 = o[6],
    o7 = o[7],
    o8 = o[8],
    o9 = o[9],
    o10 = o[10];
  const b0 = b[0],
    b1 = b[1],
    b2 = b[2],
    b3 = b[3],
    b4 = b[4],
    b5 = b[5],
    b6 = b[6],
    b7 = b[7],
    b8 = b[8],
    b9 = b[9],
    b10 = b[10];
  for (let i = 0; i < size; i++) {
    // pairwise, so the additions do not form one 11-long dependency chain
    y[i] +=
      b0 * h[o0 + i] +
      b1 * h[o1 + i] +
      (b2 * h[o2 + i] + b3 * h[o3 + i]) +
      (b4 * h[o4 + i] + b5 * h[o5 + i] + (b6 * h[o6 + i] + b7 * h[o7 + i])) +
      (b8 * h[o8 + i] + b9 * h[o9 + i] + b10 * h[o10 + i]);
  }
}

function addWeightedSum(y: Float64Array, h: Float64Array, o: Int32Array, b: Float64Array, size: number, k: number): void {
  for (let i = 0; i < size; i++) {
    let sum = 0;
    for (let j = 0; j < k; j++) sum += b[j] * h[o[j] + i];
    y[i] += sum;
  }
}
