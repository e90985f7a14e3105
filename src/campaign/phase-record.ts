import { wrapAngle } from '../util/angles.js';

/**
 * Unwrapped mode-0 phases of every node, relative to the nominal carrier. The rotating frame
 * turns with omega_0 tau, so arg a_k0 already is the phase against the nominal carrier; it is
 * unwrapped tick by tick (a tick moves it far less than pi: the frequency offsets are O(eps)).
 */
export class NodePhases {
  private last: number[] = [];
  private unwrapped: number[] = [];

  update(phase: readonly (readonly number[])[]): void {
    if (this.last.length === 0) {
      this.last = phase.map((p) => p[0]);
      this.unwrapped = this.last.slice();
      return;
    }
    for (let k = 0; k < phase.length; k++) {
      const now = phase[k][0];
      this.unwrapped[k] += wrapAngle(now - this.last[k]);
      this.last[k] = now;
    }
  }

  /** Common phase of the ensemble: the mean of the unwrapped node phases. */
  mean(): number {
    let sum = 0;
    for (const p of this.unwrapped) sum += p;
    return sum / this.unwrapped.length;
  }

  node(k: number): number {
    return this.unwrapped[k];
  }

  save(): { last: number[]; unwrapped: number[] } {
    return { last: this.last.slice(), unwrapped: this.unwrapped.slice() };
  }

  load(saved: { last: number[]; unwrapped: number[] }): void {
    this.last = saved.last.slice();
    this.unwrapped = saved.unwrapped.slice();
  }
}

/** The four phase series a soak records (radians, unwrapped). */
export interface PhaseSample {
  tick: number;
  tau: number;
  /** Mean phase of the coupled ring's nodes (the array's output). */
  ensemble: number;
  /** Node 0 of the coupled ring. */
  node: number;
  /** Mean phase of the uncoupled twin's nodes (the ensemble average of free-running parts); null without a twin. */
  uncoupledEnsemble: number | null;
  /** Node 0 of the uncoupled twin: a single free-running part. */
  singlePart: number | null;
}

export const PHASE_SERIES = ['ensemble', 'node', 'uncoupledEnsemble', 'singlePart'] as const;
export type PhaseSeriesName = (typeof PHASE_SERIES)[number];

export interface PhaseRecorderState {
  coupled: ReturnType<NodePhases['save']>;
  uncoupled: ReturnType<NodePhases['save']> | null;
  startTick: number | null;
  samples: number;
}

/**
 * Decides which ticks become stability samples: the ticks that are multiples of `stride`, from
 * the start of the record (a fixed tau or the first lock) on, full macro ticks only, so samples
 * are equally spaced. The samples themselves go to the log; the recorder's own state is the
 * unwrapping and a count.
 */
export class PhaseRecorder {
  private readonly coupled = new NodePhases();
  private readonly uncoupled: NodePhases | null;
  private startTick: number | null = null;
  samples = 0;

  constructor(
    readonly from: number | 'first-lock',
    readonly stride: number,
    readonly macroStep: number,
    withTwin: boolean,
  ) {
    this.uncoupled = withTwin ? new NodePhases() : null;
  }

  /** Whether `tick` is a sample tick (the runner logs a trace of the run at the same ticks). */
  isSampleTick(tick: number, tau: number): boolean {
    return tick % this.stride === 0 && Math.abs(tau - tick * this.macroStep) <= 1e-9 * Math.max(1, tau);
  }

  /** One tick of both rings; returns a sample when this tick is one and the record has started. */
  observe(tick: number, tau: number, locked: boolean, coupled: number[][], uncoupled: number[][] | null): PhaseSample | null {
    this.coupled.update(coupled);
    if (this.uncoupled && uncoupled) this.uncoupled.update(uncoupled);
    const fullTick = Math.abs(tau - tick * this.macroStep) <= 1e-9 * Math.max(1, tau);
    if (!fullTick || tick % this.stride !== 0) return null;
    if (this.startTick === null) {
      const ready = this.from === 'first-lock' ? locked : tau >= this.from * (1 - 1e-12);
      if (!ready) return null;
      this.startTick = tick;
    }
    this.samples++;
    const twin = this.uncoupled && uncoupled ? this.uncoupled : null;
    return {
      tick,
      tau,
      ensemble: this.coupled.mean(),
      node: this.coupled.node(0),
      uncoupledEnsemble: twin ? twin.mean() : null,
      singlePart: twin ? twin.node(0) : null,
    };
  }

  save(): PhaseRecorderState {
    return { coupled: this.coupled.save(), uncoupled: this.uncoupled?.save() ?? null, startTick: this.startTick, samples: this.samples };
  }

  load(state: PhaseRecorderState): void {
    this.coupled.load(state.coupled);
    if (this.uncoupled && state.uncoupled) this.uncoupled.load(state.uncoupled);
    this.startTick = state.startTick;
    this.samples = state.samples;
  }
}
