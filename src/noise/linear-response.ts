/**
 * The phase noise of a locked pattern by linear analysis of the guiding system around it
 * (docs/model.md, 'Noise of a locked pattern'). In the frame that turns with the pattern the
 * locked state y* is at rest, and a small disturbance obeys d(delta)/ds = J delta + inputs, with J
 * the Jacobian of the averaged field in that frame (s = eps tau, slow time). The phase-symmetry
 * directions are kept: their zero eigenvalues are what lets the common phase drift, which is the
 * array's own phase noise.
 *
 * Inputs, each a white or power-law process:
 * - fractional-frequency noise y_k(t) of each node's resonator: it enters where a detuning does,
 *   as (df/dDelta_k) y_k / eps (a fractional offset y is Delta = y / eps);
 * - the model's own additive noise sqrt(q) dW per unit tau on every x'': each rotating-frame
 *   coordinate of node k, mode j diffuses with intensity q / (2 omega_j^2) per unit tau
 *   (src/envelope/averaged-noise.ts), q / (2 omega_j^2 eps) per unit slow time.
 *
 * Outputs are phases: of each node's carrying mode, and of the array (their mean, as the soaks
 * define the array output). For an output phase phi = g . delta the transfer from an input b at
 * angular frequency w (slow units) is H(w) = g (i w I - J)^-1 b, and the one-sided spectrum in Hz
 * of phi(t) is S_phi(f) = sum over inputs of |H(w)|^2 S_in(f) with the input spectra written in
 * the units below (see phaseSpectra).
 */
import { carryingMode } from '../observe/amplitudes.js';
import { LuDecomposition, Matrix } from 'ml-matrix';
import type { GuideModel } from '../predict/guide-model.js';
import { fieldJacobian, type LockedState } from '../predict/locked-state.js';
import { subtractRotation } from '../predict/phase-orbits.js';
import { tauToSeconds } from '../scenario/units.js';
import { NO_POWER_LAW_NOISE, frequencyModulation, phaseModulation, type PowerLawNoise } from './power-law.js';

/** What the linear analysis of one locked state needs, built once. */
export interface LinearNoiseModel {
  /** Carrier frequency of the wanted mode (Hz): the frequency the phases are measured against. */
  carrierHz: number;
  /** Seconds per unit of slow time: c in t = s / c ... written as the factor s per second. */
  slowPerSecond: number;
  /** The Jacobian in the co-rotating frame (2 N M square, slow time). */
  jacobian: Matrix;
  /** Readout rows: phase of each node's carrying mode, then the array's mean phase. */
  readouts: Float64Array[];
  /** Per node, the response of the field to that node's fractional frequency (slow time per unit y). */
  frequencyInputs: Float64Array[];
  /** Per state coordinate, the two-sided intensity (per unit slow time) of the model's own white noise. */
  additiveIntensity: Float64Array;
  nodes: number;
}

/** Builds the linear model of the guide at a solved locked state (see the module header). */
export function linearNoiseModel(model: GuideModel, locked: LockedState): LinearNoiseModel {
  const { nodes, modes, epsilon, omega, noiseIntensity } = model.params;
  if (!(epsilon > 0)) throw new RangeError('the noise analysis needs eps > 0');
  const y = locked.state;
  const n = y.length;
  const jacobian = fieldJacobian(model.field, y);
  subtractRotation(jacobian, locked.generators, locked.rates, modes);
  const carrying = carryingMode(y, nodes, modes);
  const readouts: Float64Array[] = [];
  const array = new Float64Array(n);
  for (let k = 0; k < nodes; k++) {
    const g = new Float64Array(n);
    const i = 2 * (k * modes + carrying);
    const u = y[i];
    const v = y[i + 1];
    const r2 = u * u + v * v;
    if (!(r2 > 0)) throw new RangeError(`node ${k} does not oscillate in the locked state: its phase has no noise to speak of`);
    // phi = arg(u - i v) = atan2(-v, u): d phi = (v du - u dv) / r^2
    g[i] = v / r2;
    g[i + 1] = -u / r2;
    readouts.push(g);
    for (let c = 0; c < n; c++) array[c] += g[c] / nodes;
  }
  readouts.push(array);
  const frequencyInputs = detuningResponses(model, y).map((b) => b.map((x) => x / epsilon));
  const additiveIntensity = new Float64Array(n);
  for (let k = 0; k < nodes; k++) {
    for (let j = 0; j < modes; j++) {
      const d = noiseIntensity / (2 * omega[j] * omega[j] * epsilon);
      additiveIntensity[2 * (k * modes + j)] = d;
      additiveIntensity[2 * (k * modes + j) + 1] = d;
    }
  }
  const secondsPerTau = tauToSeconds(1, model.nominalFrequencyHz, omega[0]);
  return {
    carrierHz: model.nominalFrequencyHz,
    slowPerSecond: epsilon / secondsPerTau,
    jacobian,
    readouts,
    frequencyInputs,
    additiveIntensity,
    nodes,
  };
}

