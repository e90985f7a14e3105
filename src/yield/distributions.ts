/**
 * The distributions a tolerance draws from, each a pure function of a seeded generator so a
 * sample's draws repeat bit for bit. Normal: mean + sigma z. Truncated normal: the normal
 * restricted to mean +- truncate sigma, drawn by rejection (exact; the acceptance is at least
 * erf(MIN_TRUNCATE / sqrt 2), 8 %, so the loop is short). Uniform: low + (high - low) u.
 */
import type { Random } from '../util/random.js';

/** Narrowest truncation accepted, in sigmas: it keeps the rejection loop's acceptance at 8 % or more. */
export const MIN_TRUNCATE = 0.1;

export type Distribution =
  | { kind: 'normal'; mean: number; sigma: number }
  | { kind: 'truncated-normal'; mean: number; sigma: number; truncate: number }
  | { kind: 'uniform'; low: number; high: number };

export function draw(distribution: Distribution, random: Random): number {
  switch (distribution.kind) {
    case 'normal':
      return distribution.mean + distribution.sigma * random.normal();
    case 'truncated-normal': {
      for (;;) {
        const z = random.normal();
        if (Math.abs(z) <= distribution.truncate) return distribution.mean + distribution.sigma * z;
      }
    }
    case 'uniform':
      return distribution.low + (distribution.high - distribution.low) * random.uniform();
  }
}

/** The smallest and largest value a distribution can give (infinite for the plain normal with sigma > 0). */
export function support(distribution: Distribution): { low: number; high: number } {
  switch (distribution.kind) {
    case 'normal':
      return distribution.sigma > 0 ? { low: -Infinity, high: Infinity } : { low: distribution.mean, high: distribution.mean };
    case 'truncated-normal': {
      const half = distribution.truncate * distribution.sigma;
      return { low: distribution.mean - half, high: distribution.mean + half };
    }
    case 'uniform':
      return { low: distribution.low, high: distribution.high };
  }
}
