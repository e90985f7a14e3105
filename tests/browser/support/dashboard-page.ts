import type { Page } from 'playwright-core';

/**
 * Helpers that read the dashboard the way a person would: visible text and the drawing.
 * Playwright's CSS selectors pierce the open shadow roots of the Lit elements.
 */

export async function textOf(page: Page, selector: string): Promise<string> {
  return (await page.locator(selector).first().textContent())?.trim() ?? '';
}

/** The number shown in an element, e.g. the tau read-out "1.23e6" or a frame count. */
export async function numberIn(page: Page, selector: string): Promise<number> {
  return Number(await textOf(page, selector));
}

/** Screen coordinates of the middle of a link's curve (where a person would click it). */
export async function linkMiddle(page: Page, from: number, to: number): Promise<{ x: number; y: number }> {
  const hit = page.locator(`sr-ring-view .link[data-from="${from}"][data-to="${to}"] .link-hit`);
  await hit.waitFor({ state: 'attached' });
  return hit.evaluate((path: SVGPathElement) => {
    const p = path.getPointAtLength(path.getTotalLength() / 2);
    const m = path.getScreenCTM();
    if (!m) throw new Error('the link has no screen transform (not rendered?)');
    return { x: p.x * m.a + p.y * m.c + m.e, y: p.x * m.b + p.y * m.d + m.f };
  });
}

/** Screen coordinates of a node's centre (its rim circle, which does not move while the hand turns). */
export async function nodeCentre(page: Page, node: number): Promise<{ x: number; y: number }> {
  const box = await page.locator(`sr-ring-view .node[data-node="${node}"] .rim`).boundingBox();
  if (!box) throw new Error(`node ${node} is not on screen`);
  return { x: box.x + box.width / 2, y: box.y + box.height / 2 };
}

/** How many points a chart holds, as the chart element reports it on its canvas. */
export async function chartPoints(page: Page, chart: string): Promise<number> {
  return Number((await page.locator(`${chart} canvas`).getAttribute('data-points')) ?? '0');
}

/** Number of canvas pixels that are not transparent (the chart has actually drawn something). */
export async function paintedPixels(page: Page, chart: string): Promise<number> {
  return page.locator(`${chart} canvas`).evaluate((canvas: HTMLCanvasElement) => {
    const ctx = canvas.getContext('2d');
    if (!ctx) return 0;
    const data = ctx.getImageData(0, 0, canvas.width, canvas.height).data;
    let painted = 0;
    for (let i = 3; i < data.length; i += 4) if (data[i] !== 0) painted++;
    return painted;
  });
}

/** Collect uncaught page errors so a test can assert there were none. */
export function collectPageErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('pageerror', (error) => errors.push(error.message));
  page.on('console', (message) => {
    if (message.type() === 'error') errors.push(message.text());
  });
  return errors;
}
