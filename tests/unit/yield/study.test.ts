import { describe, expect, it } from 'vitest';
import { loadBuiltInScenario } from '../../../src/scenarios/index.js';
import { parseScenario } from '../../../src/scenario/parse.js';
import { parseStudy, studyToJSON } from '../../../src/yield/study.js';
import { sampleSetup, runIndex } from '../../../src/yield/sample.js';
import { sampleSeed } from '../../../src/yield/seeds.js';
import { InputError } from '../../../src/util/input-error.js';
import { thrown } from '../../support/thrown.js';

const board = loadBuiltInScenario('timing-board-8');
const base = {
  scenario: 'timing-board-8',
  samples: 20,
  seed: 1,
  tolerances: [
    { parameter: 'detuning', nodes: 'all', distribution: 'normal', sigma: 0.5, unit: 'ppm' },
    { parameter: 'coupling.strength', distribution: 'uniform', range: [0.27, 0.33] },
  ],
  start: 'random',
  criteria: { pattern: 'in-phase', mode: 0, within: 200, minMargin: null },
  confirm: { fullSystem: 5 },
};
const withChange = (change: Record<string, unknown>) => ({ ...base, ...change });

function errorOf(raw: unknown): InputError {
  return thrown(() => parseStudy(raw, board, 'study.json'), InputError);
}

describe('parseStudy', () => {
  it('takes the example of the README and normalises it', () => {
    const study = parseStudy(base, board);
    expect(study.tolerances[0].parameter.components.map((c) => c.label)).toEqual(Array.from({ length: 8 }, (_, k) => `detuning[${k}]`));
    expect(study.confirmIndices).toHaveLength(5);
    expect(new Set(study.confirmIndices).size).toBe(5);
    expect(study.confirmIndices.every((i) => i >= 0 && i < 20)).toBe(true);
    expect(study.confidence).toBe(0.95);
    // the JSON form parses back into the same study
    const json = studyToJSON(study);
    const again = parseStudy(json, parseScenario(json.scenario));
    expect(studyToJSON(again)).toEqual(json);
  });

  it.each([
    [{ samples: 0 }, 'samples', 'between 1'],
    [{ seed: -1 }, 'seed', 'unsigned'],
    [{ tolerances: [{ parameter: 'detunings', distribution: 'normal', sigma: 1 }] }, 'tolerances[0].parameter', 'unknown parameter'],
    [{ tolerances: [{ parameter: 'detuning', nodes: [8], distribution: 'normal', sigma: 1 }] }, 'tolerances[0].nodes[0]', 'node index'],
    [{ tolerances: [{ parameter: 'detuning', distribution: 'gaussian', sigma: 1 }] }, 'tolerances[0].distribution', 'one of'],
    [{ tolerances: [{ parameter: 'coupling.strength', distribution: 'uniform', range: [0.3, 0.2] }] }, 'tolerances[0].range', 'below high'],
    [
      { tolerances: [{ parameter: 'coupling.strength', distribution: 'normal', sigma: 1, unit: 'ppm' }] },
      'tolerances[0].unit',
      'takes "model"',
    ],
    [
      { tolerances: [{ parameter: 'modes[2].gain', distribution: 'uniform', range: [0.9, 1] }] },
      'tolerances[0].parameter',
      'mode 2 does not exist',
    ],
    [{ tolerances: [{ parameter: 'modes[0].loss', distribution: 'normal', sigma: 0.1 }] }, 'tolerances[0]', 'must be >= 0'],
    [
      { tolerances: [{ parameter: 'detuning', distribution: 'uniform', range: [0, 1], sigma: 1 }] },
      'tolerances[0].sigma',
      'not a field of a uniform',
    ],
    [
      { tolerances: [{ parameter: 'detuning', distribution: 'truncated-normal', sigma: 1, truncate: 0.01 }] },
      'tolerances[0].truncate',
      'between',
    ],
    [{ criteria: { pattern: 'spiral', within: 1 } }, 'criteria.pattern', 'one of'],
    [{ criteria: { pattern: 'in-phase', within: 0 } }, 'criteria.within', '> 0'],
    [{ criteria: { pattern: 'in-phase', mode: 2, within: 10 } }, 'criteria.mode', 'between 0 and 1'],
    [{ start: 'cold' }, 'start', '"random" or "scenario"'],
    [{ confirm: { fullSystem: 21 } }, 'confirm.fullSystem', 'between 0 and 20'],
    [{ sweep: { parameter: 'coupling.strength', values: [0.1, 0.2] } }, 'sweep.parameter', 'fixed uniform range'],
    [{ sweep: { parameter: 'links.weight', values: [1, -1] } }, 'sweep.values[1]', '>= 0'],
    [{ colour: 'red' }, 'colour', 'unknown field'],
  ])('refuses %j naming %s', (change, path, reason) => {
    const error = errorOf(withChange(change));
    expect(error.path).toBe(path);
    expect(error.reason).toContain(reason);
    expect(error.message.startsWith('study.json: ')).toBe(true);
  });

  it('refuses two tolerances on one component, naming both', () => {
    const error = errorOf(
      withChange({
        tolerances: [
          { parameter: 'detuning', nodes: [1, 2], distribution: 'normal', sigma: 1 },
          { parameter: 'detuning', nodes: [2], distribution: 'normal', sigma: 1 },
        ],
      }),
    );
    expect(error.path).toBe('tolerances[1]');
    expect(error.reason).toContain('detuning[2] already has a tolerance in tolerances[0]');
  });
});

