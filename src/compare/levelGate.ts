import { normalQuantile } from "../estimate/statistics/distributions.js";
import type { Finding } from "../findings.js";

/**
 * The gate a pass must also clear: a Welch PSD is an average, so a record whose level swings outside the
 * tolerance over the run (loud first half, quiet second half) can average to a conforming spectrum, and a
 * record whose content below the first line (drift, a slow tilt) holds most of its mean square is not the
 * random vibration the profile describes. Either makes a pass INCONCLUSIVE (a shown failure stays a failure).
 *
 * Level swings: the run's stretch mean squares (1 s by default, about each stretch's mean; analyzeRecording)
 * are cut into B consecutive blocks (B = 8, fewer for short runs, at least MIN_PER_BLOCK stretches each).
 * Block b's level about the run's mean is d_b = 10 log10(m_b / M), with standard error by the delta method,
 * se_b = (10 / ln 10) sqrt(s_b^2 / (n_b m_b^2) + s^2 / (n M^2)) (the covariance of m_b and M left out, which
 * only widens se_b). The run is doubted when some block lies beyond the tolerance by more than chance:
 * |d_b| - z se_b > tolerance, z = the normal 1 - 0.01 / (2B) point (Bonferroni over the blocks, both signs).
 * On a stationary record every d_b is near 0, so a doubt needs a chance excursion of z se_b past the
 * tolerance itself: the false-doubt rate is at most 1 % (normal approximation of a block mean of n_b >= 8
 * values; tests/compare/levelGate.montecarlo.test.ts measures it). A block whose mean square is 0 (the record dead or
 * flat for the whole block) is doubted outright: its level is -Infinity dB.
 *
 * Drift: the share of the record's mean square (about its mean) below the profile's first frequency (what
 * the segments' detrending removes, and the lines below it) above one half: it dominates.
 */
export const LEVEL_GATE = {
  /** Family-wise false-doubt rate of the level-swing test on a stationary record. */
  falseDoubtRate: 0.01,
  blocks: 8,
  minPerBlock: 8,
  /** The share of the mean square below the profile's first frequency above which it dominates. */
  driftShare: 0.5,
} as const;

export interface LevelSwing {
  tested: boolean;
  blocks: number;
  /** Each block's level about the run's mean, dB, and its standard error. */
  levelDb: number[];
  standardErrorDb: number[];
  /** The block whose level lies furthest beyond the tolerance once chance is allowed for (index), or -1. */
  worst: number;
  /** Its excess beyond the tolerance, dB, after z standard errors (positive: doubted). */
  excessDb: number;
  z: number;
}

/** The level-swing test on a run's stretch mean squares against a tolerance in dB (of mean square). */
export function levelSwing(stretchMs: ArrayLike<number>, toleranceDb: number): LevelSwing {
  const values: number[] = [];
  for (let i = 0; i < stretchMs.length; i++)
    if (Number.isFinite(stretchMs[i]!) && stretchMs[i]! >= 0) values.push(stretchMs[i]!);
  const n = values.length;
  const blocks = Math.min(LEVEL_GATE.blocks, Math.floor(n / LEVEL_GATE.minPerBlock));
  if (blocks < 2)
    return { tested: false, blocks: 0, levelDb: [], standardErrorDb: [], worst: -1, excessDb: -Infinity, z: NaN };
  const z = normalQuantile(1 - LEVEL_GATE.falseDoubtRate / (2 * blocks));
  const used = blocks * Math.floor(n / blocks);
  const per = used / blocks;
  let sum = 0;
  for (let i = 0; i < used; i++) sum += values[i]!;
  const mean = sum / used;
  let ss = 0;
  for (let i = 0; i < used; i++) ss += (values[i]! - mean) ** 2;
  const varAll = ss / (used - 1);
  const levelDb: number[] = [];
  const standardErrorDb: number[] = [];
  let worst = -1;
  let excessDb = -Infinity;
  const c = 10 / Math.LN10;
  for (let b = 0; b < blocks; b++) {
    let s1 = 0;
    for (let i = b * per; i < (b + 1) * per; i++) s1 += values[i]!;
    const mb = s1 / per;
    let s2 = 0;
    for (let i = b * per; i < (b + 1) * per; i++) s2 += (values[i]! - mb) ** 2;
    const vb = s2 / (per - 1);
    const d = c * Math.log(mb / mean);
    const se = c * Math.sqrt(vb / (per * mb * mb) + varAll / (used * mean * mean));
    levelDb.push(d);
    standardErrorDb.push(se);
    // A block with no mean square at all in a run that has some (a dead or flat-lined stretch of the record) lies
    // below any tolerance whatever chance allows; its se is 0/0, which would hide it from the test.
    const ex = mb > 0 || !(mean > 0) ? Math.abs(d) - z * se - toleranceDb : Infinity;
    if (ex > excessDb) {
      excessDb = ex;
      worst = b;
    }
  }
  return { tested: true, blocks, levelDb, standardErrorDb, worst, excessDb, z };
}

