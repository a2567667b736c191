/**
 * A test profile fitted to a required fatigue-damage spectrum: at most N breakpoints joined by straight
 * lines on log-log axes whose damage over the test duration covers the field's (times a margin) at every
 * natural frequency of the grid, with as little over-test as the fit allows.
 *
 * Method (psdgate's own; the steps are common practice in fatigue-equivalent test tailoring):
 * 1. Start from the inverted FDS: the level whose damage over the test would equal the target at each f_n.
 *    Damage goes as G^(b/2) at fixed shape (Miles' sigma^2 proportional to G(f_n); docs/REFERENCES.md
 *    sec. 14), so G_inv = G_ref (D_target / D_ref)^(2/b) for any reference spectrum G_ref and its damage D_ref.
 * 2. The upper envelope of G_inv by at most N breakpoints on the grid, on log-log axes, that minimises the
 *    summed log excess over the grid: dynamic programming over (grid point, level) with levels in 0.5 dB steps
 *    up to 6 dB above G_inv and coarser steps above that (exact for the discretised problem).
 * 3. The damage of that profile by the full computation; the whole profile scaled by the smallest factor
 *    that makes coverage hold everywhere (a uniform scale s multiplies every damage by exactly s^(b/2)).
 * 4. Again from a corrected target (the envelope's level times (D_target / D_test)^(2/b) at each f_n), up to
 *    12 passes in all and until 3 passes in a row bring no improvement, keeping the fit with the least
 *    over-test (the sum over the grid of ln(D_test / D_target)). The correction matters where the field's
 *    damage at high f_n comes from the quasi-static response to low-frequency content, which the local
 *    inversion of step 1 attributes to the level at f_n.
 */

export interface Breakpoint {
  hz: number;
  level: number;
}

export interface ProfileFitOptions {
  fnHz: Float64Array;
  /** Damage the test must reach at each f_n (the field's, times the margin). */
  targetDamage: Float64Array;
  /**
   * First guesses of the level at each f_n (e.g. inverted FDS with different reference shapes); each is refined, the
   * best fit kept.
   */
  startLevels: Float64Array[];
  basquinB: number;
  maxBreakpoints: number;
  /** Damage of a candidate profile over the test duration, on the same grid (the full computation). */
  damageOf: (points: Breakpoint[]) => Float64Array;
}

export interface ProfileFit {
  points: Breakpoint[];
  /** The damage of `points` over the test duration. */
  damage: Float64Array;
  /** min over f_n of damage / target (>= 1 by construction) and its f_n. */
  minRatio: number;
  minRatioHz: number;
  /** Largest and median damage / target: the over-test the fit leaves. */
  maxRatio: number;
  medianRatio: number;
  /** Uniform scale applied to the envelope in the final step (level factor). */
  scale: number;
}

const DB = Math.log(10) / 10;
/**
 * Level offsets above 6 dB tried by the envelope, dB (a line far above a point is rarely the best; the final scale
 * fixes coverage).
 */
const COARSE_DB = [7, 8, 9, 10, 12, 14, 17, 20, 25, 30, 40, 50, 60, 80, 100];

/** Level of a log-log broken line at f (f inside its range). */
export function brokenLineLevel(points: readonly Breakpoint[], f: number): number {
  let i = 0;
  while (i < points.length - 2 && f > points[i + 1]!.hz) i++;
  const a = points[i]!;
  const b = points[i + 1]!;
  const t = Math.log(f / a.hz) / Math.log(b.hz / a.hz);
  return Math.exp(Math.log(a.level) + t * (Math.log(b.level) - Math.log(a.level)));
}

/**
 * The upper envelope of points (x_k, y_k), x increasing, by a broken line through at most `maxPoints` of the
 * x_k (the first and last always), lying on or above every y_k, minimising sum_k (line(x_k) - y_k).
 * Returns the chosen indices and the line's values there.
 */
