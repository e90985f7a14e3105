import { DEFAULT_RESONANCE_MARGIN } from '../guide/resonance.js';

/**
 * How far the envelope can be trusted at a state. The neglected terms of second-order averaging
 * are O(eps^2 |f|^2 / |m.omega|^2) relative to the state, the square of the near-identity
 * correction eps u relative to the state; so the indicator (the gap between the first-order
 * reconstruction y = Y and the second-order one y = Y + eps u, over |y|) squared estimates the
 * envelope's relative error, and a divisor m.omega not large against eps breaks the expansion.
 */
export interface EnvelopeHealth {
  /** eps max|u| / max|Y| over the torus grid. */
  indicator: number;
  /** indicator^2: the estimated relative size of the neglected O(eps^2) terms. */
  estimatedError: number;
  /** Smallest |m.omega| among the harmonics that carry a non-zero coefficient; null if none does. */
  smallestDivisor: number | null;
  /** That harmonic m, as "(m_0, m_1)". */
  harmonic: string | null;
}

/** A carrying harmonic's divisor must be at least this many eps (the resonance warning's margin). */
export const DIVISOR_MARGIN = DEFAULT_RESONANCE_MARGIN;

/** Above this indicator (estimated error 1e-4) the envelope is not trusted at all. */
export const TRUST_INDICATOR = 1e-2;

/** 'auto' takes the envelope only while its estimated relative error stays below this. */
export const AUTO_ERROR = 1e-8;

/** Why the envelope cannot be trusted with this health, or null. */
export function envelopeTrouble(
  health: EnvelopeHealth,
  eps: number,
  indicatorLimit = TRUST_INDICATOR,
  margin = DIVISOR_MARGIN,
): string | null {
  const divisor = health.smallestDivisor;
  if (divisor !== null && divisor < margin * eps) {
    const inEps = divisor / eps;
    return (
      `small divisor: harmonic ${health.harmonic} has |m.omega| = ${divisor.toPrecision(3)} = ${inEps.toPrecision(3)} eps < ${margin} eps ` +
      '(near a resonance of the modes), so the averaging expansion does not hold'
    );
  }
  if (!(health.indicator <= indicatorLimit)) {
    return `near-identity indicator ${health.indicator.toPrecision(3)} is above ${indicatorLimit} (first- and second-order reconstructions differ too much)`;
  }
  return null;
}
