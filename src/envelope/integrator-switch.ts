import type { ModelParameters } from '../model/parameters.js';
import type { FullIntegrator, FullSystem, StepOutcome } from '../integrate/full-system.js';
import type { NoiseModel } from './averaged-noise.js';
import {
  chooseIntegrator,
  estimateCosts,
  type IntegratorChoice,
  type IntegratorMode,
  type IntegratorRequest,
  INTEGRATOR_REQUESTS,
} from './choice.js';
import { EnvelopeSystem, type EnvelopeCheckpoint, type EnvelopeOptions } from './envelope-system.js';
import { AUTO_ERROR, TRUST_INDICATOR } from './validity.js';

export interface IntegratorSwitchCheckpoint {
  mode: IntegratorMode;
  reason: string;
  envelope: EnvelopeCheckpoint | null;
}

/** Returning from micro steps to the envelope needs an estimated error this much below AUTO_ERROR. */
const RETURN_HYSTERESIS = 0.25;

/**
 * The session's full-system integrator: micro steps (FullSystem) or the envelope
 * (EnvelopeSystem), and the decision between them.
 *
 * Where the mode is picked: at the start, after every perturbation batch (the perturbed state
 * and parameters are probed), whenever the envelope refuses a tick (small divisor or large
 * indicator: micro-stepping takes over that very tick from the unchanged state), and, while micro
 * steps stand in for a requested or automatic envelope, about once per slow time unit (so a
 * session returns to the envelope once a kick has relaxed). Both integrators share the session's noise generator. Every switch is
 * reported (a warning when the envelope falls back, a control event when it takes over).
 */
export class IntegratorSwitch {
  readonly envelope: EnvelopeSystem | null;
  /** Why the envelope cannot run at all (null when it can). */
  readonly unavailable: string | null;
  mode: IntegratorMode = 'micro';
  reason = '';
  /** Ticks run by each mode (not part of checkpoints). */
  readonly ticksIn = { micro: 0, envelope: 0 };
  private readonly recheckTicks: number;

  constructor(
    readonly params: ModelParameters,
    readonly micro: FullSystem,
    readonly request: IntegratorRequest,
    readonly macroStep: number,
    private readonly report: (kind: 'warning' | 'control', message: string) => void,
    /** Largest estimated relative error at which 'auto' takes the envelope. */
    readonly autoError = AUTO_ERROR,
    options: EnvelopeOptions = {},
  ) {
    if (!(autoError > 0 && autoError < 1)) throw new RangeError(`envelopeAutoError: must be in (0, 1) (got ${autoError})`);
    if (!INTEGRATOR_REQUESTS.includes(request)) {
      throw new RangeError(`integrator: must be one of ${INTEGRATOR_REQUESTS.join(', ')} (got ${JSON.stringify(request)})`);
    }
    const eps = params.epsilon;
    let envelope: EnvelopeSystem | null = null;
    let unavailable: string | null = null;
    if (request === 'micro') unavailable = 'micro-stepping was requested';
    else if (!(eps > 0)) unavailable = 'eps = 0, so nothing is slow';
    else {
      try {
        const indicatorLimit = request === 'auto' ? Math.min(TRUST_INDICATOR, Math.sqrt(autoError)) : TRUST_INDICATOR;
        envelope = new EnvelopeSystem(params, micro.state, micro.tau, micro.random, { indicatorLimit, ...options });
      } catch (error) {
        unavailable = error instanceof Error ? error.message : String(error);
      }
    }
    this.envelope = envelope;
    this.unavailable = unavailable;
    this.recheckTicks = eps > 0 ? Math.max(1, Math.round(1 / (eps * macroStep))) : Number.POSITIVE_INFINITY;
  }

  /** The integrator that runs now. */
  get active(): FullIntegrator {
    return this.mode === 'envelope' && this.envelope ? this.envelope : this.micro;
  }

  /** How the noise of the running integrator is made. */
  get noiseModel(): NoiseModel {
    if (!(this.params.noiseIntensity > 0)) return 'none';
    return this.mode === 'envelope' ? 'averaged-diffusion' : 'exact-increments';
  }

  /** The first decision; reported unless it is plain micro-stepping. */
  start(): void {
    const choice = this.decide(1);
    this.mode = choice.mode;
    this.reason = choice.reason;
    if (choice.mode === 'envelope') this.report('control', this.takeOverMessage(choice));
    else if (this.request === 'envelope') this.report('warning', `envelope mode was requested but micro-stepping runs: ${choice.reason}`);
  }

