import { normalQuantile } from "./distributions.js";
/**
 * Non-parametric tests of stationarity on a sequence of stretch mean squares (Bendat & Piersol,
 * Random Data, 4th ed. 2010, sec. 4.5.2 and 10.3.1). Under stationarity the values are independent
 * draws of one distribution, so every ordering is equally likely.
 *
 * Reverse arrangements: A = number of pairs i < j with x_i > x_j. Under the hypothesis A is the number
 * of inversions of a random permutation, whose exact distribution follows the Mahonian recursion
 * P_n(k) = (1/n) sum_{j=0}^{min(k, n-1)} P_{n-1}(k - j); E[A] = n(n-1)/4, Var[A] = n(2n+5)(n-1)/72.
 * Two-sided acceptance region at level alpha: L < A <= M - L - 1 with M = n(n-1)/2 and L the largest a
 * with P(A <= a) <= alpha/2 (the distribution is symmetric about M/2). This reproduces Bendat & Piersol's
 * Table A.6 (docs/REFERENCES.md sec. 13: n = 10: 11..33, n = 20: 64..125, ..., n = 100: 2145..2804).
 *
 * Run test: runs of values above and below the median (values equal to the median dropped). With n1
 * above and n2 below, P(R = 2k) = 2 C(n1-1, k-1) C(n2-1, k-1) / C(n, n1) and P(R = 2k+1) =
 * [C(n1-1, k) C(n2-1, k-1) + C(n1-1, k-1) C(n2-1, k)] / C(n, n1) (Wald & Wolfowitz 1940, Ann. Math.
 * Statist. 11(2):147-162); E[R] = 2 n1 n2 / n + 1, Var[R] = 2 n1 n2 (2 n1 n2 - n) / (n^2 (n - 1)).
 * Acceptance region L < R <= U, L the largest r with P(R <= r) <= alpha/2, U the smallest with
 * P(R > U) <= alpha/2 (n = 20: 6 < R <= 15, docs/REFERENCES.md sec. 13).
 *
 * Exact distributions up to EXACT_LIMIT values, the normal approximation above it.
 */
export interface StationarityTest {
  test: "reverse arrangements" | "runs";
  /** Values tested. */
  n: number;
  /** A (reverse arrangements) or R (runs). */
  statistic: number;
  expected: number;
  std: number;
  /** Accepted when acceptAbove < statistic <= acceptAtMost. */
  acceptAbove: number;
  acceptAtMost: number;
  alpha: number;
  /** The nominal false-alarm rate of the region used (<= alpha for the exact, discrete distribution). */
  falseAlarmRate: number;
  method: "exact" | "normal";
  stationary: boolean;
}

export const EXACT_LIMIT = 200;

/** P(A = k), k = 0..n(n-1)/2, for the inversions of a random permutation of n (Mahonian recursion). */
export function inversionDistribution(n: number): Float64Array {
  let p = new Float64Array([1]);
  for (let m = 2; m <= n; m++) {
    const q = new Float64Array(p.length + m - 1);
    // q[k] = (1/m) sum_{j=0}^{m-1} p[k-j], as a sliding sum.
    let run = 0;
    for (let k = 0; k < q.length; k++) {
      if (k < p.length) run += p[k]!;
      if (k - m >= 0) run -= p[k - m]!;
      q[k] = run / m;
    }
    p = q;
  }
  return p;
}

/** Number of pairs i < j with x_i > x_j, by merge sort (O(n log n)). */
export function reverseArrangementCount(x: ArrayLike<number>): number {
  const a = Float64Array.from(x);
  const tmp = new Float64Array(a.length);
  let count = 0;
  for (let width = 1; width < a.length; width *= 2) {
    for (let lo = 0; lo < a.length; lo += 2 * width) {
      const mid = Math.min(lo + width, a.length);
      const hi = Math.min(lo + 2 * width, a.length);
      let i = lo;
      let j = mid;
      let k = lo;
      while (i < mid && j < hi) {
        if (a[j]! < a[i]!) {
          count += mid - i;
          tmp[k++] = a[j++]!;
        } else tmp[k++] = a[i++]!;
      }
      while (i < mid) tmp[k++] = a[i++]!;
      while (j < hi) tmp[k++] = a[j++]!;
    }
    a.set(tmp);
  }
  return count;
}

/**
 * The count the test uses: values equal to 1e-9 of the largest are ties, and a tie counts half a reverse arrangement
 * (mid-ranks, as Kendall's tau treats ties: common practice). A level that does not move (a calibrator's sine, whose
 * stretches agree to the last few bits) then gives the count's expectation n(n - 1)/4, not whatever order its rounding
 * happens to take; values that differ give the plain count.
 */
