/**
 * The chi-squared distribution with any positive, not necessarily whole, number of degrees of
 * freedom: the regularized lower incomplete gamma function P(a, x), its inverse in x, and the
 * chi-squared quantile chi2_p(nu) = 2 P^{-1}(nu / 2, p). The equivalent degrees of freedom of the
 * stability statistics are rarely whole numbers, so a table lookup will not do (README,
 * "Stability statistics").
 *
 * Methods (from memory of the textbook approach, e.g. Numerical Recipes, "Incomplete gamma
 * function"): the power series of P for x < a + 1, the continued fraction of Q = 1 - P (modified
 * Lentz) otherwise, ln Gamma by the Lanczos approximation (g = 7, nine coefficients), and the
 * inverse by safeguarded Newton steps on ln P or ln Q started from the Wilson-Hilferty
 * approximation, inside a bracket that bisection keeps when a step leaves it.
 */

const LANCZOS_G = 7;
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905,
  -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

/** ln Gamma(a) for a > 0 (Lanczos; about 15 significant digits). */
export function logGamma(a: number): number {
  if (a < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * a)) - logGamma(1 - a); // reflection
  const z = a - 1;
  let sum = LANCZOS[0];
  for (let i = 1; i < LANCZOS.length; i++) sum += LANCZOS[i] / (z + i);
  const t = z + LANCZOS_G + 0.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(sum);
}

const EPS = 1e-15;
const MAX_TERMS = 10_000;

/** Regularized lower incomplete gamma P(a, x) = gamma(a, x) / Gamma(a), a > 0, x >= 0. */
export function regularizedGammaP(a: number, x: number): number {
  checkShape('regularizedGammaP', a);
  if (!(x >= 0)) throw new RangeError(`regularizedGammaP: x must be >= 0, got ${x}`);
  if (x === 0) return 0;
  if (x === Infinity) return 1;
  return x < a + 1 ? lowerSeries(a, x) : 1 - upperFraction(a, x);
}

/** Regularized upper incomplete gamma Q(a, x) = 1 - P(a, x), without the cancellation of 1 - P. */
export function regularizedGammaQ(a: number, x: number): number {
  checkShape('regularizedGammaQ', a);
  if (!(x >= 0)) throw new RangeError(`regularizedGammaQ: x must be >= 0, got ${x}`);
  if (x === 0) return 1;
  if (x === Infinity) return 0;
  return x < a + 1 ? 1 - lowerSeries(a, x) : upperFraction(a, x);
}

/** x^a e^{-x} / Gamma(a), the prefactor both expansions share, in logs. */
function logPrefactor(a: number, x: number): number {
  return a * Math.log(x) - x - logGamma(a);
}

/** P(a, x) = x^a e^{-x} / Gamma(a + 1) sum_n x^n / ((a + 1) ... (a + n)). */
function lowerSeries(a: number, x: number): number {
  let term = 1 / a;
  let sum = term;
  for (let n = 1; n < MAX_TERMS; n++) {
    term *= x / (a + n);
    sum += term;
    if (Math.abs(term) < Math.abs(sum) * EPS) break;
  }
  return Math.min(1, sum * Math.exp(logPrefactor(a, x)));
}

/** Q(a, x) = x^a e^{-x} / Gamma(a) * 1 / (x + 1 - a - 1 (1 - a) / (x + 3 - a - ...)), modified Lentz. */
function upperFraction(a: number, x: number): number {
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < MAX_TERMS; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) break;
  }
  return Math.min(1, Math.exp(logPrefactor(a, x)) * h);
}

