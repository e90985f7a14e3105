import { CampaignRun, parseCampaign, tickViewOf } from '../../src/campaign/index.js';
import { CoSimulation } from '../../src/session/session.js';
import { makeScenario } from './scenarios.js';

/** A small real ring for campaign tests: three nodes, two-way dissipative coupling, a little spread, in-phase start. */
export const campaignRing = makeScenario({
  nodes: 3,
  twoWay: true,
  epsilon: 0.01,
  modes: [{ omega: 1, gain: 1, loss: 0 }],
  coupling: { strength: 0.1, reactive: 0, dissipative: 1 },
  detuning: [0.01, 0, -0.01],
  initial: { pattern: { q: 0, amplitude: 2, mode: 0 } },
  stepsPerPeriod: 8,
});

export const campaignRingBase = { epsilon: 0.01, secondsPerTau: 1e-7 };

/**
 * Run `raw` (a campaign) against the ring until `until`, with the campaign's lock window: what was
 * queued when, every verdict, and `watch` called after each tick.
 */
export function driveCampaign(raw: unknown, until: number, watch?: (session: CoSimulation) => void) {
  const campaign = parseCampaign(raw, campaignRing);
  const session = new CoSimulation(campaignRing, campaign.detector.lockWindow !== null ? { lockWindow: campaign.detector.lockWindow } : {});
  const run = new CampaignRun(campaign, session.params, until, session.lock, campaignRingBase);
  const log: { tau: number; by: string; uncoupled: boolean }[] = [];
  const verdicts = [];
  while (session.tau < until) {
    for (const q of run.beforeTick(session.tau)) {
      session.enqueue(q.perturbation, q.by);
      log.push({ tau: session.tau, by: q.by, uncoupled: q.uncoupled });
    }
    const frame = session.step(until)!;
    watch?.(session);
    verdicts.push(...run.afterTick(tickViewOf(frame, session.pairs)));
  }
  verdicts.push(...run.finishAll('end'));
  return { session, run, log, verdicts };
}

/**
 * The same run, saved (session checkpoint and campaign state, through JSON) at tick `at` and
 * continued in fresh objects: its verdicts, and the saved campaign state for a look inside.
 */
export function driveCampaignResumed(raw: unknown, until: number, at: number) {
  const campaign = parseCampaign(raw, campaignRing);
  let session = new CoSimulation(campaignRing);
  let run = new CampaignRun(campaign, session.params, until, session.lock, campaignRingBase);
  const verdicts = [];
  type Saved = { s: ReturnType<CoSimulation['checkpoint']>; r: ReturnType<CampaignRun['save']> };
  let saved = null as Saved | null;
  while (session.tau < until) {
    if (session.tick === at) {
      saved = JSON.parse(JSON.stringify({ s: session.checkpoint(), r: run.save() })) as Saved;
      session = CoSimulation.fromCheckpoint(campaignRing, saved!.s);
      run = new CampaignRun(campaign, session.params, until, session.lock, campaignRingBase);
      run.load(saved!.r);
    }
    for (const q of run.beforeTick(session.tau)) session.enqueue(q.perturbation, q.by);
    verdicts.push(...run.afterTick(tickViewOf(session.step(until)!, session.pairs)));
  }
  verdicts.push(...run.finishAll('end'));
  return { verdicts, saved };
}
