import { describe, expect, test } from 'vitest';
import { ModelParameters } from '../../../src/model/parameters.js';
import { MicroStepper } from '../../../src/integrate/micro-stepper.js';
import { initialRotatingState } from '../../../src/model/initial.js';
import { originalFromRotating, rotatingFromOriginal } from '../../../src/model/coordinates.js';
import { makeScenario, ringLinks } from '../../support/scenarios.js';
import { SlowField } from '../../../src/model/slow-field.js';
import { basisIntegrals, basisValues, fittedDimension, fittedWeights, type FittedSpace } from '../../../src/integrate/fitted-weights.js';
import { fittedAdamsProblem } from '../../../src/integrate/fitted-adams.js';
import { logLogSlope } from '../../support/states.js';
import { Random } from '../../../src/util/random.js';
import type { Link, ModeSpec } from '../../../src/scenario/types.js';

const TWO_PI = 2 * Math.PI;

describe('micro stepper (RK4 in the rotating frame)', () => {
  test('eps = 0: the oscillation keeps its amplitude to 1e-12 relative over 1e6 periods', () => {
    // The harmonic oscillator x'' + omega^2 x = 0 conserves x^2 + (x'/omega)^2 exactly
    // (elementary mechanics); a scheme with numerical damping would lose it period by period.
    const scenario = makeScenario({
      nodes: 2,
      twoWay: true,
      epsilon: 0,
      modes: [{ omega: 1, gain: 1, loss: 0.5 }],
      coupling: { strength: 1, reactive: 1, dissipative: 1 },
      initial: { state: [[{ x: 1.7, xdot: -0.4 }], [{ x: -0.3, xdot: 2.1 }]] },
      stepsPerPeriod: 8,
    });
    const params = new ModelParameters(scenario);
    const stepper = new MicroStepper(params, initialRotatingState(scenario, params), 8);
    const periods = 1e6;
    const chunk = 1e4;
    for (let p = chunk; p <= periods; p += chunk) stepper.advance(TWO_PI * p);
    expect(stepper.evaluations).toBe(4 * 8 * periods);
    const end = originalFromRotating(params, stepper.tau, stepper.state);
    const start = scenario.initial as { state: { x: number; xdot: number }[][] };
    for (let k = 0; k < 2; k++) {
      const e0 = start.state[k][0].x ** 2 + start.state[k][0].xdot ** 2;
      const e1 = end[k][0].x ** 2 + end[k][0].xdot ** 2;
      expect(Math.abs(Math.sqrt(e1 / e0) - 1)).toBeLessThan(1e-12);
      // and the phase is exact too: after whole periods the state is back where it began
      expect(Math.abs(end[k][0].x - start.state[k][0].x)).toBeLessThan(1e-9);
    }
  });

  test('coordinates round trip at an arbitrary tau', () => {
    const scenario = makeScenario({
      nodes: 3,
      epsilon: 1e-3,
      modes: [
        { omega: 1, gain: 1, loss: 0 },
        { omega: 1.37, gain: 1, loss: 0 },
      ],
    });
    const params = new ModelParameters(scenario);
    const y = Float64Array.from({ length: 12 }, (_, i) => Math.sin(1 + i * 0.7));
    const back = rotatingFromOriginal(params, 123.456, originalFromRotating(params, 123.456, y));
    for (let i = 0; i < 12; i++) expect(back[i]).toBeCloseTo(y[i], 13);
  });
});

// ---------------------------------------------------------------------------------------------
// The field kernel the micro stepper runs on, the fitted Adams method, and method selection.

/**
 * f(y, theta) written straight from docs/model.md, 'Reference model' and 'The frame' (dense A,
 * original coordinates).
 */
