import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { serve } from '../../server/commands/serve.js';
import { CHROMIUM_PATH, chromiumAvailability, launchChromium } from './support/chromium.js';
import { ensureDashboardBuilt, ensureServerCompiled, ROOT } from './support/build.js';
import { collectPageErrors } from './support/dashboard-page.js';

/**
 * The dashboard under the server's Content Security Policy (README "Security"): the page is
 * served with the policy, and every view runs without a single violation (an inline script or
 * style element, a data: URL, a connection elsewhere), as Chromium reports them: as console
 * errors and as securitypolicyviolation events.
 */

const { available, mustFail } = chromiumAvailability();
const TOKEN = 'csp-test-token-0123456789';

type Running = Awaited<ReturnType<typeof serve>>;

test.runIf(mustFail)('chromium is required when CI is set', () => {
  throw new Error(`BROWSER TESTS CANNOT RUN: ${CHROMIUM_PATH} not found and CI is set (install the chromium package)`);
});

describe.runIf(available)('the dashboard under its Content Security Policy', () => {
  let server: Running;
  let browser: Browser;
  let logDir: string;

  beforeAll(async () => {
    ensureServerCompiled();
    ensureDashboardBuilt();
    logDir = mkdtempSync(join(tmpdir(), 'syncring-csp-'));
    server = await serve({ port: 0, token: TOKEN, logDir, speed: 5, quiet: true, scenario: 'ring-one-way-5' });
    browser = await launchChromium();
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
    if (logDir) rmSync(logDir, { recursive: true, force: true });
  });

  /** Violations the page itself saw, recorded from before its first script runs. */
  async function watchViolations(page: Page): Promise<void> {
    await page.addInitScript(() => {
      const w = window as unknown as { violations: string[] };
      w.violations = [];
      document.addEventListener('securitypolicyviolation', (e) => w.violations.push(`${e.violatedDirective} ${e.blockedURI}`));
    });
  }

  test('the built page holds no inline script or style and no data: URL', () => {
    const page = readFileSync(join(ROOT, 'dist/web/index.html'), 'utf8');
    const scripts = [...page.matchAll(/<script\b[^>]*>/g)].map((m) => m[0]);
    expect(scripts.length).toBeGreaterThan(0);
    for (const tag of scripts) expect(tag).toMatch(/\ssrc="\.\/assets\/[^"]+\.js"/);
    expect(page).not.toMatch(/<style\b|\sstyle=|\son[a-z]+=|data:/i);
  });

  test('every view of the operator page runs with no violation and no console error', async () => {
    const page = await browser.newPage({ viewport: { width: 1600, height: 1000 } });
    const errors = collectPageErrors(page);
    await watchViolations(page);
    const response = await page.goto(server.operatorUrl);
    const policy = (await response!.allHeaders())['content-security-policy'] ?? '';
    expect(policy).toMatch(/script-src 'self'(;|$)/);
    expect(policy).toMatch(/frame-ancestors 'none'/);
    expect(policy).not.toMatch(/script-src[^;]*unsafe/);
    // the live view: the ring, the charts and the connection to /ws
    await page.locator('sr-ring-view .node').first().waitFor();
    await expect.poll(() => page.locator('[data-testid=connection]').first().textContent()).toBe('live');
    // the other views draw their own panels, with their own styles
    for (const view of ['prediction', 'soaks', 'live']) {
      await page.evaluate((hash) => (location.hash = hash), view);
      await page.waitForTimeout(1500);
    }
    // computed styles from the bundle's stylesheet (not blocked): the page background of page.css
    expect(await page.evaluate(() => getComputedStyle(document.body).backgroundColor)).toBe('rgb(233, 237, 241)');
    const violations = await page.evaluate(() => (window as unknown as { violations: string[] }).violations);
    expect({ violations, errors }).toEqual({ violations: [], errors: [] });
  });

  test('a page of another site cannot frame the dashboard', async () => {
    const response = await fetch(server.url);
    expect(response.headers.get('x-frame-options')).toBe('DENY');
    const page = await browser.newPage();
    const errors = collectPageErrors(page);
    // a page on another origin (about:blank with an iframe pointing at the server)
    await page.setContent(`<iframe id="f" src="${server.url}"></iframe>`);
    await expect
      .poll(() => errors.some((e) => /frame-ancestors|X-Frame-Options|refused to display/i.test(e)), { timeout: 10_000 })
      .toBe(true);
    const framed = page.frames().find((f) => f !== page.mainFrame());
    expect(
      await framed
        ?.locator('syncring-app')
        .count()
        .catch(() => 0),
    ).toBe(0);
  });
});
