/**
 * The distributions psdgate's statistics rest on, one implementation each: the gamma function and the
 * regularised incomplete gamma; chi-square (CDF, survival, quantiles in either tail, interval factors); the
 * standard normal (CDF, survival, quantile); Student t (quantile) and the noncentral t (CDF, quantile); the
 * binomial upper tail. Checked against scipy.stats in tests/estimate/statistics/distributions.test.ts.
 *
 * Chi-square: P(a, x) by its series for x < a + 1 and by Lentz's continued fraction otherwise
 * (Press, Teukolsky, Vetterling & Flannery, Numerical Recipes 3rd ed., Cambridge UP 2007, sec. 6.2);
 * ln Gamma by the Lanczos approximation with g = 7, n = 9 (Lanczos 1964, SIAM J. Numer. Anal. B 1:86;
 * coefficients as tabulated by Godfrey 2001).
 */

const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

export function lnGamma(z: number): number {
  if (z < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * z))) - lnGamma(1 - z);
  const x = z - 1;
  let a = LANCZOS[0]!;
  const t = x + 7.5;
  for (let i = 1; i < 9; i++) a += LANCZOS[i]! / (x + i);
  return 0.5 * Math.log(2 * Math.PI) + (x + 0.5) * Math.log(t) - t + Math.log(a);
}

/**
 * Regularised lower and upper incomplete gamma, P(a, x) and Q(a, x) = 1 - P(a, x), each computed where it
 * is accurate: the series gives P for x < a + 1, the continued fraction gives Q otherwise, and the other
 * one is its complement. Both are needed to full relative precision in their own tails (a quantile at
 * p = 1e-7 or 1 - 1e-7).
 */
function incompleteGamma(a: number, x: number): { p: number; q: number } {
  if (x <= 0) return { p: 0, q: 1 };
  if (x === Infinity) return { p: 1, q: 0 };
  const lnPre = a * Math.log(x) - x - lnGamma(a);
  if (x < a + 1) {
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < 100000; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * 1e-17) break;
    }
    const p = Math.min(1, sum * Math.exp(lnPre));
    return { p, q: 1 - p };
  }
  // Continued fraction for Q(a, x), modified Lentz.
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 100000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-16) break;
  }
  const q = Math.min(1, Math.exp(lnPre) * h);
  return { p: 1 - q, q };
}

/** Regularised lower incomplete gamma P(a, x). */
export function regularizedGammaP(a: number, x: number): number {
  return incompleteGamma(a, x).p;
}

/** P(chi2_dof <= x). */
export function chiSquareCdf(x: number, dof: number): number {
  return incompleteGamma(dof / 2, x / 2).p;
}

/** P(chi2_dof > x), accurate in the far upper tail (no 1 - P cancellation). */
export function chiSquareSurvival(x: number, dof: number): number {
  return incompleteGamma(dof / 2, x / 2).q;
}

/**
 * Quantile of the chi-square distribution: the x with P(chi2_dof <= x) = p, for any real dof > 0.
 * For p > 0.5 the upper tail 1 - p is solved instead (see chiSquareUpperQuantile).
 */
export function chiSquareQuantile(p: number, dof: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`probability must be in (0, 1), got ${p}`);
  return p <= 0.5 ? tailQuantile(p, dof, false) : tailQuantile(1 - p, dof, true);
}

/**
 * The x with P(chi2_dof > x) = q: the quantile for a small upper-tail probability given exactly (1e-6
 * is not representable as 1 - p to full precision). Used by the decision rule's family-wise limits.
 */
export function chiSquareUpperQuantile(q: number, dof: number): number {
  if (!(q > 0 && q < 1)) throw new RangeError(`probability must be in (0, 1), got ${q}`);
  return q <= 0.5 ? tailQuantile(q, dof, true) : tailQuantile(1 - q, dof, false);
}

/**
 * Solve log(tail(x)) = log(t) for the lower (P) or upper (Q) tail probability t <= 0.5. Newton steps on
 * the log of the tail (its slope is -+pdf/tail, smooth over many decades), kept inside a bisection
 * bracket in log x, to a relative step of 1e-15. Starting value: Wilson & Hilferty's cube-root normal
 * approximation (Proc. Natl. Acad. Sci. 17, 1931), or for a far lower tail the leading term of the
 * series P(a, x) ~ x^a e^-x / Gamma(a + 1) (Abramowitz & Stegun 1964, 6.5.29).
 */
