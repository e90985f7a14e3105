/**
 * Parts -> the model's epsilon, modes, coupling and detuning, and the engineering figures behind
 * them (docs/parts.md derives each step). Pure; fails with an InputError at the part whose value
 * cannot work, warns about values that work but break a rule of thumb.
 */
import { failInput as fail } from '../../util/input-error.js';
import { item } from '../../util/json-fields.js';
import type { CouplingSpec, ModeSpec } from '../types.js';
import { amplitudeToDriveLevel, offsetPpmToOmega, ppmToDelta, pullToCoupling, qualityToLoss, startupMarginToGain } from '../units.js';
import {
  crystalQuality,
  loadFrequency,
  loadPullingPpm,
  loadResonanceResistance,
  motionalInductance,
  pullabilityPpmPerPf,
  referralFactor,
} from './crystal.js';
import type { ModeParts, NodeEngineering, NodeParts, PartsDerivation, PartsSpec } from './types.js';

const PPM = 1e-6;
const TWO_PI = 2 * Math.PI;

/** Start-up margins below this are flagged: the usual design rule asks for about 3 to 5 (common practice). */
export const MARGIN_RULE_LOW = 3;
/** The upper end of that rule; margins between the two are called the low end of it (common practice). */
export const MARGIN_RULE_HIGH = 5;
/** Drive levels above this are flagged: a few hundred µW is the usual ceiling for AT-cut parts (common practice, from memory). */
export const DRIVE_LEVEL_CEILING_W = 500e-6;
/**
 * The pulling formula is first order: the exact load resonance is f_s sqrt(1 + 2p) for a pulling p,
 * which differs from f_s (1 + p) by about p^2 / 2 of f_s, 0.5 ppm at p = 1e-3 (arithmetic).
 */
export const PULLING_FIRST_ORDER_LIMIT = 1e-3;
/**
 * Per-node losses or gains that differ by more than this from their mean are named: the model carries
 * one per mode, and 5 % in the margin moves the free-running amplitude 2 sqrt(1 - 1/m) by about 1 % at m = 5.
 */
export const NODE_SPREAD_NOTE = 0.05;
/** The largest epsilon the scenario accepts (src/scenario/parse.ts). */
const EPSILON_MAX = 0.5;

export interface DerivedModel {
  epsilon: number;
  nominalFrequencyHz: number;
  modes: ModeSpec[];
  coupling: CouplingSpec;
  detuning: number[];
  derivation: PartsDerivation;
}

const mean = (values: number[]): number => values.reduce((s, v) => s + v, 0) / values.length;
const largestSpread = (values: number[]): number => {
  const m = mean(values);
  return m === 0 ? 0 : Math.max(...values.map((v) => Math.abs(v / m - 1)));
};

function loadOf(node: NodeParts): number {
  return node.loadCapacitanceF + node.loadToleranceF + node.loadTrimF;
}

/** Where a margin below 1 is the fault: the negative resistance when the crystals are alike, else the node. */
function marginPath(spec: PartsSpec, k: number): string {
  const alike = spec.nodes.every((n) => n.motionalResistanceOhm === spec.crystal.motionalResistanceOhm);
  return alike ? 'parts.sustaining.negativeResistanceOhm' : `${item('parts.nodes', k)}.motionalResistanceOhm`;
}

