/**
 * The validated, dimensionless scenario every other part of the engine consumes.
 * Raw JSON (with optional engineering-unit fields) becomes this through `parseScenario`;
 * nothing downstream ever sees ppm, Hz or quality factors.
 */

import type { PartsDerivation } from './parts/types.js';

/** A directed, weighted link: carries node `from`'s signal into node `to` (A[to][from] = weight). */
export interface Link {
  from: number;
  to: number;
  weight: number;
}

export type Topology = 'ring-one-way' | 'ring-two-way' | { edges: Link[] };

export interface ModeSpec {
  /** Natural frequency omega_j (dimensionless; mode 0 is the wanted mode). */
  omega: number;
  /** Gain g_j of the sustaining element. */
  gain: number;
  /** Extra loss d_j. */
  loss: number;
}

export interface CouplingSpec {
  /** kappa */
  strength: number;
  /** rho */
  reactive: number;
  /** sigma */
  dissipative: number;
}

export interface NoiseSpec {
  /** White-noise intensity q added to every x'' equation (sqrt(q) dW per unit tau). */
  intensity: number;
  /** Intensity of a random walk of each node's Delta_k (per unit tau). */
  detuningWalk: number;
  /** Seed of the noise generator (unsigned 32-bit integer). */
  seed: number;
  /**
   * Per node, the part's power-law fractional-frequency noise (src/scenario/noise-spec.ts: given as
   * coefficients or fitted to a phase-noise spec); absent when the scenario gives none.
   */
  parts?: PartNoise[];
}

/** One node's power-law noise as the engine generates it (h1, flicker PM, is not generated). */
export interface PartNoise {
  /** White PM, S_y = h2 f^2 (added at the output). */
  h2: number;
  /** White FM, S_y = h0. */
  h0: number;
  /** Flicker FM, S_y = h-1 / f. */
  hm1: number;
  /** Random-walk FM, S_y = h-2 / f^2. */
  hm2: number;
}

/** x and x' of one mode of one node, in the original coordinates. */
export interface ModeState {
  x: number;
  xdot: number;
}

export type InitialSpec =
  | { state: ModeState[][] }
  /** Random phases; magnitudes uniform in [A/2, A] with A one number or one per mode. */
  | { random: { seed: number; amplitude: number | number[] } }
  | { pattern: { q: number; amplitude: number; mode: number } };

export interface IntegratorSpec {
  /** Micro steps per carrier period of the fastest mode. */
  stepsPerPeriod: number;
  /** Carrier periods (of mode 0) per macro tick. */
  macroPeriods: number;
  /** Grid points per fast angle for the torus average of the guiding system. */
  averagingGrid: number;
}

export interface UnitsSpec {
  /** Frequency in Hz that mode 0 (omega_0) stands for; tau = omega_0-periods * 2 pi. */
  nominalFrequencyHz: number;
  /**
   * True when the scenario did not give `nominalFrequencyHz` and DEFAULT_NOMINAL_FREQUENCY_HZ
   * stands in: every time in seconds is then an assumption, and is shown as one.
   */
  nominalFrequencyAssumed: boolean;
}

export interface Scenario {
  name: string;
  nodes: number;
  topology: Topology;
  /** Links after expanding the topology; the order fixes link indices. */
  links: Link[];
  epsilon: number;
  modes: ModeSpec[];
  coupling: CouplingSpec;
  /** Delta_k per node (relative mistuning eps * Delta_k). */
  detuning: number[];
  noise: NoiseSpec;
  initial: InitialSpec;
  integrator: IntegratorSpec;
  units: UnitsSpec;
  /** Present when the scenario described the board by its parts: what the model numbers follow from. */
  parts?: PartsDerivation;
  /** Temperature, aging and supply (src/scenario/environment.ts); absent when the scenario gives none. */
  environment?: EnvironmentSpec;
}

/**
 * A quantity over board time (seconds from the start of the run): a start value, steps and
 * linear ramps at given times, and an optional sinusoidal cycle on top.
 */
export interface ProfileSpec {
  start: number;
  /** In time order; `over` 0 is a step. */
  changes: { at: number; by: number; over: number }[];
  cycle: { amplitude: number; periodS: number; phaseS: number } | null;
}

/** Frequency-temperature curve of one part: ppm = a1 d + a2 d^2 + a3 d^3 with d = T - inflectionC. */
export interface TemperatureCurve {
  inflectionC: number;
  a1PpmPerC: number;
  a2PpmPerC2: number;
  a3PpmPerC3: number;
}

/** Aging of one part from the start of the run: logarithmic A ln(1 + t / t1), or linear ppm per day. */
export type AgingSpec = { logPpm: number; timeConstantS: number } | { ppmPerDay: number };

export interface EnvironmentSpec {
  /** Ambient temperature (deg C) and per-node offsets from it (a board gradient), with one curve per node. */
  temperature: { ambient: ProfileSpec; offsetsC: number[]; curves: TemperatureCurve[] } | null;
  aging: AgingSpec[] | null;
  /** Supply voltage (V) against its nominal value, with one pushing coefficient per node. */
  supply: { voltage: ProfileSpec; nominalV: number; pushingPpmPerV: number[] } | null;
}
