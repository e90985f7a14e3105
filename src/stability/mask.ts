/**
 * User-supplied MTIE or TDEV masks: a table of (tau, limit), both in seconds, interpolated
 * log-log between its points, and the margin of a stability curve to it (README, "Stability
 * statistics"). syncring ships no mask from any standard; the demo's one is invented.
 *
 * JSON: { "name": "...", "metric": "mtie" | "tdev", "points": [[tau_s, limit_s], ...], "note"?: "..." }
 * CSV:  a header `tau,mtie` or `tau,tdev` (or `tau,limit` with a `# metric: mtie` comment line),
 *       then one `tau,limit` pair per line; '#' starts a comment (`# name: ...` names the mask).
 */
import { describeValue, fieldChecks, item, type JsonObject } from '../util/json-fields.js';
import { InputError } from '../util/input-error.js';

export type MaskMetric = 'mtie' | 'tdev';

export interface StabilityMask {
  name: string;
  metric: MaskMetric;
  /** Strictly increasing tau, positive limits, seconds. */
  points: [number, number][];
  note?: string;
}

const checks = fieldChecks();
const MASK_FIELDS = ['name', 'metric', 'points', 'note'];

/** A mask from parsed JSON; errors name the field (`points[2][1]: must be > 0 (got -1)`). */
export function parseMask(raw: unknown, source?: string): StabilityMask {
  try {
    const obj: JsonObject = checks.expectObject(raw, '', MASK_FIELDS);
    const name = obj.name;
    if (typeof name !== 'string' || name.trim() === '')
      throw new InputError('name', `must be a non-empty string (got ${describeValue(name)})`);
    const metric = obj.metric;
    if (metric !== 'mtie' && metric !== 'tdev')
      throw new InputError('metric', `must be "mtie" or "tdev" (got ${JSON.stringify(metric ?? null)})`);
    const list = checks.expectArray(checks.required(obj, 'points', ''), 'points');
    const points = list.map((entry, i): [number, number] => {
      const path = item('points', i);
      const pair = checks.expectArray(entry, path);
      checks.expectLength(pair, path, 2, 'numbers, [tau_s, limit_s]');
      return [
        checks.positive(checks.finiteNumber(pair[0], item(path, 0)), item(path, 0)),
        checks.positive(checks.finiteNumber(pair[1], item(path, 1)), item(path, 1)),
      ];
    });
    checkPoints(points, (i) => item(item('points', i), 0));
    if (obj.note !== undefined && typeof obj.note !== 'string') throw new InputError('note', 'must be a string');
    return { name: name as string, metric, points, ...(typeof obj.note === 'string' ? { note: obj.note } : {}) };
  } catch (error) {
    if (error instanceof InputError && source !== undefined) throw error.from(source);
    throw error;
  }
}

/** A mask from CSV text; errors name the line (`line 7: limit must be > 0 (got -1)`). */
export function parseMaskCsv(text: string, source: string, defaultName: string): StabilityMask {
  let name = defaultName;
  let metric: MaskMetric | null = null;
  let header = false;
  const points: [number, number][] = [];
  const lines: number[] = [];
  const fail = (line: number, reason: string): never => {
    throw new InputError(`line ${line}`, reason, { source });
  };
  text.split(/\r?\n/).forEach((rawLine, index) => {
    const line = index + 1;
    const hash = rawLine.indexOf('#');
    const comment = hash >= 0 ? rawLine.slice(hash + 1).trim() : '';
    const named = /^(name|metric)\s*:\s*(.+)$/i.exec(comment);
    if (named) {
      if (named[1].toLowerCase() === 'name') name = named[2].trim();
      else {
        const m = named[2].trim().toLowerCase();
        if (m !== 'mtie' && m !== 'tdev') fail(line, `metric must be mtie or tdev (got ${JSON.stringify(named[2].trim())})`);
        metric = m as MaskMetric;
      }
    }
    const body = (hash >= 0 ? rawLine.slice(0, hash) : rawLine).trim();
    if (body === '') return;
    const cells = body.split(/\s*[,;\t]\s*|\s+/);
    if (!header && points.length === 0 && /^tau$/i.test(cells[0] ?? '')) {
      header = true;
      if (cells.length !== 2) fail(line, `the header must have two columns, tau and the limit (got ${cells.length})`);
      const column = cells[1].toLowerCase();
      if (column === 'mtie' || column === 'tdev') metric = column;
      else if (column !== 'limit') fail(line, `the second column must be mtie, tdev or limit (got ${JSON.stringify(cells[1])})`);
      return;
    }
    if (cells.length !== 2) fail(line, `expected two values, tau and limit, in seconds (got ${cells.length})`);
    const [tau, limit] = cells.map((cell, i) => {
      const v = Number(cell);
      const what = i === 0 ? 'tau' : 'limit';
      if (cell === '' || !Number.isFinite(v)) fail(line, `${what} ${JSON.stringify(cell)} is not a number`);
      if (!(v > 0)) fail(line, `${what} must be > 0 (got ${v})`);
      return v;
    });
    points.push([tau, limit]);
    lines.push(line);
  });
  if (metric === null)
    throw new InputError('', 'no metric: give a header tau,mtie or tau,tdev, or a comment line "# metric: mtie"', { source });
  if (points.length === 0) throw new InputError('', 'no mask points (expected lines of tau,limit in seconds)', { source });
  checkPoints(points, (i) => `line ${lines[i]}`, source);
  return { name, metric, points };
}

