import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { serve } from '../../server/commands/serve.js';
import { CHROMIUM_PATH, chromiumAvailability, launchChromium } from './support/chromium.js';
import { ensureDashboardBuilt, ensureServerCompiled, ROOT } from './support/build.js';
import { collectPageErrors, paintedPixels, textOf } from './support/dashboard-page.js';

/**
 * The Noise view in a real Chromium against the real server on the demo board: the live pattern's
 * phase noise and deviations drawn for the array, every node and one part alone, the figures
 * with the stability caution beside them, a deviation switch, and a part noise that moves the
 * curves. Writes docs/noise.png on the way.
 */

const { available, mustFail } = chromiumAvailability();
const VIEWPORT = { width: 1920, height: 1080 };
const DOCS = join(ROOT, 'docs');

test.runIf(mustFail)('chromium is required when CI is set', () => {
  throw new Error(`BROWSER TESTS CANNOT RUN: ${CHROMIUM_PATH} not found and CI is set (install the chromium package)`);
});

describe.runIf(available)('noise view in Chromium', () => {
  let server: Awaited<ReturnType<typeof serve>>;
  let browser: Browser;
  let page: Page;
  let errors: string[];

  beforeAll(async () => {
    ensureServerCompiled();
    ensureDashboardBuilt();
    server = await serve({ port: 0, token: 'noise-view-token', logDir: null, speed: 'max', quiet: true, scenario: 'timing-board-8' });
    browser = await launchChromium();
    mkdirSync(DOCS, { recursive: true });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  test('the live in-phase pattern: array 9 dB below one part, curves drawn, caution beside the figures', async () => {
    page = await browser.newPage({ viewport: VIEWPORT });
    errors = collectPageErrors(page);
    await page.goto(`${server.url}#noise`);
    expect(await page.locator('nav.views button[aria-selected=true]').textContent()).toBe('Noise');
    await page.locator('[data-testid=noise-facts]').waitFor({ timeout: 60_000 });
    const facts = await textOf(page, '[data-testid=noise-facts]');
    expect(facts).toMatch(/in-phase/);
    // eight identical in-phase nodes with independent noise: the mean phase is 10 log10 8 = 9.03 dB quieter
    const db = Number(/array output is\s+([\d.]+) dB/.exec(facts)?.[1]);
    expect(db).toBeCloseTo(10 * Math.log10(8), 1);
    expect(facts).toMatch(/locking bandwidth of [\d.]+ (m?Hz|kHz)/);
    expect(await textOf(page, '[data-testid=noise-caution]')).toMatch(/not from a measured part.*Qualify real hardware/);
    for (const chart of ['[data-testid=noise-spectrum]', '[data-testid=noise-deviation-chart]']) {
      // eight nodes, the array and one part alone
      expect(await page.locator(`${chart} canvas`).getAttribute('data-curves')).toBe('10');
      expect(await paintedPixels(page, chart)).toBeGreaterThan(5000);
    }
    await page.screenshot({ path: join(DOCS, 'noise.png') });
    expect(errors).toEqual([]);
  }, 120_000);

  test('switching to TDEV relabels the axis; a part noise changes the analysis', async () => {
    await page.locator('[data-testid=noise-deviation]').selectOption('tdev');
    await expect.poll(() => textOf(page, '[data-testid=noise-deviation-chart]').catch(() => '')).toBeDefined();
    expect(await page.locator('sr-noise-view h3').nth(1).textContent()).toMatch(/time deviation/);
    const before = await textOf(page, '[data-testid=noise-facts]');
    await page.locator('[data-testid=noise-part]').fill('h0=1e-17');
    await page.locator('sr-noise-view button', { hasText: 'Apply' }).click();
    // white FM far above the model's own raises one part's noise; coupling leaves the dB gain at 10 log10 8
    await expect
      .poll(
        async () => await page.evaluate(() => performance.getEntriesByType('resource').filter((r) => r.name.includes('partNoise')).length),
        { timeout: 60_000 },
      )
      .toBeGreaterThan(0);
    await expect.poll(() => textOf(page, '[data-testid=noise-facts]'), { timeout: 60_000 }).toMatch(/array output is\s+9\.0\d? dB/);
    expect(before).toMatch(/array output/);
    await page.locator('[data-testid=noise-part]').fill('h9=1');
    await page.locator('sr-noise-view button', { hasText: 'Apply' }).click();
    await expect.poll(() => textOf(page, 'sr-noise-view .error').catch(() => ''), { timeout: 30_000 }).toMatch(/partNoise.*NAME=VALUE/);
    expect(errors.filter((e) => !/400/.test(e))).toEqual([]);
  }, 120_000);
});
