/**
 * `syncring stability` on measured files, the soak's mask criterion, the soak's series export and
 * the report overlay, through the built command (README, "Stability statistics").
 *
 * The NIST SP 1065 1000-point set (W. J. Riley, Handbook of Frequency Stability Analysis, 2008)
 * comes from its published generator (tests/support/nist-test-set.ts); the published values are
 * the test-set table of SP 1065 (as in tests/unit/stability/nist-1000.test.ts).
 */
import { describe, expect, test } from 'vitest';
import { execFile } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { nistTestSet } from '../support/nist-test-set.js';
import { runPairSoak } from '../support/pair-soak.js';

const root = new URL('../../', import.meta.url).pathname;
const bin = join(root, 'bin/syncring.js');

function syncring(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    execFile('node', [bin, ...args], { cwd: root, timeout: 60_000 }, (error, stdout, stderr) =>
      resolve({ code: error ? ((error as { code?: number }).code ?? -1) : 0, stdout, stderr }),
    );
  });
}

const work = mkdtempSync(join(tmpdir(), 'syncring-stability-'));
const sevenDigits = (v: number): number => Number(v.toPrecision(7));

describe('syncring stability on the NIST SP 1065 1000-point set', () => {
  const y = nistTestSet(1000);
  const frequencyFile = join(work, 'nist-frequency.txt');
  writeFileSync(frequencyFile, `# NIST SP 1065 test set, fractional frequency\n${Array.from(y).join('\n')}\n`);

  test('--type frequency --tau0 1 gives the published mean and ADEV at tau 1, 10, 100, each with its edf and interval', async () => {
    const { code, stdout } = await syncring('stability', frequencyFile, '--tau0', '1', '--type', 'frequency', '--spacing', 'decade');
    expect(code).toBe(0);
    const r = JSON.parse(stdout);
    expect(r.samples).toBe(1000);
    expect(sevenDigits(r.values.mean)).toBe(0.4897745); // NIST SP 1065 test-set table
    expect(r.stability.sweep.tau).toEqual([1, 10, 100]);
    const series = r.stability.sweep.series;
    // NIST SP 1065 test-set table: Allan, Overlapping Allan, Modified Allan rows
    expect(series.adev.deviation.map(sevenDigits)).toEqual([0.2922319, 0.09965736, 0.03897804]);
    expect(series.oadev.deviation.map(sevenDigits)).toEqual([0.2922319, 0.09159953, 0.03241343]);
    expect(series.mdev.deviation.map(sevenDigits)).toEqual([0.2922319, 0.06172376, 0.02170921]);
    for (const metric of ['oadev', 'mdev', 'tdev']) {
      r.stability.intervals[metric].forEach((iv: { edf: number; low: number; high: number }, i: number) => {
        expect(iv.edf).toBeGreaterThan(0);
        expect(iv.low).toBeLessThan(series[metric].deviation[i]);
        expect(iv.high).toBeGreaterThan(series[metric].deviation[i]);
      });
    }
    // SP 1065 white FM edf at m = 10, N = 1001 phase points: 146.1768 (by hand, tests/unit/stability/confidence.test.ts)
    expect(r.stability.intervals.oadev[1].edf).toBeCloseTo(146.1768, 3);
    expect(r.stability.noise[0].type).toBe('white FM'); // independent uniform draws
    expect(r.caution).toMatch(/describe the data file supplied/);
    expect(r.thresholds).toEqual(expect.objectContaining({ minIndependentTerms: 4, fitMinEdf: 8 }));
  });

  test('the same data as a two-column phase file (t, x) gives the same deviations, tau0 from the time column', async () => {
    const lines = ['# t (s)  x (s), integrated from the frequency set'];
    let x = 0;
    lines.push('0 0');
    for (let i = 0; i < y.length; i++) lines.push(`${i + 1} ${(x += y[i])}`);
    const phaseFile = join(work, 'nist-phase.txt');
    writeFileSync(phaseFile, `${lines.join('\n')}\n`);
    const { code, stdout } = await syncring('stability', phaseFile, '--spacing', 'decade');
    expect(code).toBe(0);
    const r = JSON.parse(stdout);
    expect(r.tau0From).toBe('time column');
    expect(r.tau0).toBe(1);
    expect(r.stability.sweep.series.oadev.deviation.map(sevenDigits)).toEqual([0.2922319, 0.09159953, 0.03241343]);
  });

  test('--html writes a report with error bars, the interval table and the caution; --mask adds the margin and its caution', async () => {
    const mask = join(work, 'lab-mask.csv');
    writeFileSync(mask, '# name: invented lab TDEV mask\ntau,tdev\n1,1\n100,100\n');
    const html = join(work, 'nist.html');
    const { code, stdout } = await syncring(
      'stability',
      frequencyFile,
      '--tau0',
      '1',
      '--type',
      'frequency',
      '--mask',
      mask,
      '--html',
      html,
    );
    expect(code).toBe(0);
    const r = JSON.parse(stdout);
    expect(r.mask.name).toBe('invented lab TDEV mask');
    expect(r.stability.mask.meets).toBe(true);
    expect(r.maskCaution).toMatch(/not a compliance test/);
    const page = readFileSync(html, 'utf8');
    expect(page).toContain('class="error-bar"');
    expect(page).toContain('data-testid="interval-table"');
    expect(page).toContain('data-testid="measured-caution"');
    expect(page).toContain('data-testid="mask-margin"');
  });

  test('bad input exits 2 with the file and line, or the option', async () => {
    const bad = join(work, 'bad.txt');
    writeFileSync(bad, '1e-12\n2e-12\n# fine\n3e-12 4e-12\n');
    let r = await syncring('stability', bad, '--tau0', '1');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/bad\.txt: line 4: has 2 columns but line 1 has 1/);
    r = await syncring('stability', frequencyFile);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/has one column, so the sample interval must be given: --tau0 SECONDS/);
    r = await syncring('stability', frequencyFile, '--tau0', '1', '--type', 'phaze');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--type must be phase or frequency/);
    r = await syncring('stability', frequencyFile, '--tau0', '1', '--mask', join(work, 'no-such-mask.csv'));
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/no such mask file/);
    const short = join(work, 'short.txt');
    writeFileSync(short, '1\n2\n3\n');
    r = await syncring('stability', short, '--tau0', '1');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/short\.txt: holds 3 values; the statistics need at least 16/);
  });
});