  /** One tick; an envelope that refuses it hands over to micro steps, which then take the tick. */
  advance(tauEnd: number): StepOutcome {
    let outcome = this.active.advance(tauEnd);
    if (!outcome.ok && outcome.fallBack && this.mode === 'envelope') {
      this.switchTo({ mode: 'micro', reason: `the envelope refused the tick: ${outcome.reason}` });
      outcome = this.micro.advance(tauEnd);
    }
    if (outcome.ok) this.ticksIn[this.mode]++;
    return outcome;
  }

  /** After a perturbation batch changed the state or the parameters of the running integrator. */
  afterPerturbations(): void {
    if (this.mode === 'envelope' && this.envelope) this.envelope.restart(this.envelope.state, this.envelope.tau);
    if (this.envelope) this.switchTo(this.decide(this.mode === 'micro' ? RETURN_HYSTERESIS : 1));
  }

  /**
   * After the detuning moved between ticks (part noise, the environment): the envelope's chunk
   * was solved with the old values, so it starts again from where it is. Micro steps read the
   * parameters afresh at every step and need nothing.
   */
  afterDetuningChange(): void {
    if (this.mode === 'envelope' && this.envelope) this.envelope.restart(this.envelope.state, this.envelope.tau);
  }

  /** After tick `tick`: micro steps that stand in for the envelope look at it again about once per slow time unit. */
  afterTick(tick: number): void {
    if (this.mode === 'micro' && this.envelope && tick % this.recheckTicks === 0) {
      this.switchTo(this.decide(RETURN_HYSTERESIS));
    }
  }

  save(): IntegratorSwitchCheckpoint {
    return { mode: this.mode, reason: this.reason, envelope: this.mode === 'envelope' && this.envelope ? this.envelope.save() : null };
  }

  /** Continue as saved (a checkpoint without integrator data ran micro steps). */
  load(saved: IntegratorSwitchCheckpoint | undefined): void {
    if (saved?.mode === 'envelope' && saved.envelope && this.envelope) {
      this.envelope.load(saved.envelope);
      this.mode = 'envelope';
      this.reason = saved.reason;
      return;
    }
    this.mode = 'micro';
    if (saved?.mode === 'envelope')
      this.reason = `micro-stepping: the checkpoint ran the envelope, which this session cannot (${this.unavailable ?? 'no envelope state saved'})`;
    else this.reason = saved?.reason ?? 'micro-stepping (restored from a checkpoint without integrator data)';
  }

  private decide(hysteresis: number): IntegratorChoice {
    const env = this.envelope;
    if (!env) return chooseIntegrator(this.request, this.params.epsilon, null, null, this.unavailable, hysteresis, this.autoError);
    const active = this.active;
    const health = env.probe(active.state, active.tau);
    const p = this.params;
    const costs = estimateCosts({
      eps: p.epsilon,
      macroStep: this.macroStep,
      microStep: this.micro.stepper.nominalStep,
      microEvaluationsPerStep: this.micro.stepper.method === 'rk4' ? 4 : 1,
      points: env.field.torus.points,
      noisy: p.noiseIntensity > 0 || p.detuningWalk > 0,
      noiseStep: env.noiseStep,
    });
    return chooseIntegrator(this.request, p.epsilon, health, costs, null, hysteresis, this.autoError);
  }

  private switchTo(choice: IntegratorChoice): void {
    if (choice.mode === this.mode) return;
    const tau = this.active.tau;
    if (choice.mode === 'envelope' && this.envelope) {
      this.envelope.restart(this.micro.state, this.micro.tau);
      this.mode = 'envelope';
      this.reason = choice.reason;
      this.report('control', this.takeOverMessage(choice));
      return;
    }
    if (this.envelope) this.micro.restore(this.envelope.state, this.envelope.tau);
    this.mode = 'micro';
    this.reason = choice.reason;
    this.report('warning', `envelope mode stops at tau = ${tau.toPrecision(8)}, micro-stepping takes over: ${choice.reason}`);
  }

  private takeOverMessage(choice: IntegratorChoice): string {
    const noise =
      this.params.noiseIntensity > 0 || this.params.detuningWalk > 0
        ? '; noise is the averaged diffusion of the slow variables (statistically, not pathwise, equivalent to micro-stepping)'
        : '';
    return `envelope mode (second-order averaging, near-identity reconstruction) from tau = ${this.active.tau.toPrecision(8)}: ${choice.reason}${noise}`;
  }
}
