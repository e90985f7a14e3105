/**
 * Basins of the catalogue's patterns: `predict --basins N` starts the guiding system N times from
 * seeded random starts (the yield studies' power-up start, sample.ts), follows each with the
 * look-ahead until it settles on a stable locked state, and hands every destination to the
 * catalogue as an extra seed, which says which entry (copies alike, mirror images apart) it is.
 * The fraction of starts that settle in an entry, with its Wilson interval, is that pattern's
 * start-up probability.
 */
import { initialRotatingState } from '../model/initial.js';
import type { Scenario } from '../scenario/types.js';
import { patternCatalogue, type PatternCatalogue } from '../predict/catalogue.js';
import type { GuideModel } from '../predict/guide-model.js';
import { lookAhead } from '../predict/look-ahead.js';
import { wilsonInterval, type ProportionInterval } from './interval.js';
import { randomStart } from './sample.js';
import { sampleSeed } from './seeds.js';

/** Seed the starts are drawn from (start i from this and i): fixed, so a basin count repeats; the value is arbitrary. */
export const BASIN_SEED = 20_261_204;
/** Confidence of the start-up probabilities' intervals (common practice). */
export const BASIN_CONFIDENCE = 0.95;
/** Most starts one count may take: each costs a look-ahead (tens of milliseconds on small rings). */
export const MAX_BASIN_STARTS = 100_000;

export interface BasinShare extends ProportionInterval {
  /** Index in the catalogue's patterns. */
  pattern: number;
  count: number;
}

export interface BasinCount {
  starts: number;
  seed: number;
  /** Starts that settled on a stable locked state within the look-ahead's budget. */
  settled: number;
  /** Per catalogue entry that some start reached, most often reached first. */
  shares: BasinShare[];
  /** Starts that did not settle (or settled where the catalogue found no entry), with their interval. */
  unsettled: ProportionInterval & { count: number };
  note: string;
}

/** The catalogue of `model` with the scenario's own start (seed 0) and `starts` random starts as extra seeds. */
export function catalogueWithBasins(
  model: GuideModel,
  scenario: Scenario,
  starts: number,
): { catalogue: PatternCatalogue; settledIndex: number; initialSettled: boolean; initialSlowTime: number; basins: BasinCount } {
  const initial = lookAhead(model, initialRotatingState(scenario, model.params));
  const destinations: (Float64Array | null)[] = [];
  for (let i = 0; i < starts; i++) {
    const board = { ...scenario, initial: randomStart(scenario, sampleSeed(BASIN_SEED, i)) };
    const destination = lookAhead(model, initialRotatingState(board, model.params));
    destinations.push(destination.settled ? destination.state : null);
  }
  const seeds = [...(initial.settled ? [initial.state] : []), ...destinations.filter((d): d is Float64Array => d !== null)];
  const catalogue = patternCatalogue(model, { seeds });
  const offset = initial.settled ? 1 : 0;
  const counts = new Map<number, number>();
  let next = offset;
  let found = 0;
  for (const d of destinations) {
    if (d === null) continue;
    const entry = catalogue.seedPatterns[next++];
    if (entry === null || entry === undefined) continue;
    counts.set(entry, (counts.get(entry) ?? 0) + 1);
    found++;
  }
  const shares = [...counts.entries()]
    .sort((a, b) => b[1] - a[1] || a[0] - b[0])
    .map(([pattern, count]) => ({ pattern, count, ...wilsonInterval(count, starts, BASIN_CONFIDENCE) }));
  return {
    catalogue,
    settledIndex: initial.settled ? (catalogue.seedPatterns[0] ?? -1) : -1,
    initialSettled: initial.settled,
    initialSlowTime: initial.slowTime,
    basins: {
      starts,
      seed: BASIN_SEED,
      settled: destinations.filter((d) => d !== null).length,
      shares,
      unsettled: { count: starts - found, ...wilsonInterval(starts - found, starts, BASIN_CONFIDENCE) },
      note:
        'start-up probability: the share of seeded random starts (random phase, modulus in [A/2, A] per node and mode) that the guiding ' +
        `system takes to each pattern, with its Wilson interval at ${BASIN_CONFIDENCE * 100} %`,
    },
  };
}
