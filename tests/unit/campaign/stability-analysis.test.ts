import { describe, expect, test } from 'vitest';
import { analyzeStability, type PhaseSample } from '../../../src/campaign/index.js';
import { Random } from '../../../src/util/random.js';

/** Units and definitions of the soak's stability report on synthetic phase records. */
const f0 = 10e6;
const tau0 = 1e-3; // seconds between samples

function samples(count: number, phase: (i: number) => [number, number, number, number]): PhaseSample[] {
  return Array.from({ length: count }, (_, i) => {
    const [ensemble, node, uncoupledEnsemble, singlePart] = phase(i);
    return { tick: i, tau: i, ensemble, node, uncoupledEnsemble, singlePart };
  });
}

describe('stability analysis of a soak record', () => {
  test('a constant offset: frequency offset in ppb, time error in ns, and 1 ppm = 86.4 ms per day', () => {
    // phi = 2 pi f0 y t for a fractional offset y (definition of time error, ITU-T G.810)
    const y = [1e-6, 2e-9, -5e-9, 0];
    const report = analyzeStability(
      samples(200, (i) => y.map((v) => 2 * Math.PI * f0 * v * i * tau0) as [number, number, number, number]),
      tau0,
      f0,
    )!;
    const [ensemble, node, uncoupled, single] = report.series;
    expect(ensemble.frequencyOffsetPpb).toBeCloseTo(1000, 6);
    expect(ensemble.timeErrorPerDayUs).toBeCloseTo(86400, 3); // 1e-6 * 86400 s = 86.4 ms (arithmetic)
    expect(node.frequencyOffsetPpb).toBeCloseTo(2, 9);
    expect(node.timeErrorPerDayUs).toBeCloseTo(172.8, 6); // 2 ppb: 2 * 86.4 us per day
    expect(uncoupled.finalTimeErrorNs).toBeCloseTo(-5e-9 * 199 * tau0 * 1e9, 9);
    expect(single.maxTimeErrorNs).toBe(0);
    expect(report.span).toBeCloseTo(199 * tau0, 15);
    // a constant offset has no Allan deviation (second differences vanish; NIST SP 1065)
    expect(ensemble.sweep.series.oadev!.deviation[0]).toBeLessThan(1e-15);
    // but MTIE sees it: y m tau0 (ITU-T G.810)
    expect(ensemble.sweep.series.mtie!.deviation[2]).toBeCloseTo(1e-6 * 4 * tau0, 12);
  });

  test('the mean of N independent white-FM parts against one part: ADEV ratio 1/sqrt(N) at every tau', () => {
    // white FM = random-walk phase; the mean of N independent walks has 1/N of the variance (common practice)
    const random = new Random(8);
    const n = 16;
    const walk = new Float64Array(n);
    const record = samples(20000, () => {
      for (let k = 0; k < n; k++) walk[k] += random.normal() * 1e-3;
      const mean = walk.reduce((a, b) => a + b, 0) / n;
      return [mean, walk[0], mean, walk[1]];
    });
    const report = analyzeStability(record, tau0, f0)!;
    const ratio = report.ratioToSinglePart!;
    for (const [i, m] of report.series[0].sweep.m.entries()) {
      if (m > 64) break;
      // at m <= 64 of 20000 samples each estimate scatters by about 3% (edf ~ 3N / 2m); 10% allowed
      expect(Math.abs(ratio.uncoupledEnsemble[i] / 0.25 - 1)).toBeLessThan(0.1);
    }
    expect(report.series.find((s) => s.name === 'singlePart')!.oadevSlope).toBeCloseTo(-0.5, 1);
  });

  test('a coupled node against an uncoupled part: near 1/sqrt(N) with independent noise, much less gain with a shared part of it', () => {
    // A node held by the coupling follows the array's mean phase, here with a residual walk of
    // its own at half the parts' size; a free-running part carries its whole walk. The variance
    // of a mean of N independent random walks is 1/N of one (common practice), so the node's
    // ADEV ratio is sqrt(1/N + 1/4) and the array output's sqrt(1/N). A walk shared by every
    // part (one supply, one temperature) does not average out: with a shared walk as large as
    // each part's own, the node's ratio is sqrt((1 + 1/N + 1/4) / 2) (same arithmetic).
    const n = 4;
    const ratios = (shared: number) => {
      const random = new Random(21);
      const own = new Float64Array(n);
      let common = 0;
      let residual = 0;
      const record = samples(20000, () => {
        common += shared * random.normal() * 1e-3;
        for (let k = 0; k < n; k++) own[k] += random.normal() * 1e-3;
        residual += 0.5 * random.normal() * 1e-3;
        const array = common + own.reduce((a, b) => a + b, 0) / n;
        return [array, array + residual, array, common + own[0]];
      });
      const report = analyzeStability(record, tau0, f0)!;
      const m = report.series[0].sweep.m;
      const upTo64 = (values: number[]) => values.filter((_, i) => m[i] <= 64);
      return { node: upTo64(report.ratioToSinglePart!.node), ensemble: upTo64(report.ratioToSinglePart!.ensemble) };
    };
    // at m <= 64 of 20000 samples each estimate scatters by about 3% (edf ~ 3N / 2m); 10% allowed
    const near = (values: number[], expected: number) => values.forEach((r) => expect(Math.abs(r / expected - 1)).toBeLessThan(0.1));
    const independent = ratios(0);
    near(independent.node, Math.sqrt(1 / n + 0.25));
    near(independent.ensemble, Math.sqrt(1 / n));
    near(ratios(1).node, Math.sqrt((1 + 1 / n + 0.25) / 2));
  });

  test('too few samples give no report; a stopped twin shortens only its own series', () => {
    expect(
      analyzeStability(
        samples(10, () => [0, 0, 0, 0]),
        tau0,
        f0,
      ),
    ).toBeNull();
    const record = samples(100, (i) => [i * 1e-3, i * 2e-3, i < 50 ? i * 1e-3 : 0, i * 1e-3]).map((s, i) =>
      i >= 50 ? { ...s, uncoupledEnsemble: null, singlePart: null } : s,
    );
    const report = analyzeStability(record, tau0, f0)!;
    expect(report.series.map((s) => [s.name, s.points])).toEqual([
      ['ensemble', 100],
      ['node', 100],
      ['uncoupledEnsemble', 50],
      ['singlePart', 50],
    ]);
    expect(report.note).toMatch(/stopped after 50 samples/);
  });

  test('a mask judges the array output only: a crossing there fails with its tau; a crossing of the single part does not count', () => {
    // array output: white FM phase (random walk) of 1e-12 s per sample; single part 100 times noisier
    const random = new Random(12);
    let a = 0;
    let p = 0;
    const toPhase = (x: number) => 2 * Math.PI * f0 * x;
    const record = samples(2000, () => {
      a += 1e-12 * random.normal();
      p += 1e-10 * random.normal();
      return [toPhase(a), toPhase(a), toPhase(p), toPhase(p)];
    });
    const flat = (limit: number) => ({
      name: `flat ${limit}`,
      metric: 'tdev' as const,
      points: [
        [1e-4, limit],
        [10, limit],
      ] as [number, number][],
    });
    const tdevOf = (r: ReturnType<typeof analyzeStability>, name: string) =>
      r!.series.find((s) => s.name === name)!.sweep.series.tdev!.deviation;
    const plain = analyzeStability(record, tau0, f0)!;
    const arrayMax = Math.max(...tdevOf(plain, 'ensemble'));
    const singleMax = Math.max(...tdevOf(plain, 'singlePart'));
    expect(singleMax).toBeGreaterThan(10 * arrayMax);
    // a limit between the two: met by the array output, crossed by the single part
    const between = analyzeStability(record, tau0, f0, { mask: flat(2 * arrayMax) })!;
    expect(between.mask!.pass).toBe(true);
    expect(between.mask!.judged).toBe('ensemble');
    expect(between.mask!.margin.factor).toBeCloseTo(2, 9);
    expect(between.series.find((s) => s.name === 'singlePart')!.mask!.meets).toBe(false);
    expect(between.mask!.caution).toMatch(/not a compliance test/);
    // a limit below the array output's largest TDEV: crossed where that value is
    const below = analyzeStability(record, tau0, f0, { mask: flat(arrayMax / 2) })!;
    expect(below.mask!.pass).toBe(false);
    expect(below.mask!.margin.tau).toBe(plain.series[0].sweep.tau[tdevOf(plain, 'ensemble').indexOf(arrayMax)]);
    expect(below.mask!.reason).toMatch(/the array output's TDEV exceeds mask "flat/);
    // a mask wholly beyond the record's taus cannot be met
    const beyond = analyzeStability(record, tau0, f0, {
      mask: {
        name: 'far',
        metric: 'mtie',
        points: [
          [100, 1],
          [1000, 1],
        ],
      },
    })!;
    expect(beyond.mask!.pass).toBe(false);
    expect(beyond.mask!.reason).toMatch(/no tau of the record .* falls inside the mask's range/);
  });

  test('every overlapping ADEV value carries an interval; the headline ratio marks taus not fit for it', () => {
    const random = new Random(3);
    let a = 0;
    const record = samples(600, () => {
      a += random.normal();
      return [a, a, a, a];
    });
    const r = analyzeStability(record, tau0, f0)!;
    const s = r.series[0];
    expect(s.intervals.oadev!.length).toBe(s.sweep.m.length);
    expect(s.noise.length).toBe(s.sweep.m.length);
    const last = s.intervals.oadev!.length - 1;
    // m = 128 of 600 points: floor(599 / 128) - 1 = 3 independent terms
    expect(s.sweep.m[last]).toBe(128);
    expect(s.intervals.oadev![last].reliable).toBe(false);
    expect(r.ratioToSinglePart!.reliable!.node[last]).toBe(false);
    expect(r.ratioToSinglePart!.reliable!.node[0]).toBe(true);
    expect(s.oadevFit.toTau).toBeLessThan(s.sweep.tau[last]);
  });
});
