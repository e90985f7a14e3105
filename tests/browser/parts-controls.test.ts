import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { serve } from '../../server/commands/serve.js';
import { CHROMIUM_PATH, chromiumAvailability, launchChromium } from './support/chromium.js';
import { ensureDashboardBuilt, ensureServerCompiled } from './support/build.js';
import { collectPageErrors, textOf } from './support/dashboard-page.js';

/**
 * Engineering values beside model values on the demo board, which is described by its parts
 * (src/scenarios/timing-board-8.json, docs/parts.md): the coupling as a pull in ppm, a detuning
 * entered as a change of a node's load capacitance in pF, and board time under slow time on the
 * charts. Screenshots go to SCREENSHOT_DIR when it is set (to look at them), nowhere otherwise.
 */

const { available, mustFail } = chromiumAvailability();
const TOKEN = 'parts-controls-token';

type Running = Awaited<ReturnType<typeof serve>>;

test.runIf(mustFail)('chromium is required when CI is set', () => {
  throw new Error(`BROWSER TESTS CANNOT RUN: ${CHROMIUM_PATH} not found and CI is set (install the chromium package)`);
});

describe.runIf(available)('parts in the controls', () => {
  let server: Running;
  let browser: Browser;
  let page: Page;
  let errors: string[];

  beforeAll(async () => {
    ensureServerCompiled();
    ensureDashboardBuilt();
    server = await serve({ port: 0, token: TOKEN, logDir: null, speed: 1, quiet: true, scenario: 'timing-board-8' });
    browser = await launchChromium();
    page = await browser.newPage({ viewport: { width: 1920, height: 1080 } });
    errors = collectPageErrors(page);
    await page.goto(server.operatorUrl);
    await page.locator('sr-ring-view .node').first().waitFor();
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  test('the coupling reads as a pull per link with its angle and pair locking range', async () => {
    // the demo's branch: P = 1.5013 ppm at 11.33 degrees, 2 P cos(alpha) = 2.944 ppm (tests/unit/scenario/builtins.test.ts, by hand)
    await expect.poll(() => textOf(page, '[data-testid=coupling-pull-reading]')).toMatch(/α = 11\.3°, pair locking range 2\.94 ppm/);
    expect(Number(await page.locator('[data-testid=coupling-pull]').inputValue())).toBeCloseTo(1.501, 3);
    // typing 3 ppm doubles kappa for the same rho and sigma
    await page.locator('[data-testid=coupling-pull]').fill('3');
    const kappa = page.locator('sr-control-panel fieldset', { hasText: 'Coupling' }).locator('input').first();
    expect(Number(await kappa.inputValue())).toBeCloseTo(0.3002614 * (3 / 1.5013071), 4);
  });

  test('a C_L change in pF is shown and sent as ppm', async () => {
    const fieldset = page.locator('sr-control-panel fieldset', { hasText: 'Detuning' });
    await fieldset.locator('select').selectOption('3');
    // node 3 as built: f_s 8.4 ppm low, C_L = 16 - 0.1 - 0.43 = 15.47 pF
    await expect.poll(() => textOf(page, '[data-testid=trim-basis]')).toMatch(/from 15\.47 pF as built/);
    // untouched, the node sits at its built load: no change
    expect(await fieldset.locator('#trim').inputValue()).toBe('0');
    await fieldset.locator('#trim').fill('-0.1');
    // by hand with f_L = f_s (1 + C1 / (2 (C0 + C_L))) (docs/parts.md): 15.37 pF
    const fs = 9996925 * (1 - 8.4e-6);
    const expected = ((fs * (1 + 12e-15 / (2 * (3.5e-12 + 15.37e-12)))) / 1e7 - 1) * 1e6;
    expect(Number(await fieldset.locator('#ppm').inputValue())).toBeCloseTo(expected, 4);
    await fieldset.locator('button[data-action=apply-detuning]').click();
    // the server's reading of the node comes back: the field shows it (to 4 digits) and so does the trim
    await expect.poll(async () => Number(await fieldset.locator('#ppm').inputValue()) - expected, { timeout: 15_000 }).toBeCloseTo(0, 3);
    await expect.poll(async () => Number(await fieldset.locator('#trim').inputValue()), { timeout: 15_000 }).toBeCloseTo(-0.1, 3);
  });

  test('the time charts label board time under slow time', async () => {
    const labels = () =>
      page.locator('sr-phase-chart').evaluate((el) => {
        const chart = (
          el as unknown as {
            charts: {
              chart: {
                scales: Record<string, { ticks: { label: string | string[] }[] }>;
                options: { scales: { x: { title: { text: string } } } };
              } | null;
            };
          }
        ).charts.chart;
        return chart ? { ticks: chart.scales.x.ticks.map((t) => t.label), title: chart.options.scales.x.title.text } : null;
      });
    await expect.poll(async () => (await labels())?.ticks.length ?? 0, { timeout: 30_000 }).toBeGreaterThan(1);
    const read = (await labels())!;
    expect(read.title).toBe('slow time ε·τ and board time at 10 MHz');
    // one slow unit is 1 / eps tau = 1e5 / (2 pi 1e7) s = 1.59 ms (README, 'Units')
    for (const label of read.ticks) {
      expect(Array.isArray(label)).toBe(true);
      const [slow, board] = label as string[];
      const ms = (Number(slow) * 1e5) / (2 * Math.PI * 1e7) / 1e-3;
      if (Number(slow) !== 0)
        expect(board).toBe(
          ms < 1 ? `${(ms * 1e3).toPrecision(3)} µs` : ms < 1000 ? `${ms.toPrecision(3)} ms` : `${(ms / 1e3).toPrecision(3)} s`,
        );
    }
    if (process.env.SCREENSHOT_DIR) {
      await page.locator('sr-control-panel').screenshot({ path: `${process.env.SCREENSHOT_DIR}/controls.png` });
      await page.locator('sr-phase-chart').screenshot({ path: `${process.env.SCREENSHOT_DIR}/phase-chart.png` });
    }
    expect(errors).toEqual([]);
  });
});
