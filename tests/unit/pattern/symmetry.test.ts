import { describe, expect, test } from 'vitest';
import { graphAutomorphisms } from '../../../src/pattern/automorphisms.js';
import { fitSymmetryPhase, patternSymmetry, spatialSymmetries } from '../../../src/pattern/symmetry.js';
import { ringLinks } from '../../../src/scenario/index.js';
import { wrapAngle } from '../../../src/util/angles.js';
import { Random } from '../../../src/util/random.js';

// The group D_N written out by formula, independent of graphAutomorphisms:
// r^m: k -> k + m and s_m: k -> m - k (mod N) (Golubitsky & Stewart, The Symmetry Perspective, 2002).
const mod = (a: number, n: number): number => ((a % n) + n) % n;
const rotation = (n: number, m: number): Int32Array => Int32Array.from({ length: n }, (_, k) => mod(k + m, n));
const reflection = (n: number, m: number): Int32Array => Int32Array.from({ length: n }, (_, k) => mod(m - k, n));
const dihedral = (n: number): Int32Array[] => [
  ...Array.from({ length: n }, (_, m) => rotation(n, m)),
  ...Array.from({ length: n }, (_, m) => reflection(n, m)),
];
const key = (perm: ArrayLike<number>): string => Array.from(perm).join(',');

/** Snapshot c * f(k) for a complex c and a complex-valued shape f. */
function snapshot(n: number, shape: (k: number) => [number, number], c: [number, number] = [1, 0]) {
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const [fr, fi] = shape(k);
    re[k] = c[0] * fr - c[1] * fi;
    im[k] = c[0] * fi + c[1] * fr;
  }
  return { re, im };
}
const wave =
  (n: number, q: number) =>
  (k: number): [number, number] => [Math.cos((2 * Math.PI * q * k) / n), Math.sin((2 * Math.PI * q * k) / n)];

/** |a - b| on the circle. */
const angleGap = (a: number, b: number): number => Math.abs(wrapAngle(a - b));

describe('patternSymmetry of rotating waves', () => {
  // By hand, with (gamma.a)_k = a_{gamma^-1(k)} and a_k = e^{2 pi i q k / N}:
  //   r^m: (r^m.a)_k = a_{k-m} = e^{-2 pi i q m / N} a_k, so phase = -2 pi q m / N (mod 2 pi);
  //   s_m: (s_m.a)_k = a_{m-k} = e^{2 pi i q m / N} e^{-2 pi i q k / N}, which is e^{i phi} a_k
  //        for all k only if e^{-4 pi i q k / N} is constant, i.e. 2q = 0 mod N. So for
  //        q != 0, N/2 no reflection fixes the wave up to a phase: it turns the q-wave into the
  //        (N-q)-wave, orthogonal to it, and the best residual is sqrt(2).
  // (A phase of +2 pi q m / N belongs to the opposite convention (gamma.a)_k = a_{gamma(k)}.)
  for (const n of [5, 6, 8]) {
    for (let q = 1; q < n; q++) {
      if (2 * q === n) continue;
      test(`q = ${q} on D_${n}: exactly the ${n} rotations, phase -2 pi q m / N`, () => {
        const { re, im } = snapshot(n, wave(n, q), [0.3, -1.2]);
        const found = patternSymmetry(re, im, dihedral(n));
        expect(found.map((s) => key(s.element))).toEqual(Array.from({ length: n }, (_, m) => key(rotation(n, m))));
        found.forEach((s, m) => {
          expect(angleGap(s.phase, (-2 * Math.PI * q * m) / n)).toBeLessThan(1e-12);
          expect(s.phase).toBeGreaterThan(-Math.PI);
          expect(s.phase).toBeLessThanOrEqual(Math.PI);
        });
        for (let m = 0; m < n; m++) expect(fitSymmetryPhase(re, im, reflection(n, m)).residual).toBeCloseTo(Math.SQRT2, 12);
      });
    }
  }

  test('the in-phase state is fixed by all of D_N with phase 0', () => {
    for (const n of [3, 4, 7]) {
      const { re, im } = snapshot(n, () => [1, 0], [0.6, 0.8]);
      const found = patternSymmetry(re, im, dihedral(n));
      expect(found.length).toBe(2 * n);
      for (const s of found) expect(Math.abs(s.phase)).toBeLessThan(1e-12);
    }
  });

  test('anti-phase on even N: all of D_N, r^m and s_m with phase pi m', () => {
    // a_k = (-1)^k: (r^m.a)_k = (-1)^(k-m) = (-1)^m a_k and (s_m.a)_k = (-1)^(m-k) = (-1)^m a_k.
    for (const n of [4, 6, 10]) {
      const { re, im } = snapshot(n, (k) => [k % 2 === 0 ? 1 : -1, 0], [0.2, 0.5]);
      const found = patternSymmetry(re, im, dihedral(n));
      expect(found.length).toBe(2 * n);
      found.forEach((s, i) => expect(angleGap(s.phase, Math.PI * (i % n))).toBeLessThan(1e-12));
      expect(found[1].text).toBe('rotation by 1');
      expect(angleGap(found[1].phase, Math.PI)).toBeLessThan(1e-12);
      expect(found[1].phase).toBe(Math.PI); // pi, not -pi: phases lie in (-pi, pi]
    }
  });

  test('using the group computed from the two-way ring gives the same result', () => {
    const n = 9;
    const q = 2;
    const { re, im } = snapshot(n, wave(n, q));
    const group = graphAutomorphisms(n, ringLinks('ring-two-way', n)).elements;
    const found = patternSymmetry(re, im, group);
    expect(found.length).toBe(n);
    expect(found.every((s) => s.text === 'identity' || s.text.startsWith('rotation by'))).toBe(true);
  });
});

