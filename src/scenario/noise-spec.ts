/**
 * The scenario's part noise as the trade specifies it (README 'Noise of the parts'): per node the
 * power-law coefficients of fractional-frequency noise, S_y(f) = h2 f^2 + h0 + h-1 / f + h-2 / f^2
 * (NIST SP 1065 terminology: white PM, white FM, flicker FM, random-walk FM), or a single-sideband
 * phase-noise spec L(f) in dBc/Hz at given offsets, fitted with those four terms.
 *
 * The conversion: L(f) = S_phi(f) / 2 (IEEE Std 1139, small-angle), S_phi(f) = (f0 / f)^2 S_y(f),
 * so S_phi(f) = f0^2 (h2 + h0 f^-2 + h-1 f^-3 + h-2 f^-4). The fit chooses h >= 0 that minimise the
 * sum over the spec points of (S_phi,model / S_phi,spec - 1)^2 (relative errors, so every point
 * counts alike in dB); with four unknowns every subset of terms is solved by least squares and the
 * best one with all coefficients positive is kept (the non-negative least-squares optimum lies on
 * one of them), fewer terms winning a tie.
 */
import type { PartNoise } from './types.js';
import { child, fieldChecks, has, item, type JsonObject } from '../util/json-fields.js';
import { failInput as fail } from '../util/input-error.js';

/** A fit worse than this anywhere (dB) is refused: the spec has a shape the four power laws cannot make (a bump, a PLL's peaking). */
export const FIT_LIMIT_DB = 3;
/** Sums of squared relative errors closer than this are a tie (rounding of an exact fit), which the fewer terms win. */
const FIT_TIE = 1e-12;
/** The coefficient names as the trade writes them, and the field each one fills. */
export const PART_NOISE_NAMES: Record<string, keyof PartNoise> = { h2: 'h2', h0: 'h0', 'h-1': 'hm1', 'h-2': 'hm2' };
/** Exponent a of f^a in S_y for each term. */
const EXPONENTS: Record<keyof PartNoise, number> = { h2: 2, h0: 0, hm1: -1, hm2: -2 };
const TERMS = Object.keys(EXPONENTS) as (keyof PartNoise)[];

const { expectObject, expectArray, expectLength, finiteNumber, nonNegative, positive, numberField } = fieldChecks();

export const NO_PART_NOISE: Readonly<PartNoise> = Object.freeze({ h2: 0, h0: 0, hm1: 0, hm2: 0 });

/** One-sided S_phi(f) in rad^2/Hz of a part at carrier f0 (Hz). */
export function phaseSpectrumOf(noise: PartNoise, f: number, f0: number): number {
  let sum = 0;
  for (const term of TERMS) sum += noise[term] * f ** (EXPONENTS[term] - 2);
  return f0 * f0 * sum;
}

/** L(f) in dBc/Hz of a part at carrier f0. */
export function phaseNoiseDbc(noise: PartNoise, f: number, f0: number): number {
  return 10 * Math.log10(phaseSpectrumOf(noise, f, f0) / 2);
}

export interface PhaseNoiseFit {
  noise: PartNoise;
  /** Largest |L_fit - L_spec| over the points, dB. */
  worstErrorDb: number;
}

/** The power-law coefficients that best fit L(f) points [offset Hz, dBc/Hz] at carrier f0 (see the module header). */
export function fitPhaseNoise(points: readonly (readonly [number, number])[], f0: number): PhaseNoiseFit {
  const rows = points.map(([f, dbc]) => {
    const spec = 2 * 10 ** (dbc / 10);
    return TERMS.map((term) => (f0 * f0 * f ** (EXPONENTS[term] - 2)) / spec);
  });
  let best: { c: number[]; residual: number; size: number } | null = null;
  for (let mask = 1; mask < 1 << TERMS.length; mask++) {
    const used = TERMS.map((_, t) => t).filter((t) => mask & (1 << t));
    if (used.length > rows.length) continue;
    const c = leastSquares(
      rows.map((r) => used.map((t) => r[t])),
      rows.map(() => 1),
    );
    if (!c || c.some((v) => !(v > 0))) continue;
    const residual = rows.reduce((sum, r) => sum + (used.reduce((s, t, i) => s + r[t] * c[i], 0) - 1) ** 2, 0);
    const better = !best || residual < best.residual - FIT_TIE || (residual <= best.residual + FIT_TIE && used.length < best.size);
    if (better) {
      const full = TERMS.map(() => 0);
      used.forEach((t, i) => (full[t] = c[i]));
      best = { c: full, residual, size: used.length };
    }
  }
  // every single term alone has a positive least-squares coefficient, so best is never null
  const noise = { ...NO_PART_NOISE };
  TERMS.forEach((term, t) => (noise[term] = best!.c[t]));
  const worstErrorDb = Math.max(...points.map(([f, dbc]) => Math.abs(phaseNoiseDbc(noise, f, f0) - dbc)));
  return { noise, worstErrorDb };
}

