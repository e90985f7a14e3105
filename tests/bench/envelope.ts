import { CoSimulation } from '../../src/session/session.js';
import { ModelParameters } from '../../src/model/parameters.js';
import { initialRotatingState } from '../../src/model/initial.js';
import { MicroStepper } from '../../src/integrate/micro-stepper.js';
import type { Scenario } from '../../src/scenario/types.js';
import { relativeError } from './measure.js';

/**
 * Envelope section of the benchmark: the session in envelope mode (second-order averaging with
 * near-identity reconstruction) run to tau = 10/eps with macro ticks of about one slow time unit,
 * so that per-tick bookkeeping (guide, observables) does not dominate. Effective carrier periods
 * per wall second = (tau / 2 pi) / wall seconds of `runUntil` (session set-up reported apart).
 * Its full state is compared with micro-stepping where that is affordable. The envelope's error
 * here is far below the micro stepper's own at session step counts (RK4's error over 10/eps does
 * not shrink with eps), so the reference is Richardson-extrapolated rotating-frame RK4 from S and
 * 2S steps per period, y = y_2S + (y_2S - y_S) / 15 (order 4); |y_2S - y_S| / 15 estimates the
 * error of y_2S and bounds that of the extrapolation from above (common practice).
 */
export interface EnvelopeCase {
  epsilon: number;
  periods: number;
  macroPeriods: number;
  ticks: number;
  ticksInEnvelope: number;
  setupSeconds: number;
  /** Best of the trials, wall seconds of runUntil. */
  runSeconds: number;
  periodsPerSecond: number;
  /** The same per CPU second of this process (what one free core delivers). */
  cpuPeriodsPerSecond: number;
  slowEvaluations: number;
  /** Envelope against the extrapolated micro reference; null when micro-stepping was not affordable. */
  relativeError: number | null;
  /** |y_2S - y_S| / 15 relative: the estimated error of the finer run, an upper bound for the reference's. */
  referenceUncertainty: number | null;
  referenceSeconds: number | null;
  note: string;
}

export interface EnvelopeOptions {
  /** The problem at a given eps (the bench's ring with omega_1 = 1.37, no noise). */
  scenarioAt: (epsilon: number, macroPeriods: number) => Scenario;
  epsilons: number[];
  /** RK4 steps per period S of the coarser reference run (the finer takes 2S). */
  referenceSteps: number;
  /** Skip micro-stepping when its predicted cost (both runs) exceeds this. */
  microBudgetSeconds: number;
  trials: number;
  log: (line: string) => void;
}

const TWO_PI = 2 * Math.PI;
const SLOW_SPAN = 10;

