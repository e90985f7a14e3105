/**
 * The noise of a locked pattern at every time scale (docs/model.md, 'Noise of a locked pattern'):
 * phase noise L(f) = S_phi(f) / 2 of the array output, of each node and of one uncoupled part,
 * and ADEV, MDEV and TDEV of the same from the spectra (spectral-deviations.ts), from the carrier
 * period up to far beyond what any simulation could step. The cost does not depend on the
 * averaging time: one linear solve per Fourier frequency.
 */
import type { GuideModel } from '../predict/guide-model.js';
import { GuideModel as Guide } from '../predict/guide-model.js';
import { loneAmplitude } from '../predict/catalogue.js';
import { solveLockedState, type LockedState } from '../predict/locked-state.js';
import type { Scenario } from '../scenario/types.js';
import { tauToSeconds } from '../scenario/units.js';
import { linearNoiseModel, phaseSpectra, type PhaseSpectra } from './linear-response.js';
import { addPowerLaw, type PowerLawNoise } from './power-law.js';
import { deviationFromSpectrum, type FrequencySpectrum } from './spectral-deviations.js';

export interface NoiseAnalysisOptions {
  /** Per node, power-law frequency and phase noise beside the model's own (default none). */
  partNoise?: readonly PowerLawNoise[];
  /** Measurement bandwidth fh (Hz) of the spectra and the deviations; default and at most f0 / 2. */
  bandwidthHz?: number;
  /** Longest averaging time (s); default 1e5. */
  longestTauSeconds?: number;
}

/**
 * The bandwidth is f0 / 2 unless told otherwise: the Nyquist frequency of a phase record taken once
 * per carrier period, which is what a counter with tau0 = 1/f0 (and a soak's series) sees, so the
 * deviations reach down to the carrier period. White PM's ADEV grows with the bandwidth, so give
 * the instrument's own where it matters. Offsets beyond about f0 / 100 rest on the averaged model
 * outside its range: there the resonator's own selectivity, which it leaves out, shapes real noise.
 */
export const AVERAGED_MODEL_OFFSET_LIMIT = 0.01;
/** Fourier frequencies of the spectra, per decade (the deviations interpolate between them). */
const SPECTRUM_POINTS_PER_DECADE = 12;
/** Averaging times per decade of the deviation tables. */
const TAUS_PER_DECADE = 4;

export interface DeviationTable {
  tau: number[];
  array: number[];
  nodes: number[][];
  uncoupled: number[];
}

export interface LockedNoise {
  carrierHz: number;
  bandwidthHz: number;
  /**
   * f0 AVERAGED_MODEL_OFFSET_LIMIT: offsets above it, and deviations at tau below about its
   * inverse, rest on the averaged model beyond its range (see AVERAGED_MODEL_OFFSET_LIMIT).
   */
  averagedModelLimitHz: number;
  offsetsHz: number[];
  /** Single-sideband phase noise L(f) = 10 log10(S_phi(f) / 2), dBc/Hz. */
  phaseNoise: { array: number[]; nodes: number[][]; uncoupled: number[] };
  adev: DeviationTable;
  mdev: DeviationTable;
  tdev: DeviationTable;
  /**
   * The offset (Hz) below which a node of the array is quieter than an uncoupled part by at
   * least half its low-offset improvement in dB (where the coupling takes hold); null when the
   * coupling does not improve a node.
   */
  lockingBandwidthHz: number | null;
  /** The improvement of a node over an uncoupled part at the lowest offset reported (dB). */
  nodeImprovementDb: number;
  /** The same for the array output. */
  arrayImprovementDb: number;
}

/**
 * The model's own noise as power-law coefficients where it has one: a random walk of each node's
 * Delta (intensity w per unit tau) is random-walk FM, y = eps Delta with variance eps^2 w per unit
 * tau, and a Wiener process of variance rate D per second has S_y(f) = D / (2 pi^2 f^2).
 */
export function modelPowerLawNoise(model: GuideModel): PowerLawNoise[] {
  const p = model.params;
  const secondsPerTau = tauToSeconds(1, model.nominalFrequencyHz, p.omega[0]);
  const rate = (p.epsilon * p.epsilon * p.detuningWalk) / secondsPerTau;
  return Array.from({ length: p.nodes }, () => ({ h2: 0, h1: 0, h0: 0, hm1: 0, hm2: rate / (2 * Math.PI * Math.PI) }));
}

