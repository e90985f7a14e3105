import type { SessionInfo, WireFrame } from '../../../src/protocol/messages.js';
import type { BranchLimit } from '../../../src/predict/continuation.js';

/**
 * What the dashboard reads from /api/catalogue and /api/what-if (server/http/prediction-api.ts,
 * the JSON of `syncring predict` with the live parameters), and the small pure steps between
 * those answers and the panels: which catalogue row the live run is in, the parameters a
 * what-if can continue in, their live values and default ranges, and the branch as chart series.
 */

import type { CatalogueEntry, ContinuationOutput as Continuation } from '../../../src/protocol/predict-output.js';

export type { CatalogueEntry, CatalogueResponse, WhatIfResponse } from '../../../src/protocol/predict-output.js';
export type { Continuation };

/** Changes whenever anything a prediction depends on changes in the live run. */
export function predictionKey(session: SessionInfo | null): string {
  if (!session) return '';
  return [
    session.scenarioName,
    session.detuning.join(','),
    session.links.map((l) => l.weight).join(','),
    session.coupling.strength,
    session.coupling.reactive,
    session.coupling.dissipative,
  ].join('|');
}

/** Angle between two phase differences, in (-pi, pi]. */
function angleBetween(a: number, b: number): number {
  return Math.atan2(Math.sin(a - b), Math.cos(a - b));
}

/** Largest angle between two lists of neighbour phase differences. */
export function phaseDistance(a: readonly number[], b: readonly number[]): number {
  if (a.length !== b.length) return Infinity;
  let worst = 0;
  for (let k = 0; k < a.length; k++) worst = Math.max(worst, Math.abs(angleBetween(a[k], b[k])));
  return worst;
}

/** Two patterns closer than this (rad, every phase difference) are taken to be the same one. */
export const SAME_PATTERN_RAD = 0.25;

/**
 * The catalogue row the live run is in: the entry on the live carrying mode nearest in neighbour
 * phase differences, when every difference is within SAME_PATTERN_RAD (`near`); failing that, the
 * nearest entry of the same kind and wave number (q and N - q are one wave number, run the other
 * way round), since a detuning deforms a pattern. Null when the full system is not locked.
 */
export function livePatternIndex(patterns: readonly CatalogueEntry[], frame: WireFrame | null): { index: number; near: boolean } | null {
  const p = frame?.full.pattern;
  if (!frame || !p || !p.locked) return null;
  const observed = frame.full.phaseDifferences;
  const n = observed.length;
  const onMode = patterns.filter((e) => e.mode === p.mode).map((e) => ({ e, distance: phaseDistance(e.phaseDifferences, observed) }));
  onMode.sort((a, b) => a.distance - b.distance);
  if (onMode.length > 0 && onMode[0].distance <= SAME_PATTERN_RAD) return { index: onMode[0].e.index, near: true };
  const sameQ = (q: number | undefined) =>
    (q === undefined && p.q === undefined) || (q !== undefined && p.q !== undefined && (q === p.q || q === (n - p.q) % n));
  const kin = onMode.find(({ e }) => e.kind === p.kind && sameQ(e.q));
  return kin ? { index: kin.e.index, near: false } : null;
}

/** A parameter a what-if can continue in, as the API names it. */
export interface WhatIfParameter {
  /** PARAM of /api/what-if, e.g. "detuning:3", "coupling", "link:0-1", "edge:0-1". */
  id: string;
  label: string;
  /** Shown in ppm (detuning) rather than in model units. */
  ppm: boolean;
  /** Symbol for axis titles and read-outs. */
  symbol: string;
}

/** Every parameter of the live network a continuation can follow. */
export function whatIfParameters(session: SessionInfo): WhatIfParameter[] {
  const out: WhatIfParameter[] = [];
  for (let k = 0; k < session.nodes; k++)
    out.push({ id: `detuning:${k}`, label: `detuning of node ${k}`, ppm: session.epsilon > 0, symbol: `Δ${subscript(k)}` });
  out.push({ id: 'coupling', label: 'coupling strength κ', ppm: false, symbol: 'κ' });
  out.push({ id: 'reactive', label: 'reactive coupling ρ', ppm: false, symbol: 'ρ' });
  out.push({ id: 'dissipative', label: 'dissipative coupling σ', ppm: false, symbol: 'σ' });
  const has = (a: number, b: number) => session.links.some((l) => l.from === a && l.to === b);
  for (const l of session.links) {
    out.push({
      id: `link:${l.from}-${l.to}`,
      label: `weight of link ${l.from} → ${l.to}`,
      ppm: false,
      symbol: `w${subscript(l.from)}${subscript(l.to)}`,
    });
    if (l.from < l.to && has(l.to, l.from))
      out.push({
        id: `edge:${l.from}-${l.to}`,
        label: `both links ${l.from} ↔ ${l.to}`,
        ppm: false,
        symbol: `w${subscript(l.from)}${subscript(l.to)}`,
      });
  }
  return out;
}