function fieldFromModel(params: ModelParameters, theta: number[], y: Float64Array): Float64Array {
  const n = params.nodes;
  const m = params.modes;
  const A = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let e = 0; e < params.linkFrom.length; e++) A[params.linkTo[e]][params.linkFrom[e]] += params.linkWeight[e];
  const x: number[][] = [];
  const xd: number[][] = [];
  for (let k = 0; k < n; k++) {
    x.push([]);
    xd.push([]);
    for (let j = 0; j < m; j++) {
      const u = y[2 * (k * m + j)];
      const v = y[2 * (k * m + j) + 1];
      x[k].push(u * Math.cos(theta[j]) + v * Math.sin(theta[j]));
      xd[k].push(params.omega[j] * (-u * Math.sin(theta[j]) + v * Math.cos(theta[j])));
    }
  }
  const s = x.map((row) => row.reduce((a, b) => a + b, 0));
  const sd = xd.map((row) => row.reduce((a, b) => a + b, 0));
  const out = new Float64Array(y.length);
  for (let k = 0; k < n; k++) {
    let coupling = 0;
    for (let l = 0; l < n; l++) {
      coupling += A[k][l] * (params.reactive * (s[l] - s[k]) + params.dissipative * (sd[l] - sd[k]));
    }
    coupling *= params.strength;
    for (let j = 0; j < m; j++) {
      const w = params.omega[j];
      const F =
        params.gain[j] * (1 - s[k] * s[k]) * sd[k] - params.loss[j] * xd[k][j] - 2 * w * w * params.detuning[k] * x[k][j] + coupling;
      out[2 * (k * m + j)] = (-F / w) * Math.sin(theta[j]);
      out[2 * (k * m + j) + 1] = (F / w) * Math.cos(theta[j]);
    }
  }
  return out;
}

const MODES_3: ModeSpec[] = [
  { omega: 1, gain: 1, loss: 0.3 },
  { omega: 1.2, gain: 0.7, loss: 0.1 },
  { omega: 2.9, gain: 0.4, loss: 0.2 },
];

