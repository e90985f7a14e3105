import type { PatternReport, SymmetryElement } from '../../../src/session/pattern-tracker.js';

/** Name of mode j for people: mode 0 is the one the board is built for. */
export function modeName(mode: number): string {
  return mode === 0 ? 'wanted mode 0' : `unwanted mode ${mode}`;
}

/** "rotating wave q = 1 on wanted mode 0" (or the short "q = 1 · wanted mode 0"). */
export function patternLabel(p: PatternReport, options: { short?: boolean } = {}): string {
  const q = p.q !== undefined ? `q = ${p.q}` : '';
  const clusters = p.kind === 'cluster' && p.clusters ? `${p.clusters.length} clusters` : '';
  const parts = [options.short ? '' : p.locked ? p.kind : `unlocked (shape ${p.shape})`, q, clusters, modeName(p.mode)].filter(Boolean);
  return parts.join(' · ');
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
