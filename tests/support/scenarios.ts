import type { Link, ModeSpec, Scenario } from '../../src/scenario/types.js';

/** Ring links as docs/model.md, 'Reference model', defines them (A_{k,k-1} = 1, and A_{k,k+1} = 1 two-way). */
export function ringLinks(n: number, twoWay: boolean): Link[] {
  const links: Link[] = [];
  for (let k = 0; k < n; k++) {
    links.push({ from: (k - 1 + n) % n, to: k, weight: 1 });
    if (twoWay && n > 2) links.push({ from: (k + 1) % n, to: k, weight: 1 });
  }
  return links;
}

/** A normalized scenario built directly (bypassing the JSON parser) for engine tests. */
export function makeScenario(options: {
  nodes: number;
  links?: Link[];
  twoWay?: boolean;
  epsilon: number;
  modes: ModeSpec[];
  coupling?: { strength: number; reactive: number; dissipative: number };
  detuning?: number[];
  initial?: Scenario['initial'];
  noise?: Partial<Scenario['noise']>;
  stepsPerPeriod?: number;
  macroPeriods?: number;
  averagingGrid?: number;
}): Scenario {
  const links = options.links ?? ringLinks(options.nodes, options.twoWay ?? false);
  return {
    name: 'test',
    nodes: options.nodes,
    topology: { edges: links },
    links,
    epsilon: options.epsilon,
    modes: options.modes,
    coupling: options.coupling ?? { strength: 0, reactive: 0, dissipative: 0 },
    detuning: options.detuning ?? new Array(options.nodes).fill(0),
    noise: { intensity: 0, detuningWalk: 0, seed: 1, ...options.noise },
    initial: options.initial ?? { random: { seed: 3, amplitude: 1 } },
    integrator: {
      stepsPerPeriod: options.stepsPerPeriod ?? 16,
      macroPeriods: options.macroPeriods ?? 1,
      averagingGrid: options.averagingGrid ?? 8,
    },
    units: { nominalFrequencyHz: 10e6, nominalFrequencyAssumed: false },
  };
}
