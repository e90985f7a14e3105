import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { request as httpRequest } from 'node:http';
import { join } from 'node:path';
import { serve, type RunningServer } from '../../server/commands/serve.js';
import type { SoakListing } from '../../src/protocol/soak-files.js';
import { sleep } from '../support/ws-client.js';

/**
 * Soaks started, stopped and resumed over HTTP (server/http/soak-control.ts) as real detached
 * `syncring soak` processes of the built-in timing-board-8 campaign. 62 slow time units reach the
 * campaign's first fault (at 60), so each soak ends with one verdict after some 10-30 s. A soak
 * stopped and resumed must end in the same state with the same verdicts as one run straight
 * through: checkpoints restore bit for bit (common practice for deterministic replay; the CLI
 * side of it is tests/integration/soak-resume.test.ts).
 */
const TOKEN = 'soak-control-token';
const UNTIL = 62;

describe('starting, stopping and resuming soaks over HTTP', () => {
  let server: RunningServer;
  let soaksDir: string;

  // the live run barely moves (speed 0.01): the two cores are for the soaks
  const open = () => serve({ port: 0, token: TOKEN, logDir: null, speed: 0.01, quiet: true, scenario: 'timing-board-8', soaksDir });
  const url = (path: string) => new URL(path, server.url);
  function post(path: string, body?: unknown, headers: Record<string, string> = {}): Promise<Response> {
    return fetch(url(path), {
      method: 'POST',
      headers: { 'Content-Type': 'application/json', Authorization: `Bearer ${TOKEN}`, ...headers },
      body: body === undefined ? undefined : typeof body === 'string' ? body : JSON.stringify(body),
    });
  }
  async function answer(response: Response): Promise<{ status: number; error?: string } & Record<string, unknown>> {
    expect(response.headers.get('content-type')).toMatch(/application\/json/);
    return { status: response.status, ...((await response.json()) as Record<string, unknown>) };
  }
  async function soaks(): Promise<SoakListing[]> {
    return ((await (await fetch(url('api/soaks'))).json()) as { soaks: SoakListing[] }).soaks;
  }
  async function until(name: string, ok: (s: SoakListing) => boolean, ms: number): Promise<SoakListing> {
    const deadline = Date.now() + ms;
    for (;;) {
      const soak = (await soaks()).find((s) => s.name === name);
      if (soak && ok(soak)) return soak;
      if (Date.now() > deadline) throw new Error(`${name} did not get there in ${ms} ms: ${JSON.stringify(soak ?? null).slice(0, 600)}`);
      await sleep(200);
    }
  }
  const summaryOf = (name: string) => JSON.parse(readFileSync(join(soaksDir, name, 'summary.json'), 'utf8'));

  beforeAll(async () => {
    soaksDir = join(mkdtempSync(join(tmpdir(), 'syncring-soak-control-')), 'soaks');
    server = await open();
  });

  afterAll(async () => {
    await server?.close();
    // a failed test may leave soaks of its own running: end exactly those
    for (const name of existsSync(soaksDir) ? readdirSync(soaksDir) : []) {
      const file = join(soaksDir, name, 'start.json');
      if (!existsSync(file)) continue;
      const { pid } = JSON.parse(readFileSync(file, 'utf8')) as { pid: number };
      try {
        process.kill(-pid, 'SIGKILL');
      } catch {
        // already ended
      }
    }
    rmSync(join(soaksDir, '..'), { recursive: true, force: true });
  });

  test('GET /api/campaigns lists the built-in campaign with its title and the scenarios it fits', async () => {
    const campaigns = (await (await fetch(url('api/campaigns'))).json()) as { name: string; title: string; scenarios: string[] }[];
    const board = campaigns.find((c) => c.name === 'timing-board-8-campaign');
    expect(board?.title).toMatch(/^Timing board soak/);
    expect(board?.scenarios).toContain('timing-board-8');
    // its faults name node 5 and the link 3 -> 4: not in a pair
    expect(board?.scenarios).not.toContain('pair-adler');
  });

  test('refuses without the token (401), from another site (403), and names the bad field (400)', async () => {
    const good = { name: 'never', scenario: 'timing-board-8', campaign: 'timing-board-8-campaign', until: UNTIL };
    const noToken = await answer(
      await fetch(url('api/soaks'), { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(good) }),
    );
    expect(noToken.status).toBe(401);
    expect(noToken.error).toMatch(/operator token/);
    expect((await answer(await post('api/soaks', good, { Authorization: 'Bearer not-the-token' }))).status).toBe(401);
    const foreign = await answer(await post('api/soaks', good, { Origin: 'http://elsewhere.example' }));
    expect(foreign.status).toBe(403);
    expect(foreign.error).toMatch(/Origin http:\/\/elsewhere\.example is not allowed/);
    // DNS rebinding: a page of another name that resolves to this machine (fetch cannot set Host)
    const rebound = await new Promise<{ status: number; body: string }>((resolve, reject) => {
      const request = httpRequest(
        url('api/soaks'),
        { method: 'POST', headers: { Host: 'rebound.example', 'Content-Type': 'application/json', Authorization: `Bearer ${TOKEN}` } },
        (response) => {
          let body = '';
          response.on('data', (chunk) => (body += chunk));
          response.on('end', () => resolve({ status: response.statusCode ?? 0, body }));
        },
      );
      request.on('error', reject);
      request.end(JSON.stringify(good));
    });
    expect(rebound.status).toBe(403);
    expect(JSON.parse(rebound.body).error).toMatch(/Host rebound\.example is not this server/);

    const bad: [unknown, RegExp][] = [
      [{ ...good, until: -3 }, /^until: must be a positive number of slow time units \(got -3\)$/],
      [{ ...good, until: 'long' }, /^until: must be a positive number of slow time units \(got string "long"\)$/],
      [{ ...good, until: undefined }, /^until: is required$/],
      [{ ...good, name: '../escape' }, /^name: must be 1 to \d+ letters/],
      [{ ...good, name: 7 }, /^name: must be a string \(got 7\)$/],
      [{ ...good, name: undefined }, /^name: is required$/],
      [
        { ...good, scenario: 'no-such-board' },
        /^scenario: must be a built-in scenario, one of timing-board-8, .* \(got string "no-such-board"\)$/,
      ],
      [{ ...good, campaign: 'faults.json' }, /^campaign: must be a built-in campaign, one of timing-board-8-campaign/],
      [{ ...good, scenario: 'pair-adler' }, /^campaign: timing-board-8-campaign does not fit scenario pair-adler: .*node/],
      [{ ...good, pace: 0 }, /^pace: must be a positive number of slow time units per second/],
      [{ ...good, colour: 'red' }, /^body\.colour: unknown field/],
      [[good], /^body: must be an object \(got an array\)$/],
      ['{"name": "half', /^body: not valid JSON/],
    ];
    for (const [body, message] of bad) {
      const reply = await answer(await post('api/soaks', body));
      expect(reply.status, JSON.stringify(body)).toBe(400);
      expect(reply.error).toMatch(message);
    }
    const plain = await answer(await post('api/soaks', JSON.stringify(good), { 'Content-Type': 'text/plain' }));
    expect(plain.status).toBe(400);
    expect(plain.error).toMatch(/^body: send the soak as a JSON object/);
    const huge = await answer(await post('api/soaks', { ...good, name: 'x'.repeat(5000) }));
    expect(huge.status).toBe(413);
    expect(huge.error).toMatch(/^body: larger than/);
    // nothing was started, and viewers still list
    expect(existsSync(join(soaksDir, 'never'))).toBe(false);
    expect((await fetch(url('api/soaks'))).status).toBe(200);
    // stop and resume name the soak they cannot find
    expect((await answer(await post('api/soaks/nowhere/stop'))).status).toBe(404);
    expect((await answer(await post('api/soaks/nowhere/resume'))).status).toBe(404);
  });

  test('a soak runs to its verdicts; another is stopped after a server restart and resumed to the same end; a third is one too many', async () => {
    // scenario left out: the live session's built-in one
    const straight = await answer(await post('api/soaks', { name: 'straight', campaign: 'timing-board-8-campaign', until: UNTIL }));
    expect(straight).toMatchObject({ status: 202, scenario: 'timing-board-8', untilSlow: UNTIL, until: 6.2e6, pace: null });
    const paced = await answer(
      await post('api/soaks', { name: 'paced', scenario: 'timing-board-8', campaign: 'timing-board-8-campaign', until: UNTIL, pace: 3 }),
    );
    expect(paced.status).toBe(202);
    const again = await answer(await post('api/soaks', { name: 'straight', campaign: 'timing-board-8-campaign', until: 5 }));
    expect(again.status).toBe(409);
    expect(again.error).toMatch(/^name: a soak named "straight" already exists/);
    const third = await answer(await post('api/soaks', { name: 'third', campaign: 'timing-board-8-campaign', until: 5 }));
    expect(third.status).toBe(429);
    expect(third.error).toMatch(/at most 2 run at once/);
    expect(existsSync(join(soaksDir, 'third'))).toBe(false);

    // the paced soak gets past a few checkpoints (1/64 of the soak each)
    await until('paced', (s) => s.state === 'running' && (s.progress?.slowTime ?? 0) > 4, 30_000);
    // it is a process of its own: it outlives the server that started it
    await server.close();
    server = await open();
    const survived = await until('paced', (s) => s.state === 'running', 5_000);
    expect(survived.launch).toMatchObject({
      scenario: 'timing-board-8',
      campaign: 'timing-board-8-campaign',
      untilSlow: UNTIL,
      pace: 3,
      runs: 1,
      alive: true,
    });
    expect((await answer(await post('api/soaks/paced/resume'))).status).toBe(409);
    expect((await answer(await post('api/soaks/paced/stop', undefined, { Authorization: '' }))).status).toBe(401);

    const stopped = await answer(await post('api/soaks/paced/stop'));
    expect(stopped).toMatchObject({ status: 200, signal: 'SIGTERM', state: 'interrupted', resumable: true });
    expect(stopped.note).toMatch(/does not catch SIGTERM/);
    const interrupted = await until('paced', (s) => s.state === 'interrupted', 5_000);
    expect(interrupted.progress!.fraction).toBeLessThan(1);
    expect(existsSync(join(soaksDir, 'paced', 'summary.json'))).toBe(false);
    expect((await answer(await post('api/soaks/paced/stop'))).status).toBe(409);
    expect((await answer(await post('api/soaks/paced/resume', { pace: -1 }))).error).toMatch(/^pace: must be a positive number/);

    // on at full speed
    const resumed = await answer(await post('api/soaks/paced/resume', { pace: null }));
    expect(resumed).toMatchObject({ status: 202, resume: true, pace: null });
    expect((await answer(await post('api/soaks/paced/resume'))).status).toBe(409);

    const [a, b] = await Promise.all([
      until('straight', (s) => s.state === 'finished', 90_000),
      until('paced', (s) => s.state === 'finished', 90_000),
    ]);
    expect(a.verdicts.map((v) => v.id)).toEqual(['warm-part-3']);
    expect(b.verdicts.map((v) => [v.id, v.pass])).toEqual(a.verdicts.map((v) => [v.id, v.pass]));
    expect(b.exitCode).toBe(a.exitCode);
    expect(b.launch?.runs).toBe(2);
    const reference = summaryOf('straight');
    const continued = summaryOf('paced');
    expect(continued.resumes).toHaveLength(1);
    expect(continued.resumes[0].fromTau).toBeGreaterThan(0);
    expect(continued.resumeCheck.mismatches).toBe(0);
    expect(continued.state).toEqual(reference.state);
    expect(continued.verdicts).toEqual(reference.verdicts);
    // the output went to the soak's folder
    expect(readFileSync(join(soaksDir, 'paced', 'soak.err'), 'utf8')).toMatch(/resuming .* from tau/);
    // the soak ends 2 slow units into the fault's window: INCOMPLETE, which does not fail the soak
    expect(readFileSync(join(soaksDir, 'straight', 'soak.out'), 'utf8')).toMatch(/"exitCode":0,.*"incomplete":1/);
    // a finished soak is neither stopped nor resumed
    expect((await answer(await post('api/soaks/straight/resume'))).error).toMatch(/is finished: only an interrupted soak can be resumed/);
  });
});
