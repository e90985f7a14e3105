import type { ScenarioJSON } from '../scenario/parse.js';
import type { DerivationStep } from '../scenario/parts/derivation-steps.js';
import type { NodeEngineering, PartsSpec } from '../scenario/parts/types.js';

/**
 * What `syncring explain SCENARIO.json` prints: how every model number of a board described by
 * its parts follows from them (docs/parts.md). SI units throughout (H, ohm, F, W, Hz); ppm where
 * a field says Ppm.
 */
export interface ExplainOutput {
  scenario: string;
  /** Per node, its parts' figures: L1, Q, load pulling, pullability, start-up margin, drive level and more. */
  nodes: NodeEngineering[];
  /** The derived model scenario in the scenario JSON format: loadable as a scenario, it runs the same board. */
  model: ScenarioJSON;
  /** The board as a whole: the time base, the model scale, the coupling and the unwanted mode. */
  board: {
    nominalFrequencyHz: number;
    /** "given" or "nominal crystal at its nominal load". */
    nominalFrequencyFrom: string;
    epsilon: number;
    /** "given" or "R1 / (2 pi f0 L1) of the nominal crystal". */
    epsilonFrom: string;
    coupling: {
      pullPpm: number;
      angleDeg: number;
      pairLockingRangePpm: number;
      impedanceOhm: { resistance: number; reactance: number } | null;
    };
    /** Spread of the nodes' operating frequencies against f0, ppm (largest minus smallest). */
    detuningSpanPpm: number;
    /**
     * The unwanted mode: its series offset, its offset at the load (the model's mode 1) and its
     * largest start-up margin over the nodes (each node's in nodes[k].spurious); null without one.
     */
    spurious: { offsetHz: number; offsetPpmAtLoad: number; startupMarginMax: number } | null;
    /** Drive level at model amplitude |a| = 1 (W): driveLevel = this |a|^2. */
    wattsAtUnitAmplitude: number;
  };
  /** The parts as read, in SI units. */
  parts: PartsSpec;
  /** Each formula with its source, in the order of docs/parts.md. */
  derivation: DerivationStep[];
  warnings: string[];
  /** What a derived figure does not mean (src/campaign/cautions.ts). */
  caution: string;
}