function reverseArrangementsWithTies(values: ArrayLike<number>): number {
  let big = 0;
  for (let i = 0; i < values.length; i++) big = Math.max(big, Math.abs(values[i]!));
  if (!(big > 0) || !Number.isFinite(big)) return reverseArrangementCount(values);
  const q = big * 1e-9;
  const x = Float64Array.from(values, (v) => Math.round(v / q));
  const sorted = Float64Array.from(x).sort();
  let ties = 0;
  for (let i = 0, j = 0; i < sorted.length; i = j) {
    while (j < sorted.length && sorted[j] === sorted[i]) j++;
    ties += ((j - i) * (j - i - 1)) / 2;
  }
  return ties === 0 ? reverseArrangementCount(values) : reverseArrangementCount(x) + ties / 2;
}

/**
 * Two-sided region from a discrete distribution p[v - offset]: L largest with P(<= L) <= a/2, U smallest with P(> U) <=
 * a/2.
 */
function exactRegion(p: Float64Array, offset: number, alpha: number): { low: number; high: number; rate: number } {
  let cum = 0;
  let low = offset - 1;
  let below = 0;
  for (let k = 0; k < p.length; k++) {
    cum += p[k]!;
    if (cum <= alpha / 2 + 1e-12) {
      low = k + offset;
      below = cum;
    } else break;
  }
  let tail = 0;
  let high = offset + p.length - 1;
  let above = 0;
  for (let k = p.length - 1; k >= 0; k--) {
    if (tail + p[k]! <= alpha / 2 + 1e-12) {
      tail += p[k]!;
      high = k + offset - 1;
      above = tail;
    } else break;
  }
  return { low, high, rate: below + above };
}

function normalRegion(mean: number, std: number, alpha: number): { low: number; high: number; rate: number } {
  const z = normalQuantile(1 - alpha / 2);
  return { low: Math.ceil(mean - z * std) - 1, high: Math.floor(mean + z * std), rate: alpha };
}

/** The exact region for n values at level alpha, made once (every channel of a record has the same n). */
const inversionRegions = new Map<string, { low: number; high: number; rate: number }>();
function inversionRegion(n: number, alpha: number): { low: number; high: number; rate: number } {
  const key = `${n} ${alpha}`;
  let r = inversionRegions.get(key);
  if (!r) inversionRegions.set(key, (r = exactRegion(inversionDistribution(n), 0, alpha)));
  return { ...r };
}

export function reverseArrangementsTest(values: ArrayLike<number>, alpha = 0.05): StationarityTest {
  const n = values.length;
  const a = reverseArrangementsWithTies(values);
  const expected = (n * (n - 1)) / 4;
  const std = Math.sqrt((n * (2 * n + 5) * (n - 1)) / 72);
  const exact = n <= EXACT_LIMIT;
  const r = exact ? inversionRegion(n, alpha) : normalRegion(expected, std, alpha);
  return {
    test: "reverse arrangements",
    n,
    statistic: a,
    expected,
    std,
    acceptAbove: r.low,
    acceptAtMost: r.high,
    alpha,
    falseAlarmRate: r.rate,
    method: exact ? "exact" : "normal",
    stationary: a > r.low && a <= r.high,
  };
}

/** P(R = r), r = 2..n1+n2, for n1 and n2 values of two kinds in random order (Wald & Wolfowitz 1940). */
export function runsDistribution(n1: number, n2: number): Float64Array {
  const n = n1 + n2;
  const total = binomial(n, n1);
  const p = new Float64Array(Math.max(0, n - 1));
  for (let r = 2; r <= n; r++) {
    let v: number;
    if (r % 2 === 0) {
      const k = r / 2;
      v = 2 * binomial(n1 - 1, k - 1) * binomial(n2 - 1, k - 1);
    } else {
      const k = (r - 1) / 2;
      v = binomial(n1 - 1, k) * binomial(n2 - 1, k - 1) + binomial(n1 - 1, k - 1) * binomial(n2 - 1, k);
    }
    p[r - 2] = v / total;
  }
  return p;
}

function binomial(n: number, k: number): number {
  if (k < 0 || k > n) return 0;
  let r = 1;
  const m = Math.min(k, n - k);
  for (let i = 1; i <= m; i++) r = (r * (n - m + i)) / i;
  return r;
}

