import { InputError } from "../../errors.js";
import { isPowerOfTwo } from "./realFft.js";
import { DETREND_NAMES, type Detrend } from "./welchPsd.js";
import { WINDOW_NAMES, type WindowName } from "./windows.js";

export interface WelchOptions {
  window?: WindowName | undefined;
  /** Samples per segment, a power of two. */
  segmentLength?: number | undefined;
  /** Wanted line spacing in Hz: the smallest power-of-two segment with spacing <= this. */
  resolutionHz?: number | undefined;
  /** Fraction of a segment shared with the next, 0 <= overlap < 1. */
  overlap?: number | undefined;
  detrend?: Detrend | undefined;
  /** Two-sided confidence level of the bounds, 0 < c < 1. */
  confidence?: number | undefined;
}

export interface ResolvedWelchOptions {
  window: WindowName;
  segmentLength: number;
  overlap: number;
  /** segmentLength - round(overlap * segmentLength). */
  hop: number;
  detrend: Detrend;
  confidence: number;
  /** Line spacing fs / N actually used. */
  resolutionHz: number;
}

export const WELCH_DEFAULTS = {
  window: "hann",
  segmentLength: 4096,
  overlap: 0.5,
  detrend: "mean",
  confidence: 0.9,
} as const;
const MAX_SEGMENT = 1 << 22;
export const MIN_CONFIDENCE = 1e-9;
export const MAX_CONFIDENCE = 1 - 1e-9;
export const CONFIDENCE_RULE = "a level between 0 and 1, at most 0.999999999 (e.g. 0.9)";

function bad(option: string, expected: string, received: unknown): never {
  throw new InputError("OPTION_INVALID", { option, expected, received: String(received) });
}

/** Resolve defaults and check every option once; names the option, the rule and the value. */
export function normalizeWelchOptions(o: WelchOptions, sampleRateHz: number): ResolvedWelchOptions {
  const window = o.window ?? WELCH_DEFAULTS.window;
  if (!WINDOW_NAMES.includes(window)) bad("window", `one of ${WINDOW_NAMES.join(", ")}`, window);
  const detrend = o.detrend ?? WELCH_DEFAULTS.detrend;
  if (!DETREND_NAMES.includes(detrend)) bad("detrend", DETREND_NAMES.join(", "), detrend);
  const overlap = o.overlap ?? WELCH_DEFAULTS.overlap;
  if (!(overlap >= 0 && overlap < 1)) bad("overlap", "a fraction 0 <= F < 1 (e.g. 0.5)", overlap);
  const confidence = o.confidence ?? WELCH_DEFAULTS.confidence;
  // Beyond 1 - 1e-9 the tail probability (1 - c) / 2 rounds away in the chi-square quantiles.
  if (!(confidence >= MIN_CONFIDENCE && confidence <= MAX_CONFIDENCE)) bad("confidence", CONFIDENCE_RULE, confidence);
  if (o.segmentLength !== undefined && o.resolutionHz !== undefined) {
    throw new InputError("OPTION_CONFLICT", {
      option: "segmentLength",
      expected: "either `segmentLength` or `resolutionHz`",
      received: "both",
    });
  }
  let n: number;
  if (o.resolutionHz !== undefined) {
    if (!(o.resolutionHz > 0) || !Number.isFinite(o.resolutionHz))
      bad("resolutionHz", "a line spacing in Hz above 0", o.resolutionHz);
    n = 2;
    while (sampleRateHz / n > o.resolutionHz && n < MAX_SEGMENT) n *= 2;
  } else {
    n = o.segmentLength ?? WELCH_DEFAULTS.segmentLength;
    if (!isPowerOfTwo(n) || n > MAX_SEGMENT)
      bad("segmentLength", `a power of two from 2 to ${MAX_SEGMENT} (e.g. 4096)`, n);
  }
  const hop = n - Math.round(overlap * n);
  if (hop < 1) bad("overlap", "an overlap that leaves a hop of at least one sample", overlap);
  return { window, segmentLength: n, overlap, hop, detrend, confidence, resolutionHz: sampleRateHz / n };
}
