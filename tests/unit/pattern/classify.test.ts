import { describe, expect, test } from 'vitest';
import { classifySnapshot, orderParameters } from '../../../src/pattern/classify.js';
import { Random } from '../../../src/util/random.js';

interface Snapshot {
  re: Float64Array;
  im: Float64Array;
}

/** Snapshot c * f(k) for a complex c and a complex-valued shape f. */
function snapshot(n: number, shape: (k: number) => [number, number], c: [number, number] = [1, 0]): Snapshot {
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const [fr, fi] = shape(k);
    re[k] = c[0] * fr - c[1] * fi;
    im[k] = c[0] * fi + c[1] * fr;
  }
  return { re, im };
}

/**
 * Rotating wave built by its defining recursion a_{k+1} = e^{2 pi i q / N} a_k (docs/model.md,
 * 'Patterns and symmetry').
 */
function rotatingWave(n: number, q: number, a0: [number, number] = [0.7, -0.2]): Snapshot {
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const step = (2 * Math.PI * q) / n;
  [re[0], im[0]] = a0;
  for (let k = 1; k < n; k++) {
    re[k] = re[k - 1] * Math.cos(step) - im[k - 1] * Math.sin(step);
    im[k] = re[k - 1] * Math.sin(step) + im[k - 1] * Math.cos(step);
  }
  return { re, im };
}

const standingWave = (n: number, q: number, phi: number, c: [number, number]): Snapshot =>
  snapshot(n, (k) => [Math.cos((2 * Math.PI * q * k) / n + phi), 0], c);

/** Adds independent normal noise of standard deviation `size` times the mean modulus. */
function perturb({ re, im }: Snapshot, size: number, random: Random): Snapshot {
  let mean = 0;
  for (let k = 0; k < re.length; k++) mean += Math.hypot(re[k], im[k]) / re.length;
  return { re: re.map((x) => x + size * mean * random.normal()), im: im.map((x) => x + size * mean * random.normal()) };
}

describe('orderParameters', () => {
  test('a q-wave has R_q = 1 and every other R_p = 0', () => {
    // Orthogonality of the discrete Fourier basis (common practice).
    for (const n of [4, 7, 12]) {
      for (let q = 0; q < n; q++) {
        const { re, im } = rotatingWave(n, q);
        const r = orderParameters(re, im);
        for (let p = 0; p < n; p++) expect(r[p]).toBeCloseTo(p === q ? 1 : 0, 12);
      }
    }
  });

  test('one excited node has R_q = 1 for every q', () => {
    // A_q = a_0 / N and mean|a| = |a_0| / N for every q (from the definition).
    const r = orderParameters([0, 0, 2, 0, 0], [0, 0, -1, 0, 0]);
    for (const value of r) expect(value).toBeCloseTo(1, 14);
  });

  test('writes into `out` and checks its length', () => {
    const { re, im } = rotatingWave(6, 1);
    const out = new Float64Array(6);
    expect(orderParameters(re, im, out)).toBe(out);
    expect(out[1]).toBeCloseTo(1, 12);
    expect(() => orderParameters(re, im, new Float64Array(5))).toThrow(/out must be a Float64Array of length 6/);
  });
});

