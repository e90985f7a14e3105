/**
 * Per-sample seeds. A sample's seed depends on the study's seed and the sample's index only, so
 * a sample draws the same parameters and the same start whichever engine, worker or order runs
 * it. The mix is splitmix32's finaliser (the one util/random.ts seeds xoshiro128** with) over the
 * pair, so neighbouring indices get unrelated seeds.
 */
const GOLDEN = 0x9e3779b9;

function finalise(z: number): number {
  let t = z >>> 0;
  t = Math.imul(t ^ (t >>> 16), 0x85ebca6b) >>> 0;
  t = Math.imul(t ^ (t >>> 13), 0xc2b2ae35) >>> 0;
  return (t ^ (t >>> 16)) >>> 0;
}

/** The seed (unsigned 32-bit) of sample `index` of a study seeded with `studySeed`. */
export function sampleSeed(studySeed: number, index: number): number {
  return finalise((finalise((studySeed >>> 0) + GOLDEN) + Math.imul(index >>> 0, GOLDEN) + (Math.floor(index / 4294967296) >>> 0)) >>> 0);
}
