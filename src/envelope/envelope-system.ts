import type { ModelParameters } from '../model/parameters.js';
import { ABSOLUTE_PER_RELATIVE, DormandPrince } from '../integrate/dormand-prince.js';
import { findBlowUp, type FullIntegrator, type StepOutcome } from '../integrate/full-system.js';
import { addDetuningWalk } from '../integrate/noise.js';
import type { Random } from '../util/random.js';
import { addAveragedDiffusion } from './averaged-noise.js';
import { SecondOrderField, type EnvelopeGrid } from './second-order-field.js';
import { DIVISOR_MARGIN, TRUST_INDICATOR, envelopeTrouble, type EnvelopeHealth } from './validity.js';

export interface EnvelopeOptions {
  /** Torus sample points (torus-harmonics.ts): 'parity' (default, 25 points for two modes) or a P^M grid, P >= 9. */
  grid?: EnvelopeGrid;
  /**
   * Relative tolerance of the slow-time Dormand-Prince integrator; default 1e-9 (absolute 1e-11):
   * over 10 slow time units it moves the full state by about 3e-10 relative against 1e-10, well
   * under the 1e-8 the envelope promises, at 60 % of the evaluations (measured on the bench ring).
   */
  tolerance?: number;
  /** Longest chunk in slow time while noise or a detuning walk is on (the splitting step); default 0.02. */
  noiseStep?: number;
  /** Largest indicator still trusted (see validity.ts); default TRUST_INDICATOR. */
  indicatorLimit?: number;
}

/** Everything needed to continue an envelope bit for bit (plain JSON). */
export interface EnvelopeCheckpoint {
  tau: number;
  state: number[];
  chunk: { start: number; end: number; startSlow: number[]; startRate: number[]; endSlow: number[]; endRate: number[] };
  noise: number[];
  solverStep: number;
  /** False when the chunk end has no rate yet (just restarted): the next chunk recomputes it. */
  rated: boolean;
  health: EnvelopeHealth;
}

/** Default relative tolerance of the slow integrator (why 1e-9: EnvelopeOptions.tolerance, measured on the bench ring). */
const ENVELOPE_TOLERANCE = 1e-9;
/**
 * Default splitting step while noise or a detuning walk is on (slow time): the noise gathered
 * during a chunk enters Y only at its end, so this bounds that delay; 0.02 is two default macro
 * ticks (README, 'Integrators and their error bounds': a tick is about 1/100 slow time unit).
 */
const NOISE_STEP = 0.02;
/**
 * Accepted plus rejected slow steps per chunk. A chunk is one step when all goes well, so this
 * many means the slow flow has blown up: the chunk is refused and micro steps take over.
 */
const STEPS_PER_CHUNK = 10_000;
/** First chunk length in slow time after a (re)start; the step controller grows it from there. */
const FIRST_CHUNK = 1e-3;
/** A chunk the controller had to split is redone at most this many times as one step. */
const CHUNK_RETRIES = 3;
/** Longest chunk in slow time even when the field is (nearly) zero and the controller keeps growing the step. */
const LONGEST_CHUNK = 1e3;

/**
 * Envelope mode: the full system advanced through its second-order averaged slow variables.
 * Y is integrated in slow time s = eps tau by the adaptive Dormand-Prince 5(4) method, one step
 * per chunk; between chunk ends Y(s) comes from cubic Hermite interpolation of the step's end
 * values and rates, and the full state at any tau is rebuilt as y = Y + eps u(Y, omega tau).
 * The cost per slow time unit does not depend on eps.
 *
 * Noise is the averaged diffusion (averaged-noise.ts), folded into Y by Lie-Trotter splitting at
 * every chunk end, with chunks no longer than `noiseStep` while noise or a detuning walk is on;
 * frames between chunk ends see the noise accumulated so far. The detuning walk is stepped per
 * advance exactly as in micro mode; the slow field follows it from the next chunk on.
 *
 * A chunk whose slow field shows a small divisor or an indicator above the limit is refused:
 * `advance` then returns { ok: false, fallBack: true } and leaves state, tau and the generator
 * untouched, so micro-stepping can take over from there.
 */
