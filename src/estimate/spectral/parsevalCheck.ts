import { studentTQuantile } from "../statistics/distributions.js";
import type { PsdEstimate } from "./psdEstimate.js";
import type { WindowName } from "./windows.js";

/**
 * Parseval cross-check of the PSD against the time history, over the same detrended data.
 *
 * sum(P) df equals, to rounding, the window-weighted mean square of the detrended segments (an identity;
 * docs/REFERENCES.md sec. 11). What can differ is the plain (unweighted) mean square of the same
 * segments: the window weights the middle of each segment more than its ends, so the two agree only
 * statistically. The allowed spread comes from the record itself: the standard error of the per-segment
 * difference by batch means over consecutive segments (WelchAccumulator), times a Student-t factor for
 * a two-sided false-doubt rate of 1e-4 per channel. With fewer than MIN_BATCHES batches the fixed
 * tolerances of docs/REFERENCES.md sec. 11 apply: 2 % with 16 or more averages for every window but the
 * flat-top (hann, hamming, blackman-harris, rectangular), else 5 %; the flat-top's strongly negative
 * lobes make its weighted and plain mean squares part more, so it always gets 5 %.
 *
 * Content the per-segment detrend removes (drift slower than the first line) is not a mismatch: it is
 * reported as the share of the record's mean square below the first analysed line, a note.
 */
export interface ParsevalCheck {
  /** RMS of the whole record after the same detrend over the whole record. */
  rmsTime: number;
  /** sqrt(sum P df). */
  rmsPsd: number;
  /** RMS of the detrended segments, unweighted: what rmsPsd is compared with. */
  rmsSegments: number;
  /** rmsPsd / rmsSegments. */
  ratio: number;
  /** Allowed |ratio - 1|. */
  tolerance: number;
  /** "record": tolerance from the record's own batch-means spread; "fixed": the sec. 11 table. */
  toleranceFrom: "record" | "fixed";
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
  const rmsSegments = Math.sqrt(psd.segmentMeanSquare);
  const ratio = rmsPsd / rmsSegments;
  let tolerance: number;
  let toleranceFrom: ParsevalCheck["toleranceFrom"];
  if (psd.meanSquareGapBatches >= MIN_BATCHES && Number.isFinite(psd.meanSquareGapError)) {
    // Mean squares differ by e (relative); RMS by about e / 2.
    const t = studentTQuantile(1 - PARSEVAL_FALSE_DOUBT_RATE / 2, psd.meanSquareGapBatches - 1);
    tolerance = Math.max(1e-9, (t * psd.meanSquareGapError) / psd.segmentMeanSquare / 2);
    toleranceFrom = "record";
  } else {
    tolerance = parsevalTolerance(window, psd.averages);
    toleranceFrom = "fixed";
  }
  const belowFirstLineShare = rmsTime > 0 ? 1 - psd.segmentMeanSquare / (rmsTime * rmsTime) : 0;
  return {
    rmsTime,
    rmsPsd,
    rmsSegments,
    ratio,
    tolerance,
    toleranceFrom,
    ok: Number.isFinite(ratio) && Math.abs(ratio - 1) <= tolerance,
    belowFirstLineShare,
  };
}
