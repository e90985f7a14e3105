import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, test, vi } from 'vitest';
import { runCli } from '../../support/run-cli.js';
import type { NoiseOutput } from '../../../src/protocol/noise-output.js';
import { adlerPairScenario } from '../../support/adler-pair.js';

afterEach(() => vi.restoreAllMocks());

function scenarioFile(changes: Record<string, unknown>): string {
  const path = join(mkdtempSync(join(tmpdir(), 'syncring-noise-')), 'scenario.json');
  writeFileSync(path, JSON.stringify({ ...adlerPairScenario(1e-5, 0.01), nominalFrequencyHz: 10e6, ...changes }));
  return path;
}

const at = (table: { tau: number[] }, row: number[], tau: number): number => {
  const i = table.tau.findIndex((t) => Math.abs(Math.log10(t / tau)) < 1e-9);
  expect(i, `tau ${tau} in the table`).toBeGreaterThanOrEqual(0);
  return row[i];
};

describe('syncring noise', () => {
  test('the demo board: one JSON object, taus from the carrier period to 1e5 s, the array 10 log10 N dB below a part', async () => {
    const { code, out } = await runCli(['noise', 'timing-board-8']);
    expect(code).toBe(0);
    const result = JSON.parse(out) as NoiseOutput;
    expect(result.pattern.kind).toBe('in-phase');
    expect(result.adev.tau[0]).toBeCloseTo(1 / result.carrierHz, 12);
    expect(result.adev.tau.at(-1)).toBeGreaterThanOrEqual(1e5);
    expect(result.phaseNoise.nodes).toHaveLength(8);
    expect(result.adev.nodes).toHaveLength(8);
    expect(result.offsetsHz).toHaveLength(result.phaseNoise.array.length);
    // the model's white noise on 8 parts of nearly equal noise: the array mean is 1/8 of one part's S_phi
    expect(result.phaseNoise.uncoupled[0] - result.phaseNoise.array[0]).toBeCloseTo(10 * Math.log10(8), 1);
    expect(result.lockingBandwidthHz).toBeGreaterThan(0);
    expect(result.caution).toMatch(/not from a measured part/);
    for (const row of [result.adev.array, result.mdev.array, result.tdev.array, ...result.adev.nodes])
      expect(row.every((v) => v > 0 && Number.isFinite(v))).toBe(true);
  });

  test("the demo's part noise comes from its scenario: one part near 1e-11 at 1 s, as SP 1065 gives for its coefficients", async () => {
    const result = JSON.parse((await runCli(['noise', 'timing-board-8'])).out) as NoiseOutput;
    expect(result.sources.parts).toBeNull();
    expect(result.sources.scenarioParts).toHaveLength(8);
    // by hand (NIST SP 1065 power-law table): h0 / 2 + 2 ln 2 h-1 + (2 pi^2 / 3) h-2 at tau = 1 s, plus white PM
    // 3 fh h2 / (4 pi^2) at the default bandwidth fh = f0 / 2 = 5 MHz: 1.3204e-22 + 7.6e-25, so ADEV = 1.152e-11
    const avar = 5e-23 / 2 + 2 * Math.LN2 * 7e-23 + ((2 * Math.PI ** 2) / 3) * 1.5e-24 + (3 * 5e6 * 2e-30) / (4 * Math.PI ** 2);
    expect(at(result.adev, result.adev.uncoupled, 1) / Math.sqrt(avar)).toBeCloseTo(1, 2);
  });

  test("--part-noise adds to the scenario's part noise", async () => {
    const path = scenarioFile({ noise: { seed: 1, powerLaw: { h0: 2e-22 } } });
    const both = JSON.parse((await runCli(['noise', path, '--part-noise', 'h0=2e-22'])).out) as NoiseOutput;
    // white FM h0 = 4e-22 in all: sigma_y(1 s) = sqrt(4e-22 / 2) (SP 1065)
    expect(at(both.adev, both.adev.uncoupled, 1) / Math.sqrt(2e-22)).toBeCloseTo(1, 2);
  });

  test('one part alone (the uncoupled reference) meets SP 1065 for white, flicker and random-walk FM to 1 %', async () => {
    // SP 1065 (Riley 2008), power-law table: sigma_y^2 = h0 / (2 tau), 2 ln 2 h-1, (2 pi^2 / 3) h-2 tau
    const quiet = scenarioFile({ noise: { intensity: 0, seed: 1 } });
    const cases = [
      { spec: 'h0=2e-22', expected: (tau: number) => Math.sqrt(2e-22 / (2 * tau)) },
      { spec: 'h-1=3e-24', expected: () => Math.sqrt(2 * Math.LN2 * 3e-24) },
      { spec: 'h-2=1e-27', expected: (tau: number) => Math.sqrt(((2 * Math.PI ** 2) / 3) * 1e-27 * tau) },
    ];
    for (const c of cases) {
      const { code, out, err } = await runCli(['noise', quiet, '--part-noise', c.spec]);
      expect(code, err).toBe(0);
      const result = JSON.parse(out) as NoiseOutput;
      for (const tau of [1, 10, 100, 1e3, 1e4, 1e5]) {
        expect(at(result.adev, result.adev.uncoupled, tau) / c.expected(tau), `${c.spec} at tau ${tau}`).toBeCloseTo(1, 2);
      }
    }
  });

  test('bad arguments exit 2 with the flag named; the run needs some noise and a stable pattern', async () => {
    const quiet = scenarioFile({ noise: { intensity: 0, seed: 1 } });
    const cases: [string[], RegExp][] = [
      [['noise', quiet], /no noise .* --part-noise/],
      [['noise', quiet, '--part-noise', 'h3=1'], /--part-noise: expected NAME=VALUE .* \(got "h3=1"\)/],
      [['noise', quiet, '--part-noise', 'h0=-1'], /--part-noise: h0 must be a finite number >= 0/],
      [['noise', quiet, '--part-noise', 'h0=1e-22,h0=2e-22'], /h0 is given twice/],
      [['noise', 'timing-board-8', '--pattern', '999'], /--pattern must be an index 0\.\.\d+/],
      [['noise', 'timing-board-8', '--bandwidth', '-5'], /--bandwidth must be a positive number of Hz/],
      [['noise', 'timing-board-8', '--tau', '1'], /unknown option --tau/],
      [['noise'], /noise needs exactly one SCENARIO/],
    ];
    for (const [argv, message] of cases) {
      const { code, err } = await runCli(argv);
      expect(code, argv.join(' ')).toBe(2);
      expect(err).toMatch(message);
    }
  });

  test('an unstable pattern is refused: it has no stationary noise', async () => {
    const predicted = await runCli(['predict', 'ring-one-way-5']);
    const patterns = JSON.parse(predicted.out).patterns as { stable: boolean | null }[];
    const unstable = patterns.findIndex((p) => p.stable === false);
    expect(unstable).toBeGreaterThanOrEqual(0);
    const { code, err } = await runCli(['noise', 'ring-one-way-5', '--pattern', String(unstable), '--part-noise', 'h0=1e-22']);
    expect(code).toBe(2);
    expect(err).toMatch(new RegExp(`pattern ${unstable} .* is unstable`));
  });
});
