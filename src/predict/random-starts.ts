/**
 * Seeded random starts of the guiding system, each followed by the look-ahead until it settles on
 * a stable locked state: the catalogue's net for stable patterns that no structural seed
 * reaches. A start puts one mode on every node with a random phase and a modulus between half
 * and all of the lone oscillator's amplitude, the other modes at rest. The draws follow the node
 * order of the model given, which for the catalogue is the renumbered copy (renumbering.ts), so
 * they do not depend on the caller's numbering either.
 *
 * Each start costs a look-ahead (tens of milliseconds on the demo board), so the run stops early
 * once RANDOM_START_PATIENCE starts in a row have brought nothing new: by then the states still
 * unseen have small basins, which is where the structural seeds are the better net.
 */
import { Random } from '../util/random.js';
import type { GuideModel } from './guide-model.js';
import type { LockedStability, LockedState } from './locked-state.js';
import { lookAhead } from './look-ahead.js';

/** The fixed seed of the draws. */
export const RANDOM_START_SEED = 20_260_611;
/** Starts per catalogue on networks of up to 16 nodes, shared round-robin among the seeded modes. */
export const RANDOM_STARTS = 12;
/**
 * Starts per catalogue above 16 nodes, where each look-ahead costs more, phases relax slowly (a
 * start may spend its whole evaluation budget) and symmetry seeds do most of the work.
 */
export const RANDOM_STARTS_LARGE = 2;
/** The run stops after this many starts in a row whose destination was known already (or that did not settle). */
export const RANDOM_START_PATIENCE = 4;
/** Field evaluations one start may spend before it counts as not settled (the look-ahead's default is 40000). */
export const RANDOM_START_EVALUATIONS = 20_000;

export interface SettledStart {
  mode: number;
  locked: LockedState;
  stability: LockedStability;
}

export interface RandomStartRun {
  tried: number;
  settled: number;
}

/**
 * Up to `count` random starts on the given modes, each with its lone amplitude; `keep` receives
 * each stable state one settles on and says whether it was new (see the module header for when
 * the run stops).
 */
export function runRandomStarts(
  model: GuideModel,
  modes: readonly number[],
  count: number,
  amplitude: (mode: number) => number,
  keep: (found: SettledStart) => boolean,
): RandomStartRun {
  const { nodes, modes: modeCount } = model.params;
  const random = new Random(RANDOM_START_SEED);
  let tried = 0;
  let settled = 0;
  let idle = 0;
  while (tried < count && idle < RANDOM_START_PATIENCE && modes.length > 0) {
    const mode = modes[tried % modes.length];
    const r0 = amplitude(mode);
    const start = new Float64Array(2 * nodes * modeCount);
    for (let k = 0; k < nodes; k++) {
      const phase = 2 * Math.PI * random.uniform();
      const modulus = r0 * (0.5 + 0.5 * random.uniform());
      const i = 2 * (k * modeCount + mode);
      // a = u - i v
      start[i] = modulus * Math.cos(phase);
      start[i + 1] = -modulus * Math.sin(phase);
    }
    tried++;
    const destination = lookAhead(model, start, { maxEvaluations: RANDOM_START_EVALUATIONS });
    const found =
      destination.settled && destination.locked && destination.stability
        ? { mode, locked: destination.locked, stability: destination.stability }
        : null;
    if (found) settled++;
    idle = found && keep(found) ? 0 : idle + 1;
  }
  return { tried, settled };
}
