import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { serve } from '../../server/commands/serve.js';
import { CHROMIUM_PATH, chromiumAvailability, launchChromium } from './support/chromium.js';
import { ensureDashboardBuilt, ensureServerCompiled } from './support/build.js';
import { collectPageErrors, textOf } from './support/dashboard-page.js';
import { runPairSoak } from '../support/pair-soak.js';

/**
 * Labels a timing engineer reads, in a real Chromium against the real server: the lock chart's
 * R ticks as placed, symbols in the upper-case chart titles in their own case, seconds that say
 * they assume 10 MHz for a scenario without nominalFrequencyHz (the built-in ring-one-way-5
 * gives none), and the caution beside a PASS in the Soaks tab (a passing pair soak, also
 * without a nominal frequency).
 */

const { available, mustFail } = chromiumAvailability();
const TOKEN = 'labels-test-token';
const VIEWPORT = { width: 1920, height: 1080 };
const ASSUMED = /at an assumed 10 MHz/;

type Running = Awaited<ReturnType<typeof serve>>;

test.runIf(mustFail)('chromium is required when CI is set', () => {
  throw new Error(`BROWSER TESTS CANNOT RUN: ${CHROMIUM_PATH} not found and CI is set (install the chromium package)`);
});

describe.runIf(available)('labels in the dashboard', () => {
  let server: Running;
  let browser: Browser;
  let page: Page;
  let errors: string[];
  let work: string;

  beforeAll(async () => {
    ensureServerCompiled();
    ensureDashboardBuilt();
    work = mkdtempSync(join(tmpdir(), 'syncring-labels-'));
    const soaksDir = join(work, 'soaks');
    const soak = await runPairSoak(work, join(soaksDir, 'pair-pass'));
    expect(soak.code).toBe(0);
    server = await serve({ port: 0, token: TOKEN, logDir: null, speed: 'max', quiet: true, scenario: 'ring-one-way-5', soaksDir });
    browser = await launchChromium();
    page = await browser.newPage({ viewport: VIEWPORT });
    errors = collectPageErrors(page);
    await page.goto(server.operatorUrl);
    await page.locator('sr-ring-view .node').first().waitFor();
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
    if (work) rmSync(work, { recursive: true, force: true });
  });

  test('the lock chart labels its R ticks 0, 0.25, 0.5, 0.75, 1', async () => {
    // the labels chart.js drew, read from the chart instance the element owns
    const labels = () =>
      page.locator('sr-lock-chart').evaluate((el) => {
        const chart = (el as unknown as { charts: { chart: { scales: Record<string, { ticks: { label: string | string[] }[] }> } | null } })
          .charts.chart;
        return chart ? chart.scales.y.ticks.map((t) => String(t.label)) : [];
      });
    await expect.poll(labels).toEqual(['0', '0.25', '0.5', '0.75', '1']);
  });

  test('chart titles stay upper case but φ and |a| keep their case', async () => {
    const phase = page.locator('sr-phase-chart h2');
    // innerText is the text as rendered, after text-transform
    const phaseText = await phase.evaluate((h) => (h as HTMLElement).innerText);
    expect(phaseText).toContain('PHASE DIFFERENCES');
    expect(phaseText).toContain('φₖ₊₁ − φₖ');
    expect(phaseText).not.toContain('Φ');
    expect(await phase.locator('.symbol').evaluate((s) => getComputedStyle(s).textTransform)).toBe('none');
    const amplitudeText = await page.locator('sr-amplitude-chart h2').evaluate((h) => (h as HTMLElement).innerText);
    expect(amplitudeText).toContain('MODE AMPLITUDES');
    expect(amplitudeText).toContain('|a|');
    expect(amplitudeText).not.toContain('|A|');
  });

  test('seconds carry the 10 MHz assumption for a scenario without nominalFrequencyHz', async () => {
    const session = (await (await fetch(new URL('api/session', server.url))).json()) as {
      nominalFrequencyAssumed: boolean;
      nominalFrequencyHz: number;
    };
    expect(session).toMatchObject({ nominalFrequencyAssumed: true, nominalFrequencyHz: 10e6 });
    await expect.poll(() => textOf(page, '[data-testid=clock-seconds]')).toMatch(/^t [\d.]+ (ns|µs|ms|s) at an assumed 10 MHz$/);
    expect(await textOf(page, '[data-testid=scenario] small')).toMatch(/f₀ = 10 MHz assumed \(not in the scenario\)/);
    // the one-way ring starts in its q = 1 wave and locks within a few lock windows
    await page.locator('sr-event-timeline tr[data-kind=lock]').first().waitFor({ timeout: 60_000 });
    expect(await textOf(page, '[data-testid=timeline-seconds]')).toMatch(ASSUMED);
    await expect
      .poll(() => textOf(page, '[data-testid=pattern-full]'))
      .toMatch(/locked since τ = [\d.e]+ \([\d.]+ (ns|µs|ms|s) at an assumed 10 MHz\)/);
    await expect
      .poll(() => textOf(page, '[data-testid=pattern-guide]'))
      .toMatch(/time constant.*≈ [\d.]+ (ns|µs|ms|s) at an assumed 10 MHz/s);
    await page.locator('nav.views button[data-view=prediction]').click();
    await page.locator('sr-catalogue-panel [data-testid=catalogue]').waitFor({ timeout: 60_000 });
    expect(await textOf(page, '[data-testid=catalogue-seconds]')).toMatch(ASSUMED);
  });

  test('a PASS in the Soaks tab has the caution beside it; its seconds say they are assumed', async () => {
    await page.locator('nav.views button[data-view=soaks]').click();
    await page.locator('sr-soak-panel button[data-soak="pair-pass"]').click();
    await expect.poll(() => textOf(page, '[data-testid=soak-verdict]')).toBe('PASS');
    const caution = page.locator('[data-testid=soak-pass-caution]');
    expect(await textOf(page, '[data-testid=soak-pass-caution]')).toBe(
      "PASS means this campaign's criteria were met under the simulated noise model. " +
        "It does not mean compliance with any standard's mask. Qualify real hardware to the standards that apply, with accredited practice.",
    );
    // beside it: on the badge's row, to its right
    const badge = (await page.locator('[data-testid=soak-verdict]').boundingBox())!;
    const box = (await caution.boundingBox())!;
    expect(box.x).toBeGreaterThan(badge.x + badge.width);
    expect(box.y).toBeLessThan(badge.y + badge.height);
    expect(box.y + box.height).toBeGreaterThan(badge.y);
    // every PASS row of the verdict table and the list entry carry the short form
    const passRows = page.locator('[data-testid=verdicts] tr[data-pass=true]');
    expect(await passRows.count()).toBeGreaterThan(0);
    for (const text of await passRows.locator('td').last().allTextContents())
      expect(text).toMatch(/PASS\s+simulated criteria, not a standard's mask/);
    expect(await page.locator('sr-soak-panel button[data-soak="pair-pass"]').textContent()).toMatch(
      /PASS: simulated criteria, not a standard's mask/,
    );
    expect(await textOf(page, '[data-testid=relock-heading]')).toMatch(ASSUMED);
    expect(errors).toEqual([]);
  });
});