export function benchEnvelope(options: EnvelopeOptions): EnvelopeCase[] {
  let microPeriodsPerSecond = 0; // measured by the first micro run, used to predict the next
  return options.epsilons.map((epsilon) => {
    const macroPeriods = Math.max(1, Math.round(1 / (TWO_PI * epsilon)));
    const scenario = options.scenarioAt(epsilon, macroPeriods);
    const tauEnd = SLOW_SPAN / epsilon;
    const periods = tauEnd / TWO_PI;
    options.log(`envelope mode at eps = ${epsilon} to tau = ${SLOW_SPAN}/eps (${periods.toExponential(2)} periods) ...`);
    let best = Number.POSITIVE_INFINITY;
    let bestCpu = Number.POSITIVE_INFINITY;
    let setupSeconds = Number.POSITIVE_INFINITY;
    let session: CoSimulation | null = null;
    for (let t = 0; t <= options.trials; t++) {
      const t0 = performance.now();
      const s = new CoSimulation(scenario, { integrator: 'envelope' });
      const cpu = process.cpuUsage();
      const t1 = performance.now();
      s.runUntil(tauEnd);
      const t2 = performance.now();
      const used = process.cpuUsage(cpu);
      if (s.halted) throw new Error(`envelope bench: the session halted at eps = ${epsilon}: ${s.halted}`);
      if (t > 0 || options.trials === 0) {
        best = Math.min(best, (t2 - t1) / 1000);
        bestCpu = Math.min(bestCpu, (used.user + used.system) / 1e6);
        setupSeconds = Math.min(setupSeconds, (t1 - t0) / 1000);
      }
      session = s;
    }
    const s = session!;
    const envelope = s.integrator.envelope;
    const result: EnvelopeCase = {
      epsilon,
      periods,
      macroPeriods,
      ticks: s.tick,
      ticksInEnvelope: s.integrator.ticksIn.envelope,
      setupSeconds,
      runSeconds: best,
      periodsPerSecond: periods / best,
      cpuPeriodsPerSecond: periods / bestCpu,
      slowEvaluations: envelope ? envelope.slowEvaluations : 0,
      relativeError: null,
      referenceUncertainty: null,
      referenceSeconds: null,
      note: '',
    };
    // the 2S run costs twice the S run
    const microCost = microPeriodsPerSecond > 0 ? (3 * periods) / microPeriodsPerSecond : 0;
    if (microCost > options.microBudgetSeconds) {
      result.note = `micro-stepping not measured (predicted ${microCost.toFixed(0)} s > budget ${options.microBudgetSeconds} s)`;
      return result;
    }
    const steps = options.referenceSteps;
    options.log(`  reference: rotating-frame RK4 to the same tau at ${steps} and ${2 * steps} steps per period ...`);
    const params = new ModelParameters(scenario);
    const start = initialRotatingState(scenario, params);
    const t0 = performance.now();
    const coarse = runMicro(params, start, steps, tauEnd, macroPeriods);
    const t1 = performance.now();
    const fine = runMicro(params, start, 2 * steps, tauEnd, macroPeriods);
    const t2 = performance.now();
    microPeriodsPerSecond = periods / ((t1 - t0) / 1000);
    const reference = fine.state.map((y, i) => y + (y - coarse.state[i]) / 15);
    result.referenceSeconds = (t2 - t0) / 1000;
    result.relativeError = relativeError(s.full.state, reference);
    result.referenceUncertainty = relativeError(coarse.state, fine.state) / 15;
    return result;
  });
}

/** Micro steps to tauEnd in ticks of macroPeriods periods, as the session would. */
function runMicro(params: ModelParameters, start: Float64Array, steps: number, tauEnd: number, macroPeriods: number): MicroStepper {
  const stepper = new MicroStepper(params, start, steps, { method: 'rk4' });
  const tick = (macroPeriods * TWO_PI) / params.omega[0];
  for (let k = 1; k * tick < tauEnd; k++) stepper.advance(k * tick);
  stepper.advance(tauEnd);
  return stepper;
}

export interface EndToEndCase {
  epsilon: number;
  periods: number;
  macroPeriods: number;
  ticks: number;
  ticksInEnvelope: number;
  periodsPerSecond: number;
  cpuPeriodsPerSecond: number;
}

/**
 * The envelope as `syncring simulate --mode envelope` runs it: the scenario's default macro tick
 * (defaultMacroPeriods, a hundredth of a slow time unit), so the per-tick guide, observables,
 * lock detection and pattern work are all in the figure, with a frame callback per tick like the
 * command's. Effective carrier periods per wall and per CPU second of runUntil, best of `trials`.
 */
export function benchEnvelopeEndToEnd(scenario: Scenario, tauEnd: number, trials: number): EndToEndCase {
  let bestWall = Number.POSITIVE_INFINITY;
  let bestCpu = Number.POSITIVE_INFINITY;
  let session: CoSimulation | null = null;
  for (let t = 0; t < trials; t++) {
    const s = new CoSimulation(scenario, { integrator: 'envelope' });
    let frames = 0;
    const cpu = process.cpuUsage();
    const t0 = performance.now();
    s.runUntil(tauEnd, () => frames++);
    const wall = (performance.now() - t0) / 1000;
    const used = process.cpuUsage(cpu);
    if (s.halted) throw new Error(`end-to-end envelope bench: the session halted: ${s.halted}`);
    bestWall = Math.min(bestWall, wall);
    bestCpu = Math.min(bestCpu, (used.user + used.system) / 1e6);
    session = s;
  }
  const periods = tauEnd / TWO_PI;
  return {
    epsilon: scenario.epsilon,
    periods,
    macroPeriods: scenario.integrator.macroPeriods,
    ticks: session!.tick,
    ticksInEnvelope: session!.integrator.ticksIn.envelope,
    periodsPerSecond: periods / bestWall,
    cpuPeriodsPerSecond: periods / bestCpu,
  };
}
