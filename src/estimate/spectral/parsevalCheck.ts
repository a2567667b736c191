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
 * record whose only oddity was content below the first line was doubted. The fix takes the slow part out of both
 * sums alike: each segment's least-squares polynomial of degree 6 (slowPart.ts) is weighed by the window on both
 * sides, so the reference is plain MS + [W(slow) - P(slow)] + the fit's white-noise leverage term (expectedGap),
 * and the batch means run on the gap less that. Chosen over a tolerance widened by the below-first-line share
 * because that share (what the segment means took away) does not measure the ramp left in the segments, which is
 * what biases, and a wider tolerance would also hide scaling errors on every swaying record; the correction is
 * exact per segment and leaves the tolerance as tight as the record allows. A scaling error moves sum(P) df and
 * not the reference, so it is still caught (tests/estimate/spectral/parsevalCheck.test.ts).
 * False-doubt rate: tests/estimate/spectral/parsevalCheck.montecarlo.test.ts.
 *
 * Content the per-segment detrend removes (drift slower than the first line) is not a mismatch: it is
 * reported as the share of the record's mean square below the first analysed line, a note.
 */
export interface ParsevalCheck {
  /** RMS of the whole record after the same detrend over the whole record. */
  rmsTime: number;
  /** sqrt(sum P df). */
  rmsPsd: number;
  /** RMS of the detrended segments, unweighted. */
  rmsSegments: number;
  /** What rmsPsd is compared with: sqrt(segments' plain mean square + the gap their slow part explains). */
  rmsReference: number;
  /** rmsPsd / rmsReference. */
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
  const reference = psd.segmentMeanSquare + (Number.isFinite(psd.expectedGap) ? psd.expectedGap : 0);
  const rmsReference = Math.sqrt(reference);
  const ratio = rmsPsd / rmsReference;
  let tolerance: number;
  let toleranceFrom: ParsevalCheck["toleranceFrom"];
  if (psd.meanSquareGapBatches >= MIN_BATCHES && Number.isFinite(psd.meanSquareGapError)) {
    // Mean squares differ by e (relative); RMS by about e / 2.
    const t = studentTQuantile(1 - PARSEVAL_FALSE_DOUBT_RATE / 2, psd.meanSquareGapBatches - 1);
    tolerance = Math.max(1e-9, (t * psd.meanSquareGapError) / reference / 2);
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
    rmsReference,
    ratio,
    tolerance,
    toleranceFrom,
    ok: Number.isFinite(ratio) && Math.abs(ratio - 1) <= tolerance,
    belowFirstLineShare,
  };
}