describe('classifySnapshot', () => {
  test('in-phase, anti-phase and rotating waves with their wave number', () => {
    for (const n of [3, 4, 5, 8, 12]) {
      for (let q = 0; q < n; q++) {
        const { re, im } = rotatingWave(n, q);
        const result = classifySnapshot(re, im);
        const kind = q === 0 ? 'in-phase' : 2 * q === n ? 'anti-phase' : 'rotating-wave';
        expect(result.kind).toBe(kind);
        expect(result.q).toBe(q);
        expect(result.clusters).toBeUndefined();
      }
    }
  });

  test('a wave with neighbour lag +2 pi / N is q = 1, not q = N - 1', () => {
    // a_k = e^{2 pi i k / 6}: arg(a_{k+1} / a_k) = 2 pi / 6, so q = 1 by the definition in section 4.
    const { re, im } = snapshot(6, (k) => [Math.cos((Math.PI * k) / 3), Math.sin((Math.PI * k) / 3)]);
    expect(classifySnapshot(re, im)).toMatchObject({ kind: 'rotating-wave', q: 1 });
  });

  test('standing waves a_k = c cos(2 pi q k / N + phi) give their q', () => {
    for (const n of [5, 8, 9]) {
      for (let q = 1; 2 * q < n; q++) {
        for (const phi of [0, 0.4, Math.PI / n]) {
          const { re, im } = standingWave(n, q, phi, [0.3, 1.1]);
          expect(classifySnapshot(re, im)).toMatchObject({ kind: 'standing-wave', q });
        }
      }
    }
  });

  test('a standing wave with nodes of zero amplitude: (1, 0, -1, 0)', () => {
    // cos(pi k / 2) on N = 4: all weight on q = 1 and q = 3, equally (from the definition).
    expect(classifySnapshot([1, 0, -1, 0], [0, 0, 0, 0])).toMatchObject({ kind: 'standing-wave', q: 1 });
  });

  test('cluster states list their groups', () => {
    // Two clusters of different modulus (not a wave: the moduli differ).
    expect(classifySnapshot([1, 0, 1, 0, 1, 0], [0, 0.5, 0, 0.5, 0, 0.5]).clusters).toEqual([
      [0, 2, 4],
      [1, 3, 5],
    ]);
    // 1, 1, 2 repeated: moduli differ, and E_0 = |A_0|^2 / mean|a|^2 = (4/3)^2 / 2 = 8/9, so no
    // pair q, N - q holds 95% of the energy.
    expect(classifySnapshot([1, 1, 2, 1, 1, 2], [0, 0, 0, 0, 0, 0])).toEqual(
      expect.objectContaining({
        kind: 'cluster',
        clusters: [
          [0, 1, 3, 4],
          [2, 5],
        ],
      }),
    );
    // 1, i, -1 repeated on N = 6: equal moduli but phases 0, 90, 180 degrees; E_0 = |i/3|^2 = 1/9
    // and the rest sits on q = 2, 4, so E_2 + E_4 = 8/9 < 0.95.
    expect(classifySnapshot([1, 0, -1, 1, 0, -1], [0, 1, 0, 0, 1, 0])).toEqual(
      expect.objectContaining({
        kind: 'cluster',
        clusters: [
          [0, 3],
          [1, 4],
          [2, 5],
        ],
      }),
    );
  });

  test('one excited node is a cluster, not a rotating wave, although every R_q = 1', () => {
    expect(classifySnapshot([0, 3, 0, 0, 0], [0, 0, 0, 0, 0])).toEqual(
      expect.objectContaining({ kind: 'cluster', clusters: [[0, 2, 3, 4], [1]] }),
    );
  });

  test('random amplitudes are singletons', () => {
    const random = new Random(4242);
    const n = 10;
    const re = Float64Array.from({ length: n }, () => random.normal());
    const im = Float64Array.from({ length: n }, () => random.normal());
    // Precondition checked here rather than assumed: every pair differs by more than 5% of the mean modulus.
    let mean = 0;
    for (let k = 0; k < n; k++) mean += Math.hypot(re[k], im[k]) / n;
    for (let j = 0; j < n; j++)
      for (let k = j + 1; k < n; k++) expect(Math.hypot(re[j] - re[k], im[j] - im[k])).toBeGreaterThan(0.05 * mean);
    const result = classifySnapshot(re, im);
    expect(result.kind).toBe('cluster');
    expect(result.clusters).toEqual(Array.from({ length: n }, (_, k) => [k]));
  });

  test('a perturbation of 0.1% leaves every kind as it was', () => {
    const random = new Random(99);
    const cases: [Snapshot, object][] = [
      [rotatingWave(8, 0), { kind: 'in-phase', q: 0 }],
      [rotatingWave(8, 4), { kind: 'anti-phase', q: 4 }],
      [rotatingWave(7, 3), { kind: 'rotating-wave', q: 3 }],
      [rotatingWave(12, 5), { kind: 'rotating-wave', q: 5 }],
      [standingWave(8, 2, 0.3, [1, 1]), { kind: 'standing-wave', q: 2 }],
      [
        snapshot(6, (k) => (k % 2 === 0 ? [1, 0] : [0, 0.5])),
        {
          kind: 'cluster',
          clusters: [
            [0, 2, 4],
            [1, 3, 5],
          ],
        },
      ],
    ];
    for (const [clean, expected] of cases) {
      for (let trial = 0; trial < 5; trial++) {
        const { re, im } = perturb(clean, 1e-3, random);
        expect(classifySnapshot(re, im)).toMatchObject(expected);
      }
    }
  });

  test('the tolerance decides: a 10% amplitude ripple on a wave', () => {
    // a_k = (1 + 0.1 (-1)^k) e^{2 pi i k / 8}: moduli 1.1 and 0.9, 10% from the mean of 1.
    const { re, im } = snapshot(8, (k) => {
      const m = 1 + 0.1 * (k % 2 === 0 ? 1 : -1);
      return [m * Math.cos((Math.PI * k) / 4), m * Math.sin((Math.PI * k) / 4)];
    });
    expect(classifySnapshot(re, im, 0.15)).toMatchObject({ kind: 'rotating-wave', q: 1 });
    expect(classifySnapshot(re, im, 0.05).kind).toBe('cluster');
  });

  test('bad input is named', () => {
    expect(() => classifySnapshot([1, 2], [0])).toThrow(/classifySnapshot: re has 2 entries but im has 1/);
    expect(() => classifySnapshot([], [])).toThrow(/no nodes/);
    expect(() => classifySnapshot([0, 0, 0], [0, 0, 0])).toThrow(/every amplitude is zero/);
    expect(() => classifySnapshot([1, Infinity], [0, 0])).toThrow(/re\[1\] = Infinity is not a finite number/);
    expect(() => classifySnapshot([1, 1], [0, 0], 0.5)).toThrow(/tolerance must lie in \[0, 0\.5\)/);
  });
});
