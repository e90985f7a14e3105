import type { CataloguePattern, PatternCatalogue } from '../predict/catalogue.js';
import type { BranchLimit, BranchPoint } from '../predict/continuation.js';
import type { LimitKind } from '../predict/continuation.js';
import type { SessionInfo } from './messages.js';
import type { BasinCount } from '../yield/basins.js';

/**
 * What `syncring predict` prints, and what the server's /api/catalogue and /api/what-if answer
 * (the same JSON for the live parameters, with what they were computed for): one typed home
 * for the command, the HTTP API and the dashboard.
 */

export type CatalogueEntry = CataloguePattern & { index: number };

/** The branch of one pattern in one parameter (`--continue`). */
export interface ContinuationOutput {
  parameter: string;
  syntax: string;
  pattern: { index: number; kind: string; q: number | null; mode: number };
  name: string;
  start: number;
  startPpm: number | null;
  limits: { decreasing: BranchLimit | null; increasing: BranchLimit | null };
  range: {
    lower: number | null;
    upper: number | null;
    lowerPpm: number | null;
    upperPpm: number | null;
    lowerKind: LimitKind | null;
    upperKind: LimitKind | null;
  };
  startIndex: number;
  steps: number;
  branch: BranchPoint[];
}

export interface PredictOutput {
  scenario: string;
  nodes: number;
  modes: number;
  epsilon: number;
  nominalFrequency: { hz: number; assumed: boolean };
  group: PatternCatalogue['group'];
  parts: number[][];
  /** How to read the numbers (units, seconds, mirror images, the marginal band). */
  notes: Record<string, string>;
  patterns: CatalogueEntry[];
  /** Where the scenario's own start settles, by the look-ahead. */
  initial: { settled: boolean; slowTime: number | null; pattern: number | null };
  warnings: string[];
  classesExamined: number;
  solves: number;
  mirrors: PatternCatalogue['mirrors'];
  numbering: PatternCatalogue['numbering'];
  search: PatternCatalogue['search'];
  continuation?: ContinuationOutput;
  /** With --basins N: the start-up probability of each pattern reached from N seeded random starts. */
  basins?: BasinCount;
  wallSeconds: number;
}

/** The live parameters an answer was computed for, so a reader can tell whether it is still current. */
export interface ComputedFor {
  scenarioName: string;
  detuning: number[];
  detuningPpm: number[];
  coupling: SessionInfo['coupling'];
  links: { from: number; to: number; weight: number }[];
}

/** GET /api/catalogue */
export type CatalogueResponse = PredictOutput & { fingerprint: string; fromCache: boolean; computedFor: ComputedFor };

/** GET /api/what-if */
export type WhatIfResponse = CatalogueResponse & { continuation: ContinuationOutput };
