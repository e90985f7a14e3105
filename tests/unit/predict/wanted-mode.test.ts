import { expect, test } from 'vitest';
import { loadBuiltInScenario } from '../../../src/scenarios/index.js';
import { ModelParameters } from '../../../src/model/parameters.js';
import { GuideModel } from '../../../src/predict/guide-model.js';
import { patternCatalogue } from '../../../src/predict/catalogue.js';

/**
 * The demo board's parts put the unwanted mode 32 kHz above the wanted one in series resonance,
 * 2995.5 ppm at the load (its smaller C1 pulls it less: 3200.9 + 102.6 - 307.7 ppm less cross
 * terms, docs/parts.md). A pattern carried by that mode is flagged, and its output frequency is
 * read against the wanted mode's nominal frequency: about +2996 ppm, i.e. 30 kHz at 10 MHz, with
 * the carrying mode's own small coupling shift as a second figure.
 */
test('patterns on the unwanted mode are flagged and their output sits about +2996 ppm from the wanted frequency', () => {
  const scenario = loadBuiltInScenario('timing-board-8');
  const model = new GuideModel(scenario, new ModelParameters(scenario));
  const catalogue = patternCatalogue(model, { types: ['in-phase'], maxFixDimension: 1, randomSeeds: 0 });
  const onWanted = catalogue.patterns.filter((p) => p.mode === 0);
  const onUnwanted = catalogue.patterns.filter((p) => p.mode === 1);
  expect(onWanted.length).toBeGreaterThan(0);
  expect(onUnwanted.length).toBeGreaterThan(0);
  for (const p of onWanted) {
    expect(p.wantedMode).toBe(true);
    // the wanted mode's output is its own shift (sub-ppm on this board)
    expect(p.outputOffsetPpm).toBeCloseTo(p.frequencyShiftPpm[0]!, 9);
    expect(Math.abs(p.outputOffsetPpm!)).toBeLessThan(1);
  }
  for (const p of onUnwanted) {
    expect(p.wantedMode).toBe(false);
    const own = p.frequencyShiftPpm[1]!;
    expect(Math.abs(own)).toBeLessThan(1);
    // (omega_1 + eps rate) / omega_0 - 1 = offset + own shift * omega_1 / omega_0 (arithmetic)
    const offsetPpm = (scenario.modes[1]!.omega - 1) * 1e6;
    expect(offsetPpm).toBeCloseTo(2995.5, 1);
    expect(p.outputOffsetPpm!).toBeCloseTo(offsetPpm + own * scenario.modes[1]!.omega, 6);
  }
});

test('the array output of a detuned in-phase lock: its spread and combining loss are reported', () => {
  const scenario = loadBuiltInScenario('timing-board-8');
  const model = new GuideModel(scenario, new ModelParameters(scenario));
  const p = patternCatalogue(model, { types: ['in-phase'], maxFixDimension: 1, randomSeeds: 0 }).patterns.find((x) => x.mode === 0)!;
  // the combining ratio is the q = 0 order parameter R_0 = |mean a| / mean |a| (same definition)
  const r0 = (() => {
    const a = p.amplitudes.map((row) => row[0]);
    let re = 0;
    let im = 0;
    for (let k = 0; k < a.length; k++) {
      re += p.state[2 * k * 2];
      im -= p.state[2 * k * 2 + 1];
    }
    return Math.hypot(re, im) / a.reduce((s, x) => s + x, 0);
  })();
  expect(p.combiningLossDb).toBeCloseTo(20 * Math.log10(r0), 10);
  expect(p.spread).toBeGreaterThan(0);
  expect(p.spread).toBeLessThan(0.5);
});
