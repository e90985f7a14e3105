/**
 * Plain-JSON description of a locked state of the guiding system: its shape and symmetry, the
 * amplitudes and phase differences, the collective frequency shift, and its stability with the
 * margin also as a time constant in slow time, carrier periods and seconds.
 */
import { classifySnapshot, type PatternKind } from '../pattern/classify.js';
import { patternSymmetry } from '../pattern/symmetry.js';
import { modeAmplitudes, neighbourPhaseDifferences, readObservables } from '../observe/amplitudes.js';
import { combining } from '../pattern/combining.js';
import { deltaToPpm, omegaToOffsetPpm, tauToSeconds } from '../scenario/units.js';
import type { LockedStability, LockedState, Verdict } from './locked-state.js';
import type { GuideModel } from './guide-model.js';

/** A span of time in the time bases a reader may want (a time constant, a transit time). */
export interface Duration {
  /** In slow time (eps tau). */
  slowTime: number;
  /** The same in tau. */
  tau: number;
  /** The same in periods of mode 0. */
  periods: number;
  /** The same in seconds at the nominal frequency. */
  seconds: number;
}

export interface FrequencyShift {
  mode: number;
  /** Nodes that share this locked frequency (one connected part of the graph). */
  nodes: number[];
  /** Rotation rate in slow time (rad per unit eps tau): the frequency is omega_j + eps * rate. */
  rate: number;
  /** Relative frequency shift eps * rate / omega_j in ppm (null when eps = 0). */
  ppm: number | null;
}

export interface LockedPatternDescription {
  kind: PatternKind;
  /** Wave number where it applies: in-phase q = 0, anti-phase q = N/2. */
  q?: number;
  clusters?: number[][];
  /** The mode carrying the energy (whose pattern `kind` describes). */
  mode: number;
  /**
   * False when an unwanted mode carries the pattern: a design defect whatever its stability, as
   * the board's output then sits at that mode's frequency (see outputOffsetPpm).
   */
  wantedMode: boolean;
  /**
   * Frequency of the carrying mode's locked oscillation against the wanted mode's nominal
   * frequency, in ppm (about the mode offset, e.g. +1500, for an unwanted mode); null when eps = 0.
   */
  outputOffsetPpm: number | null;
  /** Largest phase distance of a node from the array's mean phase, carrying mode (rad). */
  spread: number | null;
  /** 20 log10(|mean a| / mean |a|) of the carrying mode (dB): the summed output against N parts in phase. */
  combiningLossDb: number | null;
  /** true / false when the margin is resolved, null when it is marginal. */
  stable: boolean | null;
  stability: Verdict;
  /** Largest real part of the reduced Jacobian's eigenvalues (slow time). */
  margin: number;
  /** Half-width of the marginal band around 0 (see marginTolerance). */
  marginTolerance: number;
  /** e-folding time 1/|margin| of the slowest perturbation (growth when unstable); null when not finite. */
  timeConstant: Duration | null;
  eigenvalues: { re: number; im: number }[];
  /** arg a_{k+1} - arg a_k of the carrying mode, wrapped to (-pi, pi]. */
  phaseDifferences: number[];
  /** |a_kj| per node, per mode. */
  amplitudes: number[][];
  /** Mean |a_kj| over the nodes, per mode. */
  meanAmplitude: number[];
  /** Collective frequency shift per mode (slow time), 0 for a mode at rest (first part's rate if several). */
  rotation: number[];
  /** Each mode's own shift from its own nominal frequency in ppm (relative frequency), null when eps = 0. */
  frequencyShiftPpm: (number | null)[];
  /** Every locked frequency: one per oscillating mode and connected part. */
  shifts: FrequencyShift[];
  /** Spatio-temporal symmetry of the carrying mode's amplitudes in the graph's group. */
  symmetry: { element: string; permutation: number[]; phase: number }[];
  residual: number;
  /** The locked state itself (rotating frame, node-major, mode-minor [u, v] pairs). */
  state: number[];
}

/** A span of slow time in every time base; null for a non-finite or negative span or eps = 0. */
export function durationOf(slowTime: number, model: GuideModel): Duration | null {
  const eps = model.params.epsilon;
  if (!(slowTime >= 0) || !Number.isFinite(slowTime) || !(eps > 0)) return null;
  const tau = slowTime / eps;
  const omega0 = model.params.omega[0];
  return { slowTime, tau, periods: (tau * omega0) / (2 * Math.PI), seconds: tauToSeconds(tau, model.nominalFrequencyHz, omega0) };
}

/** Time constant 1 / |rate| of a rate in slow time; null for 0, non-finite rates or eps = 0. */
export function timeConstantOf(rate: number, model: GuideModel): Duration | null {
  if (!(Math.abs(rate) > 0) || !Number.isFinite(rate)) return null;
  return durationOf(1 / Math.abs(rate), model);
}

/** The description of a solved locked state (see LockedPatternDescription). */
export function describeLockedState(
  model: GuideModel,
  locked: LockedState,
  stability: LockedStability,
  group: readonly Int32Array[],
  symmetryTolerance = 1e-6,
): LockedPatternDescription {
  const { nodes, modes, epsilon, omega } = model.params;
  const observed = readObservables(locked.state, nodes, modes);
  const mode = observed.dominantMode;
  const { re, im } = modeAmplitudes(locked.state, nodes, modes, mode);
  const shape = classifySnapshot(re, im);
  const shifts: FrequencyShift[] = locked.generators.map((g, c) => ({
    mode: g.mode,
    nodes: Array.from(g.nodes),
    rate: locked.rates[c],
    ppm: epsilon > 0 ? deltaToPpm(locked.rates[c] / omega[g.mode], epsilon) : null,
  }));
  const rotation = Array.from({ length: modes }, (_, j) => shifts.find((s) => s.mode === j)?.rate ?? 0);
  const combined = combining(re, im);
  const description: LockedPatternDescription = {
    kind: shape.kind,
    mode,
    wantedMode: mode === 0,
    outputOffsetPpm: epsilon > 0 ? omegaToOffsetPpm(omega[mode] + epsilon * rotation[mode], omega[0]) : null,
    spread: combined.spread,
    combiningLossDb: combined.lossDb,
    stable: stability.verdict === 'marginal' ? null : stability.verdict === 'stable',
    stability: stability.verdict,
    margin: stability.margin,
    marginTolerance: stability.tolerance,
    timeConstant: timeConstantOf(stability.margin, model),
    eigenvalues: stability.eigenvalues,
    phaseDifferences: mode === 0 ? observed.phaseDifferences : neighbourPhaseDifferences(observed.phase, mode),
    amplitudes: observed.amplitude,
    meanAmplitude: Array.from({ length: modes }, (_, j) => observed.amplitude.reduce((s, a) => s + a[j], 0) / nodes),
    rotation,
    frequencyShiftPpm: rotation.map((rate, j) => (epsilon > 0 ? deltaToPpm(rate / omega[j], epsilon) : null)),
    shifts,
    symmetry: patternSymmetry(re, im, group, symmetryTolerance).map((s) => ({
      element: s.text,
      permutation: Array.from(s.element),
      phase: s.phase,
    })),
    residual: locked.residual,
    state: Array.from(locked.state),
  };
  if (shape.q !== undefined) description.q = shape.q;
  if (shape.clusters) description.clusters = shape.clusters;
  return description;
}
