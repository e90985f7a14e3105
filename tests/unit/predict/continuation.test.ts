import { describe, expect, test } from 'vitest';
import { patternCatalogue, type CataloguePattern } from '../../../src/predict/catalogue.js';
import { continueBranch } from '../../../src/predict/continuation.js';
import { parseContinuationParameter } from '../../../src/predict/continuation-parameter.js';
import { ringModel } from './rings.js';

/**
 * The continuation's test functions on a case with a Hopf point: the q = 1 wave of a one-way
 * ring of 5, continued in the coupling strength. A Hopf point is where a complex pair of
 * eigenvalues crosses the imaginary axis with non-zero speed (Kuznetsov, Elements of Applied
 * Bifurcation Theory, 3rd ed. 2004, section 3.4); the check is made independently of the
 * continuation, with the catalogue's own eigenvalues on either side of the reported point.
 */
const wave = (strength: number): CataloguePattern =>
  patternCatalogue(ringModel({ nodes: 5, twoWay: false, strength, epsilon: 1e-6 }), {
    types: ['rotating-wave'],
    maxFixDimension: 1,
    randomSeeds: 0,
  }).patterns.find((p) => p.candidate.q === 1)!;

describe('continuation test functions', () => {
  const start = wave(0.05);
  const model = ringModel({ nodes: 5, twoWay: false, strength: 0.05, epsilon: 1e-6 });
  const branch = continueBranch(model, Float64Array.from(start.state), parseContinuationParameter('coupling', model.params));

  test('increasing kappa: a Hopf point, confirmed by a complex pair crossing at the reported frequency (Kuznetsov 2004)', () => {
    const hopf = branch.limits.increasing!;
    expect(hopf.kind).toBe('hopf');
    const before = wave(0.99 * hopf.parameter);
    const after = wave(1.01 * hopf.parameter);
    expect(before.stable).toBe(true);
    expect(after.stable).toBe(false);
    const leading = after.eigenvalues[0];
    expect(leading.re).toBeGreaterThan(0);
    expect(Math.abs(Math.abs(leading.im) - hopf.frequency!)).toBeLessThan(0.05 * hopf.frequency!);
    // the pair itself: a conjugate partner with the same real part
    expect(after.eigenvalues[1].re).toBeCloseTo(leading.re, 12);
    expect(after.eigenvalues[1].im).toBeCloseTo(-leading.im, 12);
  });

  test('decreasing kappa: the physical bound kappa = 0, stable all the way, with the data kept for plotting', () => {
    const low = branch.limits.decreasing!;
    expect(low.kind).toBe('bound');
    expect(low.parameter).toBe(0);
    const kept = branch.points.slice(0, branch.startIndex + 1);
    for (const p of kept.slice(1)) expect(p.stable === true || p.stable === null).toBe(true);
    // parameters run monotonically from the bound to the Hopf point; each point has amplitudes and phase differences
    for (let i = 1; i < branch.points.length; i++) expect(branch.points[i].parameter).toBeGreaterThan(branch.points[i - 1].parameter);
    for (const p of branch.points) {
      expect(p.amplitudes).toHaveLength(5);
      expect(p.phaseDifferences).toHaveLength(5);
      // the q = 1 wave keeps its lag 2 pi / 5 along the whole branch (it is fixed by Z_5)
      for (const d of p.phaseDifferences) expect(d).toBeCloseTo((2 * Math.PI) / 5, 6);
    }
  });
});
