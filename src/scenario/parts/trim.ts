/**
 * A change of one node's load capacitance as a detuning in ppm and back: how the dashboard lets a
 * detuning be entered as a C_L trim (docs/parts.md, 'Load resonance').
 */
import type { NodePartsView } from '../../protocol/messages.js';
import { loadForFrequency, loadFrequency, pullabilityPpmPerPf } from './crystal.js';
import type { Scenario } from '../types.js';
import type { NodeEngineering } from './types.js';

const PPM = 1e-6;

/** What the dashboard needs of a node's parts (the session carries it for boards described by parts). */
export function nodePartsView(node: NodeEngineering): NodePartsView {
  return {
    seriesFrequencyHz: node.seriesFrequencyHz,
    motionalCapacitanceF: node.motionalCapacitanceF,
    shuntCapacitanceF: node.shuntCapacitanceF,
    loadCapacitanceF: node.loadCapacitanceF,
    pullabilityPpmPerPf: pullabilityPpmPerPf(node.motionalCapacitanceF, node.shuntCapacitanceF, node.loadCapacitanceF),
    startupMargin: node.startupMargin,
    driveLevelW: node.driveLevelW,
  };
}

/** The node's detuning (ppm against f0) with its load changed by `changeF` from as built; NaN when the load would not stay > 0. */
export function loadChangeToPpm(node: NodePartsView, changeF: number, nominalFrequencyHz: number): number {
  const load = node.loadCapacitanceF + changeF;
  if (!(load > 0)) return NaN;
  return (loadFrequency(node.seriesFrequencyHz, node.motionalCapacitanceF, node.shuntCapacitanceF, load) / nominalFrequencyHz - 1) / PPM;
}

/** The change of load from as built that puts the node at `ppm` against f0; NaN when no positive load does. */
export function ppmToLoadChange(node: NodePartsView, ppm: number, nominalFrequencyHz: number): number {
  const load = loadForFrequency(
    node.seriesFrequencyHz,
    node.motionalCapacitanceF,
    node.shuntCapacitanceF,
    nominalFrequencyHz * (1 + ppm * PPM),
  );
  return load - node.loadCapacitanceF;
}

/** The session's view of a scenario's parts, or null for one in model units. */
export function partsViewOf(scenario: Scenario): NodePartsView[] | null {
  return scenario.parts ? scenario.parts.nodes.map(nodePartsView) : null;
}