describe('field kernel (SlowField)', () => {
  const graphs: { name: string; nodes: number; links: Link[]; modes: ModeSpec[] }[] = [
    { name: 'two-way ring, two modes', nodes: 5, links: ringLinks(5, true), modes: MODES_3.slice(0, 2) },
    { name: 'one-way ring, one mode', nodes: 4, links: ringLinks(4, false), modes: MODES_3.slice(0, 1) },
    // rings of two modes run the one-pass ring kernel (src/model/ring-kernel.ts)
    { name: 'one-way ring, two modes', nodes: 5, links: ringLinks(5, false), modes: MODES_3.slice(0, 2) },
    { name: 'two-way ring, two modes, 3 nodes', nodes: 3, links: ringLinks(3, true), modes: MODES_3.slice(0, 2) },
    {
      name: 'two-way ring, two modes, slots in the other order (two-pass kernel)',
      nodes: 5,
      links: ringLinks(5, true).reverse(),
      modes: MODES_3.slice(0, 2),
    },
    {
      name: 'in-degree 3 with a weighted chord, two modes',
      nodes: 6,
      links: [...ringLinks(6, true), { from: 0, to: 3, weight: 0.4 }],
      modes: MODES_3.slice(0, 2),
    },
    { name: 'single node without links', nodes: 1, links: [], modes: MODES_3.slice(0, 1) },
    { name: 'three modes (general path)', nodes: 3, links: ringLinks(3, true), modes: MODES_3 },
  ];
  test.each(graphs)('agrees with the model equations to 1e-13: $name', ({ nodes, links, modes }) => {
    // Independent implementation of the model equations above; agreement to rounding (common practice).
    const scenario = makeScenario({
      nodes,
      links,
      epsilon: 1e-4,
      modes,
      coupling: { strength: 0.7, reactive: 0.3, dissipative: 0.9 },
      detuning: Array.from({ length: nodes }, (_, k) => 0.3 * Math.cos(2 * k + 1)),
    });
    const params = new ModelParameters(scenario);
    const field = new SlowField(params);
    const random = new Random(11);
    const size = 2 * nodes * modes.length;
    const out = new Float64Array(size);
    for (let trial = 0; trial < 5; trial++) {
      // Parameters change at run time (broken link, coupling, detuning): the kernel must follow.
      if (trial === 3 && params.linkWeight.length > 0) params.setLinkWeight(0, 0);
      if (trial === 4) {
        params.strength = 1.3;
        params.detuning[0] = -0.8;
      }
      const y = Float64Array.from({ length: size }, () => 2 * random.uniform() - 1);
      const theta = modes.map(() => 2 * Math.PI * random.uniform());
      field.evaluate(Float64Array.from(theta, Math.cos), Float64Array.from(theta, Math.sin), y, out);
      const expected = fieldFromModel(params, theta, y);
      const scale = Math.max(...expected.map(Math.abs));
      for (let i = 0; i < size; i++) expect(Math.abs(out[i] - expected[i])).toBeLessThan(1e-13 * scale);
    }
  });

  test('the ring kernel and the two-pass kernel agree to rounding, stage by stage, and the snapshot holds until prepare', () => {
    // The same ring listed in two link orders: ring order runs the one-pass kernel, the other
    // order the general two-pass one; the two sum the neighbours in opposite order, so they
    // agree to rounding (1e-14 relative, common practice), not bit for bit.
    const make = (links: Link[]) => {
      const scenario = makeScenario({
        nodes: 6,
        links,
        epsilon: 1e-4,
        modes: MODES_3.slice(0, 2),
        coupling: { strength: 0.4, reactive: 0.3, dissipative: 0.9 },
        detuning: [0.2, -0.4, 0.1, 0, 0.3, -0.1],
      });
      const params = new ModelParameters(scenario);
      return { params, field: new SlowField(params) };
    };
    const ring = make(ringLinks(6, true));
    const other = make(ringLinks(6, true).reverse());
    const random = new Random(5);
    const y = Float64Array.from({ length: 24 }, () => 2 * random.uniform() - 1);
    const base = Float64Array.from({ length: 24 }, () => random.uniform());
    const acc = Float64Array.from({ length: 24 }, () => random.uniform());
    const cos = Float64Array.of(Math.cos(0.7), Math.cos(2.1));
    const sin = Float64Array.of(Math.sin(0.7), Math.sin(2.1));
    const outputs = (field: SlowField, prepared: boolean) => {
      const next = new Float64Array(24);
      const sum = Float64Array.from(acc);
      if (!prepared) field.prepare();
      field.combinePrepared(cos, sin, y, base, 0.3, next, sum, -0.2, sum);
      return [...next, ...sum];
    };
    const close = (a: number[], b: number[]) => a.every((x, i) => Math.abs(x - b[i]) <= 1e-14 * (1 + Math.abs(b[i])));
    expect(close(outputs(ring.field, false), outputs(other.field, false))).toBe(true);
    // A parameter changed after prepare is seen by combinePrepared only after the next prepare.
    ring.field.prepare();
    const before = outputs(ring.field, true);
    for (const p of [ring.params, other.params]) {
      p.setLinkWeight(p.findLink(2, 3), 0);
      p.detuning[2] = 0.5;
      p.strength = 0.9;
    }
    expect(outputs(ring.field, true)).toEqual(before);
    expect(close(outputs(ring.field, true), outputs(other.field, false))).toBe(false);
    ring.field.prepare();
    expect(close(outputs(ring.field, true), outputs(other.field, false))).toBe(true);
    expect(close(outputs(ring.field, false), outputs(other.field, false))).toBe(true);
  });

  test('f is a trigonometric polynomial of total degree 0, 2 or 4 in the angles (the fitted space relies on it)', () => {
    // Derived from the model (F odd and cubic in x, x'); checked by a 12 x 12 torus DFT, which is
    // exact for degrees below 12 (trapezoid rule on periodic functions, common practice).
    const scenario = makeScenario({
      nodes: 3,
      twoWay: true,
      epsilon: 1e-4,
      modes: MODES_3.slice(0, 2),
      coupling: { strength: 0.7, reactive: 0.3, dissipative: 0.9 },
      detuning: [0.2, -0.4, 0.1],
    });
    const params = new ModelParameters(scenario);
    const field = new SlowField(params);
    const y = Float64Array.from({ length: 12 }, (_, i) => Math.sin(1.3 * i + 0.4));
    const P = 12;
    const out = new Float64Array(12);
    // DFT of every component over the P x P grid: re/im[(component * P + m0) * P + m1]
    const re = new Float64Array(12 * P * P);
    const im = new Float64Array(12 * P * P);
    for (let a = 0; a < P; a++) {
      for (let b = 0; b < P; b++) {
        const t0 = (2 * Math.PI * a) / P;
        const t1 = (2 * Math.PI * b) / P;
        field.evaluate(Float64Array.of(Math.cos(t0), Math.cos(t1)), Float64Array.of(Math.sin(t0), Math.sin(t1)), y, out);
        for (let m0 = 0; m0 < P; m0++) {
          for (let m1 = 0; m1 < P; m1++) {
            const phase = -(m0 * t0 + m1 * t1);
            const c = Math.cos(phase);
            const sn = Math.sin(phase);
            for (let comp = 0; comp < 12; comp++) {
              re[(comp * P + m0) * P + m1] += out[comp] * c;
              im[(comp * P + m0) * P + m1] += out[comp] * sn;
            }
          }
        }
      }
    }
    let inside = 0;
    let outside = 0;
    let degreeFour = 0;
    for (let comp = 0; comp < 12; comp++) {
      for (let m0 = 0; m0 < P; m0++) {
        for (let m1 = 0; m1 < P; m1++) {
          const k0 = m0 > P / 2 ? m0 - P : m0;
          const k1 = m1 > P / 2 ? m1 - P : m1;
          const index = (comp * P + m0) * P + m1;
          const size = Math.hypot(re[index], im[index]) / (P * P);
          const degree = Math.abs(k0) + Math.abs(k1);
          const allowed = degree <= SlowField.HARMONIC_DEGREE && (k0 + k1) % 2 === 0;
          if (allowed) inside = Math.max(inside, size);
          else outside = Math.max(outside, size);
          if (degree === 4 && allowed) degreeFour = Math.max(degreeFour, size);
        }
      }
    }
    expect(outside).toBeLessThan(1e-13 * inside);
    expect(degreeFour).toBeGreaterThan(1e-3 * inside);
  });
});

