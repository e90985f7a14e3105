/**
 * Seeded power-law noise for statistical tests of the stability statistics, by the discrete
 * 1/f^a method of Kasdin and Walter (N. J. Kasdin, "Discrete simulation of colored noise and
 * stochastic processes and 1/f^alpha power law noise generation", Proc. IEEE 83(5), 1995; from
 * memory): white Gaussian noise w through the causal filter h_0 = 1,
 * h_k = h_{k-1} (a / 2 + k - 1) / k, whose spectrum is |1 - z^-1|^-a, i.e. ~ f^-a at low f.
 * a = 0 is white, 1 flicker, 2 a random walk.
 */
import { Random } from '../../src/util/random.js';

/** Power-law noise types by the exponent alpha of S_y(f) ~ f^alpha. */
export type PowerLawAlpha = 2 | 1 | 0 | -1 | -2;

export class PowerLawNoise {
  private readonly random: Random;
  private readonly filters = new Map<string, Float64Array>();

  constructor(seed: number) {
    this.random = new Random(seed);
  }

  /** `count` samples of 1/f^a noise (unit white-noise input). */
  colored(a: number, count: number): Float64Array {
    const h = this.filter(a, count);
    const w = new Float64Array(count);
    for (let i = 0; i < count; i++) w[i] = this.random.normal();
    if (a === 0) return w;
    const out = new Float64Array(count);
    for (let n = 0; n < count; n++) {
      let sum = 0;
      for (let k = 0; k <= n; k++) sum += h[k] * w[n - k];
      out[n] = sum;
    }
    return out;
  }

  /** The causal filter h of 1/f^a noise, `count` taps (shared by `colored` and `phaseImpulse`). */
  private filter(a: number, count: number): Float64Array {
    const key = `${a}:${count}`;
    let h = this.filters.get(key);
    if (!h) {
      h = new Float64Array(count);
      h[0] = 1;
      for (let k = 1; k < count; k++) h[k] = (h[k - 1] * (a / 2 + k - 1)) / k;
      this.filters.set(key, h);
    }
    return h;
  }

  /**
   * The phase series `phase(alpha, N)` draws as a linear filter of its white input:
   * x_k = sum_{j <= k} g_{k-j} w_j. Phase types: g = h; FM types: x_k = sum_{l < k} y_l, so
   * g_0 = 0 and g_t = h_0 + ... + h_{t-1}. Any statistic's exact expectation follows from g.
   */
  phaseImpulse(alpha: PowerLawAlpha, N: number): Float64Array {
    if (alpha >= 1) return this.filter(2 - alpha, N).slice();
    const h = this.filter(-alpha, N - 1);
    const g = new Float64Array(N);
    for (let t = 1; t < N; t++) g[t] = g[t - 1] + h[t - 1];
    return g;
  }

  /**
   * Phase data x (N points) of noise type alpha: phase itself is 1/f^(2 - alpha) noise
   * (S_x ~ f^(alpha - 2)); white and flicker PM are drawn as phase, the FM types as frequency
   * (1/f^(-alpha)) summed into phase.
   */
  phase(alpha: PowerLawAlpha, N: number): Float64Array {
    if (alpha >= 1) return this.colored(2 - alpha, N);
    const y = this.colored(-alpha, N - 1);
    const x = new Float64Array(N);
    for (let i = 1; i < N; i++) x[i] = x[i - 1] + y[i - 1];
    return x;
  }
}
