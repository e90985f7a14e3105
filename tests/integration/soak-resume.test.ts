import { describe, expect, test } from 'vitest';
import { execFile, spawn } from 'node:child_process';
import { appendFileSync, existsSync, mkdtempSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readSegments } from '../../server/log/segments.js';

/**
 * Kill a real soak process with SIGKILL in the middle, resume it, and compare with an
 * uninterrupted run of the same soak: same final state, verdicts and stability, and the same
 * log record for record (no duplicate, no gap). Checkpoints restore bit for bit, so this is an
 * exact comparison (common practice for deterministic replay).
 */
const root = new URL('../../', import.meta.url).pathname;
const bin = join(root, 'bin/syncring.js');

const dir = mkdtempSync(join(tmpdir(), 'syncring-resume-'));
const scenario = join(dir, 'ring.json');
const campaign = join(dir, 'campaign.json');
writeFileSync(
  scenario,
  JSON.stringify({
    name: 'ring of four for the resume test',
    nodes: 4,
    topology: 'ring-two-way',
    epsilon: 0.01,
    modes: [{ omega: 1, gain: 1, loss: 0 }],
    coupling: { strength: 0.1, reactive: 0.05, dissipative: 1 },
    detuning: [0.01, -0.005, 0.003, -0.008],
    noise: { intensity: 1e-6, seed: 77 },
    initial: { random: { seed: 5, amplitude: 1.5 } },
    integrator: { stepsPerPeriod: 8 },
  }),
);
writeFileSync(
  campaign,
  JSON.stringify({
    name: 'mixed faults',
    timeUnit: 'slow',
    criteria: { relockWithin: 50 },
    faults: [
      { id: 'detune-2', start: 80, action: 'set-detuning', params: { node: 2, delta: 0.04 }, duration: 20 },
      { id: 'open-1-2', start: 150, action: 'break-link', params: { from: 1, to: 2 }, duration: 15 },
    ],
    random: {
      seed: 99,
      from: 220,
      actions: [
        { action: 'set-detuning', rate: 0.01, duration: [5, 15], params: { node: 'any', delta: [-0.03, 0.03] } },
        { action: 'kick-mode', rate: 0.01, params: { node: 'any', mode: 0, amount: [0.05, 0.3], phase: [0, 6.28] } },
        { action: 'set-noise', rate: 0.005, duration: [5, 10], params: { intensity: [1e-6, 4e-6] } },
      ],
    },
  }),
);
const until = '50000';
const common = ['--campaign', campaign, '--segment-bytes', '65536', '--checkpoint-every', '2000'];

function cli(args: string[]): Promise<{ code: number | null; signal: NodeJS.Signals | null; stderr: string }> {
  return new Promise((resolve) => {
    execFile('node', [bin, ...args], { cwd: root, timeout: 120_000 }, (error, _stdout, stderr) => {
      const e = error as (Error & { code?: number; signal?: NodeJS.Signals }) | null;
      resolve({ code: e ? (e.code ?? null) : 0, signal: e?.signal ?? null, stderr });
    });
  });
}

const checkpoints = (out: string) => readSegments(join(out, 'log'), 'soak').records.filter((r) => r.record.record === 'checkpoint').length;

/** Records of a soak log without the header's wall-clock stamp. */
function records(out: string) {
  const read = readSegments(join(out, 'log'), 'soak');
  expect(read.problems).toEqual([]);
  return read.records.map((r) => (r.record.record === 'header' ? { ...r.record, createdAt: null } : r.record));
}

describe('a soak killed with SIGKILL and resumed', () => {
  test('ends in the same state with the same verdicts and the same log as an uninterrupted run', async () => {
    const straight = join(dir, 'straight');
    const first = await cli(['soak', scenario, ...common, '--until', until, '--out', straight]);
    expect(first.signal).toBeNull();
    const reference = JSON.parse(readFileSync(join(straight, 'summary.json'), 'utf8'));

    // the same soak, paced so that it is surely killed in the middle
    const killed = join(dir, 'killed');
    const child = spawn('node', [bin, 'soak', scenario, ...common, '--until', until, '--out', killed, '--pace', '120'], {
      cwd: root,
      stdio: 'ignore',
    });
    const exited = new Promise<NodeJS.Signals | null>((resolve) => child.on('exit', (_code, signal) => resolve(signal)));
    for (let waited = 0; waited < 60_000; waited += 100) {
      await new Promise((r) => setTimeout(r, 100));
      if (existsSync(join(killed, 'log')) && checkpoints(killed) >= 10) break;
    }
    child.kill('SIGKILL');
    expect(await exited).toBe('SIGKILL');
    expect(existsSync(join(killed, 'summary.json'))).toBe(false);
    const atKill = readSegments(join(killed, 'log'), 'soak');
    expect(atKill.records.some((r) => r.record.record === 'end')).toBe(false);
    // a report of the interrupted soak says so
    const partial = await cli(['report', killed]);
    expect(partial.code).toBe(0);
    expect(readFileSync(join(killed, 'report.html'), 'utf8')).toContain('NOT FINISHED');
    // and as if the kill had come in the middle of a write: a torn last line
    const segments = readdirSync(join(killed, 'log')).sort();
    appendFileSync(join(killed, 'log', segments.at(-1)!), '{"record":"soak-sample","tick":');

    const resumed = await cli(['soak', scenario, ...common, '--out', killed, '--resume']);
    expect(resumed.signal).toBeNull();
    expect(resumed.code).toBe(first.code);
    expect(resumed.stderr).toMatch(/resuming .* from tau/);
    const summary = JSON.parse(readFileSync(join(killed, 'summary.json'), 'utf8'));

    expect(summary.state).toEqual(reference.state);
    expect(summary.verdicts).toEqual(reference.verdicts);
    expect(summary.stability).toEqual(reference.stability);
    expect(summary.pass).toBe(reference.pass);
    expect(summary.verdicts.length).toBeGreaterThanOrEqual(3);
    expect(summary.resumes).toHaveLength(1);
    expect(summary.resumes[0].tornTailBytes).toBeGreaterThan(0);
    expect(summary.resumeCheck.mismatches).toBe(0);
    expect(summary.resumeCheck.recordsCompared).toBe(summary.resumes[0].discardedRecords);
    // status.json counts every verdict, those judged before the kill included
    const status = JSON.parse(readFileSync(join(killed, 'status.json'), 'utf8'));
    const straightStatus = JSON.parse(readFileSync(join(straight, 'status.json'), 'utf8'));
    expect(status.faults).toEqual(straightStatus.faults);
    expect(status.faults.judged).toBe(summary.verdicts.length);

    const a = records(straight);
    const b = records(killed);
    expect(b.map((r) => r.seq)).toEqual(b.map((_, i) => i));
    expect(b).toEqual(a);
    // the kill really cut the log: the resumed run wrote into new segments
    expect(readdirSync(join(killed, 'log')).length).toBeGreaterThan(segments.length - 1);

    // resuming a finished soak only rewrites its summary
    const again = await cli(['soak', scenario, ...common, '--out', killed, '--resume']);
    expect(again.code).toBe(first.code);
    expect(JSON.parse(readFileSync(join(killed, 'summary.json'), 'utf8')).state).toEqual(reference.state);
    expect(records(killed)).toEqual(a);
  });
});