function tailQuantile(t: number, dof: number, upper: boolean): number {
  if (!(dof > 0) || !Number.isFinite(dof)) throw new RangeError(`degrees of freedom must be > 0, got ${dof}`);
  const a = dof / 2;
  const lnT = Math.log(t);
  const z = normalQuantile(upper ? 1 - t : t);
  const h = 2 / (9 * dof);
  const wh = dof * Math.pow(1 - h + z * Math.sqrt(h), 3);
  // x/2 ~ (t Gamma(a + 1))^(1/a) where the series' first term dominates.
  const series = 2 * Math.exp((lnT + lnGamma(a + 1)) / a);
  let x = !upper && (!(wh > 0) || series < wh) ? series : wh;
  if (!(x > 0) || !Number.isFinite(x)) x = dof;
  // Bracket [lo, hi] on x with lnTail(lo) and lnTail(hi) on either side of lnT.
  let lo = 0;
  let hi = Infinity;
  const lnNorm = a * Math.log(2) + lnGamma(a);
  for (let i = 0; i < 400; i++) {
    const g = incompleteGamma(a, x / 2);
    const tail = upper ? g.q : g.p;
    const f = Math.log(tail) - lnT;
    // Lower tail grows with x, upper tail falls.
    if (f < 0 !== upper) lo = x;
    else hi = x;
    if (f === 0) return x;
    const lnPdf = (a - 1) * Math.log(x) - x / 2 - lnNorm;
    const slope = (upper ? -1 : 1) * Math.exp(lnPdf - Math.log(tail));
    let next = Number.isFinite(slope) && slope !== 0 ? x - f / slope : NaN;
    if (!(next > lo && next < hi)) next = hi === Infinity ? x * 4 : lo === 0 ? x / 4 : Math.sqrt(lo * hi);
    if (Math.abs(next - x) <= 1e-15 * x) return next;
    x = next;
  }
  return x;
}

/**
 * Standard normal quantile, Acklam's rational approximation (relative error 1.15e-9; P. J. Acklam, 2003,
 * "An algorithm for computing the inverse normal CDF"), without the refinement step Acklam describes: the
 * chi-square quantiles above start from it and refine themselves; the gates and tone tests use it as it is.
 */
export function normalQuantile(p: number): number {
  const a = [
    -3.969683028665376e1, 2.209460984245205e2, -2.759285104469687e2, 1.38357751867269e2, -3.066479806614716e1,
    2.506628277459239,
  ];
  const b = [
    -5.447609879822406e1, 1.615858368580409e2, -1.556989798598866e2, 6.680131188771972e1, -1.328068155288572e1,
  ];
  const c = [
    -7.784894002430293e-3, -3.223964580411365e-1, -2.400758277161838, -2.549732539343734, 4.374664141464968,
    2.938163982698783,
  ];
  const d = [7.784695709041462e-3, 3.224671290700398e-1, 2.445134137142996, 3.754408661907416];
  const pl = 0.02425;
  let q: number;
  if (p < pl) {
    q = Math.sqrt(-2 * Math.log(p));
    return (
      (((((c[0]! * q + c[1]!) * q + c[2]!) * q + c[3]!) * q + c[4]!) * q + c[5]!) /
      ((((d[0]! * q + d[1]!) * q + d[2]!) * q + d[3]!) * q + 1)
    );
  }
  if (p > 1 - pl) {
    q = Math.sqrt(-2 * Math.log(1 - p));
    return (
      -(((((c[0]! * q + c[1]!) * q + c[2]!) * q + c[3]!) * q + c[4]!) * q + c[5]!) /
      ((((d[0]! * q + d[1]!) * q + d[2]!) * q + d[3]!) * q + 1)
    );
  }
  q = p - 0.5;
  const r = q * q;
  return (
    ((((((a[0]! * r + a[1]!) * r + a[2]!) * r + a[3]!) * r + a[4]!) * r + a[5]!) * q) /
    (((((b[0]! * r + b[1]!) * r + b[2]!) * r + b[3]!) * r + b[4]!) * r + 1)
  );
}