describe('fitted weights', () => {
  const space: FittedSpace = { phase: (2 * Math.PI) / 5, harmonics: [2, 4], modulated: true };

  test('closed-form basis integrals agree with a composite Simpson rule', () => {
    // Composite Simpson with 20000 panels: error below 1e-13 here (common practice).
    const k = fittedDimension(space);
    const exact = new Float64Array(k);
    const values = new Float64Array(k);
    for (const [s0, s1] of [
      [0, 1],
      [-7, 0],
      [-10, -3.5],
    ]) {
      basisIntegrals(space, s0, s1, exact);
      const panels = 20000;
      const step = (s1 - s0) / panels;
      const simpson = new Float64Array(k);
      for (let i = 0; i <= panels; i++) {
        basisValues(space, s0 + i * step, values);
        const w = i === 0 || i === panels ? 1 : i % 2 === 1 ? 4 : 2;
        for (let r = 0; r < k; r++) simpson[r] += (w * step * values[r]) / 3;
      }
      for (let r = 0; r < k; r++) expect(Math.abs(simpson[r] - exact[r])).toBeLessThan(1e-12 * Math.max(1, Math.abs(exact[r])));
    }
  });

  test('the step weights integrate every basis function exactly, and miss harmonic 6', () => {
    // Exactness on the fitted space defines exponentially fitted rules (Gautschi, Numer. Math. 3,
    // 1961); harmonic 6 lies outside the space, so the rule must err on it.
    const weights = fittedWeights(space)!;
    expect(weights.size).toBe(11);
    expect(weights.residual).toBeLessThan(1e-12);
    const sixth = (s: number) => Math.cos(6 * space.phase * s);
    const rule = weights.step.reduce((sum, w, j) => sum + w * sixth(-j), 0);
    const exact = Math.sin(6 * space.phase) / (6 * space.phase);
    expect(Math.abs(rule - exact)).toBeGreaterThan(1e-3);
    // sum of the weights = length of the step (constants are in the space)
    expect(weights.step.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
  });

  test('8 steps per period is refused: harmonic 4 sits on the Nyquist point and sin(4 theta) vanishes at every sample', () => {
    // sin(4 * (2 pi / 8) * j) = sin(pi j) = 0 for every sample j (arithmetic): the system is singular.
    expect(fittedWeights({ phase: (2 * Math.PI) / 8, harmonics: [2, 4], modulated: true })).toBeNull();
  });
});

/** The N = 8 two-way ring with two modes 1500 ppm apart at eps = 1e-5 (the case). */
function benchScenario(nodes = 8) {
  const scenario = makeScenario({
    nodes,
    twoWay: true,
    epsilon: 1e-5,
    modes: [
      { omega: 1, gain: 1, loss: 0.5 },
      { omega: 1.0015, gain: 1, loss: 0.66 },
    ],
    coupling: { strength: 0.1, reactive: 0.2, dissipative: 1 },
    detuning: Array.from({ length: nodes }, (_, k) => [0.1, -0.2, 0.05, 0, 0.3, -0.1, 0.2, -0.3][k % 8]),
  });
  const params = new ModelParameters(scenario);
  return { scenario, params, start: initialRotatingState(scenario, params) };
}

function relativeMaxError(y: Float64Array, reference: Float64Array): number {
  let worst = 0;
  let norm = 0;
  for (let i = 0; i < y.length; i++) {
    worst = Math.max(worst, Math.abs(y[i] - reference[i]));
    norm += reference[i] * reference[i];
  }
  return worst / Math.sqrt(norm);
}

describe('micro stepper: fitted Adams method', () => {
  test('auto picks fitted Adams for close modes at 5 steps and RK4 where it does not apply', () => {
    const { params, start } = benchScenario();
    expect(new MicroStepper(params, start, 5).method).toBe('fitted-adams');
    expect(new MicroStepper(params, start, 5, { method: 'rk4' }).method).toBe('rk4');
    expect(new MicroStepper(params, start, 8).method).toBe('rk4');
    expect(new MicroStepper(params, start, 6).method).toBe('rk4');
    const far = makeScenario({ nodes: 4, twoWay: true, epsilon: 1e-5, modes: [...MODES_3.slice(0, 1), { omega: 1.37, gain: 1, loss: 0 }] });
    const farParams = new ModelParameters(far);
    expect(new MicroStepper(farParams, initialRotatingState(far, farParams), 16).method).toBe('rk4');
  });

  test('an explicit request it cannot serve fails with the reason', () => {
    const { params, start } = benchScenario();
    expect(() => new MicroStepper(params, start, 8, { method: 'fitted-adams' })).toThrow(/8 steps per period.*aliases/);
    const far = makeScenario({ nodes: 4, twoWay: true, epsilon: 1e-5, modes: [...MODES_3.slice(0, 1), { omega: 1.37, gain: 1, loss: 0 }] });
    const farParams = new ModelParameters(far);
    expect(() => new MicroStepper(farParams, initialRotatingState(far, farParams), 16, { method: 'fitted-adams' })).toThrow(
      /too far apart/,
    );
    const strong = makeScenario({ nodes: 4, twoWay: true, epsilon: 0.05, modes: MODES_3.slice(0, 1) });
    const strongParams = new ModelParameters(strong);
    expect(fittedAdamsProblem(strongParams, (2 * Math.PI) / 5)).toMatch(/eps = 0.05 is too large/);
    expect(() => new MicroStepper(params, start, 5, { method: 'euler' as never })).toThrow(/unknown method 'euler'/);
    expect(() => new MicroStepper(params, start.subarray(1), 5)).toThrow(/31 numbers, expected 32/);
    expect(() => new MicroStepper(params, start, 0)).toThrow(/stepsPerPeriod must be a positive number/);
  });

  test('N = 8, M = 2, eps = 1e-5: below 1e-9 after 1000 periods at 5 steps, 10x better than RK4 with 8x the evaluations', () => {
    // Against a fine RK4 reference (96 steps per period, its own error ~1e-12 here): common practice.
    const { params, start } = benchScenario();
    const end = 2 * Math.PI * 1000;
    const reference = new MicroStepper(params, start, 96, { method: 'rk4' });
    reference.advance(end);
    const fitted = new MicroStepper(params, start, 5);
    // macro ticks of 125 periods, as a session would call it
    for (let p = 125; p <= 1000; p += 125) fitted.advance(2 * Math.PI * p);
    const rk4 = new MicroStepper(params, start, 10, { method: 'rk4' });
    rk4.advance(end);
    const fittedError = relativeMaxError(fitted.state, reference.state);
    const rk4Error = relativeMaxError(rk4.state, reference.state);
    expect(fitted.method).toBe('fitted-adams');
    expect(fittedError).toBeLessThan(1e-9);
    expect(fittedError).toBeLessThan(rk4Error / 10);
    // one evaluation per step plus 30 per advance for the history rebuild
    expect(fitted.evaluations).toBe(fitted.stepsBy['fitted-adams'] + 8 * 30);
    expect(rk4.evaluations).toBeGreaterThan(7.5 * fitted.evaluations);
  });

  test('measured order in eps at fixed slow time: 2 for fitted Adams (fast harmonics exact), 1 for RK4', () => {
    // Over tau = 0.5 / eps, a method whose quadrature of the fast harmonics errs by O(eps h^p)
    // per unit tau leaves an O(eps) error; integrating them exactly leaves O(eps^2)
    // (error analysis of y' = eps f(y, t), derived here; Sanders, Verhulst, Murdock 2007, ch. 2,
    // for the scaling of the slow dynamics). Max error over 20 checkpoints, against RK4 at 256.
    const epsilons = [1e-3, 5e-4, 2.5e-4, 1.25e-4];
    const errors = { fitted: [] as number[], rk4: [] as number[] };
    for (const epsilon of epsilons) {
      const scenario = makeScenario({
        nodes: 4,
        twoWay: true,
        epsilon,
        modes: [{ omega: 1, gain: 1, loss: 0.3 }],
        coupling: { strength: 0.3, reactive: 0.4, dissipative: 0.7 },
        detuning: [0.2, -0.1, 0.15, -0.25],
        initial: { random: { seed: 7, amplitude: 2 } },
      });
      const params = new ModelParameters(scenario);
      const start = initialRotatingState(scenario, params);
      const reference = new MicroStepper(params, start, 256, { method: 'rk4' });
      const fitted = new MicroStepper(params, start, 5, { method: 'fitted-adams' });
      const rk4 = new MicroStepper(params, start, 8, { method: 'rk4' });
      let fittedWorst = 0;
      let rk4Worst = 0;
      for (let c = 1; c <= 20; c++) {
        const tau = (0.5 / epsilon) * (c / 20);
        for (const s of [reference, fitted, rk4]) s.advance(tau);
        for (let i = 0; i < start.length; i++) {
          fittedWorst = Math.max(fittedWorst, Math.abs(fitted.state[i] - reference.state[i]));
          rk4Worst = Math.max(rk4Worst, Math.abs(rk4.state[i] - reference.state[i]));
        }
      }
      errors.fitted.push(fittedWorst);
      errors.rk4.push(rk4Worst);
    }
    const fittedOrder = logLogSlope(epsilons, errors.fitted);
    const rk4Order = logLogSlope(epsilons, errors.rk4);
    expect(fittedOrder).toBeGreaterThan(1.7);
    expect(fittedOrder).toBeLessThan(2.4);
    expect(rk4Order).toBeGreaterThan(0.7);
    expect(rk4Order).toBeLessThan(1.3);
  });

  test('eps = 0: the state does not change by a single bit', () => {
    // Exactness of the rotating frame (elementary): with eps = 0 every increment is zero.
    const scenario = makeScenario({ nodes: 3, twoWay: true, epsilon: 0, modes: [{ omega: 1, gain: 1, loss: 0.5 }] });
    const params = new ModelParameters(scenario);
    const start = initialRotatingState(scenario, params);
    const stepper = new MicroStepper(params, start, 5, { method: 'fitted-adams' });
    for (let p = 1000; p <= 1e5; p += 1000) stepper.advance(TWO_PI * p);
    expect(Array.from(stepper.state)).toEqual(Array.from(start));
  });

  test('each advance depends only on the state it starts from; chunking into calls changes the result by < 1e-12', () => {
    // One advance of 200 periods against 40 advances of 5: the grid is the same (5 steps per
    // period of omega = 1), only the angle reseeding and the history rebuilds differ (the method's
    // own error here is ~1e-11, so 1e-12 says the rebuilt history is as good as a continued one;
    // bound measured here, not from a publication).
    const scenario = makeScenario({
      nodes: 4,
      twoWay: true,
      epsilon: 1e-4,
      modes: [{ omega: 1, gain: 1, loss: 0.3 }],
      coupling: { strength: 0.3, reactive: 0.4, dissipative: 0.7 },
      detuning: [0.2, -0.1, 0.15, -0.25],
    });
    const params = new ModelParameters(scenario);
    const start = initialRotatingState(scenario, params);
    const whole = new MicroStepper(params, start, 5);
    whole.advance(TWO_PI * 200);
    const chunked = new MicroStepper(params, start, 5);
    for (let p = 5; p <= 200; p += 5) chunked.advance(TWO_PI * p);
    expect(relativeMaxError(chunked.state, whole.state)).toBeLessThan(1e-12);
    // and a kick between calls is simply the new starting state
    const kicked = new MicroStepper(params, start, 5);
    kicked.advance(TWO_PI * 100);
    kicked.state[0] += 0.01;
    const fresh = new MicroStepper(params, kicked.state, 5);
    fresh.restore(kicked.state, kicked.tau);
    kicked.advance(TWO_PI * 150);
    fresh.advance(TWO_PI * 150);
    expect(Array.from(kicked.state)).toEqual(Array.from(fresh.state));
  });

  test('restore puts a stepper on another state and clock; from there it steps bit for bit like one that got there itself', () => {
    const { params, start } = benchScenario(4);
    const straight = new MicroStepper(params, start, 5);
    straight.advance(TWO_PI * 30);
    const saved = { state: Float64Array.from(straight.state), tau: straight.tau };
    const other = new MicroStepper(params, start, 5);
    other.advance(TWO_PI * 47); // somewhere else in state and time
    other.restore(saved.state, saved.tau);
    expect(other.tau).toBe(saved.tau);
    straight.advance(TWO_PI * 60);
    other.advance(TWO_PI * 60);
    expect(Array.from(other.state)).toEqual(Array.from(straight.state));
    expect(() => other.restore(new Float64Array(3), 0)).toThrow(RangeError);
  });

  test('a short final span that the fitted method cannot take goes to refined RK4', () => {
    const { params, start } = benchScenario(4);
    const stepper = new MicroStepper(params, start, 5);
    stepper.advance(TWO_PI * 10);
    // 10 periods of omega_0 at 5 steps per period of omega_1 = 1.0015: ceil(50.075) steps
    expect(stepper.stepsBy['fitted-adams']).toBe(51);
    // 0.05 is one step of 1/125 period: far outside the fitted range, RK4 takes it
    stepper.advance(TWO_PI * 10 + 0.05);
    expect(stepper.stepsBy.rk4).toBe(1);
    expect(stepper.stepsBy['fitted-adams']).toBe(51);
  });
});
