import { studentTQuantile } from "../statistics/distributions.js";
import type { PsdEstimate } from "./psdEstimate.js";
import type { WindowName } from "./windows.js";

/**
 * Parseval cross-check of the PSD against the time history, over the same detrended data.
 *
 * sum(P) df equals, to rounding, the window-weighted mean square of the detrended segments (an identity;
 * docs/REFERENCES.md sec. 11). The check compares it with a figure that does not go through the window's
 * normalisation, the plain (unweighted) mean square of the same segments, so a wrong PSD scaling (factor 2,
 * sample rate, sum w^2 of another window) or lost or doubled segments show. The two agree only statistically: the
 * window weighs the middle of each segment more than its ends. The allowed spread comes from the record itself:
 * the standard error of the per-segment difference by batch means over consecutive segments (WelchAccumulator),
 * times a Student-t factor for a two-sided false-doubt rate of 1e-4 per channel. With fewer than MIN_BATCHES
 * batches the fixed tolerances of docs/REFERENCES.md sec. 11 apply: 2 % with 16 or more averages for every window
 * but the flat-top (hann, hamming, blackman-harris, rectangular), else 5 %; the flat-top's strongly negative lobes
 * make its weighted and plain mean squares part more, so it always gets 5 %.
 *
 * Slow content. The two mean squares agree in expectation only if the detrended segment's variance is the same
 * along it. A sway slower than the first line is, within one segment, a ramp or a bow the mean detrend leaves:
 * small mid-segment, where the window looks, and large at the ends. So the windowed mean square came out below
 * the plain one by a bias, not a spread (a 1.5 Hz sway holding 15 % of the mean square on 0.16 s segments: about
 * -2.2 % in mean square, -1.1 % in RMS, while the batch-means tolerance of a minute's record is about 0.1 %), and a
 * record whose only oddity was content below the first line was doubted. A second reference takes the slow part
 * out of both sums alike: each segment's least-squares polynomial of degree 6 (slowPart.ts) is weighed by the
 * window on both sides, so it is plain MS + [W(slow) - P(slow)] + the fit's white-noise leverage term
 * (expectedGap), with its own batch-means spread. The PSD agrees when it agrees with either reference, each within
 * its own tolerance.
 *
 * Why either, not the second alone: the polynomial also takes a little of faster content (of a random-phase
 * sinusoid at line k about 1.9 / k^2 of its power on Hann 4096-point segments, 0.24 at line 2), and the white-noise
 * term covers that only for a flat spectrum; a resonance near line 5 (numpy, 2^21 samples on 1024-point segments)
 * sat 33 batch-means sigma off the second reference and 1 off the first, and a pure sine on a bin, whose segments
 * are all alike, far off the second. Each reference is right where the other is not: the first for content at and
 * above the first lines, the second for content below the first line. Why not a tolerance widened by the
 * below-first-line share: that share (what the segment means took away) does not measure the ramp left in the
 * segments, which is what biases, and it would hide scaling errors on every swaying record. What either-rule costs:
 * a scaling error that happens to equal the slow part's own gap passes (a few per cent at most, on a record with a
 * strong sway); a wrong factor 2, sample rate, window normalisation or segment count moves the PSD off both and is
 * caught (tests/estimate/spectral/parsevalCheck.test.ts). False-doubt rate on swaying records, against the analytic
 * 1e-4: tests/estimate/spectral/parsevalCheck.montecarlo.test.ts.
 *
 * Content the per-segment detrend removes (drift slower than the first line) is not a mismatch: it is
 * reported as the share of the record's mean square below the first analysed line, a note.
 */
export interface ParsevalCheck {
  /** RMS of the whole record after the same detrend over the whole record. */
  rmsTime: number;
  /** sqrt(sum P df). */
  rmsPsd: number;
  /** RMS of the detrended segments, unweighted: the first reference. */
  rmsSegments: number;
  /** rmsPsd / rmsSegments. */
  ratio: number;
  /** Allowed |ratio - 1|. */
  tolerance: number;
  /** "record": tolerance from the record's own batch-means spread; "fixed": the sec. 11 table. */
  toleranceFrom: "record" | "fixed";
  /** The second reference, with each segment's slow part weighed by the window on both sides. */
  slowPart: {
    /** sqrt(segments' plain mean square + the gap their slow part explains). */
    rmsReference: number;
    /** rmsPsd / rmsReference. */
    ratio: number;
    tolerance: number;
    ok: boolean;
  };
  /** The PSD agrees with either reference within its tolerance. */
  ok: boolean;
  /** 1 - (segments' mean square) / (record's mean square): the share below the first line (drift). */
  belowFirstLineShare: number;
}

export const PARSEVAL_FALSE_DOUBT_RATE = 1e-4;
const MIN_BATCHES = 8;

export function parsevalTolerance(window: WindowName, averages: number): number {
  return window !== "flattop" && averages >= 16 ? 0.02 : 0.05;
}

export function parsevalCheck(rmsTime: number, psd: PsdEstimate, window: WindowName): ParsevalCheck {
  const rmsPsd = psd.rmsPsd;
  const plain = psd.segmentMeanSquare;
  const reference = plain + (Number.isFinite(psd.expectedGap) ? psd.expectedGap : 0);
  const fromRecord = psd.meanSquareGapBatches >= MIN_BATCHES && Number.isFinite(psd.meanSquareGapError);
  // Mean squares differ by e (relative); RMS by about e / 2.
  const t = fromRecord ? studentTQuantile(1 - PARSEVAL_FALSE_DOUBT_RATE / 2, psd.meanSquareGapBatches - 1) : NaN;
  const allowed = (error: number, ms: number) =>
    fromRecord && Number.isFinite(error)
      ? Math.max(1e-9, (t * error) / ms / 2)
      : parsevalTolerance(window, psd.averages);
  const ratio = rmsPsd / Math.sqrt(plain);
  const tolerance = allowed(psd.meanSquareGapError, plain);
  const rmsReference = Math.sqrt(reference);
  const slowRatio = rmsPsd / rmsReference;
  const slowTolerance = allowed(psd.slowGapError, reference);
  const within = (r: number, tol: number) => Number.isFinite(r) && Math.abs(r - 1) <= tol;
  const slowPart = { rmsReference, ratio: slowRatio, tolerance: slowTolerance, ok: within(slowRatio, slowTolerance) };
  const belowFirstLineShare = rmsTime > 0 ? 1 - plain / (rmsTime * rmsTime) : 0;
  return {
    rmsTime,
    rmsPsd,
    rmsSegments: Math.sqrt(plain),
    ratio,
    tolerance,
    toleranceFrom: fromRecord ? "record" : "fixed",
    slowPart,
    ok: within(ratio, tolerance) || slowPart.ok,
    belowFirstLineShare,
  };
}
