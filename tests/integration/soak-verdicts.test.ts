import { describe, expect, test } from 'vitest';
import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { adlerPairScenario } from '../support/adler-pair.js';

/**
 * A fault beyond the predicted locking limit fails with the right verdict and a non-zero exit;
 * one inside it passes. Two nodes, one mode, two-way dissipative coupling (Adler, "A Study of
 * Locking Phenomena in Oscillators", Proc. IRE 34, 1946; the mapping dw = eps omega
 * (Delta_0 - Delta_1), K = eps kappa sigma is derived in docs/model.md, 'Adler pair'): locked
 * when |dw| <= K at sin psi = dw / K, otherwise the phase slips with the beat period
 * 2 pi / sqrt(dw^2 - K^2).
 */
const root = new URL('../../', import.meta.url).pathname;
const bin = join(root, 'bin/syncring.js');

const eps = 0.01;
const kappaSigma = 0.05;
const K = eps * kappaSigma;
const start = 5000;

function soak(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    execFile('node', [bin, 'soak', ...args], { cwd: root, timeout: 120_000 }, (error, stdout, stderr) => {
      resolve({ code: error ? ((error as { code?: number }).code ?? -1) : 0, stdout, stderr });
    });
  });
}

function setUp(ratio: number) {
  const dir = mkdtempSync(join(tmpdir(), 'syncring-adler-'));
  const scenario = join(dir, 'pair.json');
  writeFileSync(scenario, JSON.stringify(adlerPairScenario(eps, kappaSigma)));
  // Delta_0 = ratio kappa sigma / omega gives dw = ratio K; the fault lasts one beat period of
  // the beyond case, so a slipping pair is back near psi = 0 when the detuning is restored
  const beat = (2 * Math.PI) / (Math.sqrt(1.6 * 1.6 - 1) * K);
  const campaign = join(dir, 'campaign.json');
  writeFileSync(
    campaign,
    JSON.stringify({
      name: `detune node 0 to ${ratio} of the locking limit`,
      faults: [{ id: `dw-${ratio}K`, start, action: 'set-detuning', params: { node: 0, delta: ratio * kappaSigma }, duration: beat }],
      stability: { uncoupledReference: false },
    }),
  );
  const until = start + beat + 13000;
  return { dir, scenario, campaign, until, out: join(dir, 'out') };
}

async function runCase(ratio: number) {
  const c = setUp(ratio);
  const result = await soak([c.scenario, '--campaign', c.campaign, '--until', String(c.until), '--out', c.out]);
  const summary = JSON.parse(readFileSync(join(c.out, 'summary.json'), 'utf8'));
  return { ...result, summary, verdict: summary.verdicts[0], out: c.out };
}

function report(dir: string): Promise<{ code: number; stdout: string }> {
  return new Promise((resolve) => {
    execFile('node', [bin, 'report', dir], { cwd: root, timeout: 60_000 }, (error, stdout) =>
      resolve({ code: error ? ((error as { code?: number }).code ?? -1) : 0, stdout }),
    );
  });
}

