import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, test, vi } from 'vitest';
import { main } from '../../../server/cli.js';
import { simulate } from '../../../server/commands/simulate.js';

const dir = mkdtempSync(join(tmpdir(), 'syncring-envelope-'));

/** An invented 4-node two-way ring with two modes at eps = 1e-6 (defaults: 8 steps per period, 1592 periods per tick). */
function scenarioFile(name: string, omega1: number, noise: number): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(
    path,
    JSON.stringify({
      name,
      nodes: 4,
      topology: 'ring-two-way',
      epsilon: 1e-6,
      modes: [
        { omega: 1, gain: 1, loss: 0.2 },
        { omega: omega1, gain: 0.8, loss: 0.1 },
      ],
      coupling: { strength: 0.4, reactive: 0.3, dissipative: 0.6 },
      detuning: [0.2, -0.1, 0.15, -0.25],
      noise: { intensity: noise, seed: 5 },
      initial: { random: { seed: 8, amplitude: [1.5, 0.5] } },
    }),
  );
  return path;
}

const far = scenarioFile('far-from-resonance', 1.37, 0);
const noisy = scenarioFile('noisy', 1.37, 1e-12);
const near = scenarioFile('near-one-to-one', 1 + 1e-5, 0);
const fiveTicks = (5 * 1592 * 2 * Math.PI) / 1;

afterEach(() => vi.restoreAllMocks());

describe('syncring simulate --mode', () => {
  test('reports the mode it used: auto takes the envelope here, micro and envelope are obeyed', () => {
    const auto = simulate({ scenario: far, until: fiveTicks });
    expect(auto.mode).toBe('envelope');
    expect(auto.integrator).toMatchObject({ requested: 'auto', mode: 'envelope', noiseModel: 'none' });
    expect((auto.integrator as { reason: string }).reason).toMatch(/valid .* times cheaper/);
    const micro = simulate({ scenario: far, until: fiveTicks, mode: 'micro' });
    expect(micro.mode).toBe('micro');
    expect(micro.integrator).toMatchObject({ requested: 'micro', mode: 'micro', ticks: { micro: 5, envelope: 0 } });
    const envelope = simulate({ scenario: far, until: fiveTicks, mode: 'envelope' });
    expect(envelope.mode).toBe('envelope');
    expect(envelope.integrator).toMatchObject({ ticks: { micro: 0, envelope: 5 } });
    // the outside contract still holds: the final states agree (`state` in README, '`syncring simulate`')
    const flat = (r: Record<string, unknown>) => (r.state as { x: number; xdot: number }[][]).flat().flatMap((s) => [s.x, s.xdot]);
    const a = flat(envelope);
    const b = flat(micro);
    const scale = Math.max(...b.map(Math.abs));
    expect(Math.max(...a.map((v, i) => Math.abs(v - b[i]))) / scale).toBeLessThan(1e-7);
  });

  test('says when the noise is the averaged diffusion', () => {
    const result = simulate({ scenario: noisy, until: fiveTicks, mode: 'envelope' });
    expect(result.noiseModel).toBe('averaged-diffusion');
    expect(result.integrator).toMatchObject({
      noiseModel: 'averaged-diffusion',
      noiseNote: expect.stringMatching(/statistically, not pathwise, equivalent/),
    });
    expect(simulate({ scenario: noisy, until: fiveTicks, mode: 'micro' }).noiseModel).toBe('exact-increments');
  });

  test('an envelope request near 1:1 falls back to micro steps and says why', () => {
    const result = simulate({ scenario: near, until: (2 * Math.PI * 1592) / 1, mode: 'envelope' });
    expect(result.mode).toBe('micro');
    expect((result.integrator as { reason: string }).reason).toMatch(/small divisor: harmonic \(1, -1\)/);
    expect(
      (result.events as { message: string }[]).some((e) => /envelope mode was requested but micro-stepping runs/.test(e.message)),
    ).toBe(true);
  });

  test('the command line takes --mode and refuses a bad one by name', async () => {
    const out: string[] = [];
    const err: string[] = [];
    vi.spyOn(process.stdout, 'write').mockImplementation((chunk) => (out.push(String(chunk)), true));
    vi.spyOn(process.stderr, 'write').mockImplementation((chunk) => (err.push(String(chunk)), true));
    expect(await main(['simulate', far, '--until', String(fiveTicks), '--mode', 'envelope'])).toBe(0);
    expect(JSON.parse(out.join('')).mode).toBe('envelope');
    expect(await main(['simulate', far, '--until', '10', '--mode', 'turbo'])).toBe(2);
    expect(err.join('')).toMatch(/--mode must be one of micro, envelope, auto \(got "turbo"\)/);
    expect(await main(['simulate', far, '--until', '10', '--mode'])).toBe(2);
    expect(err.join('')).toMatch(/--mode needs a value/);
  });
});
