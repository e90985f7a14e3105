/**
 * The parts' power-law noise generated in time (docs/model.md, 'Generated part noise'), one node at
 * a time, step by step: for each step of length h (seconds) it gives each node's mean fractional
 * frequency over the step (the frequency-modulation terms, which the session turns into the
 * node's detuning for that step) and the time error of its output (white PM, added where the
 * phase is read). Every term is generated exactly in distribution at the step boundaries:
 * - white FM (S_y = h0): the mean of y over h is Gaussian with variance h0 / (2 h) (the two-sided
 *   density of white noise with one-sided S_y = h0 is h0 / 2).
 * - random-walk FM (S_y = h-2 / f^2): y is a Wiener process of rate D = 2 pi^2 h-2 per second
 *   (one-sided S_y of such a process is D / (2 pi^2 f^2)); y at the end of the step and its
 *   integral over the step are drawn jointly (variances D h, D h^3 / 3, covariance D h^2 / 2).
 * - flicker FM (S_y = h-1 / f): a sum of relaxation (Ornstein-Uhlenbeck) processes with rates
 *   lambda_i = 2 pi f_i spaced POLES_PER_DECADE per decade and variance rates sigma_i^2 = c lambda_i,
 *   c = 2 h-1 ln r (r the spacing ratio): the one-sided spectrum sum 2 c lambda_i / (lambda_i^2 +
 *   (2 pi f)^2) is h-1 / f within FLICKER_ACCURACY_DB from f_hi 10^-FLICKER_DECADES to f_hi, f_hi the
 *   Nyquist frequency 1 / (2 T) of the nominal step T. Each process and its integral over a step are
 *   drawn jointly from their exact Gaussian law, so any step length is exact.
 * - white PM (S_y = h2 f^2, S_x = h2 / (4 pi^2)): an independent time error per step of variance
 *   h2 f_h / (4 pi^2) with f_h = 1 / (2 T), so ADEV^2 = 3 f_h h2 / (4 pi^2 tau^2) (NIST SP 1065).
 * The generator has its own seeded stream (so adding part noise leaves the model's white noise as it
 * was), and its whole state is plain JSON: a run resumed from a checkpoint continues bit for bit.
 */
import type { PartNoise } from '../scenario/types.js';
import { Random, type RandomState } from '../util/random.js';

/** Relaxation processes per decade: 2 keeps the ripple of the sum within about 0.01 dB inside the band (1 per decade gives 0.27 dB). */
export const POLES_PER_DECADE = 2;
/** Decades of the 1/f band below the Nyquist frequency of a step: at the demo's 16 us step they reach below 1e-3 Hz, beyond any run. */
export const FLICKER_DECADES = 8;
/** Extra decades of poles beyond each end of the band, so its edges are not the sum's roll-off (1 decade leaves 0.15 dB there, 2 leave 0.012 dB). */
const POLE_MARGIN_DECADES = 2;
/** The sum's spectrum stays within this of h-1 / f over the band (computed from the pole layout: 0.012 dB; tested). */
export const FLICKER_ACCURACY_DB = 0.05;
/** Below this lambda h the integral's variance is taken from its series (the closed form cancels). */
const SERIES_BELOW = 1e-3;

export interface PartNoiseSourceState {
  random: RandomState;
  /** Flicker processes, node by node (POLES per node). */
  flicker: number[];
  /** Random-walk FM value y per node. */
  walk: number[];
}

/** The flicker band of a nominal step T (s): [low, high] in Hz. */
export function flickerBand(stepSeconds: number): { lowHz: number; highHz: number } {
  const highHz = 1 / (2 * stepSeconds);
  return { lowHz: highHz * 10 ** -FLICKER_DECADES, highHz };
}

/** The relaxation rates lambda_i (rad/s) of the flicker sum for a nominal step T. */
export function flickerRates(stepSeconds: number): Float64Array {
  const { lowHz } = flickerBand(stepSeconds);
  const count = (FLICKER_DECADES + 2 * POLE_MARGIN_DECADES) * POLES_PER_DECADE + 1;
  return Float64Array.from({ length: count }, (_, i) => 2 * Math.PI * lowHz * 10 ** (i / POLES_PER_DECADE - POLE_MARGIN_DECADES));
}

/** The exact one-sided spectrum of the flicker sum made for h-1 (what the generator really makes). */
export function flickerSumSpectrum(hm1: number, stepSeconds: number, f: number): number {
  const c = 2 * hm1 * Math.log(10 ** (1 / POLES_PER_DECADE));
  let sum = 0;
  for (const lambda of flickerRates(stepSeconds)) sum += (2 * c * lambda) / (lambda * lambda + (2 * Math.PI * f) ** 2);
  return sum;
}

export class PartNoiseSource {
  readonly nodes: number;
  /** Mean fractional frequency of each node over the last step (FM terms). */
  readonly meanFrequency: Float64Array;
  /** Output time error (s) of each node at the end of the last step (white PM). */
  readonly outputTimeError: Float64Array;
  private readonly random: Random;
  private readonly rates: Float64Array;
  private readonly poles: number;
  private readonly flicker: Float64Array;
  private readonly walk: Float64Array;
  private readonly h0: Float64Array;
  private readonly walkRate: Float64Array;
  private readonly flickerScale: Float64Array;
  private readonly pmSigma: Float64Array;
  // per pole, for the cached step length, with sigma^2 = lambda: decay, integral of the decay, Cholesky factor
  private readonly decay: Float64Array;
  private readonly carry: Float64Array;
  private readonly l11: Float64Array;
  private readonly l21: Float64Array;
  private readonly l22: Float64Array;
  private cachedStep = NaN;

