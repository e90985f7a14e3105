import { describe, expect, test } from 'vitest';
import { patternCatalogue, type CataloguePattern } from '../../../src/predict/catalogue.js';
import { continueBranch } from '../../../src/predict/continuation.js';
import { parseContinuationParameter } from '../../../src/predict/continuation-parameter.js';
import { logLogSlope } from '../../support/states.js';
import { ringModel, TWO_PI } from './rings.js';

/**
 * Stability of the rotating waves (q-twisted states) of rings of van der Pol nodes, computed by
 * the catalogue on the guiding system.
 *
 * Stiff amplitudes (kappa sigma = 0.002 << g = 1): the phases obey a ring of sine-coupled phase
 * oscillators and a q-twisted state is stable iff cos(2 pi q / N) > 0 (Wiley, Strogatz, Girvan,
 * Chaos 16, 015103, 2006; for the one-way ring from the circulant eigenvalues
 * K cos(psi) (e^{-2 pi i m / N} - 1), Gray, Toeplitz and Circulant Matrices: A Review, 2006).
 * Where cos(2 pi q / N) = 0 (N = 8, q = 2 and 6; N = 12, q = 3 and 9) the phase part of the
 * Jacobian vanishes and the sign is decided by the amplitude-phase coupling, of second order in
 * kappa sigma / g. Derived here (not from a publication): with a_k = (r + rho_k) e^{i(psi k + phi_k)}
 * the linearisation for the Fourier mode mu couples rho and phi through kappa sigma r sin(psi)
 * (e^{-i mu} - e^{i mu}) terms, giving an eigenvalue near 4 (kappa sigma)^2 sin^2 psi sin^2 mu / |A|
 * (A = -g r^2 / 2 the amplitude rate) on the two-way ring: positive, of order (kappa sigma)^2.
 * At eps = 0.005 that is below the guiding system's resolution eps rateScale K / omega (K the
 * coupling rate, see marginTolerance), so the catalogue must call those states marginal, not
 * stable or unstable; in physical terms the sign is unresolved while kappa sigma / g < eps.
 */
const STIFF = 0.002;
const EPS = 0.005;

function rotatingWaves(
  nodes: number,
  twoWay: boolean,
  extra: { reactive?: number; strength?: number; epsilon?: number } = {},
): Map<number, CataloguePattern> {
  const model = ringModel({ nodes, twoWay, strength: extra.strength ?? STIFF, reactive: extra.reactive, epsilon: extra.epsilon ?? EPS });
  const catalogue = patternCatalogue(model, { types: ['in-phase', 'anti-phase', 'rotating-wave'], maxFixDimension: 1, randomSeeds: 0 });
  const byQ = new Map<number, CataloguePattern>();
  for (const p of catalogue.patterns) {
    expect(p.candidate.exact).toBe(true);
    expect(byQ.has(p.candidate.q!)).toBe(false); // each class once
    byQ.set(p.candidate.q!, p);
  }
  return byQ;
}

/**
 * Wave numbers listed: every q = 0..N-1 on either ring. On a two-way ring a reflection maps q to
 * N - q, a mirror image the catalogue lists as an entry of its own (the ring running it would
 * otherwise find no matching row).
 */
const classesOf = (nodes: number): number[] => Array.from({ length: nodes }, (_, q) => q);