describe('soak verdicts against the Adler locking limit', () => {
  test('dw = 1.6 K (beyond |dw| = K): the pattern is lost by a cycle slip, the verdict fails, exit code 1', async () => {
    const { code, stdout, summary, verdict, out } = await runCase(1.6);
    expect(code).toBe(1);
    expect(JSON.parse(stdout)).toMatchObject({ pass: false, exitCode: 1 });
    expect(summary.pass).toBe(false);
    expect(verdict.before).toBe('in-phase q=0 on mode 0');
    expect(verdict.persisted).toBe(false);
    expect(verdict.slipped).toBe(true);
    // one beat = one full turn of psi (Adler): the unwrapped excursion reaches about 2 pi
    expect(verdict.maxPhaseExcursion).toBeGreaterThan(Math.PI);
    expect(verdict.became).toContain('unlocked');
    expect(verdict.reasons.join(' ')).toMatch(/did not persist.*cycle slip/);
    // the prediction (the frame's live prediction, or the guide) also says the pattern is lost
    expect(verdict.prediction.persists).toBe(false);
    expect(verdict.prediction.agreed).toBe(true);
    expect(verdict.guide.slipped).toBe(true);
    // after the restore the pair locks again
    expect(verdict.recovered).toBe(true);
    expect(verdict.timeToRelock.tau).toBeGreaterThan(0);
    expect(summary.state).toHaveLength(2);

    // the report: one self-contained HTML file with the plots, the failed verdict and the caution
    const written = await report(out);
    expect(written.code).toBe(0);
    const html = readFileSync(JSON.parse(written.stdout).report, 'utf8');
    expect(html.startsWith('<!doctype html>')).toBe(true);
    expect(html).not.toMatch(/<script|<link|src="http/);
    expect((html.match(/<svg/g) ?? []).length).toBeGreaterThanOrEqual(4);
    expect(html).toContain('slope -1/2: white FM');
    expect(html).toContain('Neighbour phase differences');
    expect(html).toContain('dw-1.6K');
    expect(html).toContain('class="status fail">FAIL');
    expect(html).toContain(
      'Simulation does not replace qualification of real hardware. ' +
        "A PASS or a stability figure here holds under the simulated noise model only and does not mean compliance with any standard's mask. " +
        'Qualify real hardware to the standards that apply, with accredited practice.',
    );
    // a failed soak has no PASS to qualify at its head
    expect(html).not.toContain('data-testid="pass-caution"');
  });

  test('dw = 0.5 K (inside): the pattern persists, shifted to sin psi = 0.5, and the soak passes with exit code 0', async () => {
    const { code, summary, verdict } = await runCase(0.5);
    expect(code).toBe(0);
    expect(summary.pass).toBe(true);
    expect(verdict.persisted).toBe(true);
    expect(verdict.slipped).toBe(false);
    // Adler: the locked phase difference moves to asin(dw / K) = asin(0.5) = 0.5236 (3% as in tests/unit/physics/adler.test.ts)
    expect(Math.abs(verdict.maxPhaseExcursion - Math.asin(0.5))).toBeLessThan(0.03 * Math.asin(0.5) + 0.01);
    expect(verdict.prediction.persists).toBe(true);
    expect(verdict.recovered).toBe(true);
    expect(verdict.pass).toBe(true);
    expect(summary.state[0][0]).toEqual({ x: expect.any(Number), xdot: expect.any(Number) });
  });

  test('a soak that ends inside a window: INCOMPLETE, exit code 0, and 1 under --fail-incomplete', async () => {
    const c = setUp(0.5);
    const until = String(start + 2000);
    const plain = await soak([c.scenario, '--campaign', c.campaign, '--until', until, '--out', c.out]);
    expect(plain.code).toBe(0);
    const summary = JSON.parse(readFileSync(join(c.out, 'summary.json'), 'utf8'));
    expect(summary.counts).toMatchObject({ faults: 1, passed: 0, failed: 0, incomplete: 1 });
    expect(summary.verdicts[0].outcome).toBe('incomplete');
    expect(summary.pass).toBe(true);
    expect(summary.notes.join(' ')).toMatch(/1 fault was INCOMPLETE/);
    const strict = await soak([c.scenario, '--campaign', c.campaign, '--until', until, '--out', `${c.out}-strict`, '--fail-incomplete']);
    expect(strict.code).toBe(1);
    expect(JSON.parse(strict.stdout)).toMatchObject({ pass: false, exitCode: 1 });
  });

  test('a ring locked on the unwanted mode fails every fault as a design defect, and the report says so at the top', async () => {
    // two modes, the second (1500 ppm up) with the larger gain and started alone: it wins and locks
    const dir = mkdtempSync(join(tmpdir(), 'syncring-unwanted-'));
    const scenario = join(dir, 'pair.json');
    writeFileSync(
      scenario,
      JSON.stringify({
        ...adlerPairScenario(eps, kappaSigma),
        modes: [
          { omega: 1, gain: 1, loss: 0.5 },
          { omega: 1.0015, gain: 1, loss: 0 },
        ],
        initial: { pattern: { q: 0, amplitude: 2, mode: 1 } },
        nominalFrequencyHz: 10e6,
      }),
    );
    const campaign = join(dir, 'campaign.json');
    writeFileSync(
      campaign,
      JSON.stringify({
        faults: [{ id: 'nudge', start, action: 'kick-mode', params: { node: 0, mode: 1, amount: 0.05 } }],
        stability: { uncoupledReference: false },
      }),
    );
    const out = join(dir, 'out');
    const result = await soak([scenario, '--campaign', campaign, '--until', String(start + 12000), '--out', out]);
    expect(result.code).toBe(1);
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    const v = summary.verdicts[0];
    expect(v.before).toBe('in-phase q=0 on mode 1');
    expect(v.outcome).toBe('fail');
    expect(v.reasons[0]).toMatch(/^the ring was locked on unwanted mode 1 before the fault: a design defect/);
    expect(summary.final.pattern).toMatchObject({ carryingMode: 1, wantedMode: false });
    const written = await report(out);
    const html = readFileSync(JSON.parse(written.stdout).report, 'utf8');
    expect(html).toContain(
      'Design defect: the soak ended with the ring locked (in-phase) on unwanted mode 1; ' +
        "the board's output then sits at that mode's frequency, about +1500 ppm (15 kHz at 10 MHz)",
    );
  });

  test('a bad campaign is refused with exit code 2 naming the field', async () => {
    const c = setUp(0.5);
    writeFileSync(
      c.campaign,
      JSON.stringify({ faults: [{ start: 1, action: 'set-detuning', params: { node: 5, delta: 0 }, duration: 1 }] }),
    );
    const { code, stderr } = await soak([c.scenario, '--campaign', c.campaign, '--until', '100', '--out', c.out]);
    expect(code).toBe(2);
    expect(stderr).toContain(`${c.campaign}: faults[0].params.node: must be between 0 and 1 (got 5)`);
  });
});
