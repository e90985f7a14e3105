import type { ModelParameters } from './parameters.js';

/**
 * The rotating-frame vector field f(y, theta) of design section 3, without the factor eps:
 * y' = eps f(y, theta) with y = [u_00, v_00, u_01, v_01, ...] (node-major, mode-minor) and
 *   x = u cos(theta_j) + v sin(theta_j),   x' = omega_j (-u sin(theta_j) + v cos(theta_j)),
 *   u' = -(eps F / omega_j) sin(theta_j),   v' = (eps F / omega_j) cos(theta_j).
 * The full integrator and the torus average both call this one kernel, so the guiding system
 * always averages exactly the right-hand side that the full system integrates.
 */
export class SlowField {
  private readonly signal: Float64Array;
  private readonly signalRate: Float64Array;
  private readonly x: Float64Array;
  private readonly xdot: Float64Array;

  constructor(readonly params: ModelParameters) {
    const n = params.nodes;
    this.signal = new Float64Array(n);
    this.signalRate = new Float64Array(n);
    this.x = new Float64Array(n * params.modes);
    this.xdot = new Float64Array(n * params.modes);
  }

  /** out = f(y, theta) where cos/sin hold cos(theta_j), sin(theta_j) per mode. */
  evaluate(cos: Float64Array, sin: Float64Array, y: Float64Array, out: Float64Array): void {
    const p = this.params;
    const n = p.nodes;
    const m = p.modes;
    const omega = p.omega;
    const { signal, signalRate, x, xdot } = this;

    for (let k = 0; k < n; k++) {
      let s = 0;
      let sd = 0;
      for (let j = 0; j < m; j++) {
        const i = k * m + j;
        const u = y[2 * i];
        const v = y[2 * i + 1];
        const xi = u * cos[j] + v * sin[j];
        const xdi = omega[j] * (v * cos[j] - u * sin[j]);
        x[i] = xi;
        xdot[i] = xdi;
        s += xi;
        sd += xdi;
      }
      signal[k] = s;
      signalRate[k] = sd;
    }

    const kr = p.strength * p.reactive;
    const ks = p.strength * p.dissipative;
    const { inStart, inFrom, inLink, linkWeight, inWeightSum, gain, loss, detuning } = p;
    for (let k = 0; k < n; k++) {
      let pull = 0;
      let pullRate = 0;
      for (let e = inStart[k]; e < inStart[k + 1]; e++) {
        const w = linkWeight[inLink[e]];
        pull += w * signal[inFrom[e]];
        pullRate += w * signalRate[inFrom[e]];
      }
      const sk = signal[k];
      const sdk = signalRate[k];
      const coupling = kr * (pull - inWeightSum[k] * sk) + ks * (pullRate - inWeightSum[k] * sdk);
      const sustain = (1 - sk * sk) * sdk;
      const twoDelta = 2 * detuning[k];
      for (let j = 0; j < m; j++) {
        const i = k * m + j;
        const w = omega[j];
        const force = gain[j] * sustain - loss[j] * xdot[i] - twoDelta * w * w * x[i] + coupling;
        const scaled = force / w;
        out[2 * i] = -scaled * sin[j];
        out[2 * i + 1] = scaled * cos[j];
      }
    }
  }
}
