import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadReportData } from '../../server/report/report-data.js';
import { reportHtml } from '../../server/report/html.js';
import { runPairSoak } from '../support/pair-soak.js';

/**
 * What the soak report says beside its numbers, on two real soaks of the same passing pair with
 * the uncoupled twin: one whose scenario gives no nominal frequency (the 10 MHz default stands
 * in) and one that gives 10 MHz itself. The wording is the project's own; the numbers the report
 * must show are taken from the soak's summary.json, not from the report code.
 */

const PASS_WORDING =
  "PASS means this campaign's criteria were met under the simulated noise model. " +
  "It does not mean compliance with any standard's mask. Qualify real hardware to the standards that apply, with accredited practice.";

interface Soak {
  html: string;
  summary: {
    pass: boolean;
    caution?: string;
    timeBase: { nominalFrequencyAssumed?: boolean; secondsNote?: string };
    stability: { span: number; ratioToSinglePart: { tau: number[]; node: number[]; ensemble: number[]; uncoupledEnsemble: number[] } };
  };
  stdout: string;
}

let work: string;
let assumed: Soak;
let given: Soak;

async function soak(name: string, nominalFrequencyHz?: number): Promise<Soak> {
  const dir = join(work, name);
  const out = join(dir, 'out');
  const run = await runPairSoak(work, out, { uncoupledReference: true, nominalFrequencyHz });
  expect(run.code).toBe(0);
  return {
    html: reportHtml(loadReportData(out)),
    summary: JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')),
    stdout: run.stdout,
  };
}

/** The markup of the key-number boxes. */
function keyNumbers(html: string): string {
  const start = html.indexOf('data-testid="key-numbers"');
  expect(start).toBeGreaterThan(0);
  return html.slice(start, html.indexOf('data-testid="stability-caution"', start));
}

