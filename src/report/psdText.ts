import type { ChannelAnalysis, RecordingAnalysis } from "../pass/analyzeRecording.js";
import type { ChannelReading } from "../condition/scaleSamples.js";
import { chiSquareIntervalFactors } from "../estimate/statistics/distributions.js";
import { accelLabel, densityLabel } from "../units.js";
import { dB, fixed, parsevalWord, rateText, sig } from "./format.js";
import { printable } from "./printable.js";
import { findingTexts } from "./findingTexts.js";

const DETREND_WORDS = {
  none: "nothing removed",
  mean: "mean removed per segment",
  linear: "linear trend removed per segment",
} as const;

export function recordingLines(a: RecordingAnalysis): string[] {
  const i = a.input;
  return [
    `  recording  ${i.layout}`,
    `             ${i.samples} samples at ${rateText(i.sampleRateHz)} Hz = ${fixed(i.durationS, 3)} s, ${a.channels.length} channel(s) analysed${i.startTime ? `, from ${i.startTime}` : ""}`,
    `             sha256 ${i.sha256}`,
    ...(a.window.frames !== i.samples ? [`  window     ${windowText(a)}`] : []),
    ...fullScaleLines(a.channels),
    ...findingTexts(a.passDoubts).map((d) => `  DOUBT      ${d}`),
  ];
}

/**
 * What every command prints when integer samples (a PCM WAV) were read with no calibration at all: full
 * scale was taken as 1 of the unit, so every level rests on that guess (the HTML report says it too).
 */
export function fullScaleLines(channels: { name: string; reading: ChannelReading }[]): string[] {
  const assumed = channels.filter((c) => c.reading.fullScaleAssumed);
  if (assumed.length === 0) return [];
  const units = [...new Set(assumed.map((c) => c.reading.fileUnit))].join(" or ");
  const why = assumed.every((c) => c.reading.sensitivity !== null)
    ? "no calibration chunk or --scale; the sensitivity turns volts into acceleration, not codes into volts"
    : "no calibration chunk, --scale or --sensitivity";
  return [
    `  reading    ${assumed.map((c) => `"${printable(c.name)}"`).join(", ")}: integer WAV codes with no calibration, read as ±1 ${units} full scale (${why}); --scale K reads K ${units} per full scale`,
  ];
}

/** The analysed window in words: from, to, length and samples (the --from/--to of the analysis). */
export function windowText(a: RecordingAnalysis): string {
  const w = a.window;
  return `${fixed(w.fromS, 3)} to ${fixed(w.toS, 3)} s (${fixed(w.frames / a.input.sampleRateHz, 3)} s): ${w.frames} samples analysed${w.frames === a.input.samples ? ", the whole record" : ""}`;
}

export function settingsLine(a: RecordingAnalysis): string {
  const s = a.settings;
  return `  analysis   ${s.window} window, ${s.segmentLength}-point segments (${sig(s.resolutionHz, 4)} Hz lines), ${fixed(100 * s.overlap, 1)} % overlap, ${DETREND_WORDS[s.detrend]}, ${fixed(100 * s.confidence, 1)} % bounds${s.scale !== 1 ? `, scale x${s.scale}` : ""}`;
}

export function statsLine(c: ChannelAnalysis): string {
  const s = c.stats;
  const u = accelLabel(c.units);
  const head = `  samples    mean ${sig(s.mean)} ${u}, std ${sig(s.std)}, min ${sig(s.min)}, max ${sig(s.max)}`;
  // A dead channel has no shape to describe (0 / 0): its NO_SIGNAL doubt says so.
  if (deadChannel(c)) return head;
  return `${head}, crest factor ${fixed(s.crestFactor, 2)} (max |x - mean| / std), skewness ${fixed(s.skewness, 3)}, kurtosis ${fixed(s.kurtosis, 3)}`;
}

/** A channel whose every sample holds one value (NO_SIGNAL): no Parseval ratio or shape figures are shown for it. */
export function deadChannel(c: ChannelAnalysis): boolean {
  return c.doubts.some((d) => d.code === "NO_SIGNAL");
}

export function findingLines(c: ChannelAnalysis): string[] {
  return [
    ...findingTexts(c.doubts).map((d) => `  DOUBT      ${d}`),
    ...findingTexts(c.notes).map((w) => `  note       ${w}`),
  ];
}