describe('sample draws', () => {
  it('depend on the study seed and the index only, whatever the order they are drawn in', () => {
    const study = parseStudy(base, board);
    const forward = Array.from({ length: 6 }, (_, i) => sampleSetup(study, 0, i));
    const backward = Array.from({ length: 6 }, (_, i) => sampleSetup(study, 0, 5 - i)).reverse();
    expect(backward.map((s) => s.parameters)).toEqual(forward.map((s) => s.parameters));
    expect(new Set(forward.map((s) => s.seed)).size).toBe(6);
    expect(sampleSeed(1, 3)).not.toBe(sampleSeed(2, 3));
    // another study seed draws other boards
    const other = sampleSetup(parseStudy(withChange({ seed: 2 }), board), 0, 0);
    expect(other.parameters).not.toEqual(forward[0].parameters);
  });

  it('write the drawn values into the board in model units (ppm through units.ts: Delta = ppm 1e-6 / eps)', () => {
    const study = parseStudy(base, board);
    const setup = sampleSetup(study, 0, 3);
    for (let k = 0; k < 8; k++)
      expect(setup.scenario.detuning[k]).toBeCloseTo((setup.parameters[`detuning[${k}]`] * 1e-6) / board.epsilon, 9);
    expect(setup.scenario.coupling.strength).toBe(setup.parameters['coupling.strength']);
    expect(setup.parameters['coupling.strength']).toBeGreaterThanOrEqual(0.27);
    expect(setup.parameters['coupling.strength']).toBeLessThanOrEqual(0.33);
    // the study's own scenario is untouched
    expect(study.scenario.coupling.strength).toBe(board.coupling.strength);
    expect('random' in setup.scenario.initial).toBe(true);
  });

  it('draw normal tolerances around the nominal value with the given spread, truncated ones inside their bounds', () => {
    const spread = parseStudy(
      withChange({
        samples: 4000,
        tolerances: [
          { parameter: 'detuning', nodes: [0], distribution: 'normal', sigma: 0.5, unit: 'ppm' },
          { parameter: 'detuning', nodes: [1], distribution: 'truncated-normal', sigma: 0.5, truncate: 1, unit: 'ppm' },
        ],
        confirm: { fullSystem: 0 },
      }),
      board,
    );
    const draws = Array.from({ length: 4000 }, (_, i) => sampleSetup(spread, 0, i).parameters);
    const plain = draws.map((d) => d['detuning[0]']);
    const mean = plain.reduce((s, v) => s + v, 0) / plain.length;
    const sd = Math.sqrt(plain.reduce((s, v) => s + (v - mean) ** 2, 0) / (plain.length - 1));
    // the board's own detuning of node 0 in ppm (Delta eps 1e6); standard error of the mean 0.5 / sqrt(4000) = 0.0079 (4.5 sigma bound below)
    const nominalPpm = (k: number) => board.detuning[k] * board.epsilon * 1e6;
    expect(Math.abs(mean - nominalPpm(0))).toBeLessThan(0.036);
    // standard error of s is about sigma / sqrt(2 n) = 0.0056
    expect(Math.abs(sd - 0.5)).toBeLessThan(0.025);
    const truncated = draws.map((d) => d['detuning[1]']);
    // nominal +- 1 sigma
    expect(Math.min(...truncated)).toBeGreaterThanOrEqual(nominalPpm(1) - 0.5 - 1e-9);
    expect(Math.max(...truncated)).toBeLessThanOrEqual(nominalPpm(1) + 0.5 + 1e-9);
    // a normal truncated at +-1 sigma has standard deviation sigma sqrt(1 - 2 phi(1) / (2 Phi(1) - 1)) = 0.5 * 0.5380 (standard result)
    const tm = truncated.reduce((s, v) => s + v, 0) / truncated.length;
    const tsd = Math.sqrt(truncated.reduce((s, v) => s + (v - tm) ** 2, 0) / (truncated.length - 1));
    expect(Math.abs(tsd - 0.5 * 0.538)).toBeLessThan(0.012);
  });

  it("move the nominal with a sweep and keep each sample's draws the same at every point", () => {
    const pair = parseScenario({
      nodes: 2,
      topology: 'ring-two-way',
      epsilon: 0.01,
      modes: [{ omega: 1, gain: 1, loss: 0 }],
      coupling: { strength: 0.05, dissipative: 1 },
    });
    const study = parseStudy(
      {
        scenario: 'inline',
        samples: 3,
        seed: 4,
        tolerances: [{ parameter: 'coupling.strength', distribution: 'normal', sigma: 0.001 }],
        criteria: { pattern: 'in-phase', within: 100 },
        sweep: { parameter: 'coupling.strength', values: [0.02, 0.08], target: 0.9 },
      },
      pair,
    );
    const low = sampleSetup(study, 0, 1);
    const high = sampleSetup(study, 1, 1);
    expect(high.parameters['coupling.strength'] - low.parameters['coupling.strength']).toBeCloseTo(0.06, 12);
    expect(runIndex(study, 4).index).toBe(4);
    expect(runIndex(study, 4).point).toBe(1);
    expect(runIndex(study, 4).sample).toBe(1);
  });
});
