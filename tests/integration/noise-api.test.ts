import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { serve, type RunningServer } from '../../server/commands/serve.js';
import type { NoiseResponse } from '../../src/protocol/noise-output.js';

/**
 * GET /api/noise on a real server (port 0) running the demo board: the analysis of the live
 * pattern, cached by parameters and query, part noise that adds as the power-law relations say,
 * and query errors that name the field.
 */

async function getJson<T>(url: string): Promise<{ status: number; body: T }> {
  const response = await fetch(url);
  return { status: response.status, body: (await response.json()) as T };
}

/** The value of a deviation table row at the tau nearest `tau`. */
function at(taus: number[], values: number[], tau: number): { tau: number; value: number } {
  let best = 0;
  taus.forEach((t, i) => {
    if (Math.abs(Math.log(t / tau)) < Math.abs(Math.log(taus[best] / tau))) best = i;
  });
  return { tau: taus[best], value: values[best] };
}

describe('noise API', () => {
  let server: RunningServer;
  let base: string;

  beforeAll(async () => {
    server = await serve({ port: 0, scenario: 'timing-board-8', token: 'op-secret', logDir: null, speed: 0.5, quiet: true });
    base = server.url;
  });
  afterAll(async () => {
    await server?.close();
  });

  test('the live in-phase pattern of the eight-node demo: the array output is 10 log10 8 dB quieter than one part', async () => {
    const { status, body } = await getJson<NoiseResponse>(new URL('api/noise', base).href);
    expect(status).toBe(200);
    expect(body.scenarioName).toMatch(/Timing board/);
    expect(body.pattern.kind).toBe('in-phase');
    expect(body.pattern.stable).toBe(true);
    // N identical in-phase nodes with independent noise: the mean phase has 1/N of one part's
    // phase noise inside the locking bandwidth (the classic coupled-oscillator-array result).
    expect(body.arrayImprovementDb).toBeCloseTo(10 * Math.log10(8), 1);
    expect(body.phaseNoise.nodes).toHaveLength(8);
    expect(body.adev.tau[0]).toBeCloseTo(1 / body.carrierHz, 12);
    expect(body.adev.tau.at(-1)!).toBeGreaterThanOrEqual(1e5 * 0.999);
    expect(body.caution).toMatch(/Qualify real hardware/);
    const again = await getJson<NoiseResponse>(new URL('api/noise', base).href);
    expect(again.body.fromCache).toBe(true);
    expect(again.body.adev.array).toEqual(body.adev.array);
  }, 60_000);

  test('white FM part noise adds h0 / (2 tau) to the uncoupled Allan variance (NIST SP 1065)', async () => {
    const plain = await getJson<NoiseResponse>(new URL('api/noise', base).href);
    const h0 = 1e-18;
    const withParts = await getJson<NoiseResponse>(new URL(`api/noise?partNoise=h0=${h0}`, base).href);
    expect(withParts.status).toBe(200);
    expect(withParts.body.fromCache).toBe(false);
    expect(withParts.body.sources.parts?.h0).toBe(h0);
    for (const tau of [1, 100, 1e4]) {
      const before = at(plain.body.adev.tau, plain.body.adev.uncoupled, tau);
      const after = at(withParts.body.adev.tau, withParts.body.adev.uncoupled, tau);
      const expected = Math.sqrt(before.value ** 2 + h0 / (2 * after.tau));
      expect(Math.abs(after.value / expected - 1)).toBeLessThan(0.01);
    }
  }, 60_000);

  test('query errors name the field and leave the server answering', async () => {
    const cases: [string, RegExp][] = [
      ['pattern=abc', /pattern must be an integer/],
      ['pattern=-1', /pattern must be an integer from 0 to 999/],
      ['pattern=999', /pattern must be an index 0\.\.\d+/],
      ['bandwidth=-5', /bandwidth must be a number of Hz/],
      ['bandwidth=Infinity', /bandwidth must be a number of Hz/],
      ['partNoise=h9=1', /partNoise.*NAME=VALUE/],
      ['partNoise=h0=-1', /partNoise.*h0 must be a finite number >= 0/],
      ['pattern=1&pattern=2', /pattern must be given once/],
      [`partNoise=${'h0=1,'.repeat(60)}`, /partNoise must be at most/],
    ];
    for (const [query, message] of cases) {
      const { status, body } = await getJson<{ error: string }>(new URL(`api/noise?${query}`, base).href);
      expect(status, query).toBe(400);
      expect(body.error, query).toMatch(message);
    }
    expect((await fetch(new URL('api/health', base))).ok).toBe(true);
  }, 60_000);
});