export class EnvelopeSystem implements FullIntegrator {
  readonly field: SecondOrderField;
  readonly solver: DormandPrince;
  /** Reconstructed full state (rotating frame) at tau. */
  readonly state: Float64Array;
  tau: number;
  readonly noiseStep: number;
  indicatorLimit: number;
  /** Slow right-hand-side evaluations so far. */
  slowEvaluations = 0;
  /** Chunks (accepted slow steps) so far. */
  chunks = 0;
  /** Health of the last chunk (worst over its evaluations). */
  health: EnvelopeHealth = { indicator: 0, estimatedError: 0, smallestDivisor: null, harmonic: null };

  private chunkStart = 0;
  private chunkEnd = 0;
  private readonly startSlow: Float64Array;
  private readonly startRate: Float64Array;
  private readonly endSlow: Float64Array;
  private readonly endRate: Float64Array;
  private rated = false;
  /** Averaged-diffusion increments not yet folded into the slow state. */
  private readonly noise: Float64Array;
  private readonly slow: Float64Array;
  private readonly trial: Float64Array;
  private readonly lastRate: Float64Array;
  private readonly correction: Float64Array;
  private captureStart = false;
  private worstIndicator = 0;
  private worstDivisor = Number.POSITIVE_INFINITY;
  private worstHarmonic = -1;

  constructor(
    readonly params: ModelParameters,
    initial: Float64Array,
    tau: number,
    readonly random: Random,
    options: EnvelopeOptions = {},
  ) {
    const size = 2 * params.nodes * params.modes;
    if (initial.length !== size) {
      throw new Error(
        `EnvelopeSystem: initial state has ${initial.length} numbers, expected ${size} (2 x ${params.nodes} nodes x ${params.modes} modes)`,
      );
    }
    if (!(params.epsilon > 0)) throw new Error(`EnvelopeSystem: needs eps > 0 (got ${params.epsilon}); with eps = 0 nothing is slow`);
    const content = SecondOrderField.checkFieldContent(params);
    if (content) throw new Error(`EnvelopeSystem: ${content}`);
    this.field = new SecondOrderField(params, options.grid ?? 'parity');
    const tolerance = options.tolerance ?? ENVELOPE_TOLERANCE;
    if (!(tolerance > 0 && tolerance < 1)) throw new RangeError(`EnvelopeSystem: tolerance must be in (0, 1) (got ${tolerance})`);
    this.noiseStep = options.noiseStep ?? NOISE_STEP;
    if (!(this.noiseStep > 0)) throw new RangeError(`EnvelopeSystem: noiseStep must be > 0 (got ${this.noiseStep})`);
    this.indicatorLimit = options.indicatorLimit ?? TRUST_INDICATOR;
    this.solver = new DormandPrince(size, (_s, y, dy) => this.slowRate(y, dy), {
      rtol: tolerance,
      atol: tolerance * ABSOLUTE_PER_RELATIVE,
      maxSteps: STEPS_PER_CHUNK,
    });
    const make = () => new Float64Array(size);
    this.state = make();
    this.startSlow = make();
    this.startRate = make();
    this.endSlow = make();
    this.endRate = make();
    this.noise = make();
    this.slow = make();
    this.trial = make();
    this.lastRate = make();
    this.correction = make();
    this.tau = tau;
    this.restart(initial, tau);
  }

  /** Start again from the full state y at tau (after a perturbation or a switch from micro steps). */
  restart(y: Float64Array, tau: number): void {
    const eps = this.params.epsilon;
    this.field.correctionAt(y, tau, this.correction);
    for (let i = 0; i < y.length; i++) this.endSlow[i] = y[i] - eps * this.correction[i];
    this.state.set(y);
    this.tau = tau;
    this.chunkStart = eps * tau;
    this.chunkEnd = eps * tau;
    this.startSlow.set(this.endSlow);
    this.noise.fill(0);
    this.rated = false;
    this.solver.resume(this.solver.step > 0 ? this.solver.step : FIRST_CHUNK);
  }