/** The analysis of the locked state `locked` of `model` (see the module header). */
export function lockedPatternNoise(model: GuideModel, locked: LockedState, options: NoiseAnalysisOptions = {}): LockedNoise {
  const f0 = model.nominalFrequencyHz;
  const bandwidthHz = Math.min(options.bandwidthHz ?? f0 / 2, f0 / 2);
  const longest = options.longestTauSeconds ?? 1e5;
  const shortest = 1 / f0;
  const parts = options.partNoise;
  const noise = modelPowerLawNoise(model).map((own, k) => (parts?.[k] ? addPowerLaw(own, parts[k]) : own));
  // spectra from well below 1 / longest tau (the deviations reach down to 1e-5 / tau) to the bandwidth
  const frequencies = logGrid(1e-6 / longest, bandwidthHz, SPECTRUM_POINTS_PER_DECADE);
  const coupled = phaseSpectra(linearNoiseModel(model, locked), noise, frequencies);
  const part = uncoupledPart(model);
  const single = phaseSpectra(linearNoiseModel(part.model, part.locked), [noise[0]], frequencies).nodes[0];
  const taus = logGrid(shortest, longest, TAUS_PER_DECADE);
  const yOf = (phi: Float64Array): FrequencySpectrum => fractionalFrequency(frequencies, phi, f0);
  const arrayY = yOf(coupled.array);
  const nodeY = coupled.nodes.map(yOf);
  const singleY = yOf(single);
  const table = (deviation: (s: FrequencySpectrum, tau: number) => number): DeviationTable => ({
    tau: Array.from(taus),
    array: Array.from(taus, (tau) => deviation(arrayY, tau)),
    nodes: nodeY.map((s) => Array.from(taus, (tau) => deviation(s, tau))),
    uncoupled: Array.from(taus, (tau) => deviation(singleY, tau)),
  });
  const mdev = table((s, tau) => deviationFromSpectrum(s, tau, bandwidthHz, 'mdev'));
  const reported = reportedOffsets(frequencies, f0);
  const dbc = (phi: Float64Array) => reported.map((i) => 10 * Math.log10(phi[i] / 2));
  const improvement = (phi: Float64Array, i: number) => 10 * Math.log10(single[i] / phi[i]);
  const first = reported[0];
  return {
    carrierHz: f0,
    bandwidthHz,
    averagedModelLimitHz: f0 * AVERAGED_MODEL_OFFSET_LIMIT,
    offsetsHz: reported.map((i) => frequencies[i]),
    phaseNoise: { array: dbc(coupled.array), nodes: coupled.nodes.map(dbc), uncoupled: dbc(single) },
    adev: table((s, tau) => deviationFromSpectrum(s, tau, bandwidthHz, 'adev')),
    mdev,
    tdev: timeDeviations(mdev),
    lockingBandwidthHz: lockingBandwidth(coupled, single, reported),
    nodeImprovementDb: improvement(coupled.nodes[0], first),
    arrayImprovementDb: improvement(coupled.array, first),
  };
}

/** TDEV(tau) = (tau / sqrt 3) MDEV(tau) (NIST SP 1065), row by row. */
function timeDeviations(mdev: DeviationTable): DeviationTable {
  const scale = (row: number[]) => row.map((m, i) => (mdev.tau[i] / Math.sqrt(3)) * m);
  return { tau: mdev.tau, array: scale(mdev.array), nodes: mdev.nodes.map(scale), uncoupled: scale(mdev.uncoupled) };
}

/**
 * One part alone: node 0's parameters with no links, at its own locked (free-running) state: the
 * reference a node of the array is compared with.
 */
function uncoupledPart(model: GuideModel): { model: GuideModel; locked: LockedState } {
  const s = model.scenario;
  const scenario: Scenario = {
    ...s,
    nodes: 1,
    topology: { edges: [] },
    links: [],
    detuning: [model.params.detuning[0]],
    initial: { pattern: { q: 0, amplitude: 1, mode: 0 } },
  };
  const part = new Guide(scenario);
  part.params.noiseIntensity = model.params.noiseIntensity;
  part.params.detuningWalk = model.params.detuningWalk;
  const modes = part.modes;
  const seed = new Float64Array(2 * modes);
  seed[0] = loneAmplitude(part.params.gain[0], part.params.loss[0]);
  const locked = solveLockedState(part.field, seed, modes, { parts: part.parts() });
  if (!locked.converged)
    throw new RangeError('a lone part of this board does not oscillate on its wanted mode: there is no free-running reference');
  return { model: part, locked };
}

/** S_y(f) = (f / f0)^2 S_phi(f), interpolated log-log between the grid points and extended by the end slopes. */
function fractionalFrequency(frequencies: Float64Array, phi: Float64Array, f0: number): FrequencySpectrum {
  const n = frequencies.length;
  const logF = Float64Array.from(frequencies, Math.log);
  const logS = Float64Array.from(phi, (s, i) => Math.log(Math.max(s, 1e-300) * (frequencies[i] / f0) ** 2));
  const slope = (i: number) => (logS[i + 1] - logS[i]) / (logF[i + 1] - logF[i]);
  const lowSlope = slope(0);
  const highSlope = slope(n - 2);
  return (f: number) => {
    const x = Math.log(f);
    if (x <= logF[0]) return Math.exp(logS[0] + lowSlope * (x - logF[0]));
    if (x >= logF[n - 1]) return Math.exp(logS[n - 1] + highSlope * (x - logF[n - 1]));
    let lo = 0;
    let hi = n - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (logF[mid] <= x) lo = mid;
      else hi = mid;
    }
    return Math.exp(logS[lo] + slope(lo) * (x - logF[lo]));
  };
}

/** Offsets shown as L(f): from 1e-3 Hz (or the lowest computed) to the bandwidth. */
function reportedOffsets(frequencies: Float64Array, f0: number): number[] {
  const out: number[] = [];
  frequencies.forEach((f, i) => {
    if (f >= 1e-3 && f <= f0 / 2) out.push(i);
  });
  return out;
}

function lockingBandwidth(coupled: PhaseSpectra, single: Float64Array, reported: number[]): number | null {
  const gain = reported.map((i) => 10 * Math.log10(single[i] / coupled.nodes[0][i]));
  const low = gain[0];
  if (!(low > 0.5)) return null;
  for (let r = 1; r < reported.length; r++) {
    if (gain[r] <= low / 2) {
      // interpolate in log f between the last point above half and this one
      const f1 = Math.log(coupled.frequenciesHz[reported[r - 1]]);
      const f2 = Math.log(coupled.frequenciesHz[reported[r]]);
      const t = (gain[r - 1] - low / 2) / (gain[r - 1] - gain[r]);
      return Math.exp(f1 + t * (f2 - f1));
    }
  }
  return null;
}

function logGrid(from: number, to: number, perDecade: number): Float64Array {
  const count = Math.max(2, Math.ceil(Math.log10(to / from) * perDecade) + 1);
  return Float64Array.from({ length: count }, (_, i) => from * (to / from) ** (i / (count - 1)));
}
