import { Random, type RandomState } from '../util/random.js';
import type { ModelParameters } from '../model/parameters.js';
import { parsePerturbation } from '../session/perturbation.js';
import type { FaultPlan, RandomActionSpec, RandomSpec, RangeSpec } from './types.js';

export interface GeneratorState {
  random: RandomState;
  /** The arrival clock runs from here (tau): the end of the last random fault's window plus the gap. */
  cursor: number;
  count: number;
  exhausted: boolean;
}

/**
 * The seeded fault generator. Its draws depend only on its seed and spec, never on the
 * simulation, and its whole state is a few numbers, so a checkpoint continues it exactly.
 */
export class FaultGenerator {
  private readonly random: Random;
  private cursor: number;
  private count = 0;
  private exhausted = false;
  private readonly totalRate: number;

  constructor(
    readonly spec: RandomSpec,
    private readonly model: ModelParameters,
    private readonly soakUntil: number,
  ) {
    this.random = new Random(spec.seed);
    this.cursor = spec.from;
    this.totalRate = spec.actions.reduce((s, a) => s + a.rate, 0);
  }

  /**
   * The next random fault, or null when none fits before the end. A fault fits when its whole
   * evaluation window (start + duration + relockWithin) ends before `until` (or the soak's end).
   */
  next(): FaultPlan | null {
    if (this.exhausted) return null;
    const end = Math.min(this.spec.until ?? Infinity, this.soakUntil);
    const start = this.cursor - Math.log(this.random.uniform()) / this.totalRate;
    const spec = this.pickAction();
    const duration = spec.duration ? spec.duration.min + (spec.duration.max - spec.duration.min) * this.random.uniform() : null;
    const perturbation = parsePerturbation({ action: spec.action, ...this.drawParams(spec) }, this.model, `random fault ${this.count + 1}`);
    const windowEnd = start + (duration ?? 0) + spec.criteria.relockWithin;
    if (windowEnd > end) {
      this.exhausted = true;
      return null;
    }
    this.count++;
    this.cursor = windowEnd + this.spec.gap;
    return {
      id: `random-${this.count}`,
      source: 'random',
      start,
      duration,
      perturbation,
      restore: spec.restore,
      criteria: spec.criteria,
    };
  }

  save(): GeneratorState {
    return { random: this.random.getState(), cursor: this.cursor, count: this.count, exhausted: this.exhausted };
  }

  load(state: GeneratorState): void {
    this.random.setState(state.random);
    this.cursor = state.cursor;
    this.count = state.count;
    this.exhausted = state.exhausted;
  }

  private pickAction(): RandomActionSpec {
    let pick = this.random.uniform() * this.totalRate;
    for (const action of this.spec.actions) {
      pick -= action.rate;
      if (pick < 0) return action;
    }
    return this.spec.actions[this.spec.actions.length - 1];
  }

  private drawParams(spec: RandomActionSpec): Record<string, number> {
    const values: Record<string, number> = {};
    for (const [key, range] of Object.entries(spec.params)) {
      if (key === 'link' && range.kind === 'choice') {
        const [from, to] = range.values[this.randomIndex(range.values.length)];
        values.from = from;
        values.to = to;
      } else {
        values[key] = this.draw(range);
      }
    }
    return values;
  }

  private draw(range: RangeSpec): number {
    switch (range.kind) {
      case 'fixed':
        return range.value;
      case 'uniform':
        return range.min + (range.max - range.min) * this.random.uniform();
      case 'integers':
        return range.min + this.randomIndex(range.max - range.min + 1);
      case 'choice':
        return range.values[this.randomIndex(range.values.length)][0];
    }
  }

  private randomIndex(count: number): number {
    return Math.min(count - 1, Math.floor(this.random.uniform() * count));
  }
}
