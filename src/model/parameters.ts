import type { Scenario } from '../scenario/types.js';

/**
 * The parameters that change while a run goes (detuning, link weights, coupling, noise) as plain
 * JSON: what a session checkpoint stores, and the copy a campaign applies queued faults to so it
 * knows the values each one replaces (src/campaign/restore.ts).
 */
export interface MutableParameterValues {
  detuning: number[];
  linkWeight: number[];
  strength: number;
  reactive: number;
  dissipative: number;
  noiseIntensity: number;
  detuningWalk: number;
}

/**
 * The compiled, mutable parameters of the reference model (docs/model.md, 'Reference model').
 * Everything the hot loop reads lives in typed arrays; run-time changes (detuning, link
 * weights, coupling, noise) write into them in place, so nothing is ever rebuilt.
 */
export class ModelParameters {
  readonly nodes: number;
  readonly modes: number;
  readonly epsilon: number;
  readonly omega: Float64Array;
  readonly gain: Float64Array;
  readonly loss: Float64Array;
  readonly detuning: Float64Array;
  strength: number;
  reactive: number;
  dissipative: number;
  noiseIntensity: number;
  detuningWalk: number;

  /** Link endpoints in scenario order; weights are mutable, nominal weights are kept for restore. */
  readonly linkFrom: Int32Array;
  readonly linkTo: Int32Array;
  readonly linkWeight: Float64Array;
  readonly linkNominal: Float64Array;

  /** Incoming links in CSR form: links into node k are inLink[inStart[k] .. inStart[k+1]). */
  readonly inStart: Int32Array;
  readonly inFrom: Int32Array;
  readonly inLink: Int32Array;
  /** sum_l A_kl, kept in step with linkWeight. */
  readonly inWeightSum: Float64Array;

  constructor(scenario: Scenario) {
    const n = scenario.nodes;
    const m = scenario.modes.length;
    this.nodes = n;
    this.modes = m;
    this.epsilon = scenario.epsilon;
    this.omega = Float64Array.from(scenario.modes, (mode) => mode.omega);
    this.gain = Float64Array.from(scenario.modes, (mode) => mode.gain);
    this.loss = Float64Array.from(scenario.modes, (mode) => mode.loss);
    this.detuning = Float64Array.from(scenario.detuning);
    this.strength = scenario.coupling.strength;
    this.reactive = scenario.coupling.reactive;
    this.dissipative = scenario.coupling.dissipative;
    this.noiseIntensity = scenario.noise.intensity;
    this.detuningWalk = scenario.noise.detuningWalk;

    const links = scenario.links;
    this.linkFrom = Int32Array.from(links, (l) => l.from);
    this.linkTo = Int32Array.from(links, (l) => l.to);
    this.linkWeight = Float64Array.from(links, (l) => l.weight);
    this.linkNominal = Float64Array.from(links, (l) => l.weight);

    this.inStart = new Int32Array(n + 1);
    for (const l of links) this.inStart[l.to + 1]++;
    for (let k = 0; k < n; k++) this.inStart[k + 1] += this.inStart[k];
    const fill = this.inStart.slice(0, n);
    this.inFrom = new Int32Array(links.length);
    this.inLink = new Int32Array(links.length);
    links.forEach((l, index) => {
      const slot = fill[l.to]++;
      this.inFrom[slot] = l.from;
      this.inLink[slot] = index;
    });
    this.inWeightSum = new Float64Array(n);
    this.refreshWeightSums();
  }

  /** The mutable parameters as they are now, as plain JSON (doubles survive JSON exactly). */
  mutableValues(): MutableParameterValues {
    return {
      detuning: Array.from(this.detuning),
      linkWeight: Array.from(this.linkWeight),
      strength: this.strength,
      reactive: this.reactive,
      dissipative: this.dissipative,
      noiseIntensity: this.noiseIntensity,
      detuningWalk: this.detuningWalk,
    };
  }

  /** Sets every mutable parameter as `values` says (from mutableValues, here or in a checkpoint). */
  restoreValues(values: MutableParameterValues): void {
    if (values.detuning.length !== this.nodes) throw new RangeError(`expected ${this.nodes} detunings, got ${values.detuning.length}`);
    this.detuning.set(values.detuning);
    this.setLinkWeights(values.linkWeight);
    this.strength = values.strength;
    this.reactive = values.reactive;
    this.dissipative = values.dissipative;
    this.noiseIntensity = values.noiseIntensity;
    this.detuningWalk = values.detuningWalk;
  }

  /** Index of the link carrying `from` into `to`, or -1. */
  findLink(from: number, to: number): number {
    for (let e = 0; e < this.linkFrom.length; e++) {
      if (this.linkFrom[e] === from && this.linkTo[e] === to) return e;
    }
    return -1;
  }

  /** Set every link's weight at once (scenario order). */
  setLinkWeights(weights: ArrayLike<number>): void {
    if (weights.length !== this.linkWeight.length)
      throw new RangeError(`expected ${this.linkWeight.length} link weights, got ${weights.length}`);
    this.linkWeight.set(weights);
    this.refreshWeightSums();
  }

  setLinkWeight(index: number, weight: number): void {
    this.linkWeight[index] = weight;
    this.refreshWeightSums();
  }

  /** Links with their current weights, in scenario order (broken links have weight 0). */
  currentLinks(): { from: number; to: number; weight: number }[] {
    return Array.from(this.linkFrom, (from, e) => ({ from, to: this.linkTo[e], weight: this.linkWeight[e] }));
  }

  private refreshWeightSums(): void {
    for (let k = 0; k < this.nodes; k++) {
      let sum = 0;
      for (let s = this.inStart[k]; s < this.inStart[k + 1]; s++) sum += this.linkWeight[this.inLink[s]];
      this.inWeightSum[k] = sum;
    }
  }
}
