import type { PatternReport, SymmetryElement } from '../../../src/session/pattern-tracker.js';
import type { PredictedPattern } from '../../../src/predict/live.js';
import { formatNumber, formatSimulatedSeconds, marginTimeConstant, type RunScales } from '../data/engineering.js';

/** Name of mode j for people: mode 0 is the one the board is built for. */
export function modeName(mode: number): string {
  return mode === 0 ? 'wanted mode 0' : `unwanted mode ${mode}`;
}

/** "rotating wave q = 1 on wanted mode 0" (or the short "q = 1 · wanted mode 0"); "settling" while settling. */
export function patternLabel(p: PatternReport, options: { short?: boolean } = {}): string {
  const q = p.q !== undefined ? `q = ${p.q}` : '';
  const clusters = p.kind === 'cluster' && p.clusters ? `${p.clusters.length} clusters` : '';
  const settling = p.status === 'settling' ? 'settling' : '';
  const parts = [options.short ? '' : p.locked ? p.kind : `unlocked (shape ${p.shape})`, q, clusters, modeName(p.mode), settling].filter(
    Boolean,
  );
  return parts.join(' · ');
}

/** Offset of mode j from the wanted mode's nominal frequency: ppm and Hz at the nominal frequency. */
export function modeOffset(mode: number, omega: readonly number[], nominalFrequencyHz: number): { ppm: number; hz: number } {
  const ppm = (omega[mode] / omega[0] - 1) * 1e6;
  return { ppm, hz: ppm * 1e-6 * nominalFrequencyHz };
}

/**
 * The words for a pattern carried by an unwanted mode: not a healthy lock but a design defect,
 * because the board's output then sits at that mode's frequency.
 */
export function unwantedModeText(mode: number, offset: { ppm: number; hz: number }, hzText: (hz: number) => string): string {
  const sign = offset.ppm >= 0 ? '+' : '−';
  const ppm = Math.abs(offset.ppm).toPrecision(4);
  return (
    `design defect: unwanted mode ${mode} carries the pattern, ` +
    `so the output sits ${sign}${ppm} ppm (${sign}${hzText(Math.abs(offset.hz))}) from the wanted frequency`
  );
}

/** "±0.31 rad (±18°)" for a phase spread. */
export function spreadText(spread: number | null | undefined): string {
  if (spread === null || spread === undefined) return '—';
  return `±${spread.toFixed(2)} rad (±${((spread * 180) / Math.PI).toFixed(0)}°)`;
}

/** A symmetry element's phase as a fraction of a turn: "φ = 2π·1/5" or "φ = 0". */
export function symmetryPhase(element: SymmetryElement, nodes: number): string {
  const turns = element.phase / (2 * Math.PI);
  const wrapped = ((turns % 1) + 1) % 1;
  if (Math.abs(wrapped) < 1e-3 || Math.abs(wrapped - 1) < 1e-3) return 'φ = 0';
  // Prefer an exact fraction with the ring size (or a divisor) as the denominator.
  for (let den = 2; den <= Math.max(2, nodes * 2); den++) {
    const num = Math.round(wrapped * den);
    if (Math.abs(wrapped - num / den) < 0.004) return `φ = 2π·${num}/${den}`;
  }
  return `φ = ${(wrapped * 360).toFixed(1)}°`;
}

/**
 * Where a live prediction says the ring goes: the pattern, its time constant (one e-folding of
 * the slowest disturbance, not the time to get there) and the transit time the look-ahead took
 * to arrive within the lock tolerance, or that it was not predicted.
 */
export function destinationText(next: PredictedPattern, scales: RunScales | null): string {
  const constant = next.margin !== null && scales ? marginTimeConstant(next.margin, scales) : null;
  const transit = next.transit ?? null;
  const head = `→ ${next.kind}${next.q !== undefined ? ` q = ${next.q}` : ''} on ${modeName(next.mode)}`;
  const tc = constant
    ? `, time constant ${formatSimulatedSeconds(constant.seconds, scales!)} (${formatNumber(constant.slow, 3)} slow units)`
    : '';
  const arrival = !next.locked
    ? ''
    : transit
      ? `; the look-ahead gets there in ≈ ${scales ? formatSimulatedSeconds(transit.seconds, scales) : ''} (${formatNumber(transit.slowTime, 3)} slow units)`
      : '; transit time not predicted';
  return `${head}${tc}${arrival}`;
}