/**
 * The gate's findings for one channel (empty when it clears): LEVEL_SWING and DRIFT_DOMINATES.
 * `toleranceDb`: the profile's RMS tolerance as a level (the smaller side), else its narrowest band.
 */
export function levelGate(
  stretchMs: ArrayLike<number> | undefined,
  stretchS: number,
  toleranceDb: number,
  belowShare: number,
  belowHz: number,
): Finding[] {
  const out: Finding[] = [];
  if (stretchMs !== undefined) {
    const s = levelSwing(stretchMs, toleranceDb);
    if (s.tested && s.excessDb > 0) {
      const per = Math.floor(stretchMs.length / s.blocks);
      const from = s.worst * per * stretchS;
      const to = (s.worst + 1) * per * stretchS;
      const d = s.levelDb[s.worst]!;
      out.push({
        code: "LEVEL_SWING",
        values: { fromS: from, toS: to, levelDb: d, toleranceDb, falseDoubtPercent: 100 * LEVEL_GATE.falseDoubtRate },
      });
    }
  }
  // A stretch with no signal at all in a run that has some (a dropout or a stuck sensor: exact zeros or one held
  // value for a whole stretch) is doubted wherever it lies, also in the last stretches the blocks leave out and when
  // it is too short to move its block's level beyond the tolerance.
  if (stretchMs !== undefined && !out.some((f) => f.code === "LEVEL_SWING")) {
    const dead = longestDeadRun(stretchMs);
    if (dead)
      out.push({
        code: "LEVEL_SWING",
        values: {
          fromS: dead.from * stretchS,
          toS: dead.to * stretchS,
          levelDb: -Infinity,
          toleranceDb,
          falseDoubtPercent: 100 * LEVEL_GATE.falseDoubtRate,
        },
      });
  }
  if (Number.isFinite(belowShare) && belowShare > LEVEL_GATE.driftShare) {
    out.push({
      code: "DRIFT_DOMINATES",
      values: { sharePercent: 100 * belowShare, limitPercent: 100 * LEVEL_GATE.driftShare, belowHz },
    });
  }
  return out;
}

/** The longest run of stretches with mean square exactly 0, [from, to) in stretches, when some stretch has signal. */
export function longestDeadRun(ms: ArrayLike<number>): { from: number; to: number } | undefined {
  let live = false;
  let best: { from: number; to: number } | undefined;
  let start = -1;
  for (let i = 0; i <= ms.length; i++) {
    const v = i < ms.length ? ms[i]! : Number.NaN;
    if (v > 0) live = true;
    if (v === 0) {
      if (start < 0) start = i;
    } else if (start >= 0) {
      if (!best || i - start > best.to - best.from) best = { from: start, to: i };
      start = -1;
    }
  }
  return live ? best : undefined;
}
