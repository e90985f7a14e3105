import { describe, expect, test } from 'vitest';
import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { parseLog } from '../../src/protocol/log-reader.js';

const run = promisify(execFile);
const root = new URL('../../', import.meta.url).pathname;

/** Runs the built command as a user would: `npx syncring ...` from the project root. */
async function syncring(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run('npx', ['syncring', ...args], { cwd: root, timeout: 120_000 });
    return { code: 0, stdout, stderr };
  } catch (error) {
    const e = error as { code: number; stdout: string; stderr: string };
    return { code: e.code, stdout: e.stdout, stderr: e.stderr };
  }
}

describe('npx syncring simulate', () => {
  test('prints the JSON contract of the README (`syncring simulate`) for the demo scenario', async () => {
    const { code, stdout } = await syncring('simulate', 'timing-board-8', '--until', '20000');
    expect(code).toBe(0);
    const result = JSON.parse(stdout);
    expect(result.tau).toBe(20000);
    expect(['in-phase', 'anti-phase', 'rotating-wave', 'standing-wave', 'cluster', 'unlocked']).toContain(result.pattern.kind);
    expect(typeof result.pattern.locked).toBe('boolean');
    expect(result.phaseDifferences).toHaveLength(8);
    expect(result.amplitudes).toHaveLength(8);
    expect(result.amplitudes[0]).toHaveLength(2);
    expect(result.guide.pattern.kind).toBeDefined();
    expect('margin' in result.guide).toBe(true);
    expect(result.state).toHaveLength(8);
    for (const node of result.state) for (const mode of node) expect(Number.isFinite(mode.x) && Number.isFinite(mode.xdot)).toBe(true);
  });

  test('the final state equals the outside reference (SciPy DOP853) to 1e-7', async () => {
    const reference = JSON.parse(readFileSync(join(root, 'tests/reference/two-way-broken-link.dop853.json'), 'utf8'));
    const last = reference.samples.at(-1);
    const { code, stdout } = await syncring('simulate', 'tests/reference/two-way-broken-link.scenario.json', '--until', String(last.tau));
    expect(code).toBe(0);
    const { state } = JSON.parse(stdout);
    let worst = 0;
    last.state.forEach((modes: { x: number; xdot: number }[], k: number) =>
      modes.forEach((m, j) => (worst = Math.max(worst, Math.abs(state[k][j].x - m.x), Math.abs(state[k][j].xdot - m.xdot)))),
    );
    expect(worst).toBeLessThan(1e-7);
  });

  test('--out writes a session log that reads back', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'syncring-cli-'));
    const out = join(dir, 'run.ndjson');
    const { code } = await syncring('simulate', 'pair-adler', '--until', '3000', '--out', out);
    expect(code).toBe(0);
    const parsed = parseLog(readFileSync(out, 'utf8'), { firstSeq: 0 });
    expect(parsed.problems).toEqual([]);
    expect(parsed.header?.software.name).toBe('syncring');
    expect(parsed.samples.length).toBeGreaterThan(5);
    expect(parsed.checkpoints.at(-1)?.tau).toBe(3000);
  });

  test.each([
    [['simulate', 'nowhere.json', '--until', '10'], /nowhere.json: no such file/],
    [['simulate', 'pair-adler'], /needs --until/],
    [['simulate', 'pair-adler', '--until', 'soon'], /--until must be a number/],
    [['simulate', 'pair-adler', '--until', '-5'], /--until must be a positive number/],
    [['simulate', 'pair-adler', '--until', '5', '--fast'], /unknown option --fast/],
    [['frobnicate'], /unknown command "frobnicate"/],
  ])('bad input %j exits 2 with a precise message', async (args, message) => {
    const { code, stderr } = await syncring(...args);
    expect(code).toBe(2);
    expect(stderr).toMatch(message);
  });

  test('a malformed scenario file names the file and the field', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'syncring-cli-'));
    const broken = join(dir, 'broken.json');
    writeFileSync(
      broken,
      JSON.stringify({
        nodes: 3,
        topology: 'ring-one-way',
        epsilon: 1e-3,
        modes: [{ omega: 1, gain: 1, loss: 0 }],
        coupling: { strength: 0.1 },
        colour: 'blue',
      }),
    );
    const unknown = await syncring('simulate', broken, '--until', '10');
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toContain(`${broken}: colour: unknown field`);
    writeFileSync(broken, '{"nodes": 3,\n  "epsilon": }');
    const syntax = await syncring('simulate', broken, '--until', '10');
    expect(syntax.code).toBe(2);
    expect(syntax.stderr).toMatch(/not valid JSON at line 2/);
  });
});
