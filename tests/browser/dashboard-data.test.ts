import { describe, expect, test, vi } from 'vitest';
import type { HistoryPoint, WireFrame } from '../../src/protocol/messages.js';
import { LOG_FORMAT_VERSION, sampleOf } from '../../src/protocol/log-records.js';
import { scenarioToJSON } from '../../src/scenario/parse.js';
import { loadBuiltInScenario } from '../../src/scenarios/index.js';
import { CoSimulation, type Frame } from '../../src/session/session.js';
import { ChartHistory } from '../../web/src/data/chart-history.js';
import { FrameStore, type StoreChange } from '../../web/src/data/frame-store.js';
import { marginTimeConstant, formatSeconds } from '../../web/src/data/engineering.js';
import { retryDelay, socketUrl, FIRST_RETRY_MS, LONGEST_RETRY_MS, parseServerMessage } from '../../web/src/data/connection.js';
import { SeriesCache } from '../../web/src/charts/series-cache.js';
import { symmetryPhase } from '../../web/src/panels/pattern-text.js';
import { ReplayError, ReplayLog } from '../../web/src/replay/replay-log.js';
import { thrown } from '../support/thrown.js';

/**
 * The dashboard's data modules, without a browser: history thinning, chart series, the
 * engineering read-outs, reconnect timing and reading a session log back for replay.
 */

function point(i: number, phase = 0): HistoryPoint {
  return {
    tau: i,
    slowTime: i / 10,
    full: { phaseDifferences: [phase], amplitude: [[1]] },
    guide: { phaseDifferences: [phase], amplitude: [[1]] },
    locked: false,
    orderParameter: 0,
    divergence: 0,
  };
}

describe('chart history', () => {
  test('stays within its capacity, spans the whole run and keeps the newest point', () => {
    const h = new ChartHistory(8);
    for (let i = 0; i < 100; i++) h.push(point(i));
    expect(h.points.length).toBeLessThan(8);
    expect(h.points[0].tau).toBe(0);
    expect(h.newest?.tau).toBe(99);
    // Kept points are evenly spaced (a power-of-two stride) and in order.
    const taus = h.points.map((p) => p.tau);
    const stride = taus[1] - taus[0];
    expect(taus.every((t, i) => t === i * stride)).toBe(true);
    expect(Math.log2(stride) % 1).toBe(0);
    expect(h.points[h.points.length - 1].tau + stride).toBeGreaterThan(99);
  });

  test('series get a gap where a phase wraps instead of a line across the chart', () => {
    const h = new ChartHistory(100);
    [0.9, 0.95, -0.97, -0.9].forEach((turns, i) => h.push(point(i, turns * Math.PI)));
    const cache = new SeriesCache((p) => p.full.phaseDifferences.map((d) => d / Math.PI), 1);
    const [series] = cache.build(h);
    expect(series.map((p) => Number.isNaN(p.y))).toEqual([false, false, true, false, false]);
    // Appending later points extends the same series without rebuilding.
    h.push(point(4, -0.8 * Math.PI));
    expect(cache.build(h)[0].length).toBe(6);
  });
});

describe('frame store', () => {
  test('tells subscribers once per animation frame however many frames arrived', () => {
    const callbacks: FrameRequestCallback[] = [];
    vi.stubGlobal('requestAnimationFrame', (cb: FrameRequestCallback) => callbacks.push(cb));
    try {
      const scenario = loadBuiltInScenario('ring-one-way-5');
      const sim = new CoSimulation(scenario);
      const store = new FrameStore();
      const changes: StoreChange[] = [];
      store.subscribe((c) => changes.push(c));
      for (let i = 0; i < 5; i++) {
        const { events: _e, ...frame } = sim.step() as Frame;
        store.pushFrame(frame);
      }
      expect(callbacks.length).toBe(1);
      callbacks.shift()?.(0);
      expect(changes).toEqual([{ frame: true, reset: false, session: false, events: false }]);
      expect(store.frameCount).toBe(5);
      expect(store.history.newest?.tau).toBe(sim.tau);
    } finally {
      vi.unstubAllGlobals();
    }
  });
});

describe('engineering read-outs', () => {
  test('a stability margin becomes a time constant in slow units, periods and seconds', () => {
    // From the definitions in src/scenario/units.ts: tau = slow / eps, one period is 2 pi / omega0
    // of tau, seconds = periods / f0. margin -0.1, eps 1e-5, omega0 1, f0 10 MHz (hand computed).
    const c = marginTimeConstant(-0.1, { epsilon: 1e-5, nominalFrequencyHz: 10e6, omega0: 1 });
    expect(c?.slow).toBeCloseTo(10, 12);
    expect(c?.tau).toBeCloseTo(1e6, 6);
    expect(c?.periods).toBeCloseTo(1e6 / (2 * Math.PI), 6);
    expect(c?.seconds).toBeCloseTo(1e6 / (2 * Math.PI) / 10e6, 12);
    expect(marginTimeConstant(0, { epsilon: 1e-5, nominalFrequencyHz: 10e6, omega0: 1 })).toBeNull();
    expect(formatSeconds(0.0159)).toBe('15.9 ms');
  });

  test('symmetry phases read as fractions of a turn', () => {
    const element = (phase: number) => ({ element: 'rotation by 1', permutation: [1, 2, 3, 4, 0], phase });
    expect(symmetryPhase(element((2 * Math.PI) / 5), 5)).toBe('φ = 2π·1/5');
    expect(symmetryPhase(element(-(2 * Math.PI) / 5), 5)).toBe('φ = 2π·4/5');
    expect(symmetryPhase(element(Math.PI), 4)).toBe('φ = 2π·1/2');
    expect(symmetryPhase(element(1e-6), 4)).toBe('φ = 0');
  });
});