describe('twisted states in the stiff-amplitude regime (kappa sigma = 0.002 g)', () => {
  for (const twoWay of [false, true]) {
    test(`${twoWay ? 'two' : 'one'}-way rings, N = 5..12: stable set = {q : cos(2 pi q / N) > 0}, cos = 0 marginal`, () => {
      const marginal: string[] = [];
      for (let nodes = 5; nodes <= 12; nodes++) {
        const waves = rotatingWaves(nodes, twoWay);
        for (const q of classesOf(nodes)) {
          const p = waves.get(q);
          expect(p, `N = ${nodes}, q = ${q} missing`).toBeDefined();
          // the solved state is the wave itself: equal moduli, neighbour lag 2 pi q / N
          expect(p!.q).toBe(q);
          const c = Math.cos((TWO_PI * q) / nodes);
          if (Math.abs(c) < 1e-9) {
            // Wiley, Strogatz, Girvan 2006: cos = 0 is the boundary case; reported, not guessed
            expect(p!.stability, `N = ${nodes}, q = ${q}`).toBe('marginal');
            expect(p!.stable).toBeNull();
            expect(Math.abs(p!.margin)).toBeLessThanOrEqual(p!.marginTolerance);
            marginal.push(`${nodes}:${q}`);
          } else {
            // Wiley, Strogatz, Girvan 2006 (two-way); Gray 2006 circulant eigenvalues (one-way)
            expect(p!.stable, `N = ${nodes}, q = ${q}, cos = ${c.toFixed(3)}, margin ${p!.margin}`).toBe(c > 0);
          }
        }
      }
      expect(marginal).toEqual(['8:2', '8:6', '12:3', '12:9']);
    });
  }

  test('the marginal band is what withholds the verdict: at eps = 1e-9 the N = 8, q = 2 state resolves as unstable, with a margin of order (kappa sigma)^2', () => {
    const margins: number[] = [];
    const couplings = [0.002, 0.004, 0.008];
    for (const strength of couplings) {
      const p = rotatingWaves(8, true, { strength, epsilon: 1e-9 }).get(2)!;
      expect(p.stability).toBe('unstable');
      margins.push(p.margin);
    }
    // second order in the coupling (derived in the header): slope 2 on a log-log plot
    expect(Math.abs(logLogSlope(couplings, margins) - 2)).toBeLessThan(0.1);
    for (const [i, m] of margins.entries()) {
      expect(m).toBeGreaterThan(0.1 * couplings[i] ** 2);
      expect(m).toBeLessThan(10 * couplings[i] ** 2);
    }
  });
});

