/**
 * The standard normal distribution: erf, its cumulative distribution and quantile. Used for the
 * confidence level of a yield interval (z = Phi^-1((1 + c) / 2)) and for the acceptance of a
 * truncated normal draw.
 *
 * erf by its Maclaurin series below ERF_SERIES_LIMIT (alternating terms, cancellation costs at
 * most log10(e^{x^2}) ~ 4 digits at x = 3, so about 1e-12 absolute) and erfc by the continued
 * fraction of Abramowitz and Stegun 7.1.14 above it (Lentz's method), which converges fast there.
 */

/** Below this |x| the series, above it the continued fraction (see the module header). */
const ERF_SERIES_LIMIT = 3;
/** Relative size of the last term or correction at which both expansions stop. */
const EXPANSION_TOLERANCE = 1e-17;
const MAX_TERMS = 500;
const TWO_OVER_SQRT_PI = 2 / Math.sqrt(Math.PI);

export function erf(x: number): number {
  if (Number.isNaN(x)) return Number.NaN;
  if (x < 0) return -erf(-x);
  if (x < ERF_SERIES_LIMIT) {
    // erf x = 2/sqrt(pi) sum_n (-1)^n x^(2n+1) / (n! (2n+1))
    let term = x;
    let sum = x;
    const x2 = x * x;
    for (let n = 1; n < MAX_TERMS; n++) {
      term *= -x2 / n;
      const add = term / (2 * n + 1);
      sum += add;
      if (Math.abs(add) < EXPANSION_TOLERANCE * Math.abs(sum)) break;
    }
    return TWO_OVER_SQRT_PI * sum;
  }
  return 1 - erfcLarge(x);
}

/** erfc x for x >= ERF_SERIES_LIMIT: e^{-x^2}/sqrt(pi) / (x + 1/2 / (x + 1 / (x + 3/2 / (x + ...)))). */
function erfcLarge(x: number): number {
  const tiny = 1e-300;
  let f = x;
  let c = x;
  let d = 0;
  for (let n = 1; n < MAX_TERMS; n++) {
    const a = n / 2;
    d = x + a * d;
    d = Math.abs(d) < tiny ? tiny : d;
    c = x + a / c;
    c = Math.abs(c) < tiny ? tiny : c;
    d = 1 / d;
    const delta = c * d;
    f *= delta;
    if (Math.abs(delta - 1) < EXPANSION_TOLERANCE) break;
  }
  return Math.exp(-x * x) / Math.sqrt(Math.PI) / f;
}

/** P(Z <= z) for a standard normal Z. */
export function normalCdf(z: number): number {
  return 0.5 * (1 + erf(z / Math.SQRT2));
}

/** z with normalCdf(z) = p, 0 < p < 1, by bisection (the cdf is monotone; 200 halvings reach the double's resolution). */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`normalQuantile: p must lie in (0, 1) (got ${p})`);
  let low = -40;
  let high = 40;
  for (let i = 0; i < 200 && high - low > 1e-15 * Math.max(1, Math.abs(low)); i++) {
    const mid = 0.5 * (low + high);
    if (normalCdf(mid) < p) low = mid;
    else high = mid;
  }
  return 0.5 * (low + high);
}