describe('connection', () => {
  test('reconnect delays double from 0.5 s up to 15 s, with bounded jitter', () => {
    const middle = () => 0.5;
    expect(retryDelay(1, middle)).toBe(FIRST_RETRY_MS);
    expect(retryDelay(2, middle)).toBe(2 * FIRST_RETRY_MS);
    expect(retryDelay(3, middle)).toBe(4 * FIRST_RETRY_MS);
    expect(retryDelay(30, middle)).toBe(LONGEST_RETRY_MS);
    expect(retryDelay(1, () => 0)).toBe(0.8 * FIRST_RETRY_MS);
    expect(retryDelay(1, () => 1)).toBe(1.2 * FIRST_RETRY_MS);
  });

  test('the socket address follows the page and carries the operator token only when given', () => {
    expect(socketUrl({ protocol: 'http:', host: '127.0.0.1:8300' }, null)).toBe('ws://127.0.0.1:8300/ws');
    expect(socketUrl({ protocol: 'https:', host: 'lab.example:443' }, 'a b&c')).toBe('wss://lab.example:443/ws?token=a%20b%26c');
  });

  test('messages that are not server messages are ignored, not thrown', () => {
    const warn = vi.spyOn(console, 'warn').mockImplementation(() => {});
    try {
      expect(parseServerMessage('not json')).toBeNull();
      expect(parseServerMessage('{"type":"nonsense"}')).toBeNull();
      expect(parseServerMessage('{"type":"ack","id":3,"action":"pause"}')).toEqual({ type: 'ack', id: 3, action: 'pause' });
    } finally {
      warn.mockRestore();
    }
  });
});

describe('replay log', () => {
  /** A session log written the way the server writes one: header, events and samples, seq by seq. */
  function sessionLog(): { text: string; breakTau: number; frames: WireFrame[] } {
    const scenario = loadBuiltInScenario('ring-one-way-5');
    const sim = new CoSimulation(scenario);
    const lines: string[] = [];
    let seq = 0;
    const write = (record: Record<string, unknown>) => lines.push(JSON.stringify({ ...record, seq: seq++ }));
    write({
      record: 'header',
      format: 'syncring-log',
      formatVersion: LOG_FORMAT_VERSION,
      software: { name: 'syncring', version: 'test' },
      createdAt: '2026-01-01T00:00:00Z',
      scenario: scenarioToJSON(scenario),
      seeds: { noise: 1, initial: null },
    });
    const frames: WireFrame[] = [];
    let breakTau = NaN;
    for (let i = 0; i < 30; i++) {
      if (i === 15) sim.submit({ action: 'break-link', from: 2, to: 3 }, 'tester');
      const frame = sim.step() as Frame;
      for (const event of frame.events) {
        if (event.kind === 'perturbation') breakTau = event.tau;
        write({ record: 'event', event });
      }
      const sample = sampleOf(frame);
      write({ record: 'sample', frame: sample.frame });
      frames.push(sample.frame);
    }
    return { text: `${lines.join('\n')}\n{"record":"sample","seq":`, breakTau, frames };
  }

  test('samples become frames and the session at each sample has the links broken up to then', () => {
    const { text, breakTau, frames } = sessionLog();
    const replay = ReplayLog.fromText(text, 'run.ndjson');
    expect(replay.frames.length).toBe(frames.length);
    expect(replay.points.map((p) => p.tau)).toEqual(frames.map((f) => f.tau));
    expect(replay.events.some((e) => e.kind === 'perturbation' && e.by === 'tester')).toBe(true);
    const before = replay.indexAt(breakTau) - 1;
    const link = (i: number) => replay.sessionAt(i).links.find((l) => l.from === 2 && l.to === 3);
    expect(link(before)?.weight).toBe(1);
    expect(link(replay.frames.length - 1)?.weight).toBe(0);
    expect(replay.eventsUntil(replay.frames[before].tau).some((e) => e.kind === 'perturbation')).toBe(false);
    // The torn last line (a crash mid-write) is dropped, not an error.
    expect(replay.problems).toEqual([]);
  });

  test('a file that is not a session log is refused with a reason', () => {
    expect(() => ReplayLog.fromText('{"hello":1}\n', 'x.ndjson')).toThrow(ReplayError);
    expect(() => ReplayLog.fromText('{"hello":1}\n', 'x.ndjson')).toThrow(/x\.ndjson: not a syncring session log/);
    // an input error like any other: the file as its source, the reason apart
    const refused = thrown(() => ReplayLog.fromText('{"hello":1}\n', 'x.ndjson'), ReplayError);
    expect({ source: refused.source, path: refused.path, reason: refused.reason }).toEqual({
      source: 'x.ndjson',
      path: '',
      reason: 'not a syncring session log (no header record on line 1)',
    });
  });
});
