import { describe, expect, test } from 'vitest';
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { sortedSampleLines, writeAdlerStudy } from '../support/yield-study.js';

/**
 * `syncring yield` as a user runs it: the embedded thread pool with one and two workers gives the
 * same samples.ndjson byte for byte (each sample's seed is the study's seed and its index), a
 * coordinator killed with SIGKILL mid-run resumes with --resume to the same file, and bad input
 * exits 2 naming the field.
 */
const root = new URL('../../', import.meta.url).pathname;
const bin = join(root, 'bin/syncring.js');
const dir = mkdtempSync(join(tmpdir(), 'syncring-yield-'));
const study = writeAdlerStudy(dir);

interface Run {
  code: number | null;
  signal: NodeJS.Signals | null;
  stdout: string;
  stderr: string;
}

function cli(args: string[], killWhen?: () => boolean): Promise<Run> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [bin, ...args], { stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString()));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    const timer = killWhen
      ? setInterval(() => {
          if (killWhen()) child.kill('SIGKILL');
        }, 20)
      : null;
    child.on('close', (code, signal) => {
      if (timer) clearInterval(timer);
      resolve({ code, signal, stdout, stderr });
    });
  });
}

const lines = (out: string): string[] => sortedSampleLines(readFileSync(join(out, 'samples.ndjson'), 'utf8'));

