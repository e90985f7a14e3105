import { mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { serve } from '../../server/commands/serve.js';
import { TestClient } from '../support/ws-client.js';
import { CHROMIUM_PATH, chromiumAvailability, chromiumVersion, launchChromium } from './support/chromium.js';
import { ensureDashboardBuilt, ensureServerCompiled, ROOT } from './support/build.js';
import { chartPoints, collectPageErrors, linkMiddle, nodeCentre, numberIn, paintedPixels, textOf } from './support/dashboard-page.js';

/**
 * The dashboard in a real Chromium against the real server: a live run of the demo board at full
 * speed, an operator page (with the token) and a viewer page side by side, then a replay of the
 * log the operator downloads. Screenshots for the docs are written on the way.
 */

const { available, mustFail } = chromiumAvailability();
const TOKEN = 'browser-test-token';
const VIEWPORT = { width: 1920, height: 1080 };
const DOCS = join(ROOT, 'docs');
const CHARTS = ['sr-phase-chart', 'sr-amplitude-chart', 'sr-lock-chart'];

type Running = Awaited<ReturnType<typeof serve>>;

/** The server must hand out the vite build (dist/web), not the dashboard's sources (web/). */
async function expectBuiltDashboard(url: string): Promise<void> {
  const page = await (await fetch(url)).text();
  if (/src\/main\.ts/.test(page)) {
    throw new Error(
      `the server at ${url} serves the dashboard sources (web/index.html loading ./src/main.ts) instead of the build in dist/web; ` +
        'its static root must be dist/web also when it runs from the TypeScript sources',
    );
  }
  expect(page).toMatch(/<syncring-app>/);
}

test.runIf(mustFail)('chromium is required when CI is set', () => {
  throw new Error(`BROWSER TESTS CANNOT RUN: ${CHROMIUM_PATH} not found and CI is set (install the chromium package)`);
});

describe.runIf(available)('dashboard in Chromium', () => {
  let server: Running;
  let browser: Browser;
  let operator: Page;
  let viewer: Page;
  let operatorErrors: string[];
  let logDir: string;

  async function session(): Promise<{ nodes: number; status: string; links: { from: number; to: number; weight: number }[] }> {
    const response = await fetch(new URL('api/session', server.url));
    expect(response.ok).toBe(true);
    return response.json();
  }

  async function openDashboard(url: string): Promise<Page> {
    const page = await browser.newPage({ viewport: VIEWPORT, acceptDownloads: true });
    await page.goto(url);
    await page.locator('sr-ring-view .node').first().waitFor();
    return page;
  }

  beforeAll(async () => {
    ensureServerCompiled();
    ensureDashboardBuilt();
    logDir = mkdtempSync(join(tmpdir(), 'syncring-browser-'));
    server = await serve({ port: 0, token: TOKEN, logDir, speed: 'max', quiet: true, scenario: 'timing-board-8' });
    await expectBuiltDashboard(server.url);
    browser = await launchChromium();
    console.log(`browser tests on ${chromiumVersion()} (playwright reports ${browser.version()})`);
    mkdirSync(DOCS, { recursive: true });
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
    if (logDir) rmSync(logDir, { recursive: true, force: true });
  });

  test('the dashboard loads: title, a ring with every node, the three charts, the caution', async () => {
    operator = await browser.newPage({ viewport: VIEWPORT, acceptDownloads: true });
    operatorErrors = collectPageErrors(operator);
    await operator.goto(server.operatorUrl);
    await operator.locator('sr-ring-view .node').first().waitFor();
    const { nodes, links } = await session();
    expect(await operator.title()).toMatch(/syncring/);
    await expect.poll(() => operator.locator('sr-ring-view .node').count()).toBe(nodes);
    expect(await operator.locator('sr-ring-view .link').count()).toBe(links.length);
    for (const chart of CHARTS) expect(await operator.locator(`${chart} canvas`).count()).toBe(1);
    expect(await textOf(operator, '[data-testid=role]')).toBe('OPERATOR');
    expect(await textOf(operator, '[data-testid=connection]')).toBe('live');
    expect(await textOf(operator, '[data-testid=caution]')).toMatch(
      /does not replace qualification of real hardware.*simulated noise model only.*compliance with any standard's mask.*with accredited practice/s,
    );
  });

  test('the ring and the charts follow the run', async () => {
    await operator.locator('[data-testid=tau]').waitFor();
    const tau0 = await numberIn(operator, '[data-testid=tau]');
    const frames0 = await numberIn(operator, '[data-testid=frame-count]');
    const points0 = await chartPoints(operator, 'sr-phase-chart');
    await operator.waitForTimeout(1500);
    await expect.poll(() => numberIn(operator, '[data-testid=tau]')).toBeGreaterThan(tau0);
    // the demo board gives its nominal frequency: its seconds are no assumption
    expect(await textOf(operator, '[data-testid=clock-seconds]')).toMatch(/^t [\d.]+ (ns|µs|ms|s|min|h)$/);
    expect(await numberIn(operator, '[data-testid=frame-count]')).toBeGreaterThan(frames0);
    await expect.poll(() => chartPoints(operator, 'sr-phase-chart')).toBeGreaterThan(points0);
    for (const chart of CHARTS) {
      expect(await chartPoints(operator, chart)).toBeGreaterThan(0);
      expect(await paintedPixels(operator, chart)).toBeGreaterThan(1000);
    }
    // The node hands are drawn at the current phase: at least one of them has moved.
    const hands = () =>
      operator
        .locator('sr-ring-view .node line')
        .evaluateAll((lines) => lines.map((l) => `${l.getAttribute('x2')},${l.getAttribute('y2')}`).join(' '));
    const before = await hands();
    await expect.poll(hands, { timeout: 10_000 }).not.toBe(before);
    expect(operatorErrors).toEqual([]);
  });

  test('a link broken by a click on the operator page shows as broken for a viewer and in its timeline', async () => {
    viewer = await openDashboard(server.url);
    expect(await textOf(viewer, '[data-testid=role]')).toBe('VIEWER');
    await expect.poll(() => textOf(operator, '[data-testid=viewers]')).toMatch(/^2 watching/);
    // Wait for the board to lock first (the demo locks in-phase within a few tens of slow units).
    await operator.locator('sr-event-timeline tr[data-kind=lock]').first().waitFor({ timeout: 150_000 });
    expect(await operator.locator('sr-ring-view .link.broken').count()).toBe(0);
    const middle = await linkMiddle(operator, 0, 1);
    await operator.mouse.click(middle.x, middle.y);
    await viewer.locator('sr-ring-view .link.broken[data-from="0"][data-to="1"]').waitFor({ timeout: 15_000 });
    expect(await viewer.locator('sr-ring-view .link.broken').count()).toBe(1);
    await expect
      .poll(() => viewer.locator('sr-event-timeline tr[data-kind=perturbation]').allTextContents())
      .toContainEqual(expect.stringMatching(/link 0 -> 1 broken/));
    expect((await session()).links.find((l) => l.from === 0 && l.to === 1)?.weight).toBe(0);
    expect(await textOf(operator, '[data-testid=last-command]')).toMatch(/break-link accepted/);
    // Let the charts show a few slow units after the break before taking the pictures.
    await operator.waitForTimeout(2500);
    // opening one direction of one link moves the locked ring to its continued state: no loss of lock
    expect(await operator.locator('sr-event-timeline tr[data-kind=unlock], sr-event-timeline tr[data-kind=pattern-change]').count()).toBe(
      0,
    );
    expect(await textOf(operator, '[data-testid=array-output]')).toMatch(
      /^array output: phase spread ±\d\.\d\d rad \(±\d+°\) · combining loss -?\d/,
    );
    await operator.screenshot({ path: join(DOCS, 'dashboard.png') });
    await viewer.screenshot({ path: join(DOCS, 'dashboard-viewer.png') });
  });

  test('an amplitude kick on the wanted mode shows as settling, not as a pattern change', async () => {
    const lockState = () => textOf(operator, '[data-testid=lock-state]');
    await expect.poll(lockState, { timeout: 30_000 }).toMatch(/^locked since/);
    const kicks = await operator.locator('sr-event-timeline tr[data-kind=perturbation]').count();
    // watch the read-out from inside the page so a short settling is not missed between polls
    await operator.evaluate(() => {
      const w = window as unknown as { seen: string[] };
      w.seen = [];
      const find = (root: Document | ShadowRoot): Element | null => {
        const hit = root.querySelector('[data-testid=lock-state]');
        if (hit) return hit;
        for (const el of root.querySelectorAll('*'))
          if (el.shadowRoot) {
            const inner = find(el.shadowRoot);
            if (inner) return inner;
          }
        return null;
      };
      const tick = () => {
        const text = find(document)?.textContent ?? '';
        if (w.seen.at(-1) !== text) w.seen.push(text);
        requestAnimationFrame(tick);
      };
      tick();
    });
    // A kick along a node's own phase only changes its amplitude, which relaxes without moving
    // any phase difference; across it, the kick turns the node by atan(0.5 / |a|), about 0.27 rad
    // on the demo, which the ring must settle back from. Node 0's phase is read off a live frame.
    const watcher = await TestClient.connect(server.url.replace('http', 'ws') + 'ws');
    const frame = await watcher.next('frame');
    watcher.close();
    const across = frame.frame.full.phase[0][0] + Math.PI / 2;
    const panel = operator.locator('sr-control-panel');
    const kickBox = panel.locator('fieldset:has(legend:text("Kick a mode"))');
    await kickBox.locator('select').nth(1).selectOption('0');
    await kickBox.locator('input[type=number]').nth(1).fill(across.toFixed(3));
    await panel.locator('button[data-action=kick-mode]').click();
    await expect.poll(() => operator.locator('sr-event-timeline tr[data-kind=perturbation]').count()).toBeGreaterThan(kicks);
    await expect
      .poll(() => operator.evaluate(() => (window as unknown as { seen: string[] }).seen.some((t) => /settling/.test(t))), {
        timeout: 15_000,
      })
      .toBe(true);
    await expect.poll(lockState, { timeout: 30_000 }).toMatch(/^locked since/);
    expect(await operator.locator('sr-event-timeline tr[data-kind=unlock], sr-event-timeline tr[data-kind=pattern-change]').count()).toBe(
      0,
    );
  });

  test('a viewer cannot issue commands: controls are disabled and a forced command is refused', async () => {
    const buttons = viewer.locator('sr-control-panel button');
    expect(await buttons.count()).toBeGreaterThan(5);
    const enabled = await buttons.evaluateAll((all) =>
      all.filter((b) => !(b as HTMLButtonElement).disabled).map((b) => b.textContent?.trim()),
    );
    expect(enabled).toEqual([]);
    expect(await textOf(viewer, '[data-testid=controls-readonly]')).toMatch(/View only/);
    // A click on the ring explains itself instead of opening an editor.
    const node = await nodeCentre(viewer, 2);
    await viewer.mouse.click(node.x, node.y);
    await viewer.locator('[data-testid=toast-info]').first().waitFor();
    expect(await viewer.locator('sr-detuning-editor[closable]').count()).toBe(0);
    // Force the pause button back on and press it: the server must refuse, the page must say so.
    const pause = viewer.locator('sr-control-panel button[data-action=pause]');
    await pause.evaluate((b: HTMLButtonElement) => (b.disabled = false));
    await pause.click();
    const toast = viewer.locator('[data-testid=toast-error]').first();
    await toast.waitFor({ timeout: 10_000 });
    expect(await toast.textContent()).toMatch(/pause refused: viewers cannot send commands/);
    expect((await session()).status).toBe('running');
    await viewer.close();
  });

  test('replay of the downloaded log: read-only, scrubbable, events on the timeline, back to live', async () => {
    const [download] = await Promise.all([operator.waitForEvent('download'), operator.locator('[data-testid=save-log]').click()]);
    const file = await download.path();
    const text = readFileSync(file, 'utf8');
    const records = text
      .trim()
      .split('\n')
      .map((line) => JSON.parse(line) as { record: string });
    expect(records[0].record).toBe('header');
    const samples = records.filter((r) => r.record === 'sample').length;
    expect(samples).toBeGreaterThan(2);

    const page = await openDashboard(server.operatorUrl);
    await page
      .locator('sr-status-header input[type=file]')
      .setInputFiles({ name: 'session.ndjson', mimeType: 'application/x-ndjson', buffer: Buffer.from(text) });
    await page.locator('[data-testid=replay-bar]').waitFor();
    expect(await textOf(page, '[data-testid=role]')).toBe('REPLAY · READ-ONLY');
    const scrubber = page.locator('[data-testid=scrubber]');
    expect(Number(await scrubber.getAttribute('max'))).toBe(samples - 1);
    // At the end of the log the link is broken and the break is on the timeline ...
    await page.locator('sr-ring-view .link.broken[data-from="0"][data-to="1"]').waitFor();
    expect(await page.locator('sr-event-timeline tr[data-kind=perturbation]').allTextContents()).toContainEqual(
      expect.stringMatching(/link 0 -> 1 broken/),
    );
    const pointsAtEnd = await chartPoints(page, 'sr-phase-chart');
    // ... at the start it is not, and nothing has happened yet.
    const scrubTo = (index: number) =>
      scrubber.evaluate((input: HTMLInputElement, i) => {
        input.value = String(i);
        input.dispatchEvent(new Event('input', { bubbles: true, composed: true }));
      }, index);
    await scrubTo(0);
    await expect.poll(() => page.locator('sr-ring-view .link.broken').count()).toBe(0);
    expect(await numberIn(page, '[data-testid=frame-count]')).toBe(1);
    expect(await page.locator('sr-event-timeline tr[data-kind=perturbation]').count()).toBe(0);
    expect(await chartPoints(page, 'sr-phase-chart')).toBeLessThan(pointsAtEnd);
    // Replay is read-only whatever the role of the page.
    expect(await page.locator('sr-control-panel button:not([disabled])').count()).toBe(0);
    await scrubTo(samples - 1);
    await page.locator('sr-ring-view .link.broken[data-from="0"][data-to="1"]').waitFor();
    await page.waitForTimeout(300);
    await page.screenshot({ path: join(DOCS, 'replay.png') });
    await page.locator('button[data-action=back-to-live]').click();
    await page.locator('[data-testid=replay-bar]').waitFor({ state: 'detached' });
    expect(await textOf(page, '[data-testid=role]')).toBe('OPERATOR');
    await page.close();
  });

  test('a page that loses the server says so and reconnects by itself when it is back', async () => {
    const first = await serve({ port: 0, token: TOKEN, logDir: null, speed: 'max', quiet: true, scenario: 'ring-one-way-5' });
    const port = Number(new URL(first.url).port);
    const page = await openDashboard(first.operatorUrl);
    expect(await textOf(page, '[data-testid=connection]')).toBe('live');
    await first.close();
    const banner = page.locator('[data-testid=banner]');
    await banner.waitFor({ timeout: 10_000 });
    // the banner alternates between waiting (with the countdown) and a new attempt; the waits grow
    await expect.poll(() => banner.textContent(), { timeout: 10_000, interval: 100 }).toMatch(/Disconnected from the live run/);
    expect(await textOf(page, '[data-testid=connection]')).toBe('offline');
    expect(await page.locator('sr-control-panel button:not([disabled])').count()).toBe(0);
    const second = await serve({ port, token: TOKEN, logDir: null, speed: 'max', quiet: true, scenario: 'ring-one-way-5' });
    try {
      // Backoff is at most 15 s between attempts (connection.ts); allow two of them.
      await banner.waitFor({ state: 'detached', timeout: 35_000 });
      expect(await textOf(page, '[data-testid=connection]')).toBe('live');
      expect(await page.locator('sr-control-panel button[data-action=pause]').isDisabled()).toBe(false);
    } finally {
      await page.close();
      await second.close();
    }
  });
});