/** Central difference of the field in each node's detuning (the field is linear in it, so this is exact to rounding). */
function detuningResponses(model: GuideModel, y: Float64Array): Float64Array[] {
  const detuning = model.params.detuning;
  const plus = new Float64Array(y.length);
  const minus = new Float64Array(y.length);
  const out: Float64Array[] = [];
  for (let k = 0; k < model.params.nodes; k++) {
    const keep = detuning[k];
    const h = Math.max(1e-6, 1e-6 * Math.abs(keep));
    detuning[k] = keep + h;
    model.field(y, plus);
    detuning[k] = keep - h;
    model.field(y, minus);
    detuning[k] = keep;
    out.push(Float64Array.from(plus, (p, i) => (p - minus[i]) / (2 * h)));
  }
  return out;
}

/** One-sided phase spectra S_phi(f) in rad^2/Hz of every node and of the array, at the given Fourier frequencies. */
export interface PhaseSpectra {
  frequenciesHz: Float64Array;
  nodes: Float64Array[];
  array: Float64Array;
}

/**
 * S_phi(f) of every readout. With c slow units per second, f Hz is w = 2 pi f / c in slow time; a
 * frequency input of one-sided spectrum S_y(f) enters with |H(w)|^2 S_y(f) (for a lone resonator
 * H = (omega/eps)/(i w), which gives the familiar S_phi = (f0/f)^2 S_y); a white coordinate noise
 * of two-sided intensity D per unit slow time gives (2/c) |H(w)|^2 D. Phase-modulation noise is
 * added at each node's output, and to the array as the mean of independent outputs.
 */
export function phaseSpectra(linear: LinearNoiseModel, noise: readonly PowerLawNoise[], frequenciesHz: ArrayLike<number>): PhaseSpectra {
  const n = linear.jacobian.rows;
  const outputs = linear.readouts.length;
  const c = linear.slowPerSecond;
  const f0 = linear.carrierHz;
  const N = linear.nodes;
  const spectra = Array.from({ length: outputs }, () => new Float64Array(frequenciesHz.length));
  // (i w I - J)^T x = g for each readout g: then H_b = x . b for every input b (one solve per readout)
  const jt = linear.jacobian.transpose();
  const block = new Matrix(2 * n, 2 * n);
  const rhs = new Matrix(2 * n, outputs);
  linear.readouts.forEach((g, o) => g.forEach((value, i) => rhs.set(i, o, value)));
  for (let q = 0; q < frequenciesHz.length; q++) {
    const f = frequenciesHz[q];
    const w = (2 * Math.PI * f) / c;
    // real form of (i w I - J^T)(xr + i xi) = g: [-J^T, -w I; w I, -J^T][xr; xi] = [g; 0]
    for (let r = 0; r < n; r++) {
      for (let s = 0; s < n; s++) {
        const a = -jt.get(r, s);
        block.set(r, s, a);
        block.set(n + r, n + s, a);
        block.set(r, n + s, 0);
        block.set(n + r, s, 0);
      }
      block.set(r, n + r, -w);
      block.set(n + r, r, w);
    }
    const x = new LuDecomposition(block).solve(rhs);
    for (let o = 0; o < outputs; o++) {
      const transfer = (b: ArrayLike<number>): number => {
        let re = 0;
        let im = 0;
        for (let i = 0; i < n; i++) {
          re += x.get(i, o) * b[i];
          im += x.get(n + i, o) * b[i];
        }
        return re * re + im * im;
      };
      let total = 0;
      linear.frequencyInputs.forEach((b, k) => {
        const sy = frequencyModulation(noise[k] ?? NO_POWER_LAW_NOISE, f);
        if (sy > 0) total += transfer(b) * sy;
      });
      for (let i = 0; i < n; i++) {
        const d = linear.additiveIntensity[i];
        if (d > 0) total += (2 / c) * (x.get(i, o) ** 2 + x.get(n + i, o) ** 2) * d;
      }
      // phase modulation at the outputs: S_phi = (f0 / f)^2 S_y
      const pm = (k: number) => ((f0 * f0) / (f * f)) * phaseModulation(noise[k] ?? NO_POWER_LAW_NOISE, f);
      if (o < N) total += pm(o);
      else for (let k = 0; k < N; k++) total += pm(k) / (N * N);
      spectra[o][q] = total;
    }
  }
  return { frequenciesHz: Float64Array.from(frequenciesHz), nodes: spectra.slice(0, N), array: spectra[N] };
}
