/**
 * Spatio-temporal symmetry of one snapshot of complex amplitudes a_k (docs/model.md, 'Patterns and
 * symmetry').
 *
 * Convention: a permutation gamma (perm[k] = gamma(k)) acts by moving node k's amplitude to node
 * gamma(k), that is (gamma.a)_k = a_{gamma^-1(k)}; this is a left action,
 * (gamma delta).a = gamma.(delta.a). The snapshot has the symmetry (gamma, phase) when
 * gamma.a = e^{i phase} a, equivalently a_{gamma(k)} = e^{-i phase} a_k for every k. With
 * x_k(tau) = Re(a_k e^{i omega tau}) this reads gamma.x(tau) = x(tau + phase / omega): moving the
 * pattern by gamma is the same as shifting time by phase / omega.
 *
 * Example: the rotating wave a_k = e^{2 pi i q k / N} under the rotation k -> k + m has
 * (gamma.a)_k = a_{k-m} = e^{-2 pi i q m / N} a_k, so phase = -2 pi q m / N (wrapped).
 */
import { wrapAngle } from '../util/angles.js';
import { checkAmplitudes } from './amplitudes.js';
import { checkPermutation, describeElement } from './permutation.js';

export interface PatternSymmetry {
  element: Int32Array;
  /** describeElement(element).text, e.g. "rotation by 2". */
  text: string;
  /** The phase with gamma.a = e^{i phase} a, in (-pi, pi]. */
  phase: number;
}

export interface PhaseFit {
  /** Least-squares phase in (-pi, pi]: minimises |gamma.a - e^{i phase} a|. */
  phase: number;
  /** |gamma.a - e^{i phase} a| / |a| at that phase (0 for an exact symmetry, at most 2). */
  residual: number;
}

/**
 * Best phase for gamma.a = e^{i phase} a and its relative residual. The minimiser is
 * phase = arg(sum_k conj(a_k) (gamma.a)_k) = arg(sum_j conj(a_{gamma(j)}) a_j).
 */
export function fitSymmetryPhase(re: ArrayLike<number>, im: ArrayLike<number>, perm: ArrayLike<number>): PhaseFit {
  const n = checkAmplitudes(re, im, 'fitSymmetryPhase');
  if (perm.length !== n) {
    throw new RangeError(`fitSymmetryPhase: the permutation has ${perm.length} entries but the snapshot has ${n} nodes`);
  }
  checkPermutation(perm, 'fitSymmetryPhase');
  return fitPhase(re, im, perm);
}

/** fitSymmetryPhase without the checks, for callers that have made them. */
function fitPhase(re: ArrayLike<number>, im: ArrayLike<number>, perm: ArrayLike<number>): PhaseFit {
  const n = re.length;
  let overlapRe = 0;
  let overlapIm = 0;
  let norm = 0;
  for (let j = 0; j < n; j++) {
    const g = perm[j];
    // conj(a_g) * a_j
    overlapRe += re[g] * re[j] + im[g] * im[j];
    overlapIm += re[g] * im[j] - im[g] * re[j];
    norm += re[j] * re[j] + im[j] * im[j];
  }
  const phase = wrapAngle(Math.atan2(overlapIm, overlapRe));
  const c = Math.cos(phase);
  const s = Math.sin(phase);
  // Summed directly rather than as 2|a|^2 - 2|overlap|, which cancels badly for tight tolerances.
  let misfit = 0;
  for (let j = 0; j < n; j++) {
    const g = perm[j];
    // (gamma.a)_{g} = a_j against e^{i phase} a_g
    const dRe = re[j] - (c * re[g] - s * im[g]);
    const dIm = im[j] - (s * re[g] + c * im[g]);
    misfit += dRe * dRe + dIm * dIm;
  }
  return { phase, residual: Math.sqrt(misfit / norm) };
}

/**
 * The elements of `group` that fix the snapshot up to a phase: gamma.a = e^{i phase} a with the
 * least-squares phase, accepted when the relative residual is below `tolerance`. Keeps the
 * order of `group`.
 */
export function patternSymmetry(
  re: ArrayLike<number>,
  im: ArrayLike<number>,
  group: readonly ArrayLike<number>[],
  tolerance = 1e-2,
): PatternSymmetry[] {
  const n = checkAmplitudes(re, im, 'patternSymmetry');
  if (!Number.isFinite(tolerance) || tolerance <= 0) {
    throw new RangeError(`patternSymmetry: tolerance must be a finite number > 0 (got ${tolerance})`);
  }
  if (!Array.isArray(group)) throw new TypeError('patternSymmetry: group must be an array of permutations');
  const found: PatternSymmetry[] = [];
  group.forEach((perm, index) => {
    if (perm == null || perm.length !== n) {
      throw new RangeError(`patternSymmetry: group[${index}] has ${perm?.length} entries but the snapshot has ${n} nodes`);
    }
    checkPermutation(perm, `patternSymmetry: group[${index}]`);
    const fit = fitPhase(re, im, perm);
    if (fit.residual < tolerance) {
      const element = Int32Array.from(perm);
      found.push({ element, text: describeElement(element).text, phase: fit.phase });
    }
  });
  return found;
}

/**
 * The purely spatial part K of a spatio-temporal symmetry H: the elements whose phase is within
 * `phaseTolerance` radians of 0. H / K is cyclic, so |H| / |K| is the number of distinct phases.
 */
export function spatialSymmetries(symmetries: readonly PatternSymmetry[], phaseTolerance = 1e-2): PatternSymmetry[] {
  return symmetries.filter((s) => Math.abs(wrapAngle(s.phase)) <= phaseTolerance);
}
