import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { spawnSync } from 'node:child_process';
import { cpSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { serve, type RunningServer } from '../../server/commands/serve.js';
import { TestClient } from '../support/ws-client.js';
import { runPairSoak } from '../support/pair-soak.js';

/**
 * The dashboard's prediction and soak endpoints on a real server (port 0) running the demo board:
 * the catalogue for the live parameters (computed off the event loop, cached, recomputed after a
 * fault), what-if errors that name the bad field, a continuation, and the soak listing with a
 * real soak run through the CLI beside hand-written status files.
 */

interface Pattern {
  index: number;
  kind: string;
  q?: number;
  mode: number;
  stable: boolean | null;
  stability: string;
  margin: number;
}
interface Catalogue {
  fingerprint: string;
  fromCache: boolean;
  computedFor: { detuningPpm: number[]; links: { from: number; to: number; weight: number }[] };
  group: { order: number; graphOrder: number };
  patterns: Pattern[];
}

async function getJson<T>(url: string): Promise<{ status: number; body: T }> {
  const response = await fetch(url);
  return { status: response.status, body: (await response.json()) as T };
}

describe('prediction and soak API', () => {
  let server: RunningServer;
  let base: string;
  let soaksDir: string;

  beforeAll(async () => {
    soaksDir = mkdtempSync(join(tmpdir(), 'syncring-soaks-'));
    // A slow pace: the live run only has to exist, and the machine is shared.
    server = await serve({ port: 0, scenario: 'timing-board-8', token: 'op-secret', logDir: null, speed: 0.5, quiet: true, soaksDir });
    base = server.url;
  });
  afterAll(async () => {
    await server?.close();
    if (soaksDir) rmSync(soaksDir, { recursive: true, force: true });
  });

  test('the catalogue for the live parameters has a stable in-phase pattern and is computed off the event loop', async () => {
    let catalogueDone = false;
    const pending = getJson<Catalogue>(new URL('api/catalogue', base).href).then((r) => ((catalogueDone = true), r));
    // While the worker computes (seconds), the event loop still answers: if the catalogue ran on
    // it, these requests would only be served after it.
    for (let i = 0; i < 3; i++) expect((await fetch(new URL('api/health', base))).ok).toBe(true);
    expect(catalogueDone).toBe(false);
    const { status, body } = await pending;
    expect(status).toBe(200);
    expect(body.patterns.length).toBeGreaterThan(1);
    // Dissipative coupling (sigma = 1 > 0, rho = 0.2): the twisted state q is stable iff
    // cos(2 pi q / N) > 0 (Wiley, Strogatz, Girvan, Chaos 16, 015103, 2006), so in-phase (q = 0)
    // on the wanted mode must be in the catalogue as stable, with a negative margin.
    const inPhase = body.patterns.find((p) => p.kind === 'in-phase' && p.mode === 0);
    expect(inPhase).toBeDefined();
    expect(inPhase!.stable).toBe(true);
    expect(inPhase!.margin).toBeLessThan(0);
    // computed for what the live session has now
    const session = (await getJson<{ detuningPpm: number[] }>(new URL('api/session', base).href)).body;
    expect(body.computedFor.detuningPpm).toEqual(session.detuningPpm);
    const again = await getJson<Catalogue>(new URL('api/catalogue', base).href);
    expect(again.body.fromCache).toBe(true);
    expect(again.body.fingerprint).toBe(body.fingerprint);
  });

  test('a fault in the live run gives a new catalogue for the new parameters', async () => {
    const before = (await getJson<Catalogue>(new URL('api/catalogue', base).href)).body;
    const operator = await TestClient.connect(`${base.replace('http', 'ws')}ws?token=op-secret`);
    await operator.next('hello');
    operator.command({ action: 'break-link', from: 0, to: 1, id: 1 });
    await operator.next('status', (m) => m.session.links.some((l) => l.from === 0 && l.to === 1 && l.weight === 0));
    const after = (await getJson<Catalogue>(new URL('api/catalogue', base).href)).body;
    expect(after.fingerprint).not.toBe(before.fingerprint);
    expect(after.fromCache).toBe(false);
    expect(after.computedFor.links.find((l) => l.from === 0 && l.to === 1)?.weight).toBe(0);
    // The two-way ring of 8 is invariant under D_8 of order 16 (Golubitsky and Stewart, The
    // Symmetry Perspective, 2002); one direction of one link gone breaks the graph's symmetry.
    expect(before.group.graphOrder).toBe(16);
    expect(after.group.graphOrder).toBeLessThan(16);
    // Restored: the parameters are the first ones again, and so is the (cached) catalogue.
    operator.command({ action: 'restore-link', from: 0, to: 1, id: 2 });
    // (earlier status messages also have every link intact: ask the session instead)
    const linkWeight = async () =>
      (await getJson<Catalogue['computedFor']>(new URL('api/session', base).href)).body.links.find((l) => l.from === 0 && l.to === 1)
        ?.weight;
    await expect.poll(linkWeight, { timeout: 15_000 }).toBe(1);
    operator.ws.close();
    const restored = (await getJson<Catalogue>(new URL('api/catalogue', base).href)).body;
    expect(restored.fingerprint).toBe(before.fingerprint);
    expect(restored.fromCache).toBe(true);
  });

  test('what-if errors are 400 and name the bad field', async () => {
    const cases: [string, RegExp][] = [
      ['param=bogus', /param=bogus: unknown parameter "bogus"/],
      ['param=detuning:99', /param=detuning:99: node 99 does not exist/],
      ['param=link:0-5', /param=link:0-5: there is no link from node 0 to node 5/],
      ['', /param is required/],
      ['param=coupling&pattern=abc', /pattern must be an integer/],
      ['param=coupling&maxSteps=0', /maxSteps must be an integer from 1 to 1000/],
      ['param=coupling&range=1:0', /range: MIN must be below MAX/],
      ['param=coupling&pattern=999', /pattern must be an index 0\.\.\d+/],
    ];
    for (const [query, message] of cases) {
      const { status, body } = await getJson<{ error: string }>(new URL(`api/what-if?${query}`, base).href);
      expect({ query, status }).toEqual({ query, status: 400 });
      expect(body.error).toMatch(message);
    }
  });

  test('a what-if continues the chosen pattern from the live value within the range', async () => {
    const catalogue = (await getJson<Catalogue>(new URL('api/catalogue', base).href)).body;
    const index = catalogue.patterns.findIndex((p) => p.kind === 'in-phase' && p.mode === 0 && p.stable);
    expect(index).toBeGreaterThanOrEqual(0);
    const { status, body } = await getJson<{
      continuation: {
        pattern: { index: number };
        start: number;
        branch: { parameter: number }[];
        limits: Record<string, { kind: string; parameter: number } | null>;
      };
    }>(new URL(`api/what-if?param=coupling&pattern=${index}&range=0.1:0.5&maxSteps=40`, base).href);
    expect(status).toBe(200);
    const c = body.continuation;
    expect(c.pattern.index).toBe(index);
    // The live coupling strength of the demo board: 2 P / eps for the 1.5013 ppm its shared
    // 5.8 ohm + 13.7 nF branches pull (docs/parts.md, 'Coupling network'; tests/unit/scenario/builtins.test.ts).
    expect(c.start).toBeCloseTo(0.3, 3);
    expect(c.branch.length).toBeGreaterThan(4);
    for (const p of c.branch) {
      expect(p.parameter).toBeGreaterThanOrEqual(0.1 - 1e-9);
      expect(p.parameter).toBeLessThanOrEqual(0.5 + 1e-9);
    }
    expect(Math.min(...c.branch.map((p) => p.parameter))).toBeLessThan(0.3);
    expect(Math.max(...c.branch.map((p) => p.parameter))).toBeGreaterThan(0.3);
  });

  test('/api/soaks lists running, interrupted and finished soaks; reports are served', async () => {
    const work = mkdtempSync(join(tmpdir(), 'syncring-soak-work-'));
    try {
      const finished = join(soaksDir, 'pair-finished');
      const { code } = await runPairSoak(work, finished);
      const summary = JSON.parse(readFileSync(join(finished, 'summary.json'), 'utf8')) as {
        pass: boolean;
        verdicts: { id: string; pass: boolean }[];
      };
      // inside the Adler limit the pattern persists: the soak passes with exit code 0
      expect(code).toBe(0);
      expect(summary.pass).toBe(true);

      // The same soak as if it were still running: status.json as the runner writes it while it
      // runs (only ids and pass in its verdicts), no summary yet; the verdicts come from the log.
      const running = join(soaksDir, 'pair-running');
      cpSync(finished, running, { recursive: true });
      rmSync(join(running, 'summary.json'));
      const status = (pid: number, fraction: number) => ({
        state: 'running',
        pid,
        tau: 6000 * fraction,
        until: 6000,
        slowTime: 60 * fraction,
        slowUntil: 60,
        fraction,
        wallSeconds: 1.5,
        eta: '3.0 s',
        faults: { started: 1, judged: 1, failed: summary.verdicts.filter((v) => !v.pass).length },
        verdicts: summary.verdicts.map((v) => ({ id: v.id, pass: v.pass })),
        updatedAt: new Date().toISOString(),
      });
      writeFileSync(join(running, 'status.json'), JSON.stringify(status(process.pid, 0.5)));

      // A soak whose process is gone (a finished child's pid) is reported as interrupted.
      const gone = spawnSync('node', ['-e', '0']).pid;
      mkdirSync(join(soaksDir, 'pair-killed'));
      writeFileSync(join(soaksDir, 'pair-killed', 'status.json'), JSON.stringify(status(gone, 0.25)));
      // Not a soak: ignored.
      mkdirSync(join(soaksDir, 'notes'));

      const { status: code200, body } = await getJson<{
        soaks: {
          name: string;
          state: string;
          pass: boolean | null;
          nominalFrequency: { hz: number; assumed: boolean } | null;
          progress: { fraction: number; slowTime: number } | null;
          verdicts: { id: string; pass: boolean; action?: string }[];
          report: { url: string };
        }[];
      }>(new URL('api/soaks', base).href);
      expect(code200).toBe(200);
      const byName = new Map(body.soaks.map((s) => [s.name, s]));
      expect([...byName.keys()].sort()).toEqual(['pair-finished', 'pair-killed', 'pair-running']);
      const done = byName.get('pair-finished')!;
      expect(done.state).toBe('finished');
      expect(done.pass).toBe(summary.pass);
      expect(done.progress?.fraction).toBe(1);
      // the pair's scenario gives no nominal frequency: its seconds rest on the 10 MHz default
      expect(done.nominalFrequency).toEqual({ hz: 10e6, assumed: true });
      expect(done.verdicts.map((v) => [v.id, v.pass])).toEqual(summary.verdicts.map((v) => [v.id, v.pass]));
      const live = byName.get('pair-running')!;
      expect(live.state).toBe('running');
      expect(live.pass).toBeNull();
      expect(live.progress).toMatchObject({ fraction: 0.5, slowTime: 30 });
      // full verdicts read from the log, not just the ids and pass of status.json
      expect(live.verdicts.map((v) => [v.id, v.pass, v.action])).toEqual(summary.verdicts.map((v) => [v.id, v.pass, 'set-detuning']));
      expect(byName.get('pair-killed')!.state).toBe('interrupted');

      const report = await fetch(new URL(live.report.url, base));
      expect(report.status).toBe(200);
      expect(report.headers.get('content-type')).toMatch(/text\/html/);
      expect(await report.text()).toMatch(/Soak report: Adler pair[\s\S]*NOT FINISHED/);
      const noLog = await fetch(new URL(byName.get('pair-killed')!.report.url, base));
      expect(noLog.status).toBe(404);
      expect(await noLog.text()).toMatch(/no soak log here/);
      expect((await fetch(new URL('soaks/..%2F..%2Fetc/report.html', base))).status).toBe(404);
    } finally {
      rmSync(work, { recursive: true, force: true });
    }
  });
});
