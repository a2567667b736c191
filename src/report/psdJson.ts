import type { RecordingAnalysis } from "../pass/analyzeRecording.js";
import type { StationarityFinding, StationarityTest } from "../estimate/statistics/stationarityTests.js";
import type { TestMeta } from "../read/testMeta.js";
import { densityAscii } from "../units.js";
import { csvField } from "./csvField.js";
import { findingsJson, findingTexts } from "./findingTexts.js";

/** Plain numbers for JSON: NaN and infinities become null (JSON has no such values). */
export function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}
function arr(a: Float64Array): (number | null)[] {
  return Array.from(a, finiteOrNull);
}

export function toolInfo(version: string) {
  return { name: "psdgate", version };
}

export function inputJson(a: RecordingAnalysis) {
  const i = a.input;
  const w = a.window;
  return {
    file: i.file,
    format: i.format,
    layout: i.layout,
    sha256: i.sha256,
    bytes: i.bytes,
    sampleRateHz: i.sampleRateHz,
    samples: i.samples,
    durationS: i.durationS,
    startTime: i.startTime ?? null,
    preamble: i.preamble ?? [],
    window: {
      fromS: w.fromS,
      toS: w.toS,
      durationS: w.frames / i.sampleRateHz,
      frames: w.frames,
      ...(w.requestedToS !== undefined ? { requestedToS: w.requestedToS } : {}),
      ...(w.fromClock !== undefined ? { fromClock: w.fromClock } : {}),
      ...(w.toClock !== undefined ? { toClock: w.toClock } : {}),
    },
  };
}

export function settingsJson(a: RecordingAnalysis) {
  const s = a.settings;
  return {
    window: s.window,
    segment: s.segmentLength,
    overlap: s.overlap,
    hop: s.hop,
    detrend: s.detrend,
    confidence: s.confidence,
    resolutionHz: s.resolutionHz,
    scale: s.scale,
  };
}

export function statsJson(a: RecordingAnalysis["channels"][number]) {
  const s = a.stats;
  return Object.fromEntries(Object.entries(s).map(([k, v]) => [k, finiteOrNull(v)]));
}

/** The stationarity finding as plain JSON (the tests' regions, the deciding statistic, departing stretches). */
export function stationarityJson(f: StationarityFinding) {
  const t = (x: StationarityTest | undefined) =>
    x && {
      statistic: x.statistic,
      n: x.n,
      acceptAbove: x.acceptAbove,
      acceptAtMost: x.acceptAtMost,
      alpha: x.alpha,
      method: x.method,
      stationary: x.stationary,
    };
  return {
    tested: f.tested,
    stationary: f.stationary,
    stretchS: f.stretchS,
    stretches: f.stretches,
    pooled: f.pooled,
    reverseArrangements: t(f.reverseArrangements) ?? null,
    runs: t(f.runs) ?? null,
    departing: f.departing,
  };
}

/** The `psd --json` document (schema in README.md). */
export function psdJson(a: RecordingAnalysis, version: string, meta?: TestMeta) {
  return {
    tool: toolInfo(version),
    meta: meta ?? null,
    input: inputJson(a),
    settings: settingsJson(a),
    analysis: a.analysis,
    frequencyHz: arr(a.channels[0]?.psd.frequencyHz ?? new Float64Array()),
    channels: a.channels.map((c) => ({
      name: c.name,
      position: c.position,
      units: densityAscii(c.units),
      reading: c.reading,
      psd: arr(c.psd.psd),
      lower: arr(c.psd.lower),
      upper: arr(c.psd.upper),
      averages: c.psd.averages,
      skippedSegments: c.psd.skippedSegments,
      dof: finiteOrNull(c.psd.dof),
      rmsTime: finiteOrNull(c.parseval.rmsTime),
      rmsPsd: finiteOrNull(c.parseval.rmsPsd),
      rmsSegments: finiteOrNull(c.parseval.rmsSegments),
      rmsReference: finiteOrNull(c.parseval.slowPart.rmsReference),
      parsevalSlowRatio: finiteOrNull(c.parseval.slowPart.ratio),
      parsevalSlowTolerance: c.parseval.slowPart.tolerance,
      parsevalRatio: finiteOrNull(c.parseval.ratio),
      parsevalTolerance: c.parseval.tolerance,
      parsevalToleranceFrom: c.parseval.toleranceFrom,
      belowFirstLineShare: finiteOrNull(c.parseval.belowFirstLineShare),
      windowedMeanSquare: finiteOrNull(c.psd.windowedMeanSquare),
      band: c.band ? { fminHz: c.band.fminHz, fmaxHz: c.band.fmaxHz, rms: finiteOrNull(c.band.rms) } : null,
      peaks: c.peaks,
      tones: c.tones,
      ...(c.peakHold
        ? {
            peakHold: {
              stretchS: c.peakHold.stretchS,
              stretches: c.peakHold.stretches,
              averagesPerStretch: c.peakHold.averagesPerStretch,
              psd: arr(c.peakHold.psd),
              atS: arr(c.peakHold.atS),
            },
          }
        : {}),
      stats: statsJson(c),
      stationarity: stationarityJson(c.stationarity),
      warnings: findingTexts(c.notes),
      doubts: findingTexts(c.doubts),
      notes: findingsJson(c.notes),
      doubtFindings: findingsJson(c.doubts),
    })),
  };
}

/** `--csv`: frequency, then psd/lower/upper of each channel. Full precision (shortest round-trip); RFC 4180 fields. */
export function psdCsv(a: RecordingAnalysis): string {
  const head = ["frequency_hz"];
  for (const c of a.channels) {
    const u = densityAscii(c.units);
    head.push(`${c.name}_psd [${u}]`, `${c.name}_lower [${u}]`, `${c.name}_upper [${u}]`);
    if (c.peakHold) head.push(`${c.name}_peak_hold [${u}]`);
  }
  // Channel names come from the file: each header field is quoted and guarded (csvField).
  const lines = [head.map(csvField).join(",")];
  const f = a.channels[0]?.psd.frequencyHz ?? new Float64Array();
  for (let k = 0; k < f.length; k++) {
    const row = [String(f[k])];
    for (const c of a.channels) {
      row.push(String(c.psd.psd[k]), String(c.psd.lower[k]), String(c.psd.upper[k]));
      if (c.peakHold) row.push(String(c.peakHold.psd[k]));
    }
    lines.push(row.join(","));
  }
  return lines.join("\n") + "\n";
}