export function deriveModel(spec: PartsSpec, given: { epsilon: number | null; nominalFrequencyHz: number | null }): DerivedModel {
  const warnings: string[] = [];
  const { crystal, sustaining, spurious } = spec;
  const nominalLoadHz = loadFrequency(
    crystal.seriesFrequencyHz,
    crystal.motionalCapacitanceF,
    crystal.shuntCapacitanceF,
    crystal.loadCapacitanceF,
  );
  const f0 = given.nominalFrequencyHz ?? nominalLoadHz;
  const w0 = TWO_PI * f0;
  const nominalL1 = motionalInductance(crystal.seriesFrequencyHz, crystal.motionalCapacitanceF);
  // eps = R1 / (w0 L1): the nominal crystal's loss per radian at f0, so its model loss d_0 is 1.
  const epsilon = given.epsilon ?? crystal.motionalResistanceOhm / (w0 * nominalL1);
  if (given.epsilon === null && epsilon > EPSILON_MAX) {
    fail(
      'parts.crystal.motionalResistanceOhm',
      `gives a quality of ${1 / epsilon} at f0, below ${1 / EPSILON_MAX}: too lossy for the averaged model`,
    );
  }
  const rn = Math.abs(sustaining.negativeResistanceOhm);

  const wanted: ModeParts[] = [];
  const unwanted: ModeParts[] = [];
  const engineering: Omit<NodeEngineering, 'driveLevelW'>[] = [];
  const unwantedOffsets: number[] = [];
  spec.nodes.forEach((node, k) => {
    const load = loadOf(node);
    const pulling = loadPullingPpm(node.motionalCapacitanceF, node.shuntCapacitanceF, load);
    if (pulling * PPM > PULLING_FIRST_ORDER_LIMIT) {
      warnings.push(
        `node ${k}: load pulling ${pulling.toFixed(0)} ppm is large; the first-order pulling formula loses accuracy above ${PULLING_FIRST_ORDER_LIMIT / PPM} ppm`,
      );
    }
    const fL = loadFrequency(node.seriesFrequencyHz, node.motionalCapacitanceF, node.shuntCapacitanceF, load);
    const L1 = motionalInductance(node.seriesFrequencyHz, node.motionalCapacitanceF);
    const referred = rn * referralFactor(node.shuntCapacitanceF, load);
    const margin = referred / node.motionalResistanceOhm;
    const rL = loadResonanceResistance(node.motionalResistanceOhm, node.shuntCapacitanceF, load);
    if (margin < 1) {
      fail(
        marginPath(spec, k),
        `gives node ${k} a start-up margin |R_n| / R_L = ${rn} / ${rL.toPrecision(4)} ohm = ${margin.toPrecision(3)}` +
          ` (R_L = R1 (1 + C0/C_L)^2): below 1 the oscillator never starts`,
      );
    }
    if (margin < MARGIN_RULE_LOW) {
      warnings.push(
        `node ${k}: start-up margin ${margin.toPrecision(3)} is below the usual design rule of about ${MARGIN_RULE_LOW} to ${MARGIN_RULE_HIGH}` +
          ` (common practice): start-up is slow and not assured over tolerance and aging`,
      );
    } else if (margin < MARGIN_RULE_HIGH) {
      warnings.push(
        `node ${k}: start-up margin ${margin.toPrecision(3)} is at the low end of the usual design rule of about ${MARGIN_RULE_LOW} to ${MARGIN_RULE_HIGH} (common practice)`,
      );
    }
    const loss0 = qualityToLoss((w0 * L1) / node.motionalResistanceOhm, 1, epsilon);
    wanted.push({
      seriesFrequencyHz: node.seriesFrequencyHz,
      loadFrequencyHz: fL,
      motionalInductanceH: L1,
      quality: crystalQuality(node.seriesFrequencyHz, node.motionalResistanceOhm, node.motionalCapacitanceF),
      startupMargin: margin,
      loss: loss0,
      gain: startupMarginToGain(margin, loss0),
    });
    let spuriousHere: ModeParts | null = null;
    if (spurious) {
      const fs = node.seriesFrequencyHz * (1 + spurious.offsetHz / crystal.seriesFrequencyHz);
      const c1 = spurious.motionalCapacitanceAssumed ? node.motionalCapacitanceF : spurious.motionalCapacitanceF;
      const fLs = loadFrequency(fs, c1, node.shuntCapacitanceF, load);
      unwantedOffsets.push((fLs / fL - 1) / PPM);
      const L1s = motionalInductance(fs, c1);
      const marginS = referred / spurious.motionalResistanceOhm;
      spuriousHere = {
        seriesFrequencyHz: fs,
        loadFrequencyHz: fLs,
        motionalInductanceH: L1s,
        quality: crystalQuality(fs, spurious.motionalResistanceOhm, c1),
        startupMargin: marginS,
        loss: 0,
        gain: 0,
      };
      unwanted.push(spuriousHere);
    }
    engineering.push({
      motionalInductanceH: L1,
      quality: wanted[k]!.quality,
      loadPullingPpm: pulling,
      pullabilityPpmPerPf: pullabilityPpmPerPf(node.motionalCapacitanceF, node.shuntCapacitanceF, load),
      startupMargin: margin,
      seriesFrequencyHz: node.seriesFrequencyHz,
      motionalCapacitanceF: node.motionalCapacitanceF,
      shuntCapacitanceF: node.shuntCapacitanceF,
      loadCapacitanceF: load,
      loadTrimF: node.loadTrimF,
      loadFrequencyHz: fL,
      detuningPpm: (fL / f0 - 1) / PPM,
      loadResonanceResistanceOhm: rL,
      spurious: spuriousHere,
    });
  });

  const modes: ModeSpec[] = [{ omega: 1, gain: mean(wanted.map((m) => m.gain)), loss: mean(wanted.map((m) => m.loss)) }];
  let spuriousOffsetPpm: number | null = null;
  if (spurious) {
    spuriousOffsetPpm = mean(unwantedOffsets);
    const omega1 = offsetPpmToOmega(spuriousOffsetPpm, 1);
    for (const m of unwanted) {
      m.loss = qualityToLoss((w0 * omega1 * m.motionalInductanceH) / spurious.motionalResistanceOhm, omega1, epsilon);
      m.gain = startupMarginToGain(m.startupMargin, m.loss);
    }
    modes.push({ omega: omega1, gain: mean(unwanted.map((m) => m.gain)), loss: mean(unwanted.map((m) => m.loss)) });
    const strongest = Math.max(...unwanted.map((m) => m.startupMargin));
    if (strongest >= 1) {
      warnings.push(
        `the unwanted mode ${spurious.offsetHz} Hz above the wanted one has a start-up margin up to ${strongest.toPrecision(3)} (>= 1):` +
          ` it can start on its own, and which mode a node ends in depends on how it starts (docs/model.md, 'Two modes away from resonance')`,
      );
    }
    if (spurious.motionalCapacitanceAssumed) {
      warnings.push(
        "parts.spurious[0].motionalCapacitanceF not given: the wanted mode's C1 stands in (an assumption, not a property of the part);" +
          " it sets the unwanted mode's gain and quality",
      );
    }
  }
  for (const [j, list] of [wanted, unwanted].entries()) {
    if (list.length === 0) continue;
    const spread = Math.max(largestSpread(list.map((m) => m.loss)), largestSpread(list.map((m) => m.gain)));
    if (spread > NODE_SPREAD_NOTE) {
      warnings.push(
        `mode ${j}: the nodes' losses and gains differ by up to ${(spread * 100).toFixed(1)} % from their mean;` +
          ` the model carries one loss and gain per mode and uses the mean (each node's own figures are in nodes[k])`,
      );
    }
  }

  const couplingPerOhm = mean(
    spec.nodes.map((n, k) => referralFactor(n.shuntCapacitanceF, loadOf(n)) / (w0 * wanted[k]!.motionalInductanceH)),
  );
  let pullPpm: number;
  let angle: number;
  let impedanceOhm: { resistance: number; reactance: number } | null = null;
  if (spec.coupling.kind === 'pull') {
    pullPpm = spec.coupling.pullPpm;
    angle = (spec.coupling.angleDeg * Math.PI) / 180;
  } else {
    const { resistanceOhm, capacitanceF, inductanceH } = spec.coupling;
    const reactance = (inductanceH === null ? 0 : w0 * inductanceH) - (capacitanceF === null ? 0 : 1 / (w0 * capacitanceF));
    impedanceOhm = { resistance: resistanceOhm, reactance };
    // eps kappa sigma = c R and eps kappa rho = -c X with c = t / (w0 L1) (docs/parts.md, 'Coupling network')
    pullPpm = ((couplingPerOhm / 2) * Math.hypot(resistanceOhm, reactance)) / PPM;
    angle = Math.atan2(-reactance, resistanceOhm);
  }
  const coupling = pullToCoupling({ pullPpm, angle }, epsilon, 1);
  const pairLockingRangePpm = 2 * pullPpm * Math.cos(angle);
  const range = Math.max(...engineering.map((n) => n.detuningPpm)) - Math.min(...engineering.map((n) => n.detuningPpm));
  if (pairLockingRangePpm <= 0) {
    warnings.push(
      `the coupling angle ${((angle * 180) / Math.PI).toFixed(1)} degrees leaves no dissipative part: two nodes joined by one link cannot lock at all`,
    );
  } else if (range > pairLockingRangePpm) {
    warnings.push(
      `the nodes' operating frequencies span ${range.toPrecision(3)} ppm, more than the ${pairLockingRangePpm.toPrecision(3)} ppm a pair joined by one link can hold:` +
        ` whether the ring holds them depends on where the outliers sit (syncring predict says)`,
    );
  }

  let qRef: number;
  const nominalMargin = (rn * referralFactor(crystal.shuntCapacitanceF, crystal.loadCapacitanceF)) / crystal.motionalResistanceOhm;
  const wL = TWO_PI * nominalLoadHz;
  if (sustaining.driveLevelW !== null) {
    if (nominalMargin <= 1)
      fail(
        'parts.sustaining.negativeResistanceOhm',
        `gives the nominal crystal a start-up margin of ${nominalMargin.toPrecision(3)}: it has no steady drive level to set`,
      );
    // P = R1 (wL qRef |a|)^2 / 2 at the free-running |a|^2 = 4 (1 - 1/m) (docs/parts.md, 'Drive level')
    qRef = Math.sqrt((2 * sustaining.driveLevelW) / (crystal.motionalResistanceOhm * 4 * (1 - 1 / nominalMargin))) / wL;
  } else {
    // the averaged negative resistance vanishes at |a| = 2, a motional current amplitude 2 wL qRef
    qRef = sustaining.saturationCurrentA! / (2 * wL);
  }
  const wattsAtUnitAmplitude = (crystal.motionalResistanceOhm * (wL * qRef) ** 2) / 2;
  const nodes: NodeEngineering[] = engineering.map((e, k) => {
    const node = spec.nodes[k]!;
    const perUnit = (node.motionalResistanceOhm * (TWO_PI * e.loadFrequencyHz * qRef) ** 2) / 2;
    const driveLevelW = amplitudeToDriveLevel(2 * Math.sqrt(1 - 1 / e.startupMargin), perUnit);
    if (driveLevelW > DRIVE_LEVEL_CEILING_W) {
      warnings.push(
        `node ${k}: drive level ${(driveLevelW * 1e6).toPrecision(3)} µW is above ${DRIVE_LEVEL_CEILING_W * 1e6} µW, the usual ceiling for such parts (common practice)`,
      );
    }
    return { ...e, driveLevelW };
  });

  return {
    epsilon,
    nominalFrequencyHz: f0,
    modes,
    coupling,
    detuning: nodes.map((n, k) => {
      const delta = ppmToDelta(n.detuningPpm, epsilon);
      if (!Number.isFinite(delta)) fail(item('parts.nodes', k), `gives a non-finite detuning (${delta})`);
      return delta;
    }),
    derivation: {
      spec,
      nominalFrequencyHz: f0,
      nominalFrequencyFromCrystal: given.nominalFrequencyHz === null,
      epsilon,
      epsilonFromQuality: given.epsilon === null,
      nodes,
      coupling: { pullPpm, angleDeg: (angle * 180) / Math.PI, pairLockingRangePpm, impedanceOhm },
      wattsAtUnitAmplitude,
      spuriousOffsetPpm,
      warnings,
    },
  };
}
