import type { ChannelAnalysis } from "../analyzeRecording.js";
import { chiSquareIntervalFactors } from "../estimate/chiSquare.js";
import { profileLevel, type TestProfile, type ToleranceBand } from "./testProfile.js";

/**
 * Compares a measured PSD with a required profile line by line, the RMS over the profile's range,
 * and the achieved degrees of freedom. Excursions are judged with the chi-square interval of each
 * line: "clear" when the whole interval lies beyond the limit, "marginal" when it straddles it
 * (estimation noise could explain it).
 */
export type Verdict = "pass" | "fail" | "inconclusive";

export interface LineDeviation {
  frequencyHz: number;
  measured: number;
  required: number;
  /** 10 log10(measured / required). */
  deviationDb: number;
  upperDb: number;
  lowerDb: number;
  status: "within" | "above" | "below";
}

export interface Excursion {
  fromHz: number;
  toHz: number;
  direction: "above" | "below";
  lines: number;
  /** The largest deviation in the run, dB. */
  worstDb: number;
  worstHz: number;
  /** The band limit crossed at the worst line, dB (positive for above, negative for below). */
  limitDb: number;
  /** The whole confidence interval of the worst line lies beyond the limit. */
  clear: boolean;
  /**
   * Still clear when the interval is widened for the number of lines tested (Bonferroni: each line
   * at alpha / lines), so chance among many lines cannot explain it (Bonferroni 1936; Miller,
   * Simultaneous Statistical Inference, Springer 1981, ch. 1).
   */
  clearAmongAllLines: boolean;
  /** For a marginal excursion: how many times longer a record would settle it (same level assumed). */
  longerRecordFactor: number | undefined;
}

export interface ChannelCompliance {
  channel: string;
  verdict: Verdict;
  reasons: string[];
  lines: LineDeviation[];
  excursions: Excursion[];
  rms: { measured: number; required: number; deviationDb: number; upperDb: number | undefined; lowerDb: number | undefined; ok: boolean };
  dof: { achieved: number; required: number | undefined; ok: boolean };
}

/** The band of a line; at a shared edge (e.g. exactly 1000 Hz) the tighter band applies (common practice: read a shared edge strictly). */
export function bandAt(bands: ToleranceBand[], f: number): ToleranceBand | undefined {
  let best: ToleranceBand | undefined;
  for (const b of bands) {
    if (f >= b.fromHz && f <= b.toHz && (best === undefined || b.upperDb + b.lowerDb < best.upperDb + best.lowerDb)) best = b;
  }
  return best;
}

/**
 * Smallest DOF at which the interval of a line measured at `ratio` x the limit would exclude it,
 * as a multiple of the present DOF (records scale DOF in proportion to their length).
 */
export function longerRecordFactor(ratioToLimit: number, dof: number, confidence: number): number | undefined {
  if (!(dof > 0) || ratioToLimit === 1) return undefined;
  const excludes = (nu: number) => {
    const f = chiSquareIntervalFactors(nu, confidence);
    return ratioToLimit > 1 ? ratioToLimit * f.lower > 1 : ratioToLimit * f.upper < 1;
  };
  if (excludes(dof)) return 1;
  let hi = dof * 2;
  while (!excludes(hi)) {
    hi *= 2;
    if (hi > dof * 1e6) return undefined;
  }
  let lo = dof;
  for (let i = 0; i < 60 && hi / lo > 1.001; i++) {
    const mid = Math.sqrt(lo * hi);
    if (excludes(mid)) hi = mid;
    else lo = mid;
  }
  return hi / dof;
}