describe('syncring yield on the local pool', () => {
  test('one and two workers write the same samples; the summary holds the yield with its interval', async () => {
    const one = join(dir, 'one');
    const two = join(dir, 'two');
    const [a, b] = [
      await cli(['yield', study, '--out', one, '--workers', '1']),
      await cli(['yield', study, '--out', two, '--workers', '2']),
    ];
    expect(a.code, a.stderr).toBe(0);
    expect(b.code, b.stderr).toBe(0);
    const text = readFileSync(join(one, 'samples.ndjson'), 'utf8');
    expect(readFileSync(join(two, 'samples.ndjson'), 'utf8')).toBe(text);
    const records = text
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l) as { index: number; pass: boolean; full?: unknown });
    expect(records.map((r) => r.index)).toEqual(Array.from({ length: 48 }, (_, i) => i));
    expect(records.filter((r) => r.full !== undefined)).toHaveLength(2);
    const summary = JSON.parse(a.stdout) as {
      yield: { estimate: number; low: number; high: number; passed: number; samples: number; confidence: number; method: string };
      engine: { kind: string; workers: number };
      patterns: { label: string; count: number }[];
      fullSystem: { samples: number; agree: number };
      notes: { caution: string };
    };
    expect(summary).toEqual(JSON.parse(readFileSync(join(one, 'summary.json'), 'utf8')) as unknown as typeof summary);
    expect(summary.engine).toEqual({ kind: 'local', workers: 1 });
    expect(summary.yield.passed).toBe(records.filter((r) => r.pass).length);
    expect(summary.yield.samples).toBe(48);
    expect(summary.yield.method).toBe('wilson');
    expect(summary.yield.low).toBeLessThan(summary.yield.estimate);
    expect(summary.yield.high).toBeGreaterThan(summary.yield.estimate);
    expect(summary.patterns.reduce((s, p) => s + p.count, 0)).toBe(48);
    expect(summary.fullSystem.samples).toBe(2);
    expect(summary.notes.caution).toContain('not a measured production yield');
    const status = JSON.parse(readFileSync(join(one, 'status.json'), 'utf8')) as { state: string; done: number };
    expect(status).toMatchObject({ state: 'finished', done: 48 });
  });

  test('a coordinator killed mid-run resumes to the same samples', async () => {
    const out = join(dir, 'killed');
    const path = join(out, 'samples.ndjson');
    const killed = await cli(
      ['yield', study, '--out', out, '--workers', '1'],
      () => existsSync(path) && readFileSync(path, 'utf8').split('\n').length > 12,
    );
    expect(killed.signal).toBe('SIGKILL');
    const partial = readFileSync(path, 'utf8').split('\n').length - 1;
    expect(partial).toBeGreaterThan(0);
    expect(partial).toBeLessThan(48);
    // a torn last line, as a kill during a write leaves it
    writeFileSync(path, `${readFileSync(path, 'utf8')}{"index": ${partial}, "see`);
    const resumed = await cli(['yield', study, '--out', out, '--resume']);
    expect(resumed.code, resumed.stderr).toBe(0);
    expect(lines(out)).toEqual(lines(join(dir, 'one')));
    expect(readFileSync(path, 'utf8')).toBe(readFileSync(join(dir, 'one', 'samples.ndjson'), 'utf8'));
  });

  test('refuses a resume of another study, an existing folder without --resume, and bad fields, with exit code 2', async () => {
    const other = writeAdlerStudy(mkdtempSync(join(tmpdir(), 'syncring-yield-other-')), 48, { seed: 6 });
    const wrong = await cli(['yield', other, '--out', join(dir, 'one'), '--resume']);
    expect(wrong.code).toBe(2);
    expect(wrong.stderr).toContain('holds another study');
    const again = await cli(['yield', study, '--out', join(dir, 'one')]);
    expect(again.code).toBe(2);
    expect(again.stderr).toContain('--resume');
    const badDir = mkdtempSync(join(tmpdir(), 'syncring-yield-bad-'));
    const bad = writeAdlerStudy(badDir, 10, { tolerances: [{ parameter: 'detuning', distribution: 'normal', sigma: -1 }] });
    const refused = await cli(['yield', bad, '--out', join(badDir, 'out')]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain(`${bad}: tolerances[0].sigma: must be >= 0 (got -1)`);
    const inline = writeAdlerStudy(badDir, 10, { scenario: { nodes: 0 } });
    const inlineRefused = await cli(['yield', inline, '--out', join(badDir, 'out2')]);
    expect(inlineRefused.code).toBe(2);
    expect(inlineRefused.stderr).toContain('scenario.nodes');
    const workers = await cli(['yield', study, '--out', join(badDir, 'out3'), '--workers', '0']);
    expect(workers.code).toBe(2);
    expect(workers.stderr).toContain('--workers must be a positive integer');
  });

  test("predict --basins N adds each pattern's start-up probability; a bad N exits 2", async () => {
    const counted = await cli(['predict', 'ring-one-way-5', '--basins', '10']);
    expect(counted.code, counted.stderr).toBe(0);
    const output = JSON.parse(counted.stdout) as {
      patterns: { stability: string }[];
      basins: { starts: number; shares: { pattern: number; count: number; low: number; high: number }[]; unsettled: { count: number } };
    };
    expect(output.basins.starts).toBe(10);
    expect(output.basins.shares.reduce((s, b) => s + b.count, 0) + output.basins.unsettled.count).toBe(10);
    for (const share of output.basins.shares) expect(output.patterns[share.pattern].stability).toBe('stable');
    const refused = await cli(['predict', 'ring-one-way-5', '--basins', '0']);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain('--basins must be a whole number of starts');
  });

  test('--board INDEX gives the scenario of one sample, with its drawn detuning, to open live', async () => {
    const records = readFileSync(join(dir, 'one', 'samples.ndjson'), 'utf8')
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l) as { index: number; pass: boolean; parameters: Record<string, number>; startSeed: number });
    const failing = records.find((r) => !r.pass)!;
    const board = await cli(['yield', study, '--board', String(failing.index)]);
    expect(board.code, board.stderr).toBe(0);
    const scenario = JSON.parse(board.stdout) as { detuning: number[]; initial: { random: { seed: number } } };
    expect(scenario.detuning).toEqual([failing.parameters['detuning[0]'], failing.parameters['detuning[1]']]);
    expect(scenario.initial.random.seed).toBe(failing.startSeed);
    const file = join(dir, 'board.json');
    writeFileSync(file, board.stdout);
    const simulated = await cli(['simulate', file, '--until', '100']);
    expect(simulated.code, simulated.stderr).toBe(0);
    const outside = await cli(['yield', study, '--board', '48']);
    expect(outside.code).toBe(2);
    expect(outside.stderr).toContain('--board must be a sample index, 0 to 47');
  });
});
