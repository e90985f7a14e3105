/**
 * The wire protocol between the server and the dashboard: the one definition both sides import.
 * Every message is a JSON object with a `type`. Version PROTOCOL_VERSION is announced in `hello`.
 *
 * Server -> browser: hello, frame, event, status, ack, error.
 * Browser -> server: {"type": "command", "action": ..., "id"?: ...} (see COMMAND_ACTIONS).
 */
import type { ModelParameters } from '../model/parameters.js';
import type { Frame, SessionEvent } from '../session/session.js';
import { PERTURBATION_ACTIONS, parsePerturbation, type Perturbation } from '../session/perturbation.js';
import { InputError, failInput as fail } from '../util/input-error.js';
import { child, fieldChecks, has } from '../util/json-fields.js';

export const PROTOCOL_VERSION = 1;

/** Largest client message the server accepts (bytes). */
export const MAX_CLIENT_MESSAGE_BYTES = 16 * 1024;

export type Role = 'operator' | 'viewer';
export type RunStatus = 'running' | 'paused' | 'halted';
/** Pace of the run: slow-time units (eps tau) per wall second, or as fast as possible. */
export type Speed = number | 'max';

export interface LinkState {
  from: number;
  to: number;
  weight: number;
  nominal: number;
}

/** One node's crystal and load as built, for a board described by its parts: what turns a C_L change into ppm. */
export interface NodePartsView {
  seriesFrequencyHz: number;
  motionalCapacitanceF: number;
  shuntCapacitanceF: number;
  /** Nominal + tolerance + trim, as the scenario built it. */
  loadCapacitanceF: number;
  pullabilityPpmPerPf: number;
  startupMargin: number;
  driveLevelW: number;
}

/** Everything a dashboard needs to label and draw the current run. */
export interface SessionInfo {
  scenarioName: string;
  /** The scenario in its normalized JSON form. */
  scenario: unknown;
  nodes: number;
  modes: number;
  epsilon: number;
  nominalFrequencyHz: number;
  /**
   * True when the scenario gave no nominalFrequencyHz and the default stands in: every time in
   * seconds the dashboard shows is then an assumption and is labelled as one. Absent from
   * servers older than the field (read as given).
   */
  nominalFrequencyAssumed: boolean;
  omega: number[];
  links: LinkState[];
  /** Nominal Delta_k per node: without the offsets part noise and the environment add each tick. */
  detuning: number[];
  detuningPpm: number[];
  coupling: { strength: number; reactive: number; dissipative: number };
  noise: { intensity: number; detuningWalk: number; seed: number };
  macroStep: number;
  /** mode: which full-system integrator runs now, and why (the envelope is chosen where it is trusted and pays). */
  integrator: { mode: 'micro' | 'envelope'; reason: string; stepsPerPeriod: number; macroPeriods: number; averagingGrid: number };
  status: RunStatus;
  speed: Speed;
  warnings: string[];
  /** The session log's file name (GET /api/log downloads it), never its path on the server; null without a log. */
  logFile: string | null;
  /** Per node, the parts of a board described by them (docs/parts.md); null in model units, absent from older servers. */
  parts?: NodePartsView[] | null;
}

/** The few numbers per tick that the dashboard's time charts keep. */
export interface HistoryPoint {
  tau: number;
  slowTime: number;
  full: { phaseDifferences: number[]; amplitude: number[][] };
  guide: { phaseDifferences: number[]; amplitude: number[][] };
  locked: boolean;
  /** Order parameter of the current pattern's wave number (or the largest one when unlocked). */
  orderParameter: number;
  divergence: number;
}

export type WireFrame = Omit<Frame, 'events'>;

export type ServerMessage =
  | {
      type: 'hello';
      protocol: number;
      software: string;
      role: Role;
      session: SessionInfo;
      history: HistoryPoint[];
      events: SessionEvent[];
      viewers: number;
    }
  /** emittedAt: wall clock (ms since 1970) when the simulation handed the frame out, for frame-age measurements. */
  | { type: 'frame'; frame: WireFrame; emittedAt: number }
  | { type: 'event'; event: SessionEvent }
  | { type: 'status'; session: SessionInfo; viewers: number }
  | { type: 'ack'; id: string | number | null; action: string }
  | { type: 'error'; reason: string; path?: string; id?: string | number | null };

export type ControlCommand =
  | { action: 'pause' }
  | { action: 'resume' }
  | { action: 'reset' }
  | { action: 'set-speed'; speed: Speed }
  | { action: 'load-scenario'; name?: string; scenario?: unknown };