export function checkChannel(c: ChannelAnalysis, profile: TestProfile, confidence: number): ChannelCompliance {
  const p = c.psd;
  const lines: LineDeviation[] = [];
  const lineIndex: number[] = [];
  let area = 0;
  for (let k = 0; k < p.psd.length; k++) {
    const f = p.frequencyHz[k]!;
    const required = profileLevel(profile, f);
    if (!Number.isFinite(required)) continue;
    const band = bandAt(profile.bands, f)!;
    const measured = p.psd[k]!;
    area += measured;
    const deviationDb = 10 * Math.log10(measured / required);
    const status = deviationDb > band.upperDb ? "above" : deviationDb < -band.lowerDb || !(measured > 0) ? "below" : "within";
    lines.push({ frequencyHz: f, measured, required, deviationDb, upperDb: band.upperDb, lowerDb: band.lowerDb, status });
    lineIndex.push(k);
  }

  const excursions: Excursion[] = [];
  const family = lines.length > 0 && p.dof > 0 ? chiSquareIntervalFactors(p.dof, 1 - (1 - confidence) / lines.length) : { lower: 0, upper: Infinity };
  for (let i = 0; i < lines.length; ) {
    const l = lines[i]!;
    if (l.status === "within") {
      i++;
      continue;
    }
    let j = i;
    let worst = i;
    while (j + 1 < lines.length && lines[j + 1]!.status === l.status) {
      j++;
      const better = l.status === "above" ? lines[j]!.deviationDb > lines[worst]!.deviationDb : lines[j]!.deviationDb < lines[worst]!.deviationDb;
      if (better) worst = j;
    }
    const w = lines[worst]!;
    const k = lineIndex[worst]!;
    const limitDb = l.status === "above" ? w.upperDb : -w.lowerDb;
    const limitLevel = w.required * Math.pow(10, limitDb / 10);
    const clear = l.status === "above" ? p.lower[k]! > limitLevel : p.upper[k]! < limitLevel;
    const clearAmongAllLines = l.status === "above" ? w.measured * family.lower > limitLevel : w.measured * family.upper < limitLevel;
    excursions.push({
      fromHz: l.frequencyHz, toHz: lines[j]!.frequencyHz, direction: l.status, lines: j - i + 1, worstDb: w.deviationDb, worstHz: w.frequencyHz, limitDb, clear, clearAmongAllLines,
      longerRecordFactor: clear ? undefined : longerRecordFactor(w.measured / limitLevel, p.dof, confidence),
    });
    i = j + 1;
  }

  const measuredRms = Math.sqrt(area * p.lineSpacingHz);
  const rmsDev = 20 * Math.log10(measuredRms / profile.rms);
  const tol = profile.rmsToleranceDb;
  const rmsOk = tol === undefined || (rmsDev <= tol.upper && rmsDev >= -tol.lower);
  const dofOk = profile.minDof === undefined || p.dof >= profile.minDof;

  const reasons: string[] = [...c.doubts];
  let verdict: Verdict;
  const failing = excursions.length > 0 || !rmsOk;
  // With too few DOF, line excursions count only when chance among all lines cannot explain them;
  // the RMS, an average over every line, stays decisive.
  const decisive = !rmsOk || excursions.some((e) => e.clearAmongAllLines);
  if (lines.length === 0) reasons.push("no spectral line falls inside the profile's range");
  if (c.doubts.length > 0 || lines.length === 0) verdict = "inconclusive";
  else if (failing && (dofOk || decisive)) verdict = "fail";
  else if (!dofOk) verdict = "inconclusive";
  else verdict = "pass";
  if (!dofOk) reasons.push(`degrees of freedom ${p.dof.toFixed(1)} below the required ${profile.minDof}: record too short for the statistical accuracy the profile asks`);
  if (!rmsOk) reasons.push(`RMS ${measuredRms.toPrecision(4)} is ${rmsDev >= 0 ? "+" : ""}${rmsDev.toFixed(2)} dB from the required ${profile.rms.toPrecision(4)} (allowed +${tol!.upper.toFixed(2)} / -${tol!.lower.toFixed(2)} dB)`);
  const out = lines.filter((l) => l.status !== "within").length;
  if (excursions.length > 0) {
    const clear = excursions.filter((e) => e.clear).length;
    const strong = excursions.filter((e) => e.clearAmongAllLines).length;
    reasons.push(`${out} of ${lines.length} lines outside their tolerance band, in ${excursions.length} excursion(s): ${clear} clear, ${excursions.length - clear} marginal; ${strong} clear even allowing for the ${lines.length} lines tested`);
  }
  if (verdict === "pass") reasons.push(`all ${lines.length} lines within their tolerance bands, RMS within tolerance${profile.minDof !== undefined ? ", DOF met" : ""}`);
  return {
    channel: c.name, verdict, reasons, lines, excursions,
    rms: { measured: measuredRms, required: profile.rms, deviationDb: rmsDev, upperDb: tol?.upper, lowerDb: tol?.lower, ok: rmsOk },
    dof: { achieved: p.dof, required: profile.minDof, ok: dofOk },
  };
}

/** Excursions ordered by how far their worst line lies beyond its limit, largest first (a copy). */
export function worstFirst(excursions: Excursion[]): Excursion[] {
  return [...excursions].sort((a, b) => Math.abs(b.worstDb - b.limitDb) - Math.abs(a.worstDb - a.limitDb));
}

/** Worst of the channel verdicts: fail over inconclusive over pass. */
export function overallVerdict(vs: Verdict[]): Verdict {
  if (vs.includes("fail")) return "fail";
  if (vs.includes("inconclusive") || vs.length === 0) return "inconclusive";
  return "pass";
}