export function psdChannelText(c: ChannelAnalysis, confidence: number): string {
  const u = accelLabel(c.units);
  const du = densityLabel(c.units);
  const p = c.psd;
  const lines = [`channel ${c.position} "${printable(c.name)}" (${u})`];
  const pv = c.parseval;
  lines.push(
    `  RMS        ${sig(pv.rmsTime)} ${u} from the time history (trend removed), ${sig(pv.rmsSegments)} ${u} of the detrended segments, ${sig(pv.rmsPsd)} ${u} from the PSD`,
  );
  if (!deadChannel(c))
    lines.push(
      `  Parseval   PSD / segments ${fixed(pv.ratio, 4)} (${parsevalWord(pv) === "agree" ? "agree within" : pv.ok ? "outside" : "DISAGREE within"} ±${sig(100 * pv.tolerance, 2)} %${pv.toleranceFrom === "record" ? ", the record's own spread" : ""}${parsevalWord(pv).startsWith("agree with") ? `; ${parsevalWord(pv)}` : ""})`,
    );
  if (p.averages > 0) {
    const f = chiSquareIntervalFactors(p.dof, confidence);
    lines.push(
      `  averages   ${p.averages}, ${fixed(p.dof, 1)} degrees of freedom, each line ±${fixed(100 * p.randomError, 1)} % (1 sigma), ${fixed(100 * confidence, 0)} % bounds ${fixed(dB(f.lower), 2)} / +${fixed(dB(f.upper), 2)} dB`,
    );
  }
  if (c.band)
    lines.push(`  band       ${sig(c.band.fminHz)}–${sig(c.band.fmaxHz)} Hz: RMS ${sig(c.band.rms)} ${u} from the PSD`);
  if (c.peaks.length > 0)
    lines.push(`  peaks      ${c.peaks.map((k) => `${sig(k.frequencyHz, 5)} Hz ${sig(k.level, 3)}`).join(", ")} ${du}`);
  if (c.tones.length > 0)
    lines.push(
      `  tones      ${c.tones.map((t) => `${sig(t.frequencyHz, 6)} Hz ${sig(t.peak, 3)} ${u} peak (+${fixed(t.aboveBackgroundDb, 1)} dB)`).join(", ")}: lines standing far above their neighbours, amplitude from the window's kernel (candidates: a narrow resonance can look alike)`,
    );
  if (c.peakHold && c.peakHold.stretches > 0 && p.averages > 0) {
    // Where the loudest stretch stands furthest above the whole record's average (lines above 0 Hz).
    const h = c.peakHold;
    let k = 1;
    for (let i = 1; i < h.psd.length; i++) if (p.psd[i]! > 0 && h.psd[i]! / p.psd[i]! > h.psd[k]! / p.psd[k]!) k = i;
    lines.push(
      `  peak-hold  largest of ${h.stretches} stretches of ${sig(h.stretchS, 3)} s (${h.averagesPerStretch} averages each) at each line; furthest above the average at ${sig(p.frequencyHz[k]!, 5)} Hz: ${fixed(dB(h.psd[k]! / p.psd[k]!), 1)} dB (the stretch from ${sig(h.atS[k]!, 5)} s); --json holds it line by line`,
    );
  }
  lines.push(statsLine(c), ...findingLines(c));
  return lines.join("\n");
}

export function psdText(a: RecordingAnalysis, version: string): string {
  return [
    `psdgate ${version}: PSD of ${printable(a.input.file)}`,
    ...recordingLines(a),
    settingsLine(a),
    "",
    ...a.channels.map((c) => psdChannelText(c, a.settings.confidence) + "\n"),
  ].join("\n");
}

export function inspectText(a: RecordingAnalysis, version: string): string {
  const out = [`psdgate ${version}: contents of ${printable(a.input.file)}`, ...recordingLines(a), ""];
  for (const c of a.channels) {
    out.push(
      `channel ${c.position} "${printable(c.name)}" (${accelLabel(c.units)})`,
      `  RMS        ${sig(c.stats.rms)} ${accelLabel(c.units)} (mean included), ${c.stats.count} finite samples`,
      statsLine(c),
    );
    out.push(...findingLines(c), "");
  }
  return out.join("\n");
}