function checkPoints(points: [number, number][], where: (i: number) => string, source?: string): void {
  if (points.length === 0) throw new InputError('points', 'must hold at least one [tau_s, limit_s] pair', { source });
  for (let i = 1; i < points.length; i++) {
    if (!(points[i][0] > points[i - 1][0]))
      throw new InputError(where(i), `tau must increase from one point to the next (${points[i][0]} after ${points[i - 1][0]})`, {
        source,
      });
  }
}

/** The limit at tau by log-log interpolation; null outside the mask's tau range. */
export function maskLimit(mask: StabilityMask, tau: number): number | null {
  const p = mask.points;
  if (!(tau >= p[0][0] && tau <= p[p.length - 1][0])) return null;
  for (let i = 0; i < p.length; i++) if (tau === p[i][0]) return p[i][1]; // exact at its points, no rounding through the logs
  for (let i = 1; i < p.length; i++) {
    if (tau < p[i][0]) {
      const [t0, l0] = p[i - 1];
      const [t1, l1] = p[i];
      const s = Math.log(tau / t0) / Math.log(t1 / t0);
      return Math.exp(Math.log(l0) + s * Math.log(l1 / l0));
    }
  }
  return null; // not reached: tau lies inside the range
}

export interface MaskMargin {
  mask: string;
  metric: MaskMetric;
  /** Smallest limit / value over the taus inside the mask's range; null when no tau falls there. */
  factor: number | null;
  /** The same in dB, 20 log10(factor): negative means the curve crosses the mask. */
  db: number | null;
  /** Where the margin is smallest, with the value and the limit there (seconds). */
  tau: number | null;
  value: number | null;
  limit: number | null;
  /** Taus of the curve inside the mask's range. */
  checked: number;
  /** No value above the mask (null when nothing was checked). */
  meets: boolean | null;
  /** TDEV only: the same margin against the upper ends of the confidence intervals. */
  factorAtUpperBound?: number | null;
}

/** Margin of a curve (tau, value in seconds) to a mask; `upper` adds the margin of the interval's upper ends. */
export function maskMargin(
  mask: StabilityMask,
  tau: readonly number[],
  value: readonly number[],
  upper?: readonly (number | null)[],
): MaskMargin {
  let best: { factor: number; tau: number; value: number; limit: number } | null = null;
  let bestUpper: number | null = null;
  let checked = 0;
  tau.forEach((t, i) => {
    const limit = maskLimit(mask, t);
    const v = value[i];
    if (limit === null || !Number.isFinite(v)) return;
    checked++;
    const factor = v > 0 ? limit / v : Infinity;
    if (best === null || factor < best.factor) best = { factor, tau: t, value: v, limit };
    const high = upper?.[i];
    if (high !== undefined && high !== null && high > 0) bestUpper = Math.min(bestUpper ?? Infinity, limit / high);
  });
  const found = best as { factor: number; tau: number; value: number; limit: number } | null;
  const factor = found && Number.isFinite(found.factor) ? found.factor : null;
  return {
    mask: mask.name,
    metric: mask.metric,
    factor,
    db: factor === null ? null : 20 * Math.log10(factor),
    tau: found?.tau ?? null,
    value: found?.value ?? null,
    limit: found?.limit ?? null,
    checked,
    meets: found === null ? null : found.factor >= 1,
    ...(upper ? { factorAtUpperBound: bestUpper } : {}),
  };
}
