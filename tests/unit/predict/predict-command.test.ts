import { afterEach, describe, expect, test, vi } from 'vitest';
import { runCli } from '../../support/run-cli.js';
import { predict } from '../../../server/commands/predict.js';

afterEach(() => vi.restoreAllMocks());

describe('syncring predict', () => {
  test('one JSON object with the catalogue: every pattern has the contract fields; the 5-ring waves follow cos(2 pi q / 5) > 0', async () => {
    const { code, out } = await runCli(['predict', 'ring-one-way-5']);
    expect(code).toBe(0);
    const result = JSON.parse(out);
    expect(result.nodes).toBe(5);
    expect(result.group.order).toBe(5);
    for (const p of result.patterns) {
      for (const field of [
        'kind',
        'symmetry',
        'stable',
        'margin',
        'eigenvalues',
        'phaseDifferences',
        'amplitudes',
        'timeConstant',
        'frequencyShiftPpm',
        'mirror',
      ])
        expect(p).toHaveProperty(field);
      // a one-way ring has no reflection, so no entry has a mirror image of its own
      expect(p.mirror).toEqual({ relation: 'none', partner: null });
      expect(p.phaseDifferences).toHaveLength(5);
      expect(p.amplitudes).toHaveLength(5);
      expect(Number.isFinite(p.margin)).toBe(true);
    }
    const waves = result.patterns.filter(
      (p: { candidate: { type: string } }) => p.candidate.type !== 'standing-wave' && p.candidate.type !== 'cluster',
    );
    expect(waves.map((p: { q: number }) => p.q).sort()).toEqual([0, 1, 2, 3, 4]);
    for (const p of waves) {
      // Wiley, Strogatz, Girvan 2006 / Gray 2006 circulant eigenvalues
      expect(p.stable).toBe(Math.cos((2 * Math.PI * p.q) / 5) > 0);
      // in-phase q = 0; anti-phase would be N/2 (none for N = 5)
      expect(p.kind).toBe(p.q === 0 ? 'in-phase' : 'rotating-wave');
    }
    // the scenario starts at q = 1, which is stable: the initial state settles there
    expect(result.patterns[result.initial.pattern].q).toBe(1);
  });

  test('--continue detuning:0 on the detuned pair: the locking range in Delta and ppm (Adler 1946: |Delta_0 - Delta_1| = kappa sigma / omega)', () => {
    const result = predict({ scenario: 'pair-adler', continueIn: 'detuning:0' });
    const continuation = result.continuation!;
    const range = { upper: continuation.range.upper!, lower: continuation.range.lower!, upperPpm: continuation.range.upperPpm! };
    // pair-adler: Delta_1 = -0.005, kappa sigma = 0.02, omega = 1, eps = 1e-3
    expect(Math.abs(range.upper - (-0.005 + 0.02))).toBeLessThan(0.02 * 0.02);
    expect(Math.abs(range.lower - (-0.005 - 0.02))).toBeLessThan(0.02 * 0.02);
    // ppm = Delta eps / 1e-6 (README, 'Units')
    expect(range.upperPpm).toBeCloseTo((range.upper * 1e-3) / 1e-6, 6);
    expect(continuation.limits.increasing!.kind).toBe('fold');
    expect(continuation.branch.length).toBeGreaterThan(5);
  });

  test('the detuned pair holds both of its locked states: the stable one at psi = asin(dDelta / K) and the saddle at pi minus it (Adler 1946)', () => {
    const { patterns } = predict({ scenario: 'pair-adler' });
    // pair-adler: Delta = +-0.005, K = kappa sigma / omega = 0.02 per unit phase difference of the pair, so
    // sin psi = (Delta_0 - Delta_1) / K = 0.5: psi = pi/6 (stable) and 5 pi/6 (the saddle between them)
    const lag = Math.asin(0.01 / 0.02);
    expect(patterns).toHaveLength(2);
    const stable = patterns.filter((p) => p.stable === true);
    const saddle = patterns.filter((p) => p.stable === false);
    expect(stable).toHaveLength(1);
    expect(saddle).toHaveLength(1);
    expect(Math.abs(Math.abs(stable[0].phaseDifferences[0]) - lag)).toBeLessThan(1e-6);
    expect(Math.abs(Math.abs(saddle[0].phaseDifferences[0]) - (Math.PI - lag))).toBeLessThan(1e-6);
    // one unstable direction: a saddle, not a repeller
    expect(saddle[0].eigenvalues.filter((e) => e.re > 0)).toHaveLength(1);
  });

  test('--continue link:4-0 --range 0.5:1 on the one-way 5-ring: the q = 1 wave survives down to about 0.905 of the weight', () => {
    const continuation = predict({ scenario: 'ring-one-way-5', continueIn: 'link:4-0', range: '0.5:1' }).continuation!;
    expect(continuation.pattern.q).toBe(1);
    expect(continuation.range.lowerKind).toBe('fold');
    expect(continuation.range.upperKind).toBe('range');
    // consistent with the live predictor's loss at 9.5% of a link break (live-prediction tests)
    expect(continuation.range.lower!).toBeGreaterThan(0.85);
    expect(continuation.range.lower!).toBeLessThan(0.95);
  });

  test.each([
    [['predict'], /predict needs exactly one SCENARIO/],
    [['predict', 'no-such-file.json'], /no-such-file\.json: no such file/],
    [['predict', 'ring-one-way-5', '--continue', 'speed'], /--continue speed: unknown parameter "speed"/],
    [['predict', 'ring-one-way-5', '--continue', 'detuning:9'], /node 9 does not exist \(nodes are 0\.\.4\)/],
    [['predict', 'ring-one-way-5', '--continue', 'detuning'], /say which node/],
    [['predict', 'ring-one-way-5', '--continue', 'link:0-2'], /there is no link from node 0 to node 2/],
    [['predict', 'ring-one-way-5', '--continue', 'edge:0-1'], /no link from node 1 back to node 0/],
    [['predict', 'ring-one-way-5', '--continue', 'coupling', '--range', '1:0'], /--range: MIN must be below MAX/],
    [['predict', 'ring-one-way-5', '--continue', 'coupling', '--range', 'a:b'], /--range: MIN "a" is not a number/],
    [['predict', 'ring-one-way-5', '--continue', 'coupling', '--pattern', '99'], /--pattern must be an index 0\.\.4/],
    [['predict', 'ring-one-way-5', '--pattern', '1'], /--pattern needs --continue PARAM/],
    [['predict', 'ring-one-way-5', '--frobnicate'], /unknown option --frobnicate/],
  ])('bad input %j exits 2 naming the problem', async (argv, message) => {
    const { code, out, err } = await runCli(argv as string[]);
    expect(code).toBe(2);
    expect(out).toBe('');
    expect(err).toMatch(message as RegExp);
  });
});