  constructor(noise: readonly PartNoise[], stepSeconds: number, seed: number) {
    if (!(stepSeconds > 0)) throw new RangeError(`the nominal step must be > 0 s (got ${stepSeconds})`);
    this.nodes = noise.length;
    this.random = new Random(seed);
    this.rates = flickerRates(stepSeconds);
    this.poles = this.rates.length;
    this.flicker = new Float64Array(this.nodes * this.poles);
    this.walk = new Float64Array(this.nodes);
    this.meanFrequency = new Float64Array(this.nodes);
    this.outputTimeError = new Float64Array(this.nodes);
    const c = 2 * Math.log(10 ** (1 / POLES_PER_DECADE));
    const nyquist = 1 / (2 * stepSeconds);
    this.h0 = Float64Array.from(noise, (n) => n.h0);
    this.walkRate = Float64Array.from(noise, (n) => 2 * Math.PI * Math.PI * n.hm2);
    this.flickerScale = Float64Array.from(noise, (n) => Math.sqrt(c * n.hm1));
    this.pmSigma = Float64Array.from(noise, (n) => Math.sqrt((n.h2 * nyquist) / (4 * Math.PI * Math.PI)));
    this.decay = new Float64Array(this.poles);
    this.carry = new Float64Array(this.poles);
    this.l11 = new Float64Array(this.poles);
    this.l21 = new Float64Array(this.poles);
    this.l22 = new Float64Array(this.poles);
    // start the flicker processes in their stationary law, so the noise has no start-up transient
    for (let k = 0; k < this.nodes; k++) {
      if (!(this.flickerScale[k] > 0)) continue;
      for (let i = 0; i < this.poles; i++) this.flicker[k * this.poles + i] = this.flickerScale[k] * Math.sqrt(0.5) * this.random.normal();
    }
  }

  /** Advance every node by h seconds (any h > 0); results in meanFrequency and outputTimeError. */
  step(h: number): void {
    if (h !== this.cachedStep) this.prepare(h);
    const { random, poles, flicker, walk, decay, carry, l11, l21, l22 } = this;
    for (let k = 0; k < this.nodes; k++) {
      let integral = 0;
      const h0 = this.h0[k];
      if (h0 > 0) integral += Math.sqrt((h0 * h) / 2) * random.normal();
      const rate = this.walkRate[k];
      if (rate > 0) {
        const z1 = random.normal();
        const z2 = random.normal();
        const s = Math.sqrt(rate * h);
        integral += walk[k] * h + s * h * (0.5 * z1 + Math.sqrt(1 / 12) * z2);
        walk[k] += s * z1;
      }
      const scale = this.flickerScale[k];
      if (scale > 0) {
        const base = k * poles;
        for (let i = 0; i < poles; i++) {
          const z1 = random.normal();
          const z2 = random.normal();
          const x = flicker[base + i];
          integral += x * carry[i] + scale * (l21[i] * z1 + l22[i] * z2);
          flicker[base + i] = x * decay[i] + scale * l11[i] * z1;
        }
      }
      this.meanFrequency[k] = integral / h;
      this.outputTimeError[k] = this.pmSigma[k] > 0 ? this.pmSigma[k] * random.normal() : 0;
    }
  }

  save(): PartNoiseSourceState {
    return { random: this.random.getState(), flicker: Array.from(this.flicker), walk: Array.from(this.walk) };
  }

  load(state: PartNoiseSourceState): void {
    if (state.flicker.length !== this.flicker.length || state.walk.length !== this.nodes) {
      throw new RangeError('the part-noise checkpoint does not belong to this scenario (node or pole count differs)');
    }
    this.random.setState(state.random);
    this.flicker.set(state.flicker);
    this.walk.set(state.walk);
  }

  /**
   * Exact law of dx = -lambda x dt + sqrt(lambda) dW over h: x1 = a x0 + xi, int x = x0 (1 - a) / lambda + eta,
   * Var xi = (1 - a^2) / 2, Var eta = (lambda h - 2 (1 - a) + (1 - a^2) / 2) / lambda^2,
   * Cov = (1 - a)^2 / (2 lambda), a = exp(-lambda h).
   */
  private prepare(h: number): void {
    for (let i = 0; i < this.poles; i++) {
      const lambda = this.rates[i];
      const u = lambda * h;
      const oneMinusA = -Math.expm1(-u);
      const oneMinusA2 = -Math.expm1(-2 * u);
      const varX = oneMinusA2 / 2;
      const varI =
        u < SERIES_BELOW
          ? lambda * h * h * h * (1 / 3 - u / 4 + (7 * u * u) / 60)
          : (u - 2 * oneMinusA + oneMinusA2 / 2) / (lambda * lambda);
      const cov = (oneMinusA * oneMinusA) / (2 * lambda);
      this.decay[i] = 1 - oneMinusA;
      this.carry[i] = oneMinusA / lambda;
      const a11 = Math.sqrt(varX);
      this.l11[i] = a11;
      this.l21[i] = a11 > 0 ? cov / a11 : 0;
      this.l22[i] = Math.sqrt(Math.max(varI - this.l21[i] * this.l21[i], 0));
    }
    this.cachedStep = h;
  }
}
