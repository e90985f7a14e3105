/**
 * Equivalent degrees of freedom (edf) of the overlapping Allan variance and of the modified Allan
 * variance for the five power-law noise types, S_y(f) ~ f^alpha:
 * alpha = 2 white PM, 1 flicker PM, 0 white FM, -1 flicker FM, -2 random-walk FM.
 * A variance estimate s^2 is then read as sigma^2 chi2(edf) / edf (README, "Stability statistics").
 *
 * N is the number of phase points and m the averaging factor throughout.
 */

/** The power-law noise types the edf formulas know. */
export type NoiseAlpha = 2 | 1 | 0 | -1 | -2;

export const NOISE_NAMES: Readonly<Record<NoiseAlpha, string>> = {
  2: 'white PM',
  1: 'flicker PM',
  0: 'white FM',
  [-1]: 'flicker FM',
  [-2]: 'random-walk FM',
};

/**
 * Overlapping ADEV: the simple approximations of NIST SP 1065 (Riley 2008), section 5.3.3,
 * "Simple approximations for overlapping ADEV EDF", after Howe, Allan and Barnes (1981).
 * Written from memory; the same five expressions appear in the allantools library's edf_simple
 * (a second, independent statement of them). Their stated accuracy is a few per cent for
 * N >> m; the Monte Carlo test (tests/unit/stability/edf-monte-carlo.test.ts) checks them.
 */
export function oadevEdf(alpha: NoiseAlpha, N: number, m: number): number {
  switch (alpha) {
    case 2:
      return ((N + 1) * (N - 2 * m)) / (2 * (N - m));
    case 1:
      return Math.exp(Math.sqrt(Math.log((N - 1) / (2 * m)) * Math.log(((2 * m + 1) * (N - 1)) / 4)));
    case 0:
      return ((3 * (N - 1)) / (2 * m) - (2 * (N - 2)) / N) * ((4 * m * m) / (4 * m * m + 5));
    case -1:
      return m === 1 ? (2 * (N - 2) ** 2) / (2.3 * N - 4.9) : (5 * N * N) / (4 * m * (N + 3 * m));
    case -2:
      return ((N - 2) / (m * (N - 3) ** 2)) * ((N - 1) ** 2 - 3 * m * (N - 1) + 4 * m * m);
  }
}

/**
 * Modified Allan variance (and so TDEV): Greenhall's algorithm for the edf of finite-difference
 * variances (C. A. Greenhall and W. J. Riley, "Uncertainty of stability variances based on
 * finite differences", Proc. 35th PTTI, 2003), the method NIST SP 1065 recommends for Mod sigma,
 * in its modified-variance case (filter factor F = 1, stride S = m, difference order d = 2).
 * Written from the paper's equations as recalled and as the allantools library states them
 * (edf_greenhall): the generalized autocovariance s_w of the noise (its eq. 7), the filter steps
 * to s_x and s_z (eqs. 8, 9), the basic sum (eq. 10), and for long records the asymptotic form
 * 1/edf = (a0 - a1 / r) / r of its Table 1. The algorithm is exact for the model (Gaussian
 * power-law noise) up to the table's 3-4 digits.
 */
export function mdevEdf(alpha: NoiseAlpha, N: number, m: number): number {
  const d = 2;
  const S = m;
  const L = m + m * d; // filter length over the phase points: 3m
  const M = 1 + Math.floor((S * (N - L)) / m); // the estimator's terms: N - 3m + 1
  if (M < 1) return Number.NaN;
  const J = Math.min(M, (d + 1) * S);
  const JMAX = 100;
  const r = M / S;
  const sz0 = sz(0, 1, alpha);
  if (J <= JMAX) return (sz0 * sz0 * M) / basicSum(J, M, S, 1, alpha);
  if (r > d + 1) {
    const [a0, a1] = GREENHALL_TABLE_1[alpha];
    return 1 / ((a0 - a1 / r) / r);
  }
  return (sz0 * sz0 * JMAX) / basicSum(JMAX, JMAX, JMAX / r, 1, alpha);
}

/** Greenhall and Riley (2003), Table 1, column d = 2: (a0, a1) per alpha (from allantools' copy of it). */
const GREENHALL_TABLE_1: Readonly<Record<NoiseAlpha, [number, number]>> = {
  2: [7 / 9, 1 / 2],
  1: [0.997, 0.616],
  0: [1.033, 0.607],
  [-1]: [1.048, 0.534],
  [-2]: [1.302, 0.535],
};

/** Generalized autocovariance of the noise, up to a constant: eq. (7). */
function sw(t: number, alpha: number): number {
  const a = Math.abs(t);
  switch (alpha) {
    case 2:
      return -a;
    case 1:
      return t === 0 ? 0 : t * t * Math.log(a);
    case 0:
      return a ** 3;
    case -1:
      return t === 0 ? 0 : t ** 4 * Math.log(a);
    case -2:
      return a ** 5;
    case -3:
      return t === 0 ? 0 : t ** 6 * Math.log(a);
    default:
      return a ** 7;
  }
}

/** After the averaging filter of factor F: eq. (8). */
function sx(t: number, F: number, alpha: number): number {
  return F * F * (2 * sw(t, alpha) - sw(t - 1 / F, alpha) - sw(t + 1 / F, alpha));
}

/** After the second difference (d = 2): eq. (9), binomial weights 6, -4, 1. */
function sz(t: number, F: number, alpha: number): number {
  return 6 * sx(t, F, alpha) - 4 * sx(t - 1, F, alpha) - 4 * sx(t + 1, F, alpha) + sx(t - 2, F, alpha) + sx(t + 2, F, alpha);
}

/** Eq. (10): sz(0)^2 + (1 - J/M) sz(J/S)^2 + 2 sum_{j=1}^{J-1} (1 - j/M) sz(j/S)^2. */
function basicSum(J: number, M: number, S: number, F: number, alpha: number): number {
  let sum = sz(0, F, alpha) ** 2 + (1 - J / M) * sz(J / S, F, alpha) ** 2;
  for (let j = 1; j < J; j++) sum += 2 * (1 - j / M) * sz(j / S, F, alpha) ** 2;
  return sum;
}
