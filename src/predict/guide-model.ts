/**
 * A private copy of the guiding system for prediction: its own parameters (copied from a live
 * session or taken from a scenario) and its own torus average, so Newton probes, continuation
 * sweeps and look-ahead integrations never touch the parameters a running session reads.
 */
import { ModelParameters } from '../model/parameters.js';
import { TorusAverage } from '../guide/torus-average.js';
import { SlowField } from '../model/slow-field.js';
import type { Scenario } from '../scenario/types.js';
import type { Field } from './orbit-complement.js';
import { couplingComponents } from './phase-orbits.js';
import type { Accuracy } from './locked-state.js';

export class GuideModel {
  readonly params: ModelParameters;
  readonly average: TorusAverage;
  readonly field: Field;

  constructor(
    readonly scenario: Scenario,
    source?: ModelParameters,
  ) {
    this.params = new ModelParameters(scenario);
    if (source) copyParameters(source, this.params);
    this.average = new TorusAverage(this.params, exactGrid(scenario.integrator.averagingGrid));
    this.field = (y, out) => this.average.evaluate(y, out);
  }

  get nodes(): number {
    return this.params.nodes;
  }

  get modes(): number {
    return this.params.modes;
  }

  get size(): number {
    return 2 * this.params.nodes * this.params.modes;
  }

  /** Connected parts of the graph with the current link weights. */
  parts(): Int32Array[] {
    return couplingComponents(this.params);
  }

  /** What the marginal band needs: eps, the slowest carrier and the coupling rate (marginTolerance). */
  get accuracy(): Accuracy {
    return { epsilon: this.params.epsilon, omegaMin: Math.min(...this.params.omega), couplingRate: this.couplingRate() };
  }

  /** kappa |sigma + i rho / omega_0| times the largest in-weight: the fastest phase-coupling rate (slow time). */
  couplingRate(): number {
    const p = this.params;
    const weight = Math.max(...Array.from(p.inWeightSum, Math.abs), 0);
    return Math.abs(p.strength) * Math.hypot(p.dissipative, p.reactive / p.omega[0]) * weight;
  }

  get nominalFrequencyHz(): number {
    return this.scenario.units.nominalFrequencyHz;
  }
}

/**
 * The smallest trapezoid grid that still averages the field exactly: the rule is exact for
 * trigonometric polynomials of degree below P in each angle and the field has degree
 * SlowField.HARMONIC_DEGREE (torus-average.ts), so P = degree + 1 gives the same fbar as the
 * guide's own grid (to rounding) at (P / grid)^modes of the cost. Never larger than `grid`.
 */
export function exactGrid(grid: number): number {
  return Math.min(grid, SlowField.HARMONIC_DEGREE + 1);
}

/** Copies every mutable model parameter (detuning, link weights, coupling, noise) from `from` to `to`. */
export function copyParameters(from: ModelParameters, to: ModelParameters): void {
  if (from.nodes !== to.nodes || from.modes !== to.modes || from.linkWeight.length !== to.linkWeight.length) {
    throw new RangeError('copyParameters: the two parameter sets describe different networks');
  }
  to.restoreValues(from.mutableValues());
}

/**
 * Text that changes whenever anything the guiding system's locked states depend on changes
 * (detuning, link weights, coupling constants); noise is left out.
 */
export function parameterFingerprint(params: ModelParameters): string {
  return [
    Array.from(params.detuning).join(','),
    Array.from(params.linkWeight).join(','),
    params.strength,
    params.reactive,
    params.dissipative,
  ].join('|');
}
