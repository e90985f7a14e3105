/**
 * Near-resonance check for the torus average. With a cubic (odd) nonlinearity the averaged
 * equations gain extra terms at the resonances p omega_0 = q omega_1 with |p| + |q| <= 4 and
 * p + q even: 1:1, 1:3 and 3:1. The first-order error then carries terms of size
 * eps / |p omega_0 - q omega_1| (docs/model.md, 'First-order averaging'), so the check warns when
 * that distance is within `warnWithin` multiples of eps.
 */
export interface ResonanceWarning {
  /** "p:q" meaning p omega_0 = q omega_1. */
  resonance: string;
  /** |p omega_0 - q omega_1| */
  distance: number;
  /** distance / eps */
  distanceInEps: number;
  message: string;
}

const RESONANCES: [number, number][] = [
  [1, 1],
  [1, 3],
  [3, 1],
];

export const DEFAULT_RESONANCE_MARGIN = 30;

export function resonanceDistances(omega: ArrayLike<number>): { resonance: string; distance: number }[] {
  if (omega.length < 2) return [];
  return RESONANCES.map(([p, q]) => ({ resonance: `${p}:${q}`, distance: Math.abs(p * omega[0] - q * omega[1]) }));
}

export function nearResonances(omega: ArrayLike<number>, eps: number, warnWithin = DEFAULT_RESONANCE_MARGIN): ResonanceWarning[] {
  if (!(eps > 0)) return [];
  return resonanceDistances(omega)
    .filter((r) => r.distance < warnWithin * eps)
    .map((r) => ({
      ...r,
      distanceInEps: r.distance / eps,
      message:
        `modes 0 and 1 are near the ${r.resonance} resonance (${r.resonance.split(':')[0]} omega_0 = ${r.resonance.split(':')[1]} omega_1): ` +
        `|p omega_0 - q omega_1| = ${r.distance.toPrecision(3)} = ${(r.distance / eps).toPrecision(3)} eps < ${warnWithin} eps; ` +
        'the first-order guiding system is not to be trusted there',
    }));
}