export type ClientCommand = { id: string | number | null } & (
  { kind: 'perturbation'; perturbation: Perturbation } | ({ kind: 'control' } & ControlCommand)
);

export const CONTROL_ACTIONS = ['pause', 'resume', 'reset', 'set-speed', 'load-scenario'] as const;
export const COMMAND_ACTIONS: readonly string[] = [...PERTURBATION_ACTIONS, ...CONTROL_ACTIONS];

/** Fastest pace an operator may ask for, in slow-time units per second. */
export const MAX_SPEED = 1e6;

/**
 * Validate one client message (raw text). Perturbations are checked against the live model, so
 * a command naming a node or a link that does not exist is refused before anything changes.
 * @throws InputError naming the field, answering the command's id once the id could be read.
 */
export function parseClientMessage(text: string, params: ModelParameters): ClientCommand {
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (error) {
    throw new InputError('', `not valid JSON: ${(error as Error).message}`);
  }
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw))
    throw new InputError('', 'a message must be a JSON object with a "type"');
  const obj = raw as Record<string, unknown>;
  const id = typeof obj.id === 'string' || typeof obj.id === 'number' ? obj.id : null;
  try {
    return parseCommand(obj, id, params);
  } catch (error) {
    if (error instanceof InputError) throw error.answering(id);
    throw error;
  }
}

function parseCommand(obj: Record<string, unknown>, id: string | number | null, params: ModelParameters): ClientCommand {
  if (has(obj, 'id') && id === null) fail('id', 'must be a string or a number');
  if (obj.type !== 'command') fail('type', `must be "command" (got ${JSON.stringify(obj.type ?? null)})`);
  const action = obj.action;
  if (typeof action !== 'string' || !COMMAND_ACTIONS.includes(action)) {
    fail('action', `must be one of ${COMMAND_ACTIONS.join(', ')} (got ${JSON.stringify(action ?? null)})`);
  }
  const { expectObject, finiteNumber, inRange } = fieldChecks();
  if ((PERTURBATION_ACTIONS as readonly string[]).includes(action as string)) {
    return { id, kind: 'perturbation', perturbation: parsePerturbation(obj, params, '', ['type', 'id']) };
  }
  switch (action as (typeof CONTROL_ACTIONS)[number]) {
    case 'pause':
    case 'resume':
    case 'reset':
      expectObject(obj, '', ['type', 'id', 'action']);
      return { id, kind: 'control', action: action as 'pause' | 'resume' | 'reset' };
    case 'set-speed': {
      expectObject(obj, '', ['type', 'id', 'action', 'speed']);
      if (obj.speed === 'max') return { id, kind: 'control', action: 'set-speed', speed: 'max' };
      if (!has(obj, 'speed')) fail('speed', 'is required (slow-time units per second, or "max")');
      const speed = inRange(finiteNumber(obj.speed, 'speed'), 'speed', 0, MAX_SPEED);
      if (!(speed > 0)) fail('speed', 'must be > 0 (use pause to stop)');
      return { id, kind: 'control', action: 'set-speed', speed };
    }
    case 'load-scenario': {
      expectObject(obj, '', ['type', 'id', 'action', 'name', 'scenario']);
      if (has(obj, 'name') === has(obj, 'scenario')) fail('', 'give exactly one of name (a built-in scenario) or scenario (scenario JSON)');
      if (has(obj, 'name') && typeof obj.name !== 'string') fail(child('', 'name'), 'must be a string');
      return has(obj, 'name')
        ? { id, kind: 'control', action: 'load-scenario', name: obj.name as string }
        : { id, kind: 'control', action: 'load-scenario', scenario: obj.scenario };
    }
  }
  return fail('action', 'unsupported');
}

/** The chart-sized summary of a frame (the same function fills live charts and replays). */
export function historyPointOf(frame: WireFrame): HistoryPoint {
  const pattern = frame.full.pattern;
  const r = pattern.orderParameters;
  const orderParameter = pattern.q !== undefined && r[pattern.q] !== undefined ? r[pattern.q] : Math.max(0, ...r);
  return {
    tau: frame.tau,
    slowTime: frame.slowTime,
    full: { phaseDifferences: frame.full.phaseDifferences, amplitude: frame.full.amplitude },
    guide: { phaseDifferences: frame.guide.phaseDifferences, amplitude: frame.guide.amplitude },
    locked: pattern.locked,
    orderParameter,
    divergence: frame.divergence.max,
  };
}
