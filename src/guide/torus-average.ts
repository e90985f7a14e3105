import type { ModelParameters } from '../model/parameters.js';
import { SlowField } from '../model/slow-field.js';

/**
 * The averaged field fbar(y) = mean of f(y, theta) over the torus of fast angles (one angle per
 * mode), by the trapezoid rule on a P (M = 1) or P x P (M = 2) grid. The trapezoid rule is exact
 * for trigonometric polynomials of degree below P in each angle; the reference model's field has
 * degree at most 4 (docs/model.md, 'The frame', harmonic content), so any P >= 5 gives the exact
 * first-order average.
 * Averaging treats the angles as independent, which is right only away from low-order
 * resonances p omega_0 = q omega_1 (see resonance.ts).
 */
export class TorusAverage {
  readonly field: SlowField;
  readonly points: number;
  private readonly cosTable: Float64Array;
  private readonly sinTable: Float64Array;
  private readonly cos: Float64Array;
  private readonly sin: Float64Array;
  private readonly sample: Float64Array;

  constructor(
    readonly params: ModelParameters,
    readonly grid: number,
  ) {
    this.field = new SlowField(params);
    const m = params.modes;
    this.points = grid ** m;
    this.cosTable = new Float64Array(this.points * m);
    this.sinTable = new Float64Array(this.points * m);
    for (let p = 0; p < this.points; p++) {
      let index = p;
      for (let j = 0; j < m; j++) {
        const angle = (2 * Math.PI * (index % grid)) / grid;
        index = Math.floor(index / grid);
        this.cosTable[p * m + j] = Math.cos(angle);
        this.sinTable[p * m + j] = Math.sin(angle);
      }
    }
    this.cos = new Float64Array(m);
    this.sin = new Float64Array(m);
    this.sample = new Float64Array(2 * params.nodes * m);
  }

  /** out = fbar(y). */
  evaluate(y: Float64Array, out: Float64Array): void {
    const m = this.params.modes;
    out.fill(0);
    // One parameter snapshot for all points; each point adds 1 F to the sum in the kernel's own
    // pass (out + 1 F is out + F exactly), its `next` output (y + 0 F) is scratch.
    this.field.prepare();
    for (let p = 0; p < this.points; p++) {
      for (let j = 0; j < m; j++) {
        this.cos[j] = this.cosTable[p * m + j];
        this.sin[j] = this.sinTable[p * m + j];
      }
      this.field.combinePrepared(this.cos, this.sin, y, y, 0, this.sample, out, 1, out);
    }
    const scale = 1 / this.points;
    for (let i = 0; i < out.length; i++) out[i] *= scale;
  }
}