/**
 * Factors that turn an estimate G into its two-sided confidence interval for a chi-square variate
 * with `dof` degrees of freedom: lower = G * nu / chi2(1 - alpha/2; nu), upper = G * nu / chi2(alpha/2; nu),
 * alpha = 1 - confidence (Bendat & Piersol, Random Data, 4th ed., Wiley 2010, ch. 8).
 */
export function chiSquareIntervalFactors(dof: number, confidence: number): { lower: number; upper: number } {
  const alpha = 1 - confidence;
  return {
    lower: dof / chiSquareUpperQuantile(alpha / 2, dof),
    upper: dof / chiSquareQuantile(alpha / 2, dof),
  };
}

/**
 * Standard normal CDF from the regularised incomplete gamma: erf(x) = P(1/2, x^2). Below 0 it is the upper tail at -x,
 * Q(1/2, x^2 / 2) / 2, to full relative precision (as 0.5 - 0.5 P it lost every digit below x of about -8).
 */
export function normalCdf(x: number): number {
  if (x < 0) return normalSurvival(-x);
  return 0.5 + 0.5 * regularizedGammaP(0.5, (x * x) / 2);
}

/**
 * Upper tail of the standard normal, Q(x) = P(Z > x), from the regularised upper incomplete gamma,
 * Q(x) = Q(1/2, x^2 / 2) / 2 for x >= 0, to full relative precision in the far tail (no 1 - Phi cancellation).
 */
export function normalSurvival(x: number): number {
  const g = incompleteGamma(0.5, (x * x) / 2);
  return x >= 0 ? 0.5 * g.q : 0.5 + 0.5 * g.p;
}

/**
 * Student-t quantile by the Cornish-Fisher expansion in the normal quantile z (Abramowitz & Stegun,
 * Handbook of Mathematical Functions, 1964, 26.7.5), four terms; within about 1 % for nu >= 7 at the
 * tail used here (checked against scipy in the tests).
 */
export function studentTQuantile(p: number, nu: number): number {
  const z = normalQuantile(p);
  const z2 = z * z;
  const g1 = (z * (z2 + 1)) / 4;
  const g2 = (z * ((5 * z2 + 16) * z2 + 3)) / 96;
  const g3 = (z * (((3 * z2 + 19) * z2 + 17) * z2 - 15)) / 384;
  const g4 = (z * ((((79 * z2 + 776) * z2 + 1482) * z2 - 1920) * z2 - 945)) / 92160;
  return z + g1 / nu + g2 / nu ** 2 + g3 / nu ** 3 + g4 / nu ** 4;
}

// 8-point Gauss-Legendre nodes and weights on [-1, 1] (Abramowitz & Stegun 1964, Table 25.4).
const GL_X = [0.1834346424956498, 0.525532409916329, 0.7966664774136267, 0.9602898564975363];
const GL_W = [0.362683783378362, 0.3137066458778873, 0.2223810344533745, 0.1012285362903763];

/**
 * CDF of the noncentral t with nu DOF and noncentrality delta: T = (Z + delta) / S with S = sqrt(chi2_nu / nu),
 * so P(T <= t) = integral_0^inf Phi(t s - delta) f_S(s) ds, f_S(s) = 2 (nu/2)^(nu/2) / Gamma(nu/2) s^(nu-1) exp(-nu s^2
 * / 2) (the definition; e.g. Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions vol. 2, 1995, ch. 31,
 * from memory). Gauss-Legendre on 400 pieces of the range that holds S (about 12 standard deviations each side of 1).
 * Phi(t s - delta) steps from 0 to 1 over a width of about 1 / |t| around s = delta / t; where that is narrower than a
 * piece (a large t: few DOF and a high confidence, e.g. k for 3 spectra at 99.99 %), the pieces the step crosses are
 * integrated on sub-pieces 1 / |t| wide over delta / t +- 12 / |t| (with 400 pieces alone the step was missed: k off
 * by 4e-4 at n = 3, p = 0.999, 99.99 % and by 20-40 % at 99.9999 %; scipy.stats.nct.ppf in the tests).
 */
