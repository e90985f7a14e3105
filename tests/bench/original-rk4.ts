import type { ModelParameters } from '../../src/model/parameters.js';

/**
 * The comparison integrator of the benchmark: classic RK4 on the reference model in its original
 * coordinates z = [x, x'] per node and mode (docs/model.md, 'Reference model'),
 * x'' = -omega^2 x + eps F, with no rotating frame. It has to resolve the carrier itself, so its
 * phase error of O((omega h)^5) per step is what limits it. Written as carefully as the engine's kernel (neighbour
 * slots, locals, one fused pass per stage) so that the comparison measures the method, not the
 * coding; two modes on graphs with in-degree at most two (the rings of the benchmark) only.
 */
export class OriginalRk4 {
  readonly state: Float64Array;
  tau = 0;
  evaluations = 0;
  private readonly trial: Float64Array;
  private readonly sum: Float64Array;
  private readonly signal: Float64Array;
  private readonly signalRate: Float64Array;
  private readonly fromA: Int32Array;
  private readonly fromB: Int32Array;
  private readonly linkA: Int32Array;
  private readonly linkB: Int32Array;
  private readonly step: number;

  constructor(
    readonly params: ModelParameters,
    initial: Float64Array,
    stepsPerPeriod: number,
  ) {
    if (params.modes !== 2) throw new Error(`OriginalRk4: written for two modes, got ${params.modes}`);
    const n = params.nodes;
    if (initial.length !== 4 * n) throw new Error(`OriginalRk4: initial state has ${initial.length} numbers, expected ${4 * n}`);
    this.state = Float64Array.from(initial);
    this.trial = new Float64Array(4 * n);
    this.sum = new Float64Array(4 * n);
    this.signal = new Float64Array(n);
    this.signalRate = new Float64Array(n);
    this.fromA = new Int32Array(n);
    this.fromB = new Int32Array(n);
    this.linkA = new Int32Array(n);
    this.linkB = new Int32Array(n);
    for (let k = 0; k < n; k++) {
      const first = params.inStart[k];
      const degree = params.inStart[k + 1] - first;
      if (degree > 2 || params.linkWeight.length === 0)
        throw new Error(`OriginalRk4: node ${k} has ${degree} incoming links (1 or 2 supported)`);
      this.fromA[k] = degree > 0 ? params.inFrom[first] : k;
      this.linkA[k] = degree > 0 ? params.inLink[first] : 0;
      this.fromB[k] = degree > 1 ? params.inFrom[first + 1] : k;
      this.linkB[k] = degree > 1 ? params.inLink[first + 1] : 0;
    }
    this.step = (2 * Math.PI) / (stepsPerPeriod * Math.max(...params.omega));
  }

  advance(tauEnd: number): void {
    const span = tauEnd - this.tau;
    if (!(span > 0)) return;
    const steps = Math.max(1, Math.ceil((span / this.step) * (1 - 1e-10)));
    const h = span / steps;
    const { state: z, trial, sum } = this;
    for (let s = 0; s < steps; s++) {
      this.stage(z, z, 0.5 * h, trial, z, h / 6, sum);
      this.stage(trial, z, 0.5 * h, trial, sum, h / 3, sum);
      this.stage(trial, z, h, trial, sum, h / 3, sum);
      this.stage(trial, z, 0, trial, sum, h / 6, z);
    }
    this.evaluations += 4 * steps;
    this.tau = tauEnd;
  }

  /** With D = dz/dtau at zIn: next = base + a D, accOut = accIn + b D (zIn is read first). */
  private stage(
    zIn: Float64Array,
    base: Float64Array,
    a: number,
    next: Float64Array,
    accIn: Float64Array,
    b: number,
    accOut: Float64Array,
  ): void {
    const p = this.params;
    const { signal, signalRate, fromA, fromB, linkA, linkB } = this;
    const n = p.nodes;
    for (let k = 0, i = 0; k < n; k++, i += 4) {
      signal[k] = zIn[i] + zIn[i + 2];
      signalRate[k] = zIn[i + 1] + zIn[i + 3];
    }
    const eps = p.epsilon;
    const weight = p.linkWeight;
    const detuning = p.detuning;
    const kr = p.strength * p.reactive;
    const ks = p.strength * p.dissipative;
    const w0 = p.omega[0],
      w1 = p.omega[1];
    const sq0 = w0 * w0,
      sq1 = w1 * w1;
    const g0 = p.gain[0],
      g1 = p.gain[1],
      d0 = p.loss[0],
      d1 = p.loss[1];
    for (let k = 0, i = 0; k < n; k++, i += 4) {
      const x0 = zIn[i],
        r0 = zIn[i + 1],
        x1 = zIn[i + 2],
        r1 = zIn[i + 3];
      const sk = signal[k],
        rk = signalRate[k];
      const la = fromA[k],
        lb = fromB[k];
      const wa = weight[linkA[k]],
        wb = weight[linkB[k]];
      const coupling =
        kr * (wa * (signal[la] - sk) + wb * (signal[lb] - sk)) + ks * (wa * (signalRate[la] - rk) + wb * (signalRate[lb] - rk));
      const sustain = (1 - sk * sk) * rk;
      const dk = 2 * detuning[k];
      const acc0 = -sq0 * x0 + eps * (g0 * sustain - d0 * r0 - dk * sq0 * x0 + coupling);
      const acc1 = -sq1 * x1 + eps * (g1 * sustain - d1 * r1 - dk * sq1 * x1 + coupling);
      next[i] = base[i] + a * r0;
      next[i + 1] = base[i + 1] + a * acc0;
      next[i + 2] = base[i + 2] + a * r1;
      next[i + 3] = base[i + 3] + a * acc1;
      accOut[i] = accIn[i] + b * r0;
      accOut[i + 1] = accIn[i + 1] + b * acc0;
      accOut[i + 2] = accIn[i + 2] + b * r1;
      accOut[i + 3] = accIn[i + 3] + b * acc1;
    }
  }
}
