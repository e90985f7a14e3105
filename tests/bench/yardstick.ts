import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { ModelParameters } from '../../src/model/parameters.js';

/**
 * The C yardstick: tests/bench/c/rk4_rotating.c (classic RK4 in the rotating frame, mirroring the
 * engine's kernel) compiled with gcc -O3 -march=native into a temporary folder and fed the bench's
 * problem on stdin. Returns null with a reason when gcc is missing or the compile fails.
 */
export interface YardstickRun {
  periods: number;
  steps: number;
  trials: number;
  wallSeconds: number;
  cpuSeconds: number;
  periodsPerSecond: number;
  cpuPeriodsPerSecond: number;
  state: number[];
}

export interface Yardstick {
  run(periods: number, trials: number): YardstickRun;
  dispose(): void;
}

const SOURCE = fileURLToPath(new URL('../../../tests/bench/c/rk4_rotating.c', import.meta.url));

export function compileYardstick(params: ModelParameters, start: Float64Array, stepsPerPeriod: number): Yardstick | string {
  if (params.modes !== 2) return `the C yardstick is written for two modes (got ${params.modes})`;
  if (!existsSync(SOURCE)) return `C source not found at ${SOURCE}`;
  if (spawnSync('gcc', ['--version']).status !== 0) return 'gcc not found: C yardstick skipped';
  const folder = mkdtempSync(join(tmpdir(), 'syncring-bench-'));
  const binary = join(folder, 'rk4_rotating');
  try {
    execFileSync('gcc', ['-O3', '-march=native', '-o', binary, SOURCE, '-lm'], { stdio: ['ignore', 'ignore', 'pipe'] });
  } catch (error) {
    rmSync(folder, { recursive: true, force: true });
    return `gcc failed on ${SOURCE}: ${String((error as { stderr?: Buffer }).stderr ?? error)}`;
  }
  const problem = describeProblem(params, start);
  return {
    run(periods, trials) {
      const input = `${params.nodes} ${stepsPerPeriod} ${periods} ${trials} ${params.epsilon}\n${problem}`;
      const output = execFileSync(binary, [], { input, encoding: 'utf8' });
      return JSON.parse(output) as YardstickRun;
    },
    dispose() {
      rmSync(folder, { recursive: true, force: true });
    },
  };
}

/** The parameter lines of the C program's input (see the C file's header); in-neighbour slots as in SlowField. */
function describeProblem(params: ModelParameters, start: Float64Array): string {
  const p = params;
  const exact = (x: number) => x.toPrecision(17);
  const lines = [
    [p.omega[0], p.omega[1], p.gain[0], p.gain[1], p.loss[0], p.loss[1], p.strength, p.reactive, p.dissipative].map(exact).join(' '),
  ];
  for (let k = 0; k < p.nodes; k++) {
    const first = p.inStart[k];
    const degree = p.inStart[k + 1] - first;
    if (degree > 2) throw new Error(`C yardstick: node ${k} has ${degree} incoming links (at most 2 supported)`);
    const slot = (s: number) => (degree > s ? `${p.inFrom[first + s]} ${exact(p.linkWeight[p.inLink[first + s]])}` : `${k} 0`);
    lines.push(`${exact(p.detuning[k])} ${slot(0)} ${slot(1)}`);
  }
  lines.push(Array.from(start, exact).join(' '));
  return `${lines.join('\n')}\n`;
}