export function upperEnvelope(
  x: Float64Array,
  y: Float64Array,
  maxPoints: number,
): { index: number[]; value: number[] } {
  const m = x.length;
  if (m < 2) throw new RangeError("an envelope needs at least 2 points");
  if (!(Number.isInteger(maxPoints) && maxPoints >= 2))
    throw new RangeError(`at least 2 breakpoints, got ${maxPoints}`);
  let yMax = -Infinity;
  for (let k = 0; k < m; k++) yMax = Math.max(yMax, y[k]!);
  // Candidate levels per point: y_k + 0, 0.5, ..., 6 dB, then 1 dB steps to the highest y plus 1 dB, and the highest y
  // itself.
  const levels: Float64Array[] = [];
  for (let k = 0; k < m; k++) {
    const v: number[] = [];
    for (let d = 0; d <= 6 + 1e-9; d += 0.5) v.push(y[k]! + d * DB);
    for (const d of COARSE_DB) if (y[k]! + d * DB <= yMax + 3 * DB) v.push(y[k]! + d * DB);
    if (yMax > y[k]!) v.push(yMax);
    levels.push(Float64Array.from(v));
  }
  const segs = Math.min(maxPoints - 1, m - 1);
  // best[s][k][a]: least cost of a line from point 0 to point k at level a, in s segments; from[...] the previous (k,
  // a).
  const best = Array.from({ length: segs + 1 }, () => levels.map((l) => new Float64Array(l.length).fill(Infinity)));
  const fromK = Array.from({ length: segs + 1 }, () => levels.map((l) => new Int32Array(l.length).fill(-1)));
  const fromA = Array.from({ length: segs + 1 }, () => levels.map((l) => new Int32Array(l.length).fill(-1)));
  for (let a = 0; a < levels[0]!.length; a++) best[0]![0]![a] = levels[0]![a]! - y[0]!;
  // Prefix sums of x and y, so a segment's summed excess is O(1): sum_{k=i+1..j} (va + slope (x_k - x_i) - y_k).
  const sx = new Float64Array(m + 1);
  const sy = new Float64Array(m + 1);
  for (let k = 0; k < m; k++) {
    sx[k + 1] = sx[k]! + x[k]!;
    sy[k + 1] = sy[k]! + y[k]!;
  }
  // Push from (i, a), i ascending: best[.][i][.] is final once every earlier point has pushed.
  for (let i = 0; i < m - 1; i++) {
    const li = levels[i]!;
    for (let a = 0; a < li.length; a++) {
      let any = false;
      for (let s = 0; s < segs; s++) if (best[s]![i]![a]! < Infinity) any = true;
      if (!any) continue;
      const va = li[a]!;
      // The line from (x_i, va) stays on or above y_k for i < k < j iff its slope >= minSlope over those k.
      let minSlope = -Infinity;
      for (let j = i + 1; j < m; j++) {
        const lj = levels[j]!;
        const dx = x[j]! - x[i]!;
        const n = j - i;
        const sumDx = sx[j + 1]! - sx[i + 1]! - n * x[i]!;
        const sumY = sy[j + 1]! - sy[i + 1]!;
        for (let b = 0; b < lj.length; b++) {
          const slope = (lj[b]! - va) / dx;
          if (slope < minSlope - 1e-12) continue;
          const cost = n * va + slope * sumDx - sumY;
          for (let s = 1; s <= segs; s++) {
            const c = best[s - 1]![i]![a]! + cost;
            if (c < best[s]![j]![b]!) {
              best[s]![j]![b] = c;
              fromK[s]![j]![b] = i;
              fromA[s]![j]![b] = a;
            }
          }
        }
        minSlope = Math.max(minSlope, (y[j]! - va) / dx);
      }
    }
  }
  let bs = -1;
  let bb = -1;
  let bc = Infinity;
  for (let s = 1; s <= segs; s++) {
    const row = best[s]![m - 1]!;
    for (let b = 0; b < row.length; b++)
      if (row[b]! < bc - 1e-12) {
        bc = row[b]!;
        bs = s;
        bb = b;
      }
  }
  if (bs < 0) throw new RangeError("no envelope found (internal)");
  const index: number[] = [];
  const value: number[] = [];
  let k = m - 1;
  let a = bb;
  for (let s = bs; s >= 0; s--) {
    index.push(k);
    value.push(levels[k]![a]!);
    if (s === 0) break;
    const pk = fromK[s]![k]![a]!;
    const pa = fromA[s]![k]![a]!;
    k = pk;
    a = pa;
  }
  return { index: index.reverse(), value: value.reverse() };
}