  /** Health of an envelope started from the full state y at tau (one slow evaluation; changes nothing else). */
  probe(y: Float64Array, tau: number): EnvelopeHealth {
    const { field, slow, trial, correction } = this;
    const eps = this.params.epsilon;
    field.correctionAt(y, tau, correction);
    for (let i = 0; i < y.length; i++) slow[i] = y[i] - eps * correction[i];
    field.evaluate(slow, trial);
    field.findCarriedDivisor();
    const divisor = field.smallestDivisor;
    return {
      indicator: field.indicator,
      estimatedError: field.indicator * field.indicator,
      smallestDivisor: Number.isFinite(divisor) ? divisor : null,
      harmonic: field.smallestHarmonic >= 0 ? field.torus.describe(field.smallestHarmonic) : null,
    };
  }

  /** The slow variables Y (noise included) at the current tau. */
  slowState(out: Float64Array): Float64Array {
    this.interpolate(this.params.epsilon * this.tau, out);
    for (let i = 0; i < out.length; i++) out[i] += this.noise[i];
    return out;
  }

  advance(tauEnd: number): StepOutcome {
    if (!(tauEnd > this.tau)) return { ok: true, detuningChanged: false };
    const eps = this.params.epsilon;
    const p = this.params;
    // The generator is only drawn from with noise or a walk on; only then is there anything to restore.
    const randomBefore = p.noiseIntensity > 0 || p.detuningWalk > 0 ? this.random.getState() : null;
    const slowEnd = eps * tauEnd;
    let from = this.tau;
    while (slowEnd > this.chunkEnd) {
      const boundary = this.chunkEnd / eps;
      if (boundary > from) {
        addAveragedDiffusion(this.params, this.random, boundary - from, this.noise);
        from = boundary;
      }
      const problem = this.nextChunk();
      if (problem) {
        if (randomBefore) this.random.setState(randomBefore);
        return { ok: false, reason: problem, fallBack: true, detuningChanged: false };
      }
    }
    addAveragedDiffusion(this.params, this.random, tauEnd - from, this.noise);
    const { slow, trial, correction } = this;
    this.interpolate(slowEnd, slow);
    for (let i = 0; i < slow.length; i++) slow[i] += this.noise[i];
    this.field.correctionAt(slow, tauEnd, correction);
    for (let i = 0; i < slow.length; i++) trial[i] = slow[i] + eps * correction[i];
    const blowUp = findBlowUp(trial, this.params.modes);
    if (blowUp) {
      if (randomBefore) this.random.setState(randomBefore);
      return { ok: false, reason: blowUp, detuningChanged: false };
    }
    this.state.set(trial);
    const span = tauEnd - this.tau;
    this.tau = tauEnd;
    const detuningChanged = addDetuningWalk(this.params, this.random, span);
    return { ok: true, detuningChanged };
  }

  save(): EnvelopeCheckpoint {
    return {
      tau: this.tau,
      state: Array.from(this.state),
      chunk: {
        start: this.chunkStart,
        end: this.chunkEnd,
        startSlow: Array.from(this.startSlow),
        startRate: Array.from(this.startRate),
        endSlow: Array.from(this.endSlow),
        endRate: Array.from(this.endRate),
      },
      noise: Array.from(this.noise),
      solverStep: this.solver.step,
      rated: this.rated,
      health: { ...this.health },
    };
  }

  load(saved: EnvelopeCheckpoint): void {
    const size = this.state.length;
    const arrays = [saved.state, saved.chunk.startSlow, saved.chunk.startRate, saved.chunk.endSlow, saved.chunk.endRate, saved.noise];
    if (arrays.some((a) => !Array.isArray(a) || a.length !== size)) {
      throw new RangeError(`envelope checkpoint: every state array must hold ${size} numbers`);
    }
    this.tau = saved.tau;
    this.state.set(saved.state);
    this.chunkStart = saved.chunk.start;
    this.chunkEnd = saved.chunk.end;
    this.startSlow.set(saved.chunk.startSlow);
    this.startRate.set(saved.chunk.startRate);
    this.endSlow.set(saved.chunk.endSlow);
    this.endRate.set(saved.chunk.endRate);
    this.noise.set(saved.noise);
    this.rated = saved.rated;
    this.health = { ...saved.health };
    // The solver's cached rate is recomputed from endSlow: the same function of the same numbers.
    this.solver.resume(saved.solverStep);
  }

