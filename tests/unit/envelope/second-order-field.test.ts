import { describe, expect, test } from 'vitest';
import { TorusAverage } from '../../../src/guide/torus-average.js';
import { SlowField } from '../../../src/model/slow-field.js';
import { SecondOrderField } from '../../../src/envelope/second-order-field.js';
import { TorusHarmonics } from '../../../src/envelope/torus-harmonics.js';
import { Random } from '../../../src/util/random.js';
import { makeScenario } from '../../support/scenarios.js';
import { compiled, relativeGap, ringOfFour } from './problems.js';

function randomState(size: number, seed: number): Float64Array {
  const random = new Random(seed);
  return Float64Array.from({ length: size }, () => 3 * random.uniform() - 1.5);
}

/** The 8 x 8 trapezoid grid, built by hand because the tensor factory refuses it. */
function eightByEight(omega: Float64Array): TorusHarmonics {
  const angles = new Float64Array(64 * 2);
  for (let p = 0; p < 64; p++) {
    angles[2 * p] = (2 * Math.PI * (p % 8)) / 8;
    angles[2 * p + 1] = (2 * Math.PI * Math.floor(p / 8)) / 8;
  }
  return new TorusHarmonics(omega, angles);
}

describe('torus sample points and harmonics', () => {
  test('tensor grids below 9 points per angle are refused with the reason', () => {
    const { params } = compiled(ringOfFour(1e-3));
    expect(() => TorusHarmonics.tensor(params.omega, 8)).toThrow(
      /grid must be an integer >= 9 .*products of the field average exactly \(got 8\)/,
    );
    expect(() => new SecondOrderField(params, 7)).toThrow(/>= 9/);
  });

  test('the kept harmonics are the even total degrees 2 and 4, one of each pair {m, -m}', () => {
    // In Z^2 there are 4k vectors with |m_0| + |m_1| = k, so (8 + 16) / 2 = 12 pairs; in Z, 2 (m = 2, 4).
    const two = TorusHarmonics.parity(Float64Array.of(1, 1.37));
    expect(two.count).toBe(12);
    const seen = new Set<string>();
    for (let h = 0; h < two.count; h++) {
      const [a, b] = [two.orders[2 * h], two.orders[2 * h + 1]];
      expect([2, 4]).toContain(Math.abs(a) + Math.abs(b));
      expect(seen.has(`${-a},${-b}`)).toBe(false);
      seen.add(`${a},${b}`);
      expect(two.divisor[h]).toBeCloseTo(a * 1 + b * 1.37, 14);
    }
    expect(TorusHarmonics.parity(Float64Array.of(1)).count).toBe(2);
    expect(two.points).toBe(25);
  });

  test('the reference model has the harmonic content the envelope assumes (degree <= 4, even only)', () => {
    expect(SecondOrderField.checkFieldContent(compiled(ringOfFour(1e-3)).params)).toBeNull();
    const oneMode = makeScenario({
      nodes: 3,
      twoWay: true,
      epsilon: 1e-3,
      modes: [{ omega: 1.2, gain: 1, loss: 0.3 }],
      coupling: { strength: 0.5, reactive: 0.4, dissipative: 0.3 },
    });
    expect(SecondOrderField.checkFieldContent(compiled(oneMode).params)).toBeNull();
  });
});

describe('the second-order slow field', () => {
  const { params } = compiled(ringOfFour(0.01));
  const size = 2 * params.nodes * params.modes;
  const y = randomState(size, 5);

  test('its mean part is the guide torus average, and its eps-term is what makes it second order', () => {
    const fbar = new Float64Array(size);
    new TorusAverage(params, 8).evaluate(y, fbar);
    const slow = new Float64Array(size);
    new SecondOrderField(params).evaluate(y, slow);
    const drift = slow.map((v, i) => (v - fbar[i]) / params.epsilon);
    // the eps < D_y f u > term is O(1) after dividing by eps, neither zero nor rounding
    const driftSize = Math.max(...Array.from(drift, Math.abs));
    expect(driftSize).toBeGreaterThan(1e-2);
    expect(driftSize).toBeLessThan(1e3);
  });

  test('the parity grid (25 points) and the 9 x 9 and 11 x 11 tensor grids agree to rounding; the 8 x 8 grid aliases', () => {
    // Trapezoid sums are exact for trigonometric polynomials below the grid size (common practice);
    // the products in < D_y f u > reach degree 8 per angle, so 8 points per angle are too few.
    const evaluate = (grid: ConstructorParameters<typeof SecondOrderField>[1]) => {
      const out = new Float64Array(size);
      new SecondOrderField(params, grid).evaluate(y, out);
      return out;
    };
    const parity = evaluate('parity');
    const nine = evaluate(9);
    const eleven = evaluate(11);
    expect(relativeGap(parity, nine)).toBeLessThan(1e-12);
    expect(relativeGap(eleven, nine)).toBeLessThan(1e-12);
    const fbar = new Float64Array(size);
    new TorusAverage(params, 8).evaluate(y, fbar);
    const driftGap = (a: Float64Array) =>
      relativeGap(
        a.map((v, i) => v - fbar[i]),
        nine.map((v, i) => v - fbar[i]),
      );
    expect(driftGap(parity)).toBeLessThan(1e-9);
    expect(driftGap(evaluate(eightByEight(params.omega)))).toBeGreaterThan(1e-3);
  });

  test('the correction u solves omega . d_theta u = f - fbar (checked by central differences in tau)', () => {
    // With theta = omega tau, d/dtau u(Y, omega tau) = omega . d_theta u; a central difference with
    // step h has error h^2 |u'''| / 6 (common practice).
    const envelope = new SecondOrderField(params);
    const raw = new SlowField(params);
    const fbar = new Float64Array(size);
    new TorusAverage(params, 8).evaluate(y, fbar);
    const h = 1e-4;
    for (const tau of [0.3, 17.9, 1234.5]) {
      const ahead = new Float64Array(size);
      const behind = new Float64Array(size);
      envelope.correctionAt(y, tau + h, ahead);
      envelope.correctionAt(y, tau - h, behind);
      const rate = ahead.map((v, i) => (v - behind[i]) / (2 * h));
      const f = new Float64Array(size);
      raw.evaluate(
        Float64Array.from(params.omega, (w) => Math.cos(w * tau)),
        Float64Array.from(params.omega, (w) => Math.sin(w * tau)),
        y,
        f,
      );
      expect(
        relativeGap(
          rate,
          f.map((v, i) => v - fbar[i]),
        ),
      ).toBeLessThan(1e-6);
    }
  });

  test('the correction has zero mean over the torus', () => {
    // u = sum over m != 0 of f_m e^{i m.theta} / (i m.omega) has no constant term; with two
    // incommensurate frequencies the time mean over a long window tends to the torus mean.
    const envelope = new SecondOrderField(params);
    const u = new Float64Array(size);
    const sum = new Float64Array(size);
    const samples = 20000;
    for (let k = 0; k < samples; k++) {
      envelope.correctionAt(y, k * 0.7071, u);
      for (let i = 0; i < size; i++) sum[i] += u[i] / samples;
    }
    envelope.correctionAt(y, 0, u);
    const scale = Math.max(...Array.from(u, Math.abs));
    expect(Math.max(...Array.from(sum, Math.abs))).toBeLessThan(0.02 * scale);
  });
});