export function runTest(values: ArrayLike<number>, alpha = 0.05): StationarityTest {
  const sorted = Float64Array.from(values).sort();
  const m = sorted.length;
  const median = m === 0 ? NaN : m % 2 === 1 ? sorted[(m - 1) / 2]! : (sorted[m / 2 - 1]! + sorted[m / 2]!) / 2;
  let n1 = 0;
  let n2 = 0;
  let runs = 0;
  let prev = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    if (v === median) continue;
    const side = v > median ? 1 : -1;
    if (side === 1) n1++;
    else n2++;
    if (side !== prev) runs++;
    prev = side;
  }
  const n = n1 + n2;
  const expected = n > 0 ? (2 * n1 * n2) / n + 1 : NaN;
  const std = n > 1 ? Math.sqrt((2 * n1 * n2 * (2 * n1 * n2 - n)) / (n * n * (n - 1))) : NaN;
  const exact = n <= EXACT_LIMIT;
  const r = exact ? exactRegion(runsDistribution(n1, n2), 2, alpha) : normalRegion(expected, std, alpha);
  return {
    test: "runs",
    n,
    statistic: runs,
    expected,
    std,
    acceptAbove: r.low,
    acceptAtMost: r.high,
    alpha,
    falseAlarmRate: r.rate,
    method: exact ? "exact" : "normal",
    stationary: runs > r.low && runs <= r.high,
  };
}

export interface DepartingStretch {
  fromS: number;
  toS: number;
  /** 10 log10(mean square / median mean square). */
  levelDb: number;
}

export interface StationarityFinding {
  /** False when there were too few stretches to test. */
  tested: boolean;
  stretchS: number;
  stretches: number;
  /** Consecutive stretches pooled into one tested value (to keep the tested values at most `maxValues`). */
  pooled: number;
  /** The deciding test. */
  reverseArrangements?: StationarityTest | undefined;
  /** Reported beside it, not part of the decision (two tests at 5 % each would alarm on about 10 % of records). */
  runs?: StationarityTest | undefined;
  stationary: boolean;
  /** The stretches whose level departs most from the median, largest first. */
  departing: DepartingStretch[];
}

export const MIN_STRETCHES = 10;

/**
 * The stationarity finding of a record from its stretch mean squares: the reverse-arrangements test
 * decides (sensitive to trends and steps, Bendat & Piersol 2010 sec. 4.5.2), on at most `maxValues`
 * values (consecutive stretches pooled by their mean when there are more; a partial last pool dropped).
 */
export function stationarityFinding(
  stretchMeanSquares: ArrayLike<number>,
  stretchS: number,
  startS = 0,
  options: { alpha?: number; maxValues?: number; departing?: number } = {},
): StationarityFinding {
  const alpha = options.alpha ?? 0.05;
  const maxValues = options.maxValues ?? 100;
  const finite: number[] = [];
  for (let i = 0; i < stretchMeanSquares.length; i++)
    if (Number.isFinite(stretchMeanSquares[i]!)) finite.push(stretchMeanSquares[i]!);
  const count = stretchMeanSquares.length;
  const departing = departingStretches(stretchMeanSquares, stretchS, startS, options.departing ?? 3);
  // Too few values, or all alike (a constant record): nothing to test.
  if (finite.length < MIN_STRETCHES || finite.every((v) => v === finite[0]))
    return { tested: false, stretchS, stretches: count, pooled: 1, stationary: true, departing };
  const pooled = Math.ceil(finite.length / maxValues);
  const values: number[] = [];
  for (let i = 0; i + pooled <= finite.length; i += pooled) {
    let s = 0;
    for (let j = 0; j < pooled; j++) s += finite[i + j]!;
    values.push(s / pooled);
  }
  const ra = reverseArrangementsTest(values, alpha);
  return {
    tested: true,
    stretchS,
    stretches: count,
    pooled,
    reverseArrangements: ra,
    runs: runTest(values, alpha),
    stationary: ra.stationary,
    departing,
  };
}

function departingStretches(
  ms: ArrayLike<number>,
  stretchS: number,
  startS: number,
  count: number,
): DepartingStretch[] {
  const finite = Array.from(ms)
    .filter(Number.isFinite)
    .sort((a, b) => a - b);
  if (finite.length === 0) return [];
  const m = finite.length;
  const median = m % 2 ? finite[(m - 1) / 2]! : (finite[m / 2 - 1]! + finite[m / 2]!) / 2;
  const all: DepartingStretch[] = [];
  for (let i = 0; i < ms.length; i++) {
    const v = ms[i]!;
    if (!Number.isFinite(v) || !(median > 0)) continue;
    all.push({
      fromS: startS + i * stretchS,
      toS: startS + (i + 1) * stretchS,
      // A stretch with no signal (mean square 0) is -Infinity dB, said as such (a floor at 1e-300 printed -2989.6 dB).
      levelDb: v > 0 ? 10 * Math.log10(v / median) : -Infinity,
    });
  }
  all.sort((a, b) => Math.abs(b.levelDb) - Math.abs(a.levelDb) || 0);
  return all.slice(0, count);
}