describe('how reactive and strong coupling shift the stable set', () => {
  /**
   * Reactive coupling rho turns the coupling constant into kappa (sigma - i rho / omega) =
   * kappa |C| e^{-i beta}, beta = atan(rho / (omega sigma)); the phase equations get the phase lag
   * of Sakaguchi and Kuramoto (Prog. Theor. Phys. 76, 576, 1986): theta_k' has
   * kappa |C| / 2 sin(theta_l - theta_k - beta). On the one-way ring the circulant eigenvalues
   * (Gray 2006) become (kappa |C| / 2) cos(psi + beta) (e^{-i mu} - 1): stable iff
   * cos(2 pi q / N + beta) > 0, the window turned by -beta. On the two-way ring the two
   * neighbours contribute cos(psi + beta) and cos(psi - beta), summing to 2 cos(psi) cos(beta):
   * the set is unchanged and the real parts scale with kappa |C| cos(beta) = kappa sigma, while the
   * eigenvalues gain imaginary parts kappa (rho / omega) sin(psi) sin(mu) (derived here).
   */
  const beta = Math.PI / 4; // rho = sigma = 1, omega = 1

  test('one-way rings, rho = sigma: stable set = {q : cos(2 pi q / N + beta) > 0}; N = 8, q = 1 and 5 become the marginal ones', () => {
    let decided = 0;
    let total = 0;
    const marginal: string[] = [];
    for (let nodes = 5; nodes <= 12; nodes++) {
      const waves = rotatingWaves(nodes, false, { reactive: 1 });
      for (let q = 0; q < nodes; q++) {
        const p = waves.get(q)!;
        expect(p).toBeDefined();
        total++;
        const c = Math.cos((TWO_PI * q) / nodes + beta);
        // phase-reduction margin (Gray 2006 with the phase lag): the least stable Fourier mode
        const mus = Array.from({ length: nodes - 1 }, (_, m) => (TWO_PI * (m + 1)) / nodes);
        const phaseMargin = Math.max(...mus.map((mu) => 0.5 * STIFF * Math.SQRT2 * c * (Math.cos(mu) - 1)));
        if (Math.abs(c) < 1e-9) {
          expect(p.stability, `N = ${nodes}, q = ${q}`).toBe('marginal');
          marginal.push(`${nodes}:${q}`);
        } else if (Math.abs(phaseMargin) > 3 * p.marginTolerance) {
          decided++;
          expect(p.stable, `N = ${nodes}, q = ${q}, cos(psi + beta) = ${c.toFixed(3)}`).toBe(c > 0);
          // and the margin itself follows the phase reduction to 20% (corrections O(kappa sigma / g))
          expect(Math.abs(p.margin - phaseMargin)).toBeLessThan(0.2 * Math.abs(phaseMargin));
        } else {
          // within 3x the band of the resolution: marginal or the phase-reduction sign, never the opposite
          expect(p.stable === null || p.stable === c > 0, `N = ${nodes}, q = ${q}`).toBe(true);
        }
      }
    }
    expect(marginal).toEqual(['8:1', '8:5']);
    expect(decided).toBeGreaterThan(0.9 * total);
  });

  test('two-way rings, rho = sigma: the same stable set, the same real parts, travelling (complex) perturbations', () => {
    for (let nodes = 5; nodes <= 12; nodes++) {
      const plain = rotatingWaves(nodes, true);
      const reactive = rotatingWaves(nodes, true, { reactive: 1 });
      for (const q of classesOf(nodes)) {
        const a = plain.get(q)!;
        const b = reactive.get(q)!;
        expect(b.stable, `N = ${nodes}, q = ${q}`).toBe(a.stable);
        if (a.stability !== 'marginal') {
          expect(Math.abs(b.margin - a.margin)).toBeLessThan(0.1 * Math.abs(a.margin));
        }
        // imaginary parts: none without rho; up to kappa (rho / omega) |sin psi| max sin(mu) with it
        const largestIm = (p: typeof a) => Math.max(...p.eigenvalues.map((e) => Math.abs(e.im)));
        const psi = (TWO_PI * q) / nodes;
        expect(largestIm(a)).toBeLessThan(1e-9);
        if (Math.abs(Math.sin(psi)) > 0.1) expect(largestIm(b)).toBeGreaterThan(0.5 * STIFF * Math.abs(Math.sin(psi)));
      }
    }
  });

  test('strong coupling (kappa sigma = g) only removes twisted states, through the amplitudes; in-phase stays stable', () => {
    // Derived in the file header: the amplitude-phase term is destabilising (positive) for every
    // twisted state with sin(psi) != 0 and absent for in-phase (psi = 0), so the stable set can
    // only shrink as kappa sigma / g grows. The dissipative coupling also acts as an extra loss
    // 2 kappa sigma (1 - cos psi) on a two-way ring: r^2 = 4 (1 - 2 kappa sigma (1 - cos psi) / g),
    // so at kappa sigma = g the waves with cos psi <= 1/2 do not exist at all (derived).
    let removed = 0;
    for (let nodes = 5; nodes <= 12; nodes++) {
      const stiff = rotatingWaves(nodes, true);
      const strong = rotatingWaves(nodes, true, { strength: 1 });
      expect(strong.get(0)!.stable).toBe(true);
      expect(strong.get(0)!.meanAmplitude[0]).toBeCloseTo(2, 9);
      for (const q of classesOf(nodes)) {
        const wave = strong.get(q);
        const psi = (TWO_PI * q) / nodes;
        if (Math.cos(psi) < 0.5 - 1e-9) expect(wave, `N = ${nodes}, q = ${q} should not exist`).toBeUndefined();
        else if (Math.cos(psi) > 0.5 + 1e-9) {
          expect(wave, `N = ${nodes}, q = ${q}`).toBeDefined();
          expect(wave!.meanAmplitude[0]).toBeCloseTo(2 * Math.sqrt(1 - 2 * (1 - Math.cos(psi))), 6);
        }
        if (wave?.stable === true) expect(stiff.get(q)!.stable, `N = ${nodes}, q = ${q}`).toBe(true);
        if (stiff.get(q)!.stable === true && wave?.stable !== true) removed++;
      }
    }
    expect(removed).toBeGreaterThan(0);
  });

  test('N = 7, q = 1 on a two-way ring: the continuation in kappa finds where it turns unstable, and the catalogue agrees on both sides', () => {
    const model = ringModel({ nodes: 7, twoWay: true, strength: 0.05 });
    const start = patternCatalogue(model, { types: ['rotating-wave'], maxFixDimension: 1, randomSeeds: 0 }).patterns.find(
      (p) => p.candidate.q === 1,
    )!;
    expect(start.stable).toBe(true);
    const branch = continueBranch(model, Float64Array.from(start.state), parseContinuationParameter('coupling', model.params), {
      directions: ['increasing'],
    });
    const limit = branch.limits.increasing!;
    // a real eigenvalue crossing with the pattern still there (no turning point): symmetry breaking
    expect(limit.kind).toBe('branch-point');
    expect(limit.parameter).toBeGreaterThan(0.05);
    expect(limit.parameter).toBeLessThan(1); // the twisted-state physics test sees q = 1 leave at kappa sigma = g
    // (eps = 1e-6 so that margins this close to the crossing are resolved)
    const below = rotatingWaves(7, true, { strength: 0.97 * limit.parameter, epsilon: 1e-6 }).get(1)!;
    const above = rotatingWaves(7, true, { strength: 1.03 * limit.parameter, epsilon: 1e-6 }).get(1)!;
    expect(below.stable).toBe(true);
    expect(above.stable).toBe(false);
  });
});
