import type { ModelParameters } from '../model/parameters.js';
import { Random, type RandomState } from '../util/random.js';
import { MicroStepper } from './micro-stepper.js';
import { addDetuningWalk, addNoiseIncrement } from './noise.js';

export interface StepOutcome {
  ok: boolean;
  /** Why the step was refused (the state is then left as it was before the step). */
  reason?: string;
  /** True when the random walk changed the detuning during this step. */
  detuningChanged: boolean;
  /**
   * Set (with ok false) when the integrator refused the step because it cannot be trusted there,
   * not because the state blew up: another integrator should take over from the unchanged state.
   */
  fallBack?: boolean;
}

/** What a session needs from an integrator of the full system (micro steps or the envelope). */
export interface FullIntegrator {
  /** Rotating-frame state [u, v] per node and mode at `tau`. */
  readonly state: Float64Array;
  readonly tau: number;
  /** The noise generator (shared by every integrator of one session). */
  readonly random: Random;
  /** Advance to tauEnd; a refused step leaves the state, tau and the generator as they were. */
  advance(tauEnd: number): StepOutcome;
}

/** An amplitude this large is runaway: the model's limit cycles sit near 2. */
export const RUNAWAY_AMPLITUDE = 1e3;

/**
 * The full coupled system on the multirate clock: micro steps in the rotating frame (MicroStepper:
 * the fitted Adams method where it applies, RK4 otherwise) resolve the carrier; each macro step
 * then adds the exact noise increment and the detuning random walk, and checks for blow-up. A step
 * that produced a non-finite or runaway state is undone, so no NaN ever leaves this object.
 */
export class FullSystem implements FullIntegrator {
  readonly stepper: MicroStepper;
  readonly random: Random;
  private readonly previous: Float64Array;

  constructor(
    readonly params: ModelParameters,
    initial: Float64Array,
    stepsPerPeriod: number,
    noiseSeed: number,
  ) {
    this.stepper = new MicroStepper(params, initial, stepsPerPeriod);
    this.random = new Random(noiseSeed);
    this.previous = new Float64Array(initial.length);
  }

  get state(): Float64Array {
    return this.stepper.state;
  }

  get tau(): number {
    return this.stepper.tau;
  }

  /**
   * Continue from `state` at `tau` (a checkpoint, an undone step, a hand-over from the envelope),
   * with the noise generator at `random`; without it the generator stays where it is (it is
   * shared with the envelope, so a hand-over finds it already in place).
   */
  restore(state: ArrayLike<number>, tau: number, random?: RandomState): void {
    this.stepper.restore(state, tau);
    if (random) this.random.setState(random);
  }

  advance(tauEnd: number): StepOutcome {
    const t0 = this.stepper.tau;
    const y = this.stepper.state;
    this.previous.set(y);
    const randomBefore = this.random.getState();
    this.stepper.advance(tauEnd);
    addNoiseIncrement(this.params, this.random, t0, tauEnd, y);
    const problem = findBlowUp(y, this.params.modes);
    if (problem) {
      this.restore(this.previous, t0, randomBefore);
      return { ok: false, reason: problem, detuningChanged: false };
    }
    const detuningChanged = addDetuningWalk(this.params, this.random, tauEnd - t0);
    return { ok: true, detuningChanged };
  }

  getRandomState(): RandomState {
    return this.random.getState();
  }
}

/** Describe the first non-finite or runaway amplitude in y, or return null. */
export function findBlowUp(y: Float64Array, modes: number): string | null {
  for (let i = 0; i < y.length; i += 2) {
    const u = y[i];
    const v = y[i + 1];
    const node = Math.floor(i / 2 / modes);
    const mode = (i / 2) % modes;
    if (!Number.isFinite(u) || !Number.isFinite(v)) return `non-finite state at node ${node}, mode ${mode}`;
    const r = Math.hypot(u, v);
    if (r > RUNAWAY_AMPLITUDE) return `runaway amplitude ${r.toPrecision(3)} at node ${node}, mode ${mode} (limit ${RUNAWAY_AMPLITUDE})`;
  }
  return null;
}