function subscript(k: number): string {
  return String(k).replace(/\d/g, (d) => '₀₁₂₃₄₅₆₇₈₉'[Number(d)]);
}

/** The live value of a parameter in model units (detuning Delta, weights, coupling constants). */
export function liveValue(session: SessionInfo, id: string): number | null {
  const [head, rest] = id.split(':');
  switch (head) {
    case 'detuning':
      return session.detuning[Number(rest)] ?? null;
    case 'coupling':
      return session.coupling.strength;
    case 'reactive':
      return session.coupling.reactive;
    case 'dissipative':
      return session.coupling.dissipative;
    case 'link':
    case 'edge': {
      const [from, to] = (rest ?? '').split('-').map(Number);
      return session.links.find((l) => l.from === from && l.to === to)?.weight ?? null;
    }
    default:
      return null;
  }
}

/**
 * A range worth exploring, in model units: a detuning a few locking widths either side
 * (kappa |sigma + i rho / omega_0| is the width of a pair's locking range), zero to three times
 * the coupling strength, zero to twice a link's nominal weight, the coupling constants +-2.
 */
export function defaultRange(session: SessionInfo, id: string): { min: number; max: number } {
  const now = liveValue(session, id) ?? 0;
  const head = id.split(':')[0];
  const { strength, reactive, dissipative } = session.coupling;
  switch (head) {
    case 'detuning': {
      const width = Math.max(1e-6, Math.abs(strength) * Math.hypot(dissipative, reactive / (session.omega[0] || 1)));
      return { min: now - 4 * width, max: now + 4 * width };
    }
    case 'coupling':
      return { min: 0, max: Math.max(3 * Math.abs(now), 0.1) };
    case 'link':
    case 'edge': {
      const [from, to] = id.split(':')[1].split('-').map(Number);
      const nominal = session.links.find((l) => l.from === from && l.to === to)?.nominal ?? 1;
      return { min: 0, max: Math.max(2 * nominal, now * 1.2, 0.1) };
    }
    default:
      return { min: now - 2, max: now + 2 };
  }
}

export type BranchQuantity = 'phase' | 'amplitude';

export interface BranchXY {
  x: number;
  y: number;
  /** The point's stability verdict; null when the continuation did not monitor it. */
  stability: 'stable' | 'unstable' | 'marginal' | null;
}

/** x of a branch point: ppm for a detuning (when the run has an epsilon), else the parameter. */
export function branchX(point: { parameter: number; ppm: number | null }, inPpm: boolean): number {
  return inPpm && point.ppm !== null ? point.ppm : point.parameter;
}

/**
 * One series per node along the branch: the carrying mode's neighbour phase differences
 * (unwrapped along the branch, so a difference passing pi stays one continuous curve) or its
 * amplitudes |a_k|.
 */
export function branchSeries(c: Continuation, quantity: BranchQuantity, inPpm: boolean): BranchXY[][] {
  const points = c.branch;
  if (points.length === 0) return [];
  const mode = c.pattern.mode;
  const count = quantity === 'phase' ? points[0].phaseDifferences.length : points[0].amplitudes.length;
  const series: BranchXY[][] = Array.from({ length: count }, () => []);
  const previous = new Array<number>(count).fill(NaN);
  for (const point of points) {
    const x = branchX(point, inPpm);
    for (let k = 0; k < count; k++) {
      let y: number;
      if (quantity === 'phase') {
        const raw = point.phaseDifferences[k];
        y = Number.isNaN(previous[k]) ? raw : previous[k] + angleBetween(raw, previous[k]);
        previous[k] = y;
      } else {
        y = point.amplitudes[k]?.[mode] ?? 0;
      }
      series[k].push({ x, y, stability: point.stability });
    }
  }
  return series;
}

/** Limits a person should look at: where the pattern is lost. The others only end the computed stretch. */
export function isLossLimit(limit: BranchLimit | null): limit is BranchLimit {
  return limit !== null && (limit.kind === 'fold' || limit.kind === 'hopf' || limit.kind === 'branch-point');
}

/** Words for each way a continuation stops. */
export const LIMIT_WORDS: Record<BranchLimit['kind'], string> = {
  fold: 'fold: the pattern disappears',
  hopf: 'Hopf: the pattern starts to oscillate',
  'branch-point': 'branch point: the pattern splits',
  bound: 'physical bound of the parameter',
  range: 'end of the range asked for',
  'max-steps': 'step budget used up',
  'step-failure': 'the continuation could not go on',
};