export function noncentralTCdf(t: number, nu: number, delta: number): number {
  if (!(nu > 0)) throw new RangeError(`degrees of freedom above 0, got ${nu}`);
  const sd = 1 / Math.sqrt(2 * nu);
  const lo = Math.max(0, 1 - 14 * sd);
  const hi = Math.max(1 + 14 * sd, nu < 4 ? 8 : 0);
  const lnC = Math.log(2) + (nu / 2) * Math.log(nu / 2) - lnGamma(nu / 2);
  const pieces = 400;
  const h = (hi - lo) / pieces;
  // Integral of the integrand over [a, b] by 8-point Gauss-Legendre.
  const piece = (a: number, b: number): number => {
    const mid = (a + b) / 2;
    const half = (b - a) / 2;
    let part = 0;
    for (let k = 0; k < 4; k++) {
      for (const sign of [-1, 1]) {
        const s = mid + sign * GL_X[k]! * half;
        if (s <= 0) continue;
        const dens = Math.exp(lnC + (nu - 1) * Math.log(s) - (nu * s * s) / 2);
        part += GL_W[k]! * dens * normalCdf(t * s - delta);
      }
    }
    return part * half;
  };
  // The step of Phi(t s - delta) when it is narrower than a piece: [stepLo, stepHi] in sub-pieces of width w.
  const w = 1 / Math.abs(t);
  const narrow = Math.abs(t) * h > 1;
  const stepLo = narrow ? delta / t - 12 * w : Infinity;
  const stepHi = narrow ? delta / t + 12 * w : -Infinity;
  let sum = 0;
  let refined = 0;
  for (let p = 0; p < pieces; p++) {
    const a = lo + p * h;
    const b = a + h;
    if (b > stepLo && a < stepHi) {
      const from = Math.max(a, stepLo);
      const to = Math.min(b, stepHi);
      if (from > a) refined += piece(a, from);
      const m = Math.ceil((to - from) / w);
      for (let i = 0; i < m; i++) refined += piece(from + ((to - from) * i) / m, from + ((to - from) * (i + 1)) / m);
      if (to < b) refined += piece(to, b);
      continue;
    }
    const mid = lo + (p + 0.5) * h;
    for (let k = 0; k < 4; k++) {
      for (const sign of [-1, 1]) {
        const s = mid + (sign * GL_X[k]! * h) / 2;
        if (s <= 0) continue;
        const dens = Math.exp(lnC + (nu - 1) * Math.log(s) - (nu * s * s) / 2);
        sum += GL_W[k]! * dens * normalCdf(t * s - delta);
      }
    }
  }
  return (sum * h) / 2 + refined;
}

/** Quantile of the noncentral t: the t with noncentralTCdf(t) = prob, by bisection to 1e-12 relative. */
export function noncentralTQuantile(prob: number, nu: number, delta: number): number {
  if (!(prob > 0 && prob < 1)) throw new RangeError(`a probability between 0 and 1, got ${prob}`);
  let lo = delta - 10;
  let hi = delta + 10;
  while (noncentralTCdf(lo, nu, delta) > prob) lo = lo - 2 * Math.abs(lo) - 10;
  while (noncentralTCdf(hi, nu, delta) < prob) hi = hi + 2 * Math.abs(hi) + 10;
  for (let i = 0; i < 200 && hi - lo > 1e-12 * Math.max(1, Math.abs(hi)); i++) {
    const mid = (lo + hi) / 2;
    if (noncentralTCdf(mid, nu, delta) < prob) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** P(X >= r) for X ~ Binomial(n, p), by summing the terms (n is at most a few thousand here). */
export function binomialAtLeast(r: number, n: number, p: number): number {
  if (r <= 0) return 1;
  if (r > n) return 0;
  if (p <= 0) return 0;
  if (p >= 1) return 1;
  let term = Math.pow(1 - p, n);
  let below = 0;
  if (term > 0) {
    for (let i = 0; i < r; i++) {
      below += term;
      term *= ((n - i) / (i + 1)) * (p / (1 - p));
    }
    return Math.max(0, Math.min(1, 1 - below));
  }
  // (1 - p)^n underflowed: work in logs from the mode outwards.
  const lnP = Math.log(p);
  const ln1p = Math.log1p(-p);
  let lnC = 0;
  let sum = 0;
  for (let i = 0; i <= n; i++) {
    if (i > 0) lnC += Math.log((n - i + 1) / i);
    if (i >= r) sum += Math.exp(lnC + i * lnP + (n - i) * ln1p);
  }
  return Math.min(1, sum);
}
