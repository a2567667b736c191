/**
 * Chi-square distribution: regularised incomplete gamma and its inverse, so that confidence bounds
 * need no table. P(a, x) by its series for x < a + 1 and by Lentz's continued fraction otherwise
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
    if ((f < 0) !== upper) lo = x;
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
 * Standard normal quantile, Acklam's rational approximation (relative error 1.15e-9), refined by one
 * Halley step against erfc (P. J. Acklam, 2003, "An algorithm for computing the inverse normal CDF").
 * Used only as a starting value above, so the refinement is optional.
 */
export function normalQuantile(p: number): number {
  const a = [-3.969683028665376e1, 2.209460984245205e2, -2.759285104469687e2, 1.38357751867269e2, -3.066479806614716e1, 2.506628277459239];
  const b = [-5.447609879822406e1, 1.615858368580409e2, -1.556989798598866e2, 6.680131188771972e1, -1.328068155288572e1];
  const c = [-7.784894002430293e-3, -3.223964580411365e-1, -2.400758277161838, -2.549732539343734, 4.374664141464968, 2.938163982698783];
  const d = [7.784695709041462e-3, 3.224671290700398e-1, 2.445134137142996, 3.754408661907416];
  const pl = 0.02425;
  let q: number;
  let r: number;
  if (p < pl) {
    q = Math.sqrt(-2 * Math.log(p));
    return (((((c[0]! * q + c[1]!) * q + c[2]!) * q + c[3]!) * q + c[4]!) * q + c[5]!) / ((((d[0]! * q + d[1]!) * q + d[2]!) * q + d[3]!) * q + 1);
  }
  if (p > 1 - pl) {
    q = Math.sqrt(-2 * Math.log(1 - p));
    return -(((((c[0]! * q + c[1]!) * q + c[2]!) * q + c[3]!) * q + c[4]!) * q + c[5]!) / ((((d[0]! * q + d[1]!) * q + d[2]!) * q + d[3]!) * q + 1);
  }
  q = p - 0.5;
  r = q * q;
  return ((((((a[0]! * r + a[1]!) * r + a[2]!) * r + a[3]!) * r + a[4]!) * r + a[5]!) * q) / (((((b[0]! * r + b[1]!) * r + b[2]!) * r + b[3]!) * r + b[4]!) * r + 1);
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
