import { existsSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Campaign } from '../../src/campaign/index.js';
import type { Scenario } from '../../src/scenario/types.js';
import { ASSUMED_FREQUENCY_NOTE, tauToSeconds } from '../../src/scenario/units.js';
import { PASS_CAUTION } from '../../src/campaign/cautions.js';
import type { SoakOutcome } from '../../src/protocol/soak-records.js';
import {
  RESUMES_FILE,
  SUMMARY_FILE,
  type ResumeEntry,
  type SoakStatus,
  type SoakSummary,
  type SoakTimeBase,
} from '../../src/protocol/soak-files.js';

/**
 * The files a soak keeps beside its log (formats in src/protocol/soak-files.ts), each replaced
 * atomically: written to a temporary name, then renamed over the old one.
 */
export function writeJsonAtomically(dir: string, name: string, value: unknown): string {
  const path = join(dir, name);
  const temporary = `${path}.${process.pid}.tmp`;
  writeFileSync(temporary, `${JSON.stringify(value, null, 2)}\n`);
  renameSync(temporary, path);
  return path;
}

/** Whether the soak's seconds rest on the default nominal frequency, with the sentence that says so. */
export function nominalFrequencyFields(scenario: Scenario): Pick<SoakStatus, 'nominalFrequencyAssumed' | 'secondsNote'> {
  return scenario.units.nominalFrequencyAssumed
    ? { nominalFrequencyAssumed: true, secondsNote: ASSUMED_FREQUENCY_NOTE }
    : { nominalFrequencyAssumed: false };
}

export function timeBaseOf(scenario: Scenario, campaign: Campaign, macroStep: number, stride: number): SoakTimeBase {
  return {
    epsilon: scenario.epsilon,
    secondsPerTau: tauToSeconds(1, scenario.units.nominalFrequencyHz, scenario.modes[0].omega),
    nominalFrequencyHz: scenario.units.nominalFrequencyHz,
    ...nominalFrequencyFields(scenario),
    campaignUnit: campaign.timeUnit,
    tauPerCampaignUnit: campaign.tauPerUnit,
    macroStep,
    sampleStrideTicks: stride,
  };
}

/** summary.json: the outcome with what a reader needs to read it. */
export function writeSummary(
  out: string,
  outcome: SoakOutcome,
  about: { scenario: Scenario; campaign: Campaign; until: number; macroStep: number; stride: number },
  extra: Pick<SoakSummary, 'note' | 'log' | 'resumeCheck' | 'wallSeconds'> = {},
): { path: string; summary: SoakSummary } {
  const { pass, exitCode, ...rest } = outcome;
  const summary: SoakSummary = {
    format: 'syncring-soak-summary',
    formatVersion: 1,
    pass,
    caution: PASS_CAUTION,
    exitCode,
    scenario: about.scenario.name,
    campaign: about.campaign.name,
    until: about.until,
    timeBase: timeBaseOf(about.scenario, about.campaign, about.macroStep, about.stride),
    resumes: readResumes(out),
    ...extra,
    ...rest,
  };
  return { path: writeJsonAtomically(out, SUMMARY_FILE, summary), summary };
}

export function readResumes(out: string): ResumeEntry[] {
  const path = join(out, RESUMES_FILE);
  if (!existsSync(path)) return [];
  try {
    const entries: unknown = JSON.parse(readFileSync(path, 'utf8'));
    return Array.isArray(entries) ? (entries as ResumeEntry[]) : [];
  } catch {
    return [];
  }
}

export function recordResume(out: string, entry: ResumeEntry): void {
  writeJsonAtomically(out, RESUMES_FILE, [...readResumes(out), entry]);
}