/** Four significant digits: frequencies rounded, levels rounded up (so rounding never lowers the damage). */
function round4(x: number, up: boolean): number {
  const e = Math.floor(Math.log10(x)) - 3;
  const f = 10 ** e;
  const v = (up ? Math.ceil(x / f - 1e-9) : Math.round(x / f)) * f;
  return Number(v.toPrecision(4));
}

function ratios(damage: Float64Array, target: Float64Array): Float64Array {
  return damage.map((d, i) => d / target[i]!);
}

function summary(
  points: Breakpoint[],
  damage: Float64Array,
  target: Float64Array,
  fnHz: Float64Array,
  scale: number,
): ProfileFit {
  const r = ratios(damage, target);
  let min = Infinity;
  let minHz = NaN;
  let max = 0;
  r.forEach((v, i) => {
    if (v < min) {
      min = v;
      minHz = fnHz[i]!;
    }
    max = Math.max(max, v);
  });
  const sorted = Float64Array.from(r).sort();
  const mid = sorted.length >> 1;
  const median = sorted.length % 2 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
  return { points, damage, minRatio: min, minRatioHz: minHz, maxRatio: max, medianRatio: median, scale };
}

/** Scale every level by the smallest factor that makes damage / target >= 1 everywhere (level factor = ratio^(2/b)). */
function scaled(
  points: Breakpoint[],
  o: ProfileFitOptions,
): { points: Breakpoint[]; damage: Float64Array; scale: number } {
  const d = o.damageOf(points);
  let need = 0;
  d.forEach((v, i) => (need = Math.max(need, o.targetDamage[i]! / v)));
  const s = need ** (2 / o.basquinB) * (1 + 1e-9);
  const out = points.map((p) => ({ hz: p.hz, level: round4(p.level * s, true) }));
  return { points: out, damage: o.damageOf(out), scale: s };
}

export function fitDamageProfile(o: ProfileFitOptions): ProfileFit {
  const m = o.fnHz.length;
  const x = o.fnHz.map(Math.log);
  let bestFit: ProfileFit | undefined;
  for (const start of o.startLevels) {
    let y = start.map(Math.log);
    let stale = 0;
    for (let pass = 0; pass < 12 && stale < 3; pass++) {
      const env = upperEnvelope(x, y, o.maxBreakpoints);
      // Ends of the band stay exact; inner breakpoints rounded to 4 digits (still on or inside the grid's range).
      const raw = env.index.map((k, j) => ({
        hz: j === 0 || j === env.index.length - 1 ? o.fnHz[k]! : round4(o.fnHz[k]!, false),
        level: Math.exp(env.value[j]!),
      }));
      const s = scaled(raw, o);
      const fit = summary(s.points, s.damage, o.targetDamage, o.fnHz, s.scale);
      // Over-test measure: the mean log damage ratio (the area by which the test's FDS exceeds the target).
      const excess = (f: ProfileFit) => ratios(f.damage, o.targetDamage).reduce((t, v) => t + Math.log(v), 0);
      if (!bestFit || excess(fit) < excess(bestFit) - 1e-9) {
        bestFit = fit;
        stale = 0;
      } else stale++;
      // Corrected target: at each f_n the level at which the present shape would just meet it.
      const before = o.damageOf(raw);
      const ny = new Float64Array(m);
      for (let k = 0; k < m; k++)
        ny[k] =
          Math.log(brokenLineLevel(raw, o.fnHz[k]!)) + (2 / o.basquinB) * Math.log(o.targetDamage[k]! / before[k]!);
      y = ny;
    }
  }
  return bestFit!;
}
