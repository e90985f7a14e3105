import { initialRotatingState } from '../model/initial.js';
import type { Scenario } from '../scenario/types.js';
import { patternCatalogue, type PatternCatalogue } from './catalogue.js';
import type { GuideModel } from './guide-model.js';
import { lookAhead, type LookAheadResult } from './look-ahead.js';

export interface CatalogueWithStart {
  catalogue: PatternCatalogue;
  /** Where the guiding system takes the scenario's initial state. */
  destination: LookAheadResult;
  /** Index in catalogue.patterns of the pattern the start settles into, -1 when it does not settle. */
  settledIndex: number;
}

/**
 * The catalogue of `model`, with what the scenario's initial state settles into. The start's
 * destination is an extra seed: it can add an entry but not change the others, and the catalogue
 * says which entry (copies alike, mirror images apart) it landed in.
 */
export function catalogueWithStart(model: GuideModel, scenario: Scenario): CatalogueWithStart {
  const destination = lookAhead(model, initialRotatingState(scenario, model.params));
  const catalogue = patternCatalogue(model, destination.settled ? { seeds: [destination.state] } : {});
  return { catalogue, destination, settledIndex: destination.settled ? (catalogue.seedPatterns[0] ?? -1) : -1 };
}