describe('patternSymmetry of standing waves and clusters', () => {
  test('standing wave cos(pi k / 4) on D_8: {e, r^4, s_0, s_4}', () => {
    // By hand: (r^m.a)_k = cos(pi (k - m) / 4) equals +-cos(pi k / 4) for all k only when
    // m = 0 mod 4 (sign (-1)^(m/4)); (s_m.a)_k = cos(pi (m - k) / 4) likewise only when m = 0 mod 4.
    // So r^4 (phase pi), s_0 (phase 0) and s_4 (phase pi) beside the identity: Z_2 x Z_2.
    const n = 8;
    const { re, im } = snapshot(n, (k) => [Math.cos((Math.PI * k) / 4), 0], [1.5, -0.4]);
    const found = patternSymmetry(re, im, dihedral(n));
    expect(found.map((s) => s.text)).toEqual(['identity', 'rotation by 4', 'reflection k -> -k', 'reflection k -> 4 - k']);
    expect(found.map((s) => Math.abs(s.phase))).toEqual([0, Math.PI, 0, Math.PI].map((p) => expect.closeTo(p, 12)));
    expect(spatialSymmetries(found).map((s) => s.text)).toEqual(['identity', 'reflection k -> -k']);
  });

  test('2-cluster state (1 on even nodes, 0.5 i on odd) on D_6: the D_3 that keeps parity, phase 0', () => {
    // By hand: the moduli 1 and 0.5 must be kept, so gamma maps even nodes to even nodes:
    // r^m and s_m with m even, six elements; then e^{i phase} 1 = 1 forces phase 0.
    const n = 6;
    const { re, im } = snapshot(n, (k) => (k % 2 === 0 ? [1, 0] : [0, 0.5]));
    const found = patternSymmetry(re, im, dihedral(n));
    expect(found.map((s) => key(s.element)).sort()).toEqual(
      [0, 2, 4]
        .flatMap((m) => [rotation(n, m), reflection(n, m)])
        .map(key)
        .sort(),
    );
    for (const s of found) expect(Math.abs(s.phase)).toBeLessThan(1e-12);
  });

  test('spatial part of a q = 2 wave on D_6 is {e, r^3}; H / K has 3 phases', () => {
    // -2 pi 2 m / 6 = 0 mod 2 pi only for m = 0, 3.
    const n = 6;
    const { re, im } = snapshot(n, wave(n, 2));
    const found = patternSymmetry(re, im, dihedral(n));
    const kernel = spatialSymmetries(found);
    expect(kernel.map((s) => s.text)).toEqual(['identity', 'rotation by 3']);
    expect(found.length / kernel.length).toBe(3);
  });
});

describe('tolerance and input checks', () => {
  test('a small perturbation keeps the symmetry, a large one breaks it', () => {
    // The residual of a perturbation of relative size delta is about sqrt(2) delta (common practice).
    const n = 8;
    const random = new Random(77);
    const clean = snapshot(n, wave(n, 3));
    const perturbed = (size: number) => ({
      re: clean.re.map((x) => x + size * random.normal()),
      im: clean.im.map((x) => x + size * random.normal()),
    });
    const small = perturbed(1e-4);
    expect(patternSymmetry(small.re, small.im, dihedral(n)).length).toBe(n);
    const large = perturbed(0.2);
    expect(patternSymmetry(large.re, large.im, dihedral(n)).map((s) => s.text)).toEqual(['identity']);
    // The tolerance is a strict bound on the residual.
    const fit = fitSymmetryPhase(small.re, small.im, rotation(n, 1));
    expect(patternSymmetry(small.re, small.im, [rotation(n, 1)], fit.residual).length).toBe(0);
    expect(patternSymmetry(small.re, small.im, [rotation(n, 1)], fit.residual * 1.01).length).toBe(1);
  });

  test('bad input is named', () => {
    const { re, im } = snapshot(4, wave(4, 1));
    expect(() => patternSymmetry(re, im.subarray(0, 3), dihedral(4))).toThrow(/re has 4 entries but im has 3/);
    expect(() => patternSymmetry(re, im, [Int32Array.from([0, 1, 2])])).toThrow(/group\[0\] has 3 entries but the snapshot has 4 nodes/);
    expect(() => patternSymmetry(re, im, [rotation(4, 0), Int32Array.from([0, 1, 1, 3])])).toThrow(
      /group\[1\]: node 1 is the image of two nodes/,
    );
    expect(() => patternSymmetry([0, 0], [0, 0], [rotation(2, 0)])).toThrow(/every amplitude is zero/);
    expect(() => patternSymmetry([1, NaN], [0, 0], [rotation(2, 0)])).toThrow(/re\[1\] = NaN is not a finite number/);
    expect(() => patternSymmetry(re, im, dihedral(4), 0)).toThrow(/tolerance must be a finite number > 0/);
  });
});
