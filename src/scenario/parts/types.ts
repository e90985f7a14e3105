/**
 * A board described by its parts (the optional `parts` section of a scenario), in SI units, and
 * what follows from it. docs/parts.md derives every number; README.md, 'The parts section',
 * documents the fields.
 */

/** The equivalent circuit of a crystal (motional arm L1 C1 R1 shunted by C0) and its load. */
export interface CrystalParts {
  seriesFrequencyHz: number;
  motionalResistanceOhm: number;
  motionalCapacitanceF: number;
  shuntCapacitanceF: number;
  loadCapacitanceF: number;
}

/** One node's crystal as built: the shared crystal with this node's own values and trims. */
export interface NodeParts extends CrystalParts {
  /** This node's load capacitance minus the nominal one, as built (capacitor tolerance, strays). */
  loadToleranceF: number;
  /** The trim applied to this node's load capacitance. */
  loadTrimF: number;
}

/** The sustaining circuit: its small-signal negative resistance and what sets its amplitude. */
export interface SustainingParts {
  /** R_n < 0, at the crystal terminals with the load in place (as it is measured). */
  negativeResistanceOhm: number;
  /** Either the nominal crystal's steady-state drive level (W) ... */
  driveLevelW: number | null;
  /** ... or the motional current amplitude (A) at which the averaged negative resistance falls to zero. */
  saturationCurrentA: number | null;
}

/** An unwanted resonance of the same crystal: its own motional arm beside the wanted one. */
export interface SpuriousParts {
  /** Its series frequency above the wanted mode's, in Hz (an offset in ppm is converted on reading). */
  offsetHz: number;
  motionalResistanceOhm: number;
  /** Its motional capacitance; the wanted mode's when the scenario gives none (an assumption, docs/parts.md). */
  motionalCapacitanceF: number;
  /** True when motionalCapacitanceF was not given and the wanted mode's stands in. */
  motionalCapacitanceAssumed: boolean;
}

/** The coupling of one link of weight 1, as a pull and an angle or as the parts of a shared branch. */
export type CouplingParts =
  | { kind: 'pull'; pullPpm: number; angleDeg: number }
  /** A branch shared by the two nodes' crystal loops: R in series with C and/or L (absent parts are shorts). */
  | { kind: 'network'; resistanceOhm: number; capacitanceF: number | null; inductanceH: number | null };

export interface PartsSpec {
  crystal: CrystalParts;
  nodes: NodeParts[];
  sustaining: SustainingParts;
  spurious: SpuriousParts | null;
  coupling: CouplingParts;
}

/** One mode of one node, as its parts make it. */
export interface ModeParts {
  seriesFrequencyHz: number;
  loadFrequencyHz: number;
  motionalInductanceH: number;
  quality: number;
  /** |R_n| referred to the motional arm over this mode's R1 (below 1 the mode cannot start). */
  startupMargin: number;
  /** Model loss d_j and gain g_j of this node's parts (the model carries their mean over the nodes). */
  loss: number;
  gain: number;
}

/** What `syncring explain` prints for each node (docs/parts.md). */
export interface NodeEngineering {
  motionalInductanceH: number;
  quality: number;
  loadPullingPpm: number;
  pullabilityPpmPerPf: number;
  startupMargin: number;
  /** Free-running steady-state drive level of this node's crystal alone (uncoupled), W. */
  driveLevelW: number;
  seriesFrequencyHz: number;
  motionalCapacitanceF: number;
  shuntCapacitanceF: number;
  /** Load capacitance as built: nominal + tolerance + trim. */
  loadCapacitanceF: number;
  loadTrimF: number;
  loadFrequencyHz: number;
  /** f_L against the nominal frequency, ppm: the node's detuning in the model. */
  detuningPpm: number;
  /** R_L = R1 (1 + C0/C_L)^2. */
  loadResonanceResistanceOhm: number;
  spurious: ModeParts | null;
}

/** The board's derived figures: carried by a Scenario made from parts, shown by explain and the dashboard. */
export interface PartsDerivation {
  spec: PartsSpec;
  nominalFrequencyHz: number;
  /** True when the scenario left out nominalFrequencyHz and the nominal crystal's load frequency stands in. */
  nominalFrequencyFromCrystal: boolean;
  epsilon: number;
  /** True when the scenario left out epsilon and 1 / Q of the nominal crystal stands in. */
  epsilonFromQuality: boolean;
  nodes: NodeEngineering[];
  coupling: {
    pullPpm: number;
    angleDeg: number;
    /** 2 P cos(alpha): the frequency difference a pair joined by one such link can hold, ppm. */
    pairLockingRangePpm: number;
    /** For network coupling: the branch impedance at f0 (R + jX), ohm. */
    impedanceOhm: { resistance: number; reactance: number } | null;
  };
  /** Drive level (W) of a node at model amplitude |a| = 1 with the nominal crystal (units.ts amplitudeToDriveLevel). */
  wattsAtUnitAmplitude: number;
  /** The spurious mode's offset above the wanted one at the load, ppm (the model's mode 1 offset). */
  spuriousOffsetPpm: number | null;
  warnings: string[];
}