/** The x with P(a, x) = p, for 0 < p < 1 (0 and 1 give 0 and Infinity). */
export function inverseRegularizedGammaP(a: number, p: number): number {
  checkShape('inverseRegularizedGammaP', a);
  if (!(p >= 0 && p <= 1)) throw new RangeError(`inverseRegularizedGammaP: p must be in [0, 1], got ${p}`);
  if (p === 0) return 0;
  if (p === 1) return Infinity;
  // Work on the smaller tail, in logs, so that p near 0 or 1 keeps its digits.
  const upper = p > 0.5;
  const target = Math.log(upper ? 1 - p : p);
  const tail = (x: number): number => Math.log(upper ? regularizedGammaQ(a, x) : regularizedGammaP(a, x));
  // d/dx ln P = x^{a-1} e^{-x} / (Gamma(a) P); for Q the sign turns.
  const slope = (x: number, value: number): number => (upper ? -1 : 1) * Math.exp((a - 1) * Math.log(x) - x - logGamma(a) - value);
  let x = Math.max(wilsonHilfertyGamma(a, p), 1e-300);
  let lo = 0;
  let hi = Infinity;
  for (let i = 0; i < 200; i++) {
    const value = tail(x);
    const error = value - target;
    // the tail grows with x for P and falls for Q: keep a bracket around the root
    if (error > 0 !== upper) hi = Math.min(hi, x);
    else lo = Math.max(lo, x);
    if (Math.abs(error) < 1e-14) return x;
    let next = x - error / slope(x, value);
    if (!(next > lo && next < hi) || !Number.isFinite(next)) next = hi === Infinity ? Math.max(2 * x, x + 1) : 0.5 * (lo + hi);
    if (Math.abs(next - x) <= 1e-15 * x) return next;
    x = next;
  }
  return x;
}

/** chi2_p(nu): the p-quantile of the chi-squared distribution with nu > 0 degrees of freedom. */
export function chiSquaredQuantile(p: number, nu: number): number {
  if (!(nu > 0) || !Number.isFinite(nu)) throw new RangeError(`chiSquaredQuantile: degrees of freedom must be > 0, got ${nu}`);
  return 2 * inverseRegularizedGammaP(nu / 2, p);
}

/** P(chi2(nu) <= x). */
export function chiSquaredCdf(x: number, nu: number): number {
  if (!(nu > 0) || !Number.isFinite(nu)) throw new RangeError(`chiSquaredCdf: degrees of freedom must be > 0, got ${nu}`);
  return regularizedGammaP(nu / 2, Math.max(0, x) / 2);
}

/**
 * Wilson-Hilferty: chi2_p(nu) ~ nu (1 - 2 / (9 nu) + z_p sqrt(2 / (9 nu)))^3 with z_p the normal
 * quantile (from memory; good to a few parts in 1000 from nu of about 10 up). Only a start value
 * here, written in terms of the gamma shape a = nu / 2 and floored at a small positive value.
 */
function wilsonHilfertyGamma(a: number, p: number): number {
  const nu = 2 * a;
  const z = normalQuantile(p);
  const c = 2 / (9 * nu);
  const cube = 1 - c + z * Math.sqrt(c);
  if (cube > 0.05) return (nu * cube ** 3) / 2;
  // far in the lower tail with few degrees of freedom: P(a, x) ~ x^a / Gamma(a + 1)
  return Math.exp((Math.log(p) + logGamma(a + 1)) / a);
}

/**
 * Normal quantile by Acklam's rational approximation (relative error about 1e-9; from memory),
 * used only for start values and for the Wilson-Hilferty comparison.
 */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`normalQuantile: p must be in (0, 1), got ${p}`);
  const a = [-39.69683028665376, 220.9460984245205, -275.9285104469687, 138.357751867269, -30.66479806614716, 2.506628277459239];
  const b = [-54.47609879822406, 161.5858368580409, -155.6989798598866, 66.80131188771972, -13.28068155288572];
  const c = [-0.007784894002430293, -0.3223964580411365, -2.400758277161838, -2.549732539343734, 4.374664141464968, 2.938163982698783];
  const d = [0.007784695709041462, 0.3224671290700398, 2.445134137142996, 3.754408661907416];
  const low = 0.02425;
  if (p < low) {
    const q = Math.sqrt(-2 * Math.log(p));
    return (((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) / ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1);
  }
  if (p > 1 - low) return -normalQuantile(1 - p);
  const q = p - 0.5;
  const r = q * q;
  return (
    ((((((a[0] * r + a[1]) * r + a[2]) * r + a[3]) * r + a[4]) * r + a[5]) * q) /
    (((((b[0] * r + b[1]) * r + b[2]) * r + b[3]) * r + b[4]) * r + 1)
  );
}

/** The Wilson-Hilferty approximation itself, for comparisons at large nu. */
export function wilsonHilfertyQuantile(p: number, nu: number): number {
  const c = 2 / (9 * nu);
  return nu * (1 - c + normalQuantile(p) * Math.sqrt(c)) ** 3;
}

function checkShape(where: string, a: number): void {
  if (!(a > 0) || !Number.isFinite(a)) throw new RangeError(`${where}: shape a must be a finite number > 0, got ${a}`);
}