describe('the soak report labels its numbers', () => {
  beforeAll(async () => {
    work = mkdtempSync(join(tmpdir(), 'syncring-report-labels-'));
    // one after the other: both write their scenario and campaign into `work`
    assumed = await soak('assumed');
    given = await soak('given', 10e6);
  }, 120_000); // two soaks one after the other: seconds each on a loaded machine

  afterAll(() => {
    if (work) rmSync(work, { recursive: true, force: true });
  });

  test('a soak without nominalFrequencyHz says its seconds assume 10 MHz, in the report, the summary and beside each time axis', () => {
    expect(assumed.summary.timeBase.nominalFrequencyAssumed).toBe(true);
    expect(assumed.summary.timeBase.secondsNote).toMatch(/no nominalFrequencyHz.*assumes f0 = 10 MHz/);
    expect(assumed.html).toContain('The scenario gives no nominalFrequencyHz, so every time in seconds assumes f0 = 10 MHz.');
    expect(assumed.html).toMatch(/slow time units = [\d.]+ us at an assumed 10 MHz/);
    expect(assumed.html).toContain('averaging time tau (s, at an assumed 10 MHz)');
    expect(assumed.html).toContain('TDEV, MTIE (ns, at an assumed 10 MHz)');
    expect(assumed.html).toContain('time error (ns, at an assumed 10 MHz)');
    // the same 10 MHz given by the scenario is no assumption
    expect(given.summary.timeBase.nominalFrequencyAssumed).toBe(false);
    // (matched, not compared whole: a failure should not print the whole report)
    expect(given.html.match(/at an assumed|no nominalFrequencyHz|data-testid="assumed-frequency"/)).toBeNull();
    expect(given.html).toMatch(/slow time units = [\d.]+ us at 10 MHz/);
    expect(given.html).toContain('averaging time tau (s)');
  });

  test('the ADEV guide of slope -1 names white and flicker PM, which ADEV cannot tell apart', () => {
    // ADEV ~ tau^-1 for both white and flicker PM (NIST SP 1065, table of power-law noise slopes)
    expect(assumed.html).toContain('slope -1: white or flicker PM');
    expect(assumed.html).not.toMatch(/slope -1: white PM/);
    expect(assumed.html).toContain('slope -1/2: white FM');
  });

  test('the PASS status and every PASS verdict carry the caution beside them', () => {
    expect(assumed.summary.pass).toBe(true);
    expect(assumed.summary.caution).toBe(PASS_WORDING);
    expect(JSON.parse(assumed.stdout)).toMatchObject({ pass: true, caution: PASS_WORDING });
    expect(assumed.html).toContain(
      `<div class="status pass">PASS</div>\n<p class="caution" data-testid="pass-caution">${PASS_WORDING}</p>`,
    );
    const passCells = assumed.html.match(/<td class="ok">PASS[^]*?<\/td>/g) ?? [];
    expect(passCells).toHaveLength(1);
    for (const cell of passCells) expect(cell).toContain('<span class="caution">simulated criteria, not a standard\'s mask</span>');
    // and once in full above the verdict table
    const verdicts = assumed.html.slice(assumed.html.indexOf('<h2>Verdicts</h2>'), assumed.html.indexOf('<h2>Stability tables</h2>'));
    expect(verdicts).toContain(PASS_WORDING);
  });

  test('every stability result carries the stability caution: the key numbers, each stability plot and the tables', () => {
    const plain =
      "These stability figures come from the simulated noise model, not from a measured part. It does not mean compliance with any standard's mask.";
    expect(keyNumbers(assumed.html).length).toBeGreaterThan(0);
    expect(assumed.html).toMatch(
      new RegExp(`data-testid="key-numbers"[^]*?</div></div><p class="caution" data-testid="stability-caution">${escapeRegExp(plain)}`),
    );
    const figures = assumed.html.split('<figure>').slice(1);
    const stabilityFigures = figures.filter((f) =>
      /Overlapping Allan deviation versus|Time deviation \(solid\)|Time error against|Time error with each/.test(f),
    );
    expect(stabilityFigures).toHaveLength(4);
    for (const f of stabilityFigures) expect(f.slice(0, f.indexOf('</figure>'))).toContain(plain);
    const tables = assumed.html.slice(assumed.html.indexOf('<h2>Stability tables</h2>'), assumed.html.indexOf('<h2>Definitions</h2>'));
    expect(tables).toContain(plain);
  });

  test('"time error per day" appears only with its basis: not as a key number, and in the table with the record length, no aging, no temperature', () => {
    expect(keyNumbers(assumed.html)).not.toMatch(/per day/);
    const heading = /data-testid="per-day-heading">([^<]*)<\/th>/.exec(assumed.html)?.[1] ?? '';
    expect(heading).toMatch(
      /^time error per day if this offset held \(extrapolated from the ([\d.]+) us at an assumed 10 MHz record; no aging, no temperature change; not a holdover figure\)$/,
    );
    // the record length shown is the stability record's span from the summary (in us)
    const shown = Number(/from the ([\d.]+) us/.exec(heading)![1]);
    expect(Math.abs(shown - assumed.summary.stability.span * 1e6)).toBeLessThan(0.05);
  });

  test('the key number on coupling is a coupled node against an uncoupled part, with the averaging ratios and the independence assumption beside it', () => {
    const box = keyNumbers(assumed.html);
    const value = Number(/<b>([\d.]+) x<\/b><span>Coupled node \/ uncoupled part \(ADEV\)\./.exec(box)?.[1]);
    const tau = Number(/At tau = ([\d.]+) us at an assumed 10 MHz one node inside the coupled array has/.exec(box)?.[1]) * 1e-6;
    const r = assumed.summary.stability.ratioToSinglePart;
    const i = r.tau.findIndex((t) => Math.abs(t / tau - 1) < 1e-3);
    expect(i).toBeGreaterThanOrEqual(0);
    // four significant digits as shown
    expect(Math.abs(value / r.node[i] - 1)).toBeLessThan(1e-3);
    // the array output's ratio is a different number here: it is not the one shown as the coupling's benefit
    expect(Math.abs(r.ensemble[i] / r.node[i] - 1)).toBeGreaterThan(0.05);
    expect(box).toContain(
      `The array output reaches ${Number(r.ensemble[i].toPrecision(4))} times ` +
        `and the uncoupled ensemble average ${Number(r.uncoupledEnsemble[i].toPrecision(4))} times; that much comes from plain averaging`,
    );
    expect(box).toMatch(
      /1\/sqrt\(N\) = 0\.7071 for N = 2 assumes independent noise in every part; a shared supply or a shared temperature correlates the noise/,
    );
  });
});

function escapeRegExp(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&');
}
