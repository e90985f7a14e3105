import type { ModeState } from '../../src/scenario/types.js';
import { Random } from '../../src/util/random.js';

/**
 * Original-coordinate state at tau = 0 for given complex amplitudes a_kj (x = Re a,
 * x' = omega Re(i a) = -omega Im a), optionally jittered by a seeded relative perturbation.
 */
export function stateFromAmplitudes(amplitudes: { re: number; im: number }[][], omega: number[], jitter = 0, seed = 1): ModeState[][] {
  const random = new Random(seed);
  return amplitudes.map((modes) =>
    modes.map((a, j) => {
      const re = a.re * (1 + jitter * (2 * random.uniform() - 1)) - jitter * (2 * random.uniform() - 1) * a.im;
      const im = a.im * (1 + jitter * (2 * random.uniform() - 1)) + jitter * (2 * random.uniform() - 1) * a.re;
      return { x: re, xdot: -omega[j] * im };
    }),
  );
}

/** a_k = amplitude e^{2 pi i q k / N}: the rotating wave with wave number q on mode 0. */
export function twistedAmplitudes(nodes: number, q: number, amplitude: number): { re: number; im: number }[][] {
  return Array.from({ length: nodes }, (_, k) => {
    const phase = (2 * Math.PI * q * k) / nodes;
    return [{ re: amplitude * Math.cos(phase), im: amplitude * Math.sin(phase) }];
  });
}

/** Least-squares slope of log(y) against log(x). */
export function logLogSlope(x: number[], y: number[]): number {
  const lx = x.map(Math.log);
  const ly = y.map(Math.log);
  const mx = lx.reduce((a, b) => a + b, 0) / lx.length;
  const my = ly.reduce((a, b) => a + b, 0) / ly.length;
  let num = 0;
  let den = 0;
  for (let i = 0; i < lx.length; i++) {
    num += (lx[i] - mx) * (ly[i] - my);
    den += (lx[i] - mx) ** 2;
  }
  return num / den;
}