/** Least squares by the normal equations (at most 4 unknowns, scaled rows); null when singular. */
function leastSquares(a: number[][], b: number[]): number[] | null {
  const n = a[0].length;
  const m: number[][] = Array.from({ length: n }, (_, i) => {
    const row = Array.from({ length: n }, (_, j) => a.reduce((s, r) => s + r[i] * r[j], 0));
    row.push(a.reduce((s, r, k) => s + r[i] * b[k], 0));
    return row;
  });
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(m[r][col]) > Math.abs(m[pivot][col])) pivot = r;
    if (!(Math.abs(m[pivot][col]) > 1e-12 * Math.abs(m[col][col] || 1))) return null;
    [m[col], m[pivot]] = [m[pivot], m[col]];
    for (let r = 0; r < n; r++) {
      if (r === col) continue;
      const factor = m[r][col] / m[col][col];
      for (let k = col; k <= n; k++) m[r][k] -= factor * m[col][k];
    }
  }
  return m.map((row, i) => row[n] / row[i]);
}

/** `powerLaw`: one coefficient object for every node, or an array of them, one per node. */
function parsePowerLaw(value: unknown, path: string, nodes: number): PartNoise[] {
  const one = (raw: unknown, at: string): PartNoise => {
    const obj = expectObject(raw, at, [...Object.keys(PART_NOISE_NAMES), 'h1']);
    if (has(obj, 'h1')) fail(child(at, 'h1'), 'flicker PM (h1) is not generated by the engine; leave it out or describe the floor with h2');
    const noise = { ...NO_PART_NOISE };
    for (const [name, field] of Object.entries(PART_NOISE_NAMES)) noise[field] = numberField(obj, at, name, nonNegative, 0);
    return noise;
  };
  return perNode(value, path, nodes, one);
}

/** `phaseNoise`: {points: [[offsetHz, dBcHz], ...], carrierHz?} for every node, or an array of them. */
function parsePhaseNoise(value: unknown, path: string, nodes: number, nominalHz: number): PartNoise[] {
  const one = (raw: unknown, at: string): PartNoise => {
    const obj: JsonObject = expectObject(raw, at, ['points', 'carrierHz']);
    const f0 = numberField(obj, at, 'carrierHz', positive, nominalHz);
    const pointsPath = child(at, 'points');
    const rawPoints = expectArray(obj.points, pointsPath);
    if (rawPoints.length < 2) fail(pointsPath, `needs at least 2 [offsetHz, dBcHz] points to fit (got ${rawPoints.length})`);
    const points = rawPoints.map((p, i): [number, number] => {
      const at2 = item(pointsPath, i);
      const pair = expectArray(p, at2);
      expectLength(pair, at2, 2, 'entries [offsetHz, dBcHz]');
      const f = positive(finiteNumber(pair[0], item(at2, 0)), item(at2, 0));
      const dbc = finiteNumber(pair[1], item(at2, 1));
      if (dbc >= 0) fail(item(at2, 1), `must be below 0 dBc/Hz (got ${dbc}); the small-angle relation L = S_phi / 2 does not hold there`);
      return [f, dbc];
    });
    points.forEach(([f], i) => {
      if (i > 0 && !(f > points[i - 1][0]))
        fail(item(item(pointsPath, i), 0), `offsets must increase (got ${f} after ${points[i - 1][0]})`);
      if (f >= f0 / 2) fail(item(item(pointsPath, i), 0), `must be below half the carrier (${f0 / 2} Hz)`);
    });
    const fit = fitPhaseNoise(points, f0);
    if (fit.worstErrorDb > FIT_LIMIT_DB) {
      fail(
        pointsPath,
        `white PM, white FM, flicker FM and random-walk FM fit these points only within ${fit.worstErrorDb.toFixed(1)} dB ` +
          `(limit ${FIT_LIMIT_DB} dB): the spec has a shape these power laws cannot make`,
      );
    }
    return fit.noise;
  };
  return perNode(value, path, nodes, one);
}

function perNode(value: unknown, path: string, nodes: number, one: (raw: unknown, at: string) => PartNoise): PartNoise[] {
  if (!Array.isArray(value)) {
    const shared = one(value, path);
    return Array.from({ length: nodes }, () => ({ ...shared }));
  }
  expectLength(value, path, nodes, 'entries, one per node (or give one object for every node)');
  return value.map((raw, k) => one(raw, item(path, k)));
}

/** The fields of `noise` read here. */
export const PART_NOISE_FIELDS = ['powerLaw', 'phaseNoise'] as const;

/**
 * The part noise of a scenario's `noise` section, or undefined when it gives neither powerLaw nor
 * phaseNoise; `nominalHz` is the carrier a phase-noise spec refers to unless it names its own.
 */
export function parsePartNoise(noise: JsonObject, nodes: number, nominalHz: number): PartNoise[] | undefined {
  if (has(noise, 'powerLaw') && has(noise, 'phaseNoise')) fail('noise', 'give either powerLaw or phaseNoise, not both');
  if (has(noise, 'powerLaw')) return parsePowerLaw(noise.powerLaw, 'noise.powerLaw', nodes);
  if (has(noise, 'phaseNoise')) return parsePhaseNoise(noise.phaseNoise, 'noise.phaseNoise', nodes, nominalHz);
  return undefined;
}

/** The JSON form of part noise, as `powerLaw` with the trade's names (parsePartNoise reads it back). */
export function partNoiseToJSON(parts: readonly PartNoise[]): Record<string, number>[] {
  return parts.map((p) => Object.fromEntries(Object.entries(PART_NOISE_NAMES).map(([name, field]) => [name, p[field]])));
}
