import type { CataloguePattern } from '../../src/predict/catalogue.js';
import { UsageError } from '../usage-error.js';

/**
 * Which catalogue entry a command works on: the one asked for by index, else the one the
 * scenario's initial state settles into, else the stable pattern with the widest margin.
 * `flag` is how the caller names the index argument, `purpose` the verb its errors use.
 */
export function choosePattern(
  patterns: readonly CataloguePattern[],
  requested: number | undefined,
  settled: number,
  flag: string,
  purpose: string,
): number {
  if (patterns.length === 0) throw new UsageError(`the catalogue holds no locked pattern to ${purpose}`);
  if (requested !== undefined) {
    if (!Number.isInteger(requested) || requested < 0 || requested >= patterns.length) {
      throw new UsageError(`${flag} must be an index 0..${patterns.length - 1} into "patterns" (got ${requested})`);
    }
    return requested;
  }
  if (settled >= 0) return settled;
  let best = -1;
  patterns.forEach((p, i) => {
    if (p.stable === true && (best < 0 || p.margin < patterns[best].margin)) best = i;
  });
  if (best < 0)
    throw new UsageError(`no stable pattern to ${purpose} and the initial state does not settle; choose one with ${flag} INDEX`);
  return best;
}
