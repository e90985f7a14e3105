import { historyPointOf, type HistoryPoint, type SessionInfo, type WireFrame } from '../../../src/protocol/messages.js';
import { parseLog, type LogProblem } from '../../../src/protocol/log-reader.js';
import { parseScenario, scenarioToJSON } from '../../../src/scenario/parse.js';
import type { Scenario } from '../../../src/scenario/types.js';
import type { SessionEvent } from '../../../src/session/session.js';
import type { Perturbation } from '../../../src/session/perturbation.js';
import { nearResonances } from '../../../src/guide/resonance.js';
import { deltaToPpm } from '../../../src/scenario/units.js';
import { InputError } from '../../../src/util/input-error.js';

/**
 * A log that cannot be replayed is bad input like any other: an InputError whose source is the
 * file and whose reason names what is missing or wrong. The name stays for the dashboard, which
 * shows such an error's message as it is.
 */
export { InputError as ReplayError };

/**
 * A saved session log, read back for replay: its samples as frames (in time order), their chart
 * points, its events, and the session as it stood at any sample (links broken or restored,
 * detuning changed ... by the events logged up to then).
 */
export class ReplayLog {
  readonly frames: WireFrame[];
  readonly points: HistoryPoint[];
  readonly events: SessionEvent[];
  readonly scenario: Scenario;
  readonly problems: LogProblem[];
  readonly createdAt: string | null;

  private constructor(
    readonly fileName: string,
    scenario: Scenario,
    frames: WireFrame[],
    events: SessionEvent[],
    problems: LogProblem[],
    createdAt: string | null,
  ) {
    this.scenario = scenario;
    this.frames = frames;
    this.points = frames.map(historyPointOf);
    this.events = events;
    this.problems = problems;
    this.createdAt = createdAt;
  }

  static fromText(text: string, fileName: string): ReplayLog {
    const log = parseLog(text);
    if (!log.header) throw new InputError('', 'not a syncring session log (no header record on line 1)', { source: fileName });
    let scenario: Scenario;
    try {
      scenario = parseScenario(log.header.scenario, `${fileName}: header.scenario`);
    } catch (error) {
      if (error instanceof InputError) throw error;
      // anything else the parser trips over is still this file's fault, shown as it is
      throw new InputError('', (error as Error).message);
    }
    const frames = log.samples
      .map(({ frame }): WireFrame => {
        const { events: _dropped, ...wire } = frame;
        return wire;
      })
      .sort((a, b) => a.tau - b.tau);
    if (frames.length === 0) throw new InputError('', 'the log holds no samples to replay', { source: fileName });
    const events = log.events.map((r) => r.event).sort((a, b) => a.tau - b.tau || a.seq - b.seq);
    return new ReplayLog(fileName, scenario, frames, events, log.problems, log.header.createdAt ?? null);
  }

  /** Index of the last frame at or before tau. */
  indexAt(tau: number): number {
    let lo = 0;
    let hi = this.frames.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (this.frames[mid].tau <= tau) lo = mid;
      else hi = mid - 1;
    }
    return lo;
  }

  eventsUntil(tau: number): SessionEvent[] {
    return this.events.filter((e) => e.tau <= tau);
  }

  /** The session as it stood at frame `index`: the scenario with the perturbations logged so far. */
  sessionAt(index: number): SessionInfo {
    const frame = this.frames[index];
    const s = this.scenario;
    const info: SessionInfo = {
      scenarioName: s.name,
      scenario: scenarioToJSON(s),
      nodes: s.nodes,
      modes: s.modes.length,
      epsilon: s.epsilon,
      nominalFrequencyHz: s.units.nominalFrequencyHz,
      nominalFrequencyAssumed: s.units.nominalFrequencyAssumed,
      omega: s.modes.map((m) => m.omega),
      links: s.links.map((l) => ({ from: l.from, to: l.to, weight: l.weight, nominal: l.weight })),
      detuning: [...s.detuning],
      detuningPpm: [],
      coupling: { ...s.coupling },
      noise: { ...s.noise },
      macroStep: (s.integrator.macroPeriods * 2 * Math.PI) / s.modes[0].omega,
      integrator: { mode: frame.mode ?? 'micro', reason: 'as recorded in the log', ...s.integrator },
      status: frame.status === 'halted' ? 'halted' : 'paused',
      speed: 1,
      warnings: nearResonances(
        s.modes.map((m) => m.omega),
        s.epsilon,
      ).map((w) => w.message),
      logFile: this.fileName,
    };
    for (const event of this.events) {
      if (event.tau > frame.tau) break;
      if (event.perturbation) applyToSession(info, event.perturbation);
    }
    info.detuningPpm = s.epsilon > 0 ? info.detuning.map((d) => deltaToPpm(d, s.epsilon)) : info.detuning.map(() => 0);
    return info;
  }
}

/** Book-keeping of what a perturbation changed, for display (the physics was in the run). */
function applyToSession(info: SessionInfo, p: Perturbation): void {
  const link = (from: number, to: number) => info.links.find((l) => l.from === from && l.to === to);
  switch (p.action) {
    case 'set-detuning':
      info.detuning[p.node] = p.delta;
      return;
    case 'break-link': {
      const l = link(p.from, p.to);
      if (l) l.weight = 0;
      return;
    }
    case 'restore-link': {
      const l = link(p.from, p.to);
      if (l) l.weight = l.nominal;
      return;
    }
    case 'set-link-weight': {
      const l = link(p.from, p.to);
      if (l) l.weight = p.weight;
      return;
    }
    case 'set-coupling':
      if (p.strength !== undefined) info.coupling.strength = p.strength;
      if (p.reactive !== undefined) info.coupling.reactive = p.reactive;
      if (p.dissipative !== undefined) info.coupling.dissipative = p.dissipative;
      return;
    case 'set-noise':
      if (p.intensity !== undefined) info.noise.intensity = p.intensity;
      if (p.detuningWalk !== undefined) info.noise.detuningWalk = p.detuningWalk;
      return;
    case 'kick-mode':
      return;
  }
}
