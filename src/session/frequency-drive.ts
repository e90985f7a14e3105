/**
 * What moves each node's frequency from outside the equations, tick by tick: the parts'
 * frequency-modulation noise (src/noise/part-noise-source.ts) and the environment's drift
 * (src/environment/drift.ts). Before each tick it sets every node's detuning to the scenario's
 * (or the operator's) value plus y_k / eps, y_k the node's fractional frequency offset over the
 * tick: the noise's exact mean over the tick plus the drift at the tick's midpoint. A detuning
 * enters the model as a relative frequency offset eps Delta (src/scenario/units.ts), so the phase
 * a node gathers over the tick is its noise's integral. White PM is kept apart as an output phase
 * (rad at the carrier) the session adds where it reads phases: a buffer's noise does not act
 * back on the resonator.
 */
import type { ModelParameters } from '../model/parameters.js';
import type { Scenario } from '../scenario/types.js';
import { tauToSeconds } from '../scenario/units.js';
import { environmentFrequency } from '../environment/drift.js';
import { PartNoiseSource, type PartNoiseSourceState } from '../noise/part-noise-source.js';

/** Mixed into the scenario's noise seed for the parts' stream, so it is independent of the model's white noise. */
const PART_NOISE_SEED_MIX = 0x6d2b79f5;

export interface FrequencyDriveState {
  source: PartNoiseSourceState | null;
  /** Each node's nominal detuning (the scenario's, an operator's or a campaign's). */
  nominal: number[];
  /** The Delta each node's detuning holds beyond its nominal value. */
  applied: number[];
  /** The detuning as the drive last wrote it (a detuning walk moves it on from there). */
  written: number[];
  outputPhase: number[];
}

export class FrequencyDrive {
  /** Each node's nominal detuning, kept exactly (the detuning is nominal + applied, never a running sum). */
  readonly nominal: Float64Array;
  /** Delta added to each node's nominal detuning for the current tick. */
  readonly applied: Float64Array;
  private readonly written: Float64Array;
  /** White-PM phase of each node's output (rad at the carrier of mode 0) at the end of the last tick. */
  readonly outputPhase: Float64Array;
  private readonly source: PartNoiseSource | null;
  private readonly secondsPerTau: number;
  private readonly carrierHz: number;

  private constructor(
    readonly scenario: Scenario,
    private readonly params: ModelParameters,
    macroStep: number,
  ) {
    if (!(params.epsilon > 0)) throw new RangeError('part noise and the environment move the detuning, which needs epsilon > 0');
    const n = params.nodes;
    this.nominal = Float64Array.from(params.detuning);
    this.written = Float64Array.from(params.detuning);
    this.applied = new Float64Array(n);
    this.outputPhase = new Float64Array(n);
    this.carrierHz = scenario.units.nominalFrequencyHz;
    this.secondsPerTau = tauToSeconds(1, this.carrierHz, params.omega[0]);
    const parts = scenario.noise.parts;
    this.source = parts
      ? new PartNoiseSource(parts, macroStep * this.secondsPerTau, (scenario.noise.seed ^ PART_NOISE_SEED_MIX) >>> 0)
      : null;
  }

  /** The drive of a scenario, or null when it has neither part noise nor an environment. */
  static of(scenario: Scenario, params: ModelParameters, macroStep: number): FrequencyDrive | null {
    return scenario.noise.parts || scenario.environment ? new FrequencyDrive(scenario, params, macroStep) : null;
  }

  /** Set every node's detuning for the tick [tau0, tau1]. */
  beforeTick(tau0: number, tau1: number): void {
    const t0 = tau0 * this.secondsPerTau;
    const t1 = tau1 * this.secondsPerTau;
    const source = this.source;
    if (source) source.step(t1 - t0);
    const env = this.scenario.environment;
    const middle = 0.5 * (t0 + t1);
    const { detuning, epsilon } = this.params;
    const phasePerSecond = 2 * Math.PI * this.carrierHz;
    for (let k = 0; k < this.applied.length; k++) {
      let y = source ? source.meanFrequency[k] : 0;
      if (env) y += environmentFrequency(env, k, middle);
      const delta = y / epsilon;
      // a detuning walk moved the nominal value since the last write (0 exactly when nothing did)
      this.nominal[k] += detuning[k] - this.written[k];
      detuning[k] = this.nominal[k] + delta;
      this.written[k] = detuning[k];
      this.applied[k] = delta;
      this.outputPhase[k] = source ? phasePerSecond * source.outputTimeError[k] : 0;
    }
  }

  /** A detuning set from outside (an operator, a campaign) is the node's nominal value; the drive's offset stays on top. */
  setNominal(node: number, delta: number): void {
    this.nominal[node] = delta;
    this.params.detuning[node] = delta + this.applied[node];
    this.written[node] = this.params.detuning[node];
  }

  save(): FrequencyDriveState {
    return {
      source: this.source?.save() ?? null,
      nominal: Array.from(this.nominal),
      applied: Array.from(this.applied),
      written: Array.from(this.written),
      outputPhase: Array.from(this.outputPhase),
    };
  }

  load(state: FrequencyDriveState): void {
    if (state.applied.length !== this.applied.length)
      throw new RangeError('the drive checkpoint does not belong to this scenario (node count differs)');
    if (this.source && state.source) this.source.load(state.source);
    this.nominal.set(state.nominal);
    this.applied.set(state.applied);
    this.written.set(state.written);
    this.outputPhase.set(state.outputPhase);
  }
}
