import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import type { ExplainOutput } from '../../../src/protocol/explain-output.js';
import { parseScenario } from '../../../src/scenario/index.js';
import { builtInScenarioRaw, loadBuiltInScenario } from '../../../src/scenarios/index.js';
import { runCli } from '../../support/run-cli.js';

describe('syncring explain', () => {
  test('the demo board: one JSON object, a row per node, the derived model loads as the same board', async () => {
    const { code, out } = await runCli(['explain', 'timing-board-8']);
    expect(code).toBe(0);
    expect(out.trim().split('\n')).toHaveLength(1);
    const result = JSON.parse(out) as ExplainOutput;
    expect(result.nodes).toHaveLength(8);
    for (const n of result.nodes) {
      // invented AT-cut-like parts: about 15 ppm/pF at 16 pF, Q about 1.1e5, 50 µW (README, 'The parts section')
      expect(n.pullabilityPpmPerPf).toBeLessThan(-14);
      expect(n.pullabilityPpmPerPf).toBeGreaterThan(-18);
      expect(n.quality).toBeGreaterThan(1.1e5);
      expect(n.quality).toBeLessThan(1.11e5);
      expect(n.startupMargin).toBeGreaterThan(5);
      expect(n.driveLevelW).toBeGreaterThan(49e-6);
      expect(n.driveLevelW).toBeLessThan(51e-6);
      expect(Math.abs(n.detuningPpm)).toBeLessThan(0.3); // trimmed
    }
    // the untrimmed tolerances are up to 8.4 ppm; the trims leave a span the coupling holds
    expect(result.board.detuningSpanPpm).toBeLessThan(result.board.coupling.pairLockingRangePpm);
    expect(result.caution).toMatch(/does not replace a start-up test/);
    const { parts: _parts, ...board } = loadBuiltInScenario('timing-board-8');
    expect(parseScenario(result.model)).toEqual(board);
  });

  test('bad part values exit with 2 and name the field and why', async () => {
    const raw = builtInScenarioRaw('timing-board-8') as { parts: { crystal: Record<string, number> } };
    raw.parts.crystal.shuntCapacitanceF = 0;
    const file = join(mkdtempSync(join(tmpdir(), 'syncring-explain-')), 'board.json');
    writeFileSync(file, JSON.stringify(raw));
    const { code, err } = await runCli(['explain', file]);
    expect(code).toBe(2);
    expect(err).toContain(`${file}: parts.crystal.shuntCapacitanceF: must be > 0 (got 0): C0 is the capacitance between the electrodes`);
  });

  test('a scenario in model units and a missing argument are refused with 2', async () => {
    const modelOnly = await runCli(['explain', 'pair-adler']);
    expect(modelOnly.code).toBe(2);
    expect(modelOnly.err).toMatch(/parts: is missing/);
    const none = await runCli(['explain']);
    expect(none.code).toBe(2);
    expect(none.err).toMatch(/explain needs exactly one SCENARIO/);
  });
});