  /** Longest chunk now: the splitting step with noise, LONGEST_CHUNK without. */
  private chunkLimit(): number {
    const p = this.params;
    return p.noiseIntensity > 0 || p.detuningWalk > 0 ? this.noiseStep : LONGEST_CHUNK;
  }

  /** Begin the chunk after the current one; returns why it cannot be trusted, or null. */
  private nextChunk(): string | null {
    const { startSlow, startRate, endSlow, endRate, noise, trial, solver } = this;
    let folded = false;
    for (let i = 0; i < noise.length; i++) {
      if (noise[i] !== 0) folded = true;
      startSlow[i] = endSlow[i] + noise[i];
    }
    noise.fill(0);
    const start = this.chunkEnd;
    this.worstIndicator = 0;
    this.worstDivisor = Number.POSITIVE_INFINITY;
    this.worstHarmonic = -1;
    if (folded || !this.rated) {
      solver.invalidate();
      this.captureStart = true;
    } else {
      startRate.set(endRate);
    }
    let span: number;
    for (let attempt = 0; ; attempt++) {
      span = Math.min(solver.step > 0 ? solver.step : FIRST_CHUNK, this.chunkLimit());
      trial.set(startSlow);
      const accepted = solver.accepted;
      if (!solver.integrate(start, start + span, trial)) {
        return "the envelope's slow integrator failed (its step size collapsed)";
      }
      if (solver.accepted - accepted === 1 || attempt === CHUNK_RETRIES) break;
      // The controller split this chunk: redo it as one step of the size it now proposes, so
      // that the Hermite interpolant spans exactly one step.
      solver.invalidate();
      this.captureStart = true;
    }
    this.chunkStart = start;
    this.chunkEnd = start + span;
    endSlow.set(trial);
    endRate.set(this.lastRate);
    this.rated = true;
    // The last evaluation sampled the field at the chunk end: which harmonics it carries.
    this.field.findCarriedDivisor();
    this.worstDivisor = this.field.smallestDivisor;
    this.worstHarmonic = this.field.smallestHarmonic;
    this.chunks++;
    this.health = {
      indicator: this.worstIndicator,
      estimatedError: this.worstIndicator * this.worstIndicator,
      smallestDivisor: Number.isFinite(this.worstDivisor) ? this.worstDivisor : null,
      harmonic: this.worstHarmonic >= 0 ? this.field.torus.describe(this.worstHarmonic) : null,
    };
    return envelopeTrouble(this.health, this.params.epsilon, this.indicatorLimit, DIVISOR_MARGIN);
  }

  /** The slow-time right-hand side as the solver sees it, with the bookkeeping of a chunk. */
  private slowRate(y: Float64Array, dy: Float64Array): void {
    const field = this.field;
    field.evaluate(y, dy);
    this.slowEvaluations++;
    this.lastRate.set(dy);
    if (this.captureStart) {
      this.startRate.set(dy);
      this.captureStart = false;
    }
    if (field.indicator > this.worstIndicator) this.worstIndicator = field.indicator;
  }

  /** Cubic Hermite interpolation of Y over the current chunk (exact at its ends). */
  private interpolate(s: number, out: Float64Array): void {
    const span = this.chunkEnd - this.chunkStart;
    if (!(span > 0)) {
      out.set(this.endSlow);
      return;
    }
    const x = (s - this.chunkStart) / span;
    const a = 1 - x;
    const h00 = (1 + 2 * x) * a * a;
    const h10 = x * a * a * span;
    const h01 = x * x * (3 - 2 * x);
    const h11 = x * x * (x - 1) * span;
    const { startSlow, startRate, endSlow, endRate } = this;
    for (let i = 0; i < out.length; i++) {
      out[i] = h00 * startSlow[i] + h10 * startRate[i] + h01 * endSlow[i] + h11 * endRate[i];
    }
  }
}
