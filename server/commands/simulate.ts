import { CoSimulation, type Frame } from '../../src/session/session.js';
import { INTEGRATOR_REQUESTS, type IntegratorRequest } from '../../src/envelope/choice.js';
import { scenarioToJSON } from '../../src/scenario/parse.js';
import { logHeader, sampleOf } from '../../src/protocol/log-records.js';
import { runSummaryOf } from '../../src/protocol/run-summary.js';
import { NdjsonFile } from '../log/ndjson-file.js';
import { Progress } from '../progress.js';
import { loadScenario } from '../scenario-file.js';
import { UsageError } from '../usage-error.js';
import { SOFTWARE_VERSION } from '../version.js';

export interface SimulateArgs {
  scenario: string;
  until: number;
  out?: string;
  /** Full-system integrator: 'micro', 'envelope' or 'auto' (default). */
  mode?: string;
}

/** Largest number of samples a headless log keeps; ticks are decimated to fit. */
const MAX_LOGGED_SAMPLES = 2000;

/**
 * `syncring simulate`: run the co-simulation headless to tau = until and print one JSON object
 * (README, '`syncring simulate`') with the pattern, the phase differences, the amplitudes, the
 * guide's pattern and margin, and the full state in the original coordinates.
 */
export function simulate(args: SimulateArgs): Record<string, unknown> {
  if (!(args.until > 0) || !Number.isFinite(args.until)) throw new UsageError(`--until must be a positive number (got ${args.until})`);
  const requested = (args.mode ?? 'auto') as IntegratorRequest;
  if (!INTEGRATOR_REQUESTS.includes(requested))
    throw new UsageError(`--mode must be one of ${INTEGRATOR_REQUESTS.join(', ')} (got ${JSON.stringify(args.mode)})`);
  const { scenario } = loadScenario(args.scenario);
  const session = new CoSimulation(scenario, { integrator: requested });
  const log = args.out ? new NdjsonFile(args.out) : null;
  const totalTicks = Math.ceil(args.until / session.macroStep);
  const every = Math.max(1, Math.ceil(totalTicks / MAX_LOGGED_SAMPLES));
  const events: Frame['events'] = [];
  const started = Date.now();
  const progress = new Progress('simulate', args.until);
  log?.append(logHeader(scenario, scenarioToJSON(scenario), SOFTWARE_VERSION));
  const last = session.runUntil(args.until, (frame) => {
    for (const event of frame.events) {
      events.push(event);
      log?.append({ record: 'event', event });
    }
    if (log && (frame.tick % every === 0 || frame.status === 'halted')) {
      log.append(sampleOf(frame));
    }
    progress.update(frame.tau, `tau ${frame.tau.toPrecision(6)}`);
  });
  progress.finish();
  if (!last) throw new UsageError('nothing was simulated');
  const state = session.fullState();
  log?.append({ record: 'checkpoint', tau: session.tau, tick: session.tick, state });
  log?.close();
  const summary = runSummaryOf(last);
  return {
    ...summary,
    tau: session.tau,
    scenario: scenario.name,
    mode: session.integrator.mode,
    noiseModel: session.integrator.noiseModel,
    halted: session.halted,
    phases: last.full.phase,
    warnings: session.warnings.map((w) => w.message),
    events,
    integrator: integratorReport(session, requested),
    wallSeconds: (Date.now() - started) / 1000,
    state,
  };
}

/** Which integrator ran, why, with what noise, and what it cost. */
function integratorReport(session: CoSimulation, requested: IntegratorRequest): Record<string, unknown> {
  const { micro, envelope, mode, reason, noiseModel, ticksIn } = session.integrator;
  const ran = (ticksIn.envelope > 0 ? 1 : 0) + (ticksIn.micro > 0 ? 1 : 0);
  return {
    requested,
    mode,
    reason,
    noiseModel,
    ...(noiseModel === 'averaged-diffusion'
      ? { noiseNote: 'averaged diffusion of the slow variables: statistically, not pathwise, equivalent to micro-stepping' }
      : {}),
    ticks: { ...ticksIn },
    method:
      ran > 1
        ? 'micro steps and the envelope (see events for the switches)'
        : mode === 'envelope'
          ? 'envelope: second-order averaging with near-identity reconstruction, Dormand-Prince 5(4) in slow time'
          : 'micro steps in the rotating frame with exact macro-step noise',
    stepsPerPeriod: session.scenario.integrator.stepsPerPeriod,
    microStep: micro.stepper.nominalStep,
    macroStep: session.macroStep,
    evaluations: micro.stepper.evaluations,
    envelope: envelope
      ? {
          torusPoints: envelope.field.torus.points,
          slowEvaluations: envelope.slowEvaluations,
          chunks: envelope.chunks,
          fieldEvaluations: envelope.field.fieldEvaluations,
          health: envelope.health,
        }
      : null,
    guideEvaluations: session.guide.evaluations,
  };
}
