import type { StabilityMask } from '../stability/mask.js';
import type { Perturbation, PerturbationAction } from '../session/perturbation.js';

/**
 * A validated fault campaign. Every time is in tau (the parser converts from the campaign's
 * `timeUnit`); rates are per unit tau.
 */

/** Units the campaign's times are written in: tau, slow time eps tau, or seconds at the nominal frequency. */
export type TimeUnit = 'tau' | 'slow' | 'seconds';

/** What a fault puts back when it ends: the values it replaced, nothing, or an explicit perturbation. */
export type RestoreSpec = 'previous' | 'none' | Perturbation;

/** Pass/fail rules for one fault. */
export interface Criteria {
  /** The locked pattern must survive the fault: no cycle slip, no other pattern, no mode change. */
  mustPersist: boolean;
  /** The lock detector must show the pre-fault pattern again within relockWithin of the restore. */
  mustRelock: boolean;
  /** Longest allowed time to re-lock after the restore (tau). */
  relockWithin: number;
  /** Largest allowed excursion of a neighbour phase difference from its pre-fault value (rad). */
  maxPhaseExcursion: number | null;
  /** Largest allowed growth of the relative full-vs-guide divergence over its value just before the fault. */
  maxDivergence: number | null;
  /** The prediction (guide, or a frame's own prediction) must agree on whether the pattern persists. */
  predictionMustAgree: boolean;
}

/** One scheduled fault, fully resolved. */
export interface FaultPlan {
  id: string;
  source: 'schedule' | 'random';
  /** Planned start (tau); applied at the first tick boundary at or after it. */
  start: number;
  /** Time from the full value (the start, or the end of the ramp) to the restore (tau); null for permanent and instantaneous faults. */
  duration: number | null;
  /** Time over which the parameters move linearly to the fault's values (tau); absent for a step. */
  ramp?: number;
  perturbation: Perturbation;
  restore: RestoreSpec;
  criteria: Criteria;
}

/** A random parameter: a fixed value, a uniform range, or a choice among listed values. */
export type RangeSpec =
  | { kind: 'fixed'; value: number }
  | { kind: 'uniform'; min: number; max: number }
  | { kind: 'integers'; min: number; max: number }
  | { kind: 'choice'; values: number[][] };

export interface RandomActionSpec {
  action: PerturbationAction;
  /** Mean faults per unit tau of this action. */
  rate: number;
  /** Duration range (tau); null for instantaneous or permanent faults. */
  duration: { min: number; max: number } | null;
  restore: 'previous' | 'none';
  /** Parameter name -> range; `link` picks [from, to] pairs. */
  params: Record<string, RangeSpec>;
  criteria: Criteria;
}

/**
 * Seeded random faults: arrivals form a Poisson process of total rate sum(rate) that runs only
 * while no random fault is being evaluated (so random faults never overlap one another); the
 * action is drawn with probability rate / sum(rate), then its parameters from their ranges.
 */
export interface RandomSpec {
  seed: number;
  /** No random fault starts before this (tau). */
  from: number;
  /** No random fault's evaluation window ends after this (tau); null: the end of the soak. */
  until: number | null;
  /** Quiet time after one random fault's evaluation window before the next arrival clock runs (tau). */
  gap: number;
  actions: RandomActionSpec[];
}

export interface DetectorSpec {
  /** Lock window in slow time (eps tau), as CoSimulation's option; null: the session default. */
  lockWindow: number | null;
  /** Lock tolerance (rad); null: the session default. */
  lockTolerance: number | null;
}

export interface StabilitySpec {
  /** Start of the stability record (tau), or at the first lock of the full system. */
  from: number | 'first-lock';
  /** Run an uncoupled twin (coupling 0, same noise) for the single-part and ensemble-average references. */
  uncoupledReference: boolean;
  /** Most stability samples kept; the sample stride is chosen from the soak length to fit. */
  maxSamples: number;
  /** An MTIE or TDEV mask the array output is held against (README, "Stability statistics"), or null. */
  mask: StabilityMask | null;
  /** A soak-level criterion: the soak fails when the array output crosses the mask (default true with a mask). */
  mustMeetMask: boolean;
}

export interface Campaign {
  name: string;
  timeUnit: TimeUnit;
  /** Tau per campaign time unit (for showing times back in the campaign's own unit). */
  tauPerUnit: number;
  criteria: Criteria;
  detector: DetectorSpec;
  stability: StabilitySpec;
  faults: FaultPlan[];
  random: RandomSpec | null;
}
