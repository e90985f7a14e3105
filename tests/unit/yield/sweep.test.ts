import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../../src/scenario/parse.js';
import { parseStudy, totalSamples } from '../../../src/yield/study.js';
import { runIndex } from '../../../src/yield/sample.js';
import { pointSummaries, sweepSummary } from '../../../src/yield/summary.js';
import { adlerPairScenario } from '../../support/adler-pair.js';

/**
 * A sweep of the coupling of an Adler pair whose node 0 alone is detuned (normal, s = 0.04):
 * it locks iff |Delta_0| <= kappa sigma (Adler 1946; docs/model.md, 'Adler pair'), so the yield at
 * coupling K is erf(K / (s sqrt 2)). The guiding system has no noise, so a tolerance on the noise
 * intensity cannot move its yield: the sensitivity view must rank the detuning first.
 */
const SAMPLES = 60;
// erf(K / (0.04 sqrt 2)) from Python's math.erf
const EXPECTED = [0.3829249225480262, 0.7887004526662894, 0.9875806693484477, 0.9999994266968563];

describe('a sweep of the coupling strength', () => {
  const study = parseStudy(
    {
      scenario: 'inline',
      samples: SAMPLES,
      seed: 9,
      tolerances: [
        { parameter: 'detuning', nodes: [0], distribution: 'normal', mean: 0, sigma: 0.04 },
        { parameter: 'noise.intensity', distribution: 'uniform', range: [0, 1e-6] },
      ],
      criteria: { pattern: 'in-phase', within: 400 },
      sweep: { parameter: 'coupling.strength', values: [0.02, 0.05, 0.1, 0.2], target: 0.95 },
    },
    parseScenario(adlerPairScenario(0.01, 0.05)),
  );
  const records = Array.from({ length: totalSamples(study) }, (_, i) => runIndex(study, i));
  const points = pointSummaries(study, records);
  const sweep = sweepSummary(study, points)!;

  it("gives the yield against the coupling, each interval holding Adler's erf(K / (s sqrt 2))", () => {
    expect(sweep.values).toEqual([0.02, 0.05, 0.1, 0.2]);
    sweep.yields.forEach((y, i) => {
      expect(y.samples).toBe(SAMPLES);
      expect(y.low).toBeLessThanOrEqual(EXPECTED[i]);
      expect(y.high).toBeGreaterThanOrEqual(EXPECTED[i]);
    });
    // the same boards at every point: a board that locks at one coupling locks at every larger one
    for (let sample = 0; sample < SAMPLES; sample++) {
      const passes = points.map((_, point) => records[point * SAMPLES + sample].pass);
      for (let p = 1; p < passes.length; p++) if (passes[p - 1]) expect(passes[p]).toBe(true);
    }
  });

  it('names the smallest coupling that reaches the target', () => {
    // 0.05 gives 0.79 at most plausibly; 0.1 gives 0.988 (a 95 % target is reached)
    expect(sweep.smallestReaching).toBe(0.1);
    expect(sweep.target).toBe(0.95);
    // 60 of 60 has a Wilson lower bound of n / (n + z^2) = 60 / 63.84 = 0.940 < 0.95: at this sample
    // count no coupling reaches 95 % with confidence, and the summary must say so
    expect(sweep.yields[3].passed).toBe(SAMPLES);
    expect(sweep.yields[3].low).toBeCloseTo(60 / (60 + 1.959963984540054 ** 2), 10);
    expect(sweep.smallestReachingSurely).toBeNull();
  });

  it('ranks the detuning above the noise intensity in the sensitivity view', () => {
    const rows = points[1].sensitivity;
    expect(rows.map((r) => r.component)).toEqual(['detuning[0]', 'noise.intensity']);
    const detuning = rows[0];
    // the outer quartiles of Delta_0 (large |Delta_0|) fail, the inner ones pass
    expect(detuning.quartileYield[1]).toBeGreaterThan(detuning.quartileYield[0]);
    expect(detuning.quartileYield[2]).toBeGreaterThan(detuning.quartileYield[3]);
    expect(detuning.swing).toBeGreaterThan(rows[1].swing);
  });
});
