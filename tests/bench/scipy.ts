import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { ModelParameters } from '../../src/model/parameters.js';

/**
 * SciPy's DOP853 on the bench's problem through tests/bench/dop853.py (original coordinates, so
 * it has to resolve the carrier itself). `available` says why it cannot run (no python3 or no
 * SciPy); `run` integrates as many whole periods as fit in `budgetSeconds` (at most maxPeriods).
 */
export interface Dop853Run {
  periods: number;
  wallSeconds: number;
  cpuSeconds: number;
  evaluations: number;
  /** Original-coordinate state [x0, x0', x1, x1'] per node at tau = 2 pi periods. */
  state: number[];
}

const SCRIPT = fileURLToPath(new URL('../../../tests/bench/dop853.py', import.meta.url));

export function scipyUnavailable(): string | null {
  if (!existsSync(SCRIPT)) return `SciPy section skipped: ${SCRIPT} not found`;
  const probe = spawnSync('python3', ['-c', 'import scipy, numpy; print(scipy.__version__)'], { encoding: 'utf8' });
  if (probe.error) return 'SciPy section skipped: python3 not found';
  if (probe.status !== 0) return 'SciPy section skipped: python3 has no scipy/numpy (Debian: python3-scipy)';
  return null;
}

export function scipyVersion(): string {
  return spawnSync('python3', ['-c', 'import scipy; print(scipy.__version__)'], { encoding: 'utf8' }).stdout.trim();
}

export function runDop853(
  params: ModelParameters,
  z0: Float64Array,
  tolerance: number,
  maxPeriods: number,
  budgetSeconds: number,
): Dop853Run {
  const p = params;
  const slot = (k: number, s: number) => {
    const first = p.inStart[k];
    const degree = p.inStart[k + 1] - first;
    if (degree > 2) throw new Error(`SciPy bench: node ${k} has ${degree} incoming links (at most 2 supported)`);
    return degree > s ? { from: p.inFrom[first + s], weight: p.linkWeight[p.inLink[first + s]] } : { from: k, weight: 0 };
  };
  const nodes = Array.from({ length: p.nodes }, (_, k) => k);
  const problem = {
    epsilon: p.epsilon,
    omega: Array.from(p.omega),
    gain: Array.from(p.gain),
    loss: Array.from(p.loss),
    strength: p.strength,
    reactive: p.reactive,
    dissipative: p.dissipative,
    detuning: Array.from(p.detuning),
    fromA: nodes.map((k) => slot(k, 0).from),
    weightA: nodes.map((k) => slot(k, 0).weight),
    fromB: nodes.map((k) => slot(k, 1).from),
    weightB: nodes.map((k) => slot(k, 1).weight),
    z0: Array.from(z0),
    rtol: tolerance,
    atol: tolerance,
    maxPeriods,
    budgetSeconds,
  };
  const output = execFileSync('python3', [SCRIPT], {
    input: JSON.stringify(problem),
    encoding: 'utf8',
    timeout: (10 * budgetSeconds + 60) * 1000,
  });
  return JSON.parse(output) as Dop853Run;
}
