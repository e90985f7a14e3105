import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { serve } from '../../server/commands/serve.js';
import { CHROMIUM_PATH, chromiumAvailability, launchChromium } from './support/chromium.js';
import { ensureDashboardBuilt, ensureServerCompiled, ROOT } from './support/build.js';
import { collectPageErrors, textOf } from './support/dashboard-page.js';

/**
 * Starting soaks from the Soaks tab in a real Chromium against the real server: the operator
 * fills the form (a refused length first, its message beside the form), the soak appears,
 * runs and finishes with its verdict; a second, paced one is stopped, resumed and stopped with
 * the buttons. A viewer's page has neither form nor buttons. Writes docs/soaks-start.png.
 * 62 slow time units of the built-in timing-board-8 campaign reach its first fault (at 60).
 */

const { available, mustFail } = chromiumAvailability();
const TOKEN = 'soak-start-test-token';
const VIEWPORT = { width: 1920, height: 1080 };
const DOCS = join(ROOT, 'docs');

type Running = Awaited<ReturnType<typeof serve>>;

test.runIf(mustFail)('chromium is required when CI is set', () => {
  throw new Error(`BROWSER TESTS CANNOT RUN: ${CHROMIUM_PATH} not found and CI is set (install the chromium package)`);
});

describe.runIf(available)('starting soaks from the dashboard in Chromium', () => {
  let server: Running;
  let browser: Browser;
  let page: Page;
  let errors: string[];
  let work: string;
  let soaksDir: string;
  let first = '';

  beforeAll(async () => {
    ensureServerCompiled();
    ensureDashboardBuilt();
    work = mkdtempSync(join(tmpdir(), 'syncring-soak-start-'));
    soaksDir = join(work, 'soaks');
    // the live run barely moves: the cores are for the soaks
    server = await serve({ port: 0, token: TOKEN, logDir: null, speed: 0.01, quiet: true, scenario: 'timing-board-8', soaksDir });
    browser = await launchChromium();
    mkdirSync(DOCS, { recursive: true });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
    // end exactly the soaks this test started, should one still run
    for (const name of soaksDir && existsSync(soaksDir) ? readdirSync(soaksDir) : []) {
      const file = join(soaksDir, name, 'start.json');
      if (!existsSync(file)) continue;
      try {
        process.kill(-(JSON.parse(readFileSync(file, 'utf8')) as { pid: number }).pid, 'SIGKILL');
      } catch {
        // already ended
      }
    }
    if (work) rmSync(work, { recursive: true, force: true });
  });

  test('the operator starts a soak from the form; it appears, runs and finishes with its verdict', async () => {
    page = await browser.newPage({ viewport: VIEWPORT });
    errors = collectPageErrors(page);
    await page.goto(`${server.operatorUrl}#soaks`);
    const form = page.locator('sr-soak-start-form [data-testid=soak-start-form]');
    await form.waitFor({ timeout: 15_000 });
    await expect.poll(() => page.locator('[data-testid=soak-start-name]').inputValue()).toMatch(/^timing-board-8-\d{4}-\d{4}$/);
    expect(await page.locator('[data-testid=soak-start-campaign]').inputValue()).toBe('timing-board-8-campaign');
    expect(await page.locator('[data-testid=soak-start-scenario]').inputValue()).toBe('timing-board-8');
    // the campaign's faults name nodes a pair does not have
    expect(await page.locator('[data-testid=soak-start-scenario] option[value=pair-adler]').isDisabled()).toBe(true);
    expect(await textOf(page, '[data-testid=soak-start-hint]')).toMatch(/no earlier soak of this scenario/);

    await page.locator('[data-testid=soak-start-until]').fill('-3');
    await page.locator('button[data-action=start-soak]').click();
    await expect
      .poll(() => textOf(page, '[data-testid=soak-start-error]'))
      .toBe('until: must be a positive number of slow time units (got -3)');
    expect(await page.locator('sr-soak-panel button[data-soak]').count()).toBe(0);

    first = await page.locator('[data-testid=soak-start-name]').inputValue();
    await page.locator('[data-testid=soak-start-until]').fill('62');
    await page.locator('button[data-action=start-soak]').click();
    await page.locator(`sr-soak-panel button[data-soak="${first}"]`).waitFor({ timeout: 10_000 });
    expect(await page.locator('[data-testid=soak-start-error]').count()).toBe(0);
    expect(await textOf(page, '[data-testid=soak-name]')).toBe(first);
    await expect.poll(() => textOf(page, '[data-testid=soak-verdict]'), { timeout: 15_000 }).toMatch(/^(STARTING|RUNNING)$/);
    expect(await page.locator('button[data-action=stop-soak]').count()).toBe(1);
    // a fresh default name for the next one
    expect(await page.locator('[data-testid=soak-start-name]').inputValue()).not.toBe(first);
    await expect.poll(() => textOf(page, '[data-testid=soak-verdict]'), { timeout: 15_000 }).toBe('RUNNING');
    await expect
      .poll(async () => Number((await textOf(page, '[data-testid=soak-progress]')).replace(/[^\d.]/g, '')), { timeout: 20_000 })
      .toBeGreaterThan(0);
  });

  test('a paced soak is stopped, resumed and stopped again with the buttons', async () => {
    const second = await page.locator('[data-testid=soak-start-name]').inputValue();
    await page.locator('[data-testid=soak-start-until]').fill('62');
    await page.locator('[data-testid=soak-start-pace]').fill('2');
    await page.locator('button[data-action=start-soak]').click();
    await page.locator(`sr-soak-panel button[data-soak="${second}"]`).waitFor({ timeout: 10_000 });
    expect(await textOf(page, '[data-testid=soak-name]')).toBe(second);
    await expect.poll(() => textOf(page, '[data-testid=soak-verdict]'), { timeout: 15_000 }).toBe('RUNNING');

    await page.locator('button[data-action=stop-soak]').click();
    await expect.poll(() => textOf(page, '[data-testid=soak-action-result]'), { timeout: 10_000 }).toMatch(/^Stopped \(SIGTERM\)/);
    await expect.poll(() => textOf(page, '[data-testid=soak-verdict]'), { timeout: 10_000 }).toBe('INTERRUPTED');
    expect(await page.locator('button[data-action=stop-soak]').count()).toBe(0);
    await page.locator('button[data-action=resume-soak]').click();
    await expect.poll(() => textOf(page, '[data-testid=soak-action-result]'), { timeout: 10_000 }).toMatch(/^Resumed as pid \d+/);
    await expect.poll(() => textOf(page, '[data-testid=soak-verdict]'), { timeout: 15_000 }).toBe('RUNNING');
    const start = JSON.parse(readFileSync(join(soaksDir, second, 'start.json'), 'utf8')) as { runs: { resume: boolean; pace: number }[] };
    expect(start.runs.map((r) => [r.resume, r.pace])).toEqual([
      [false, 2],
      [true, 2],
    ]);
    await page.locator('button[data-action=stop-soak]').click();
    await expect.poll(() => textOf(page, '[data-testid=soak-verdict]'), { timeout: 10_000 }).toBe('INTERRUPTED');
  });

  test('the first soak finishes with its verdict; the form then tells the wall time from its rate', async () => {
    await page.locator(`sr-soak-panel button[data-soak="${first}"]`).click();
    // one fault judged: it began at 60 and the soak ended before its evaluation window closed,
    // so it is INCOMPLETE, which does not fail the soak
    await expect.poll(() => textOf(page, '[data-testid=soak-verdict]'), { timeout: 120_000, interval: 500 }).toBe('PASS');
    const row = page.locator('[data-testid=verdicts] tr[data-fault=warm-part-3]');
    expect(await row.getAttribute('data-outcome')).toBe('incomplete');
    expect(await row.locator('.badge').textContent()).toBe('INCOMPLETE');
    expect(await row.locator('.notes').textContent()).toMatch(
      /^undecided when judging stopped: less than a lock window had passed since the fault$/,
    );
    expect(await textOf(page, '[data-testid=soak-progress]')).toBe('100 %');
    expect(await page.locator('button[data-action=stop-soak], button[data-action=resume-soak]').count()).toBe(0);
    await page.locator('[data-testid=soak-start-until]').fill('300');
    await page.locator('[data-testid=soak-start-pace]').fill('');
    await expect
      .poll(() => textOf(page, '[data-testid=soak-start-hint]'))
      .toMatch(new RegExp(`^≈ .+ of wall time at [\\d.]+ slow units/s \\(measured on ${first}\\)$`));
    await page.locator('[data-testid=soak-start-pace]').blur();
    await page.mouse.move(5, 1075);
    await page.screenshot({ path: join(DOCS, 'soaks-start.png') });
    // the refused start answered 400, which Chromium logs; nothing else went wrong
    expect(errors.filter((e) => !/status of 400/.test(e))).toEqual([]);
  });

  test('a viewer sees the soaks but no form and no buttons', async () => {
    const viewer = await browser.newPage({ viewport: VIEWPORT });
    const viewerErrors = collectPageErrors(viewer);
    await viewer.goto(`${server.url}#soaks`);
    await viewer.locator('sr-soak-panel button[data-soak]').first().waitFor({ timeout: 15_000 });
    expect(await viewer.locator('sr-soak-panel button[data-soak]').count()).toBe(2);
    await viewer.locator('sr-soak-panel button[data-soak]').nth(1).click();
    await viewer.locator('[data-testid=soak-verdict]').waitFor();
    expect(await viewer.locator('sr-soak-start-form').count()).toBe(0);
    expect(await viewer.locator('sr-soak-panel button[data-action]').count()).toBe(0);
    await viewer.close();
    expect(viewerErrors).toEqual([]);
  });
});
