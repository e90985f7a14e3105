import { describe, expect, test } from 'vitest';
import { parseScenario } from '../../../src/scenario/index.js';
import { InputError } from '../../../src/util/input-error.js';

/** A scenario as raw JSON, open to the cases below: any field may be broken, dropped or added, also in a mode. */
interface RawScenario {
  modes: Record<string, unknown>[];
  [field: string]: unknown;
}

/** A small valid scenario; each case below breaks exactly one thing in a fresh copy. */
function valid(): RawScenario {
  return {
    nodes: 3,
    topology: 'ring-one-way',
    epsilon: 1e-3,
    modes: [
      { omega: 1, gain: 1, loss: 0 },
      { omega: 1.3, gain: 1, loss: 0.1 },
    ],
    coupling: { strength: 0.05, dissipative: 1 },
  };
}

function errorOf(raw: unknown, source?: string): InputError {
  try {
    parseScenario(raw, source);
  } catch (err) {
    expect(err).toBeInstanceOf(InputError);
    return err as InputError;
  }
  throw new Error('expected parseScenario to throw');
}

type Case = [label: string, breakIt: (s: RawScenario) => unknown, path: string, reason: string];

// The expected messages are the contract of this module (DEVELOPERS.md, 'Conventions': bad input
// gets an error naming what and where); each was written by hand from the rule it enforces.
const cases: Case[] = [
  ['root is not an object', () => [1, 2], '', 'must be an object (got an array)'],
  [
    'nodes missing',
    (s) => {
      delete s.nodes;
      return s;
    },
    'nodes',
    'is required',
  ],
  ['nodes not a number', (s) => ({ ...s, nodes: '3' }), 'nodes', 'must be a number (got string "3")'],
  ['nodes not an integer', (s) => ({ ...s, nodes: 2.5 }), 'nodes', 'must be an integer (got 2.5)'],
  ['nodes too many', (s) => ({ ...s, nodes: 5000 }), 'nodes', 'must be between 1 and 4096 (got 5000)'],
  ['ring of one node', (s) => ({ ...s, nodes: 1 }), 'nodes', 'must be >= 2 for topology "ring-one-way" (got 1)'],
  ['epsilon NaN', (s) => ({ ...s, epsilon: NaN }), 'epsilon', 'must be a finite number (got NaN)'],
  ['epsilon Infinity', (s) => ({ ...s, epsilon: Infinity }), 'epsilon', 'must be a finite number (got Infinity)'],
  ['epsilon too large', (s) => ({ ...s, epsilon: 0.7 }), 'epsilon', 'must be between 0 and 0.5 (got 0.7)'],
  ['epsilon negative', (s) => ({ ...s, epsilon: -1e-3 }), 'epsilon', 'must be between 0 and 0.5 (got -0.001)'],
  [
    'unknown topology name',
    (s) => ({ ...s, topology: 'ring' }),
    'topology',
    'must be "ring-one-way", "ring-two-way" or {"edges": [[from, to, weight], ...]} (got string "ring")',
  ],
  [
    'edge target out of range',
    (s) => ({
      ...s,
      topology: {
        edges: [
          [0, 1, 1],
          [1, 5, 1],
        ],
      },
    }),
    'topology.edges[1][1]',
    'node index 5 is out of range (nodes = 3, so 0 to 2)',
  ],
  [
    'edge index not an integer',
    (s) => ({ ...s, topology: { edges: [[0.5, 1, 1]] } }),
    'topology.edges[0][0]',
    'must be an integer (got 0.5)',
  ],
  [
    'self-loop',
    (s) => ({
      ...s,
      topology: {
        edges: [
          [0, 1, 1],
          [2, 2, 1],
        ],
      },
    }),
    'topology.edges[1]',
    'is a self-loop on node 2; an edge must join two different nodes',
  ],
  [
    'duplicate edge',
    (s) => ({
      ...s,
      topology: {
        edges: [
          [0, 1, 1],
          [1, 2, 1],
          [0, 1, 0.5],
        ],
      },
    }),
    'topology.edges[2]',
    'duplicates topology.edges[0] (both carry node 0 into node 1)',
  ],
  [
    'negative weight',
    (s) => ({
      ...s,
      topology: {
        edges: [
          [0, 1, 1],
          [1, 2, -0.5],
        ],
      },
    }),
    'topology.edges[1][2]',
    'weight must be >= 0 (got -0.5); use 0 for a broken link',
  ],
  [
    'edge with two entries',
    (s) => ({ ...s, topology: { edges: [[0, 1]] } }),
    'topology.edges[0]',
    'must be [from, to, weight] with 3 entries (got 2)',
  ],
  ['no modes', (s) => ({ ...s, modes: [] }), 'modes', 'must have 1 or 2 entries (got 0)'],
  ['three modes', (s) => ({ ...s, modes: [...s.modes, { omega: 2, gain: 1, loss: 0 }] }), 'modes', 'must have 1 or 2 entries (got 3)'],
  [
    'omega negative',
    (s) => {
      s.modes[1].omega = -1;
      return s;
    },
    'modes[1].omega',
    'must be > 0 (got -1)',
  ],
  [
    'omega missing',
    (s) => {
      delete s.modes[0].omega;
      return s;
    },
    'modes[0].omega',
    'is required (or give offsetPpm)',
  ],
  [
    'omega and offsetPpm together',
    (s) => {
      s.modes[1].offsetPpm = 1500;
      return s;
    },
    'modes[1]',
    'give either omega or offsetPpm, not both',
  ],
  [
    'loss and quality together',
    (s) => {
      s.modes[0].quality = 1e5;
      return s;
    },
    'modes[0]',
    'give either loss or quality, not both',
  ],
  [
    'quality when epsilon is 0',
    (s) => {
      s.epsilon = 0;
      delete s.modes[0].loss;
      s.modes[0].quality = 1e5;
      return s;
    },
    'modes[0].quality',
    'cannot be used when epsilon is 0 (loss = omega / (epsilon * quality)); give loss instead',
  ],
  [
    'gain missing',
    (s) => {
      delete s.modes[1].gain;
      return s;
    },
    'modes[1].gain',
    'is required',
  ],
  ['coupling strength missing', (s) => ({ ...s, coupling: { dissipative: 1 } }), 'coupling.strength', 'is required'],
  ['detuning of the wrong length', (s) => ({ ...s, detuning: [0, 0] }), 'detuning', 'must have 3 entries, one per node (got 2)'],
  ['detuning entry null', (s) => ({ ...s, detuning: [0, 0.1, null] }), 'detuning[2]', 'must be a number (got null)'],
  [
    'detuning and detuningPpm together',
    (s) => ({ ...s, detuning: [0, 0, 0], detuningPpm: [0, 0, 0] }),
    'detuningPpm',
    'cannot be given together with detuning; give one of them',
  ],
  [
    'detuningPpm when epsilon is 0',
    (s) => ({ ...s, epsilon: 0, detuningPpm: [0.1, 0, 0] }),
    'detuningPpm',
    'cannot be used when epsilon is 0 (Delta = ppm * 1e-6 / epsilon); give detuning instead',
  ],
  [
    'noise seed negative',
    (s) => ({ ...s, noise: { intensity: 0, seed: -1 } }),
    'noise.seed',
    'must be an unsigned 32-bit integer, 0 to 4294967295 (got -1)',
  ],
  [
    'noise seed too large',
    (s) => ({ ...s, noise: { intensity: 0, seed: 2 ** 32 } }),
    'noise.seed',
    'must be an unsigned 32-bit integer, 0 to 4294967295 (got 4294967296)',
  ],
  ['noise intensity negative', (s) => ({ ...s, noise: { intensity: -1e-9, seed: 1 } }), 'noise.intensity', 'must be >= 0 (got -1e-9)'],
  [
    'two initial kinds',
    (s) => ({ ...s, initial: { random: { seed: 1, amplitude: 1 }, pattern: { q: 0, amplitude: 1 } } }),
    'initial',
    'must have exactly one of state, random, pattern (got random, pattern)',
  ],
  ['no initial kind', (s) => ({ ...s, initial: {} }), 'initial', 'must have exactly one of state, random, pattern (got none)'],
  [
    'initial state with too few nodes',
    (s) => ({
      ...s,
      initial: {
        state: [
          [
            { x: 1, xdot: 0 },
            { x: 0, xdot: 0 },
          ],
        ],
      },
    }),
    'initial.state',
    'must have 3 entries, one per node (got 1)',
  ],
  [
    'initial state with too few modes at node 2',
    (s) => ({ ...s, initial: { state: [stateRow(), stateRow(), [{ x: 0, xdot: 0 }]] } }),
    'initial.state[2]',
    'must have 2 entries, one per mode (got 1)',
  ],
  [
    'initial state xdot not a number',
    (s) => ({
      ...s,
      initial: {
        state: [
          stateRow(),
          stateRow(),
          [
            { x: 0, xdot: '0' },
            { x: 0, xdot: 0 },
          ],
        ],
      },
    }),
    'initial.state[2][0].xdot',
    'must be a number (got string "0")',
  ],
  [
    'pattern wave number out of range',
    (s) => ({ ...s, initial: { pattern: { q: 3, amplitude: 1 } } }),
    'initial.pattern.q',
    'must be a wave number between 0 and 2 (got 3)',
  ],
  [
    'pattern mode out of range',
    (s) => ({ ...s, initial: { pattern: { q: 0, amplitude: 1, mode: 2 } } }),
    'initial.pattern.mode',
    'must be a mode index, 0 to 1 (got 2)',
  ],
  [
    'random amplitude zero',
    (s) => ({ ...s, initial: { random: { seed: 1, amplitude: 0 } } }),
    'initial.random.amplitude',
    'must be > 0 (got 0)',
  ],
  [
    'stepsPerPeriod too large',
    (s) => ({ ...s, integrator: { stepsPerPeriod: 5000 } }),
    'integrator.stepsPerPeriod',
    'must be between 4 and 4096 (got 5000)',
  ],
  [
    'averagingGrid too small',
    (s) => ({ ...s, integrator: { averagingGrid: 4 } }),
    'integrator.averagingGrid',
    'must be between 5 and 64 (got 4)',
  ],
  [
    'macroPeriods zero',
    (s) => ({ ...s, integrator: { macroPeriods: 0 } }),
    'integrator.macroPeriods',
    `must be between 1 and ${Number.MAX_SAFE_INTEGER} (got 0)`,
  ],
  [
    'quality so small that the loss overflows',
    (s) => {
      s.epsilon = 1e-5;
      delete s.modes[0].loss;
      s.modes[0].quality = 1e-320;
      return s;
    },
    'modes[0].quality',
    'gives a non-finite loss (Infinity); the value is too extreme',
  ],
  ['name not a string', (s) => ({ ...s, name: 42 }), 'name', 'must be a string (got 42)'],
  ['nominal frequency zero', (s) => ({ ...s, nominalFrequencyHz: 0 }), 'nominalFrequencyHz', 'must be > 0 (got 0)'],
];

