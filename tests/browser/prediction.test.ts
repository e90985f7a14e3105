import { execFile } from 'node:child_process';
import { cpSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { serve } from '../../server/commands/serve.js';
import { CHROMIUM_PATH, chromiumAvailability, launchChromium } from './support/chromium.js';
import { ensureDashboardBuilt, ensureServerCompiled, ROOT } from './support/build.js';
import { collectPageErrors, numberIn, paintedPixels, textOf } from './support/dashboard-page.js';
import { adlerPairScenario } from '../support/adler-pair.js';

/**
 * The Prediction and Soaks views in a real Chromium against the real server on the demo board:
 * the catalogue of locked patterns, a what-if continuation drawn as a branch diagram while the
 * live run goes on untouched, and the soak list with progress, verdicts and the report link.
 * Writes docs/prediction.png and docs/soaks.png on the way.
 */

const { available, mustFail } = chromiumAvailability();
const TOKEN = 'prediction-test-token';
const VIEWPORT = { width: 1920, height: 1080 };
const DOCS = join(ROOT, 'docs');
const bin = join(ROOT, 'bin/syncring.js');

type Running = Awaited<ReturnType<typeof serve>>;

/**
 * A real soak of a locked pair (one fault at half the Adler locking limit, one at 2.5 times it,
 * one kick), about two seconds: Adler, Proc. IRE 34 (1946), locked while |dw| <= K. The soak
 * ends with exit code 1 because the second fault slips, as it must.
 */
async function pairSoak(work: string, out: string): Promise<void> {
  const scenario = join(work, 'pair.json');
  writeFileSync(scenario, JSON.stringify(adlerPairScenario()));
  const campaign = join(work, 'campaign.json');
  writeFileSync(
    campaign,
    JSON.stringify({
      name: 'pair: inside and beyond the locking limit, a kick',
      timeUnit: 'slow',
      detector: { lockWindow: 5 },
      criteria: { relockWithin: 40 },
      faults: [
        // kappa sigma = 0.05 is the limit in Delta_0
        { id: 'inside-limit', start: 20, action: 'set-detuning', params: { node: 0, delta: 0.025 }, duration: 15 },
        { id: 'beyond-limit', start: 80, action: 'set-detuning', params: { node: 0, delta: 0.125 }, duration: 60 },
        { id: 'kick-node-1', start: 190, action: 'kick-mode', params: { node: 1, mode: 0, amount: 0.5 } },
      ],
      stability: { uncoupledReference: false },
    }),
  );
  await new Promise<void>((resolve, reject) =>
    execFile(
      'node',
      [bin, 'soak', scenario, '--campaign', campaign, '--until', '24000', '--out', out],
      { cwd: ROOT, timeout: 60_000 },
      (error) => (error && (error as { code?: unknown }).code !== 1 ? reject(error) : resolve()),
    ),
  );
}

test.runIf(mustFail)('chromium is required when CI is set', () => {
  throw new Error(`BROWSER TESTS CANNOT RUN: ${CHROMIUM_PATH} not found and CI is set (install the chromium package)`);
});

describe.runIf(available)('prediction and soak views in Chromium', () => {
  let server: Running;
  let browser: Browser;
  let page: Page;
  let errors: string[];
  let soaksDir: string;
  let work: string;

  async function session(): Promise<{ coupling: { strength: number }; links: { weight: number }[]; detuning: number[] }> {
    return (await fetch(new URL('api/session', server.url))).json();
  }

  beforeAll(async () => {
    ensureServerCompiled();
    ensureDashboardBuilt();
    work = mkdtempSync(join(tmpdir(), 'syncring-prediction-'));
    soaksDir = join(work, 'soaks');
    mkdirSync(soaksDir);
    const finished = join(soaksDir, 'pair-locking-limits');
    await pairSoak(work, finished);
    // The same soak as if it were still running (status.json as the runner writes it, no summary).
    const running = join(soaksDir, 'pair-night-run');
    cpSync(finished, running, { recursive: true });
    rmSync(join(running, 'summary.json'));
    const status = JSON.parse(readFileSync(join(finished, 'status.json'), 'utf8')) as Record<string, unknown>;
    writeFileSync(
      join(running, 'status.json'),
      JSON.stringify({
        ...status,
        state: 'running',
        pid: process.pid,
        tau: 15600,
        slowTime: 156,
        fraction: 0.65,
        eta: '1.1 s',
        updatedAt: new Date().toISOString(),
      }),
    );
    server = await serve({ port: 0, token: TOKEN, logDir: null, speed: 'max', quiet: true, scenario: 'timing-board-8', soaksDir });
    browser = await launchChromium();
    mkdirSync(DOCS, { recursive: true });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
    if (work) rmSync(work, { recursive: true, force: true });
  });

  test('the prediction view lists the locked patterns with a stable in-phase one and marks the live one', async () => {
    page = await browser.newPage({ viewport: VIEWPORT });
    errors = collectPageErrors(page);
    await page.goto(`${server.operatorUrl}#prediction`);
    expect(await page.locator('nav.views button[aria-selected=true]').textContent()).toBe('Prediction');
    await page.locator('sr-catalogue-panel tbody tr').first().waitFor({ timeout: 30_000 });
    expect(await page.locator('sr-catalogue-panel tbody tr').count()).toBeGreaterThan(1);
    // dissipative coupling: in-phase (q = 0, cos 0 > 0) is stable (Wiley, Strogatz, Girvan 2006)
    expect(await page.locator('sr-catalogue-panel tr[data-kind=in-phase][data-stability=stable]').count()).toBeGreaterThan(0);
    expect(await textOf(page, '[data-testid=catalogue-facts]')).toMatch(/\d+ locked patterns, \d+ stable/);
    // the demo's unwanted mode sits 2995.5 ppm up at the load (its parts, docs/parts.md): its stable patterns are
    // design defects, and their output is read against the wanted frequency (+2996 ppm, 30 kHz at 10 MHz, shown to 3 digits)
    const defects = page.locator('sr-catalogue-panel tbody tr.defect');
    expect(await defects.count()).toBeGreaterThan(0);
    for (const row of await defects.all()) {
      expect(await row.textContent()).toMatch(/unwanted mode 1/);
      expect(await row.textContent()).toMatch(/DESIGN DEFECT/);
      expect(await row.textContent()).toMatch(/\+3000 ppm\s*\+30(\.0+)? kHz/);
    }
    expect(await page.locator('sr-catalogue-panel tbody tr:not(.defect)').first().textContent()).not.toMatch(/DESIGN DEFECT/);
    expect(await textOf(page, '[data-testid=catalogue-facts]')).toMatch(/\d+ of them on an unwanted mode/);
    // Once the board locks (in-phase, within a few tens of slow units) its row is marked live.
    const liveRow = page.locator('sr-catalogue-panel tr[data-live]');
    await liveRow.waitFor({ timeout: 45_000 });
    expect(await liveRow.getAttribute('data-kind')).toBe('in-phase');
    expect(await liveRow.textContent()).toMatch(/LIVE/);
  });

  test('a what-if draws the branch with a fold marker while the live run streams on untouched', async () => {
    const before = await session();
    const tau0 = await numberIn(page, '[data-testid=tau]');
    await page.locator('[data-testid=what-if-param]').selectOption('coupling');
    await page.locator('button[data-action=run-what-if]').click();
    await page.locator('[data-testid=what-if-headline]').waitFor({ timeout: 45_000 });
    const canvas = page.locator('sr-branch-chart canvas');
    await expect.poll(async () => Number(await canvas.getAttribute('data-points'))).toBeGreaterThan(20);
    // Below some coupling strength the locked state meets another branch and disappears (a fold).
    expect(Number(await canvas.getAttribute('data-limits'))).toBeGreaterThanOrEqual(1);
    expect(await textOf(page, '[data-testid=limit-lower]')).toMatch(/fold: the pattern disappears at κ = 0\.\d+/);
    expect(await paintedPixels(page, 'sr-branch-chart')).toBeGreaterThan(5000);
    // The live run kept streaming and its parameters are what they were.
    await expect.poll(() => numberIn(page, '[data-testid=tau]'), { timeout: 10_000 }).toBeGreaterThan(tau0);
    expect(await session()).toMatchObject({ coupling: before.coupling, detuning: before.detuning, links: before.links });
    await page.mouse.move(5, 1075);
    await page.waitForTimeout(300);
    await page.screenshot({ path: join(DOCS, 'prediction.png') });
    expect(errors).toEqual([]);
  });

  test('the soaks view shows progress, the verdict table, pass or fail and the report link', async () => {
    await page.locator('nav.views button[data-view=soaks]').click();
    await page.locator('sr-soak-panel button[data-soak]').first().waitFor({ timeout: 15_000 });
    expect(await page.locator('sr-soak-panel button[data-soak]').count()).toBe(2);
    // The running soak is chosen first.
    expect(await textOf(page, '[data-testid=soak-name]')).toBe('pair-night-run');
    expect(await textOf(page, '[data-testid=soak-verdict]')).toBe('RUNNING');
    expect(await textOf(page, '[data-testid=soak-progress]')).toBe('65 %');
    await page.locator('sr-soak-panel button[data-soak=pair-locking-limits]').click();
    await expect.poll(() => textOf(page, '[data-testid=soak-verdict]')).toBe('FAIL');
    const rows = page.locator('[data-testid=verdicts] tbody tr');
    expect(await rows.count()).toBe(3);
    expect(await page.locator('[data-testid=verdicts] tr[data-fault=inside-limit]').getAttribute('data-pass')).toBe('true');
    expect(await page.locator('[data-testid=verdicts] tr[data-fault=beyond-limit]').getAttribute('data-pass')).toBe('false');
    const href = await page.locator('[data-testid=soak-report]').getAttribute('href');
    const report = await fetch(new URL(href!, server.url));
    expect(report.status).toBe(200);
    expect(await report.text()).toMatch(/Soak report: Adler pair/);
    await page.mouse.move(5, 1075);
    await page.screenshot({ path: join(DOCS, 'soaks.png') });
    expect(errors).toEqual([]);
  });
});