describe('a soak with a mask, its series export and the report overlay (two-node pair)', () => {
  const passing = {
    name: 'invented flat TDEV limit 1 ns',
    metric: 'tdev',
    points: [
      [1e-7, 1e-9],
      [1e-4, 1e-9],
    ],
  };
  const crossing = {
    name: 'invented flat TDEV limit 0.1 ns',
    metric: 'tdev',
    points: [
      [1e-7, 1e-10],
      [1e-4, 1e-10],
    ],
  };

  test('a mask that is met: exit 0, the margin in the summary with its caution; the series files read back to the same deviations', async () => {
    const dir = mkdtempSync(join(work, 'pass-'));
    const out = join(dir, 'out');
    const run = await runPairSoak(dir, out, { uncoupledReference: true, nominalFrequencyHz: 1e7, stability: { mask: passing } });
    expect(run.code).toBe(0);
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    const mask = summary.stability.mask;
    expect(mask.pass).toBe(true);
    expect(mask.required).toBe(true);
    expect(mask.judged).toBe('ensemble');
    expect(mask.margin.db).toBeGreaterThan(0);
    expect(mask.caution).toMatch(/not a compliance test/);
    expect(summary.notes.join(' ')).toMatch(/meets mask "invented flat TDEV limit 1 ns" with a margin of/);
    for (const name of ['ensemble', 'node', 'uncoupledEnsemble', 'singlePart'])
      expect(existsSync(join(out, 'series', `${name}.txt`))).toBe(true);
    const exported = await syncring('stability', join(out, 'series', 'ensemble.txt'));
    expect(exported.code).toBe(0);
    const r = JSON.parse(exported.stdout);
    const own = summary.stability.series.find((s: { name: string }) => s.name === 'ensemble');
    expect(r.tau0).toBeCloseTo(summary.stability.tau0, 15);
    expect(r.samples).toBe(own.points);
    r.stability.sweep.series.oadev.deviation.forEach((v: number, i: number) =>
      expect(Math.abs(v / own.sweep.series.oadev.deviation[i] - 1)).toBeLessThan(1e-9),
    );
    expect(r.stability.intervals.tdev.map((i: { edf: number }) => i.edf)).toEqual(own.intervals.tdev.map((i: { edf: number }) => i.edf));

    // the report overlays another soak's array output, or a measured file, on the ADEV plot
    const other = join(dir, 'other');
    expect((await runPairSoak(mkdtempSync(join(dir, 'o-')), other, { nominalFrequencyHz: 1e7 })).code).toBe(0);
    let rep = await syncring('report', out, '--overlay', other, '--overlay-label', 'second pair soak');
    expect(rep.code).toBe(0);
    let page = readFileSync(join(out, 'report.html'), 'utf8');
    expect(page).toContain('overlay: second pair soak');
    expect(page).toContain('class="error-bar"');
    expect(page).toContain('data-testid="mask-margin"');
    rep = await syncring('report', out, '--overlay', join(out, 'series', 'singlePart.txt'), '--out', join(dir, 'r2.html'));
    expect(rep.code).toBe(0);
    page = readFileSync(join(dir, 'r2.html'), 'utf8');
    expect(page).toContain('overlay: singlePart.txt');
    expect(page).toMatch(/a measured file/);
    rep = await syncring('report', out, '--overlay', join(dir, 'nothing-here'));
    expect(rep.code).toBe(2);
    expect(rep.stderr).toMatch(/--overlay .*nothing-here: no such soak folder or data file/);
    rep = await syncring('report', out, '--overlay-label', 'x');
    expect(rep.code).toBe(2);
  }, 120_000);

  test('a mask the array output crosses fails the soak (exit 1) and says where; reported only with mustMeetMask false', async () => {
    const dir = mkdtempSync(join(work, 'cross-'));
    const required = await runPairSoak(dir, join(dir, 'a'), { nominalFrequencyHz: 1e7, stability: { mask: crossing } });
    expect(required.code).toBe(1);
    const a = JSON.parse(readFileSync(join(dir, 'a', 'summary.json'), 'utf8'));
    expect(a.stability.mask.pass).toBe(false);
    expect(a.stability.mask.reason).toMatch(/the array output's TDEV exceeds mask "invented flat TDEV limit 0.1 ns" at tau [0-9.e-]+ s/);
    expect(a.stability.mask.margin.db).toBeLessThan(0);
    const reported = await runPairSoak(mkdtempSync(join(work, 'cross2-')), join(dir, 'b'), {
      nominalFrequencyHz: 1e7,
      stability: { mask: crossing, mustMeetMask: false },
    });
    expect(reported.code).toBe(0);
    const b = JSON.parse(readFileSync(join(dir, 'b', 'summary.json'), 'utf8'));
    expect(b.stability.mask.pass).toBe(false);
    expect(b.notes.join(' ')).toMatch(/reported only \(stability.mustMeetMask is false\)/);
  }, 120_000);

  test('a mask file named in the campaign is read beside it (CSV, MTIE); a bad one is refused with exit 2 naming the field and line', async () => {
    const dir = mkdtempSync(join(work, 'file-'));
    writeFileSync(join(dir, 'mtie-mask.csv'), '# name: invented MTIE mask\ntau,mtie\n1e-7,1e-10\n1e-4,1e-8\n');
    const run = await runPairSoak(dir, join(dir, 'out'), { nominalFrequencyHz: 1e7, stability: { mask: 'mtie-mask.csv' } });
    expect(run.code).toBe(0);
    const summary = JSON.parse(readFileSync(join(dir, 'out', 'summary.json'), 'utf8'));
    expect(summary.stability.mask.mask.name).toBe('invented MTIE mask');
    expect(summary.stability.mask.margin.metric).toBe('mtie');
    expect(summary.stability.mask.pass).toBe(true);

    writeFileSync(join(dir, 'broken.csv'), 'tau,mtie\n1e-7,1e-10\n1e-4,-1\n');
    const broken = await runPairSoak(dir, join(dir, 'b'), { stability: { mask: 'broken.csv' } });
    expect(broken.code).toBe(2);
    expect(broken.stderr).toMatch(/stability\.mask: .*broken\.csv: line 3: limit must be > 0/);
    const inline = await runPairSoak(dir, join(dir, 'c'), { stability: { mask: { name: 'x', metric: 'tdev', points: [[1, 0]] } } });
    expect(inline.code).toBe(2);
    expect(inline.stderr).toMatch(/stability\.mask\.points\[0\]\[1\]/);
    const lonely = await runPairSoak(dir, join(dir, 'd'), { stability: { mustMeetMask: true } });
    expect(lonely.code).toBe(2);
    expect(lonely.stderr).toMatch(/stability\.mustMeetMask: needs a mask/);
  }, 120_000);
});