function stateRow() {
  return [
    { x: 1, xdot: 0 },
    { x: 0, xdot: 0 },
  ];
}

describe('parseScenario rejects malformed scenarios with a precise path and reason', () => {
  test('the base scenario used by the cases is itself valid', () => {
    expect(() => parseScenario(valid())).not.toThrow();
  });

  test.each(cases)('%s', (_label, breakIt, path, reason) => {
    const err = errorOf(breakIt(valid()));
    expect(err.path).toBe(path);
    expect(err.reason).toBe(reason);
    expect(err.message).toBe(path === '' ? reason : `${path}: ${reason}`);
  });

  test('the source is prefixed to the message', () => {
    const raw = valid();
    raw.modes[1].omega = -1;
    const err = errorOf(raw, 'board.json');
    expect(err.message).toBe('board.json: modes[1].omega: must be > 0 (got -1)');
    expect(err.source).toBe('board.json');
    expect(err.path).toBe('modes[1].omega');
  });
});

describe('unknown fields are errors that name the field', () => {
  test('at top level', () => {
    const err = errorOf({ ...valid(), epsilonn: 1e-3 });
    expect(err.path).toBe('epsilonn');
    expect(err.reason).toMatch(/^unknown field \(allowed here: name, nodes, topology, epsilon, /);
  });

  test('inside a mode', () => {
    const raw = valid();
    raw.modes[1].omga = 1;
    const err = errorOf(raw);
    expect(err.path).toBe('modes[1].omga');
    expect(err.reason).toBe('unknown field (allowed here: omega, offsetPpm, gain, loss, quality)');
  });

  test('inside coupling', () => {
    const err = errorOf({ ...valid(), coupling: { strength: 0.1, strenght: 0.1 } });
    expect(err.path).toBe('coupling.strenght');
  });

  test('two levels down in initial', () => {
    const err = errorOf({ ...valid(), initial: { pattern: { q: 0, amplitude: 1, phase: 0 } } });
    expect(err.path).toBe('initial.pattern.phase');
    expect(err.reason).toBe('unknown field (allowed here: q, amplitude, mode)');
  });

  test('inside an initial state cell', () => {
    const err = errorOf({
      ...valid(),
      initial: {
        state: [
          stateRow(),
          stateRow(),
          [
            { x: 0, xdot: 0, v: 1 },
            { x: 0, xdot: 0 },
          ],
        ],
      },
    });
    expect(err.path).toBe('initial.state[2][0].v');
  });

  test('a JSON "__proto__" key is an unknown field, not a prototype', () => {
    const err = errorOf(JSON.parse('{"nodes": 3, "__proto__": {"x": 1}}'));
    expect(err.path).toBe('__proto__');
  });
});
