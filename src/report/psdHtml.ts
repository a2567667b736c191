import type { ChannelAnalysis, RecordingAnalysis } from "../pass/analyzeRecording.js";
import { chiSquareIntervalFactors } from "../estimate/statistics/distributions.js";
import { accelLabel, densityLabel } from "../units.js";
import { embedResult } from "./embeddedResult.js";
import { dB, fixed, parsevalWord, sig } from "./format.js";
import { histogramOf } from "./htmlReport.js";
import { psdJson } from "./psdJson.js";
import { deadChannel } from "./psdText.js";
import {
  PEAK_HOLD_STYLE,
  qty,
  reportOpening,
  reportPage,
  row,
  segmentRmsLabel,
  recordSignOff,
  timeRmsLabel,
  type ReportContext,
} from "./reportPage.js";
import { escapeXml as esc, svgPlot } from "./svgPlot.js";
import { findingTexts } from "./findingTexts.js";

/**
 * The record of a PSD with no profile (`psd --report`): per channel the PSD with its confidence band,
 * the Parseval check, statistics and histogram; the same identity, printed-page rules and embedded
 * result as a check report. There is no verdict: the page says "PSD record" where a check says PASS.
 */
export const PSD_WORD = "PSD RECORD";

/** The plotted range: the --fmin/--fmax band when given, else the first line above 0 Hz to Nyquist. */
function plotDomain(c: ChannelAnalysis): [number, number] {
  const f = c.psd.frequencyHz;
  const lo = c.band ? Math.max(c.band.fminHz, f[1] ?? 1) : (f[1] ?? 1);
  const hi = c.band ? c.band.fmaxHz : (f[f.length - 1] ?? 2 * lo);
  return [lo, hi > lo ? hi : lo * 2];
}

function channelSection(c: ChannelAnalysis, a: RecordingAnalysis, n: number): string {
  const u = accelLabel(c.units);
  const f = c.psd.frequencyHz;
  const [lo, hi] = plotDomain(c);
  let top = 0;
  for (let k = 0; k < f.length; k++)
    if (f[k]! >= lo && f[k]! <= hi && Number.isFinite(c.psd.upper[k]!)) top = Math.max(top, c.psd.upper[k]!);
  let bottom = Infinity;
  // The floor stops 10 decades under the top, so a roll-off to nothing does not squash the plot.
  for (let k = 0; k < f.length; k++)
    if (f[k]! >= lo && f[k]! <= hi && c.psd.lower[k]! > top * 1e-10) bottom = Math.min(bottom, c.psd.lower[k]!);
  const hold = c.peakHold && c.peakHold.stretches > 0 && c.psd.averages > 0 ? c.peakHold : undefined;
  if (hold)
    for (let k = 0; k < f.length; k++)
      if (f[k]! >= lo && f[k]! <= hi && Number.isFinite(hold.psd[k]!)) top = Math.max(top, hold.psd[k]!);
  if (!(top > 0) || !Number.isFinite(bottom)) {
    top = 1;
    bottom = 1e-6;
  }
  // Candidate tones (lines far above their neighbours), marked at their line with their peak amplitude.
  const toneMarks = c.tones.map((t) => {
    const k = Math.min(f.length - 1, Math.max(0, Math.round(t.frequencyHz / c.psd.lineSpacingHz)));
    return {
      x: f[k]!,
      y: c.psd.psd[k]!,
      text: `${sig(t.frequencyHz, 5)} Hz: ${sig(t.peak, 3)} ${u} peak`,
      id: `tone-${sig(t.frequencyHz, 6)}`,
    };
  });
  const plot = svgPlot({
    id: `psd-${n}`,
    title: `PSD of channel ${c.position} "${c.name}" with ${fixed(100 * a.settings.confidence, 0)} % confidence band`,
    xLabel: "frequency (Hz)",
    yLabel: `PSD (${densityLabel(c.units)})`,
    xDomain: [lo, hi],
    yDomain: [bottom / 2, top * 2],
    yLog: true,
    xMarks: c.band ? [lo, hi] : [],
    series: [
      { id: "confidence", label: "confidence band", x: f, y: c.psd.lower, y2: c.psd.upper, className: "band" },
      { id: "measured", label: "measured PSD", x: f, y: c.psd.psd, className: "measured" },
      ...(hold
        ? [
            {
              id: "peak-hold",
              label: `peak-hold (${sig(hold.stretchS, 3)} s stretches)`,
              x: f,
              y: hold.psd,
              className: "peakhold",
            },
          ]
        : []),
      ...(toneMarks.length > 0
        ? [
            {
              id: "tones",
              label: "candidate tone",
              x: toneMarks.map((t) => t.x),
              y: toneMarks.map((t) => t.y),
              className: "tone",
              markers: true,
            },
          ]
        : []),
    ],
    notes: toneMarks,
  });
  const pv = c.parseval;
  const p = c.psd;
  const s = c.stats;
  const bounds = p.averages > 0 ? chiSquareIntervalFactors(p.dof, a.settings.confidence) : undefined;
  // A dead channel (NO_SIGNAL): no Parseval ratio or shape figures of 0 / 0 (its doubt says it).
  const live = !deadChannel(c);
  return `<section class="channel" id="channel-${n}">
<h2>Channel ${c.position} “${esc(c.name)}”</h2>
${plot}
<h3>Parseval check and levels</h3>
<table class="levels">
${row(timeRmsLabel(a), qty(sig(pv.rmsTime, 4), u), "num")}
${row(segmentRmsLabel(a), qty(sig(pv.rmsSegments, 4), u), "num")}
${row("RMS from the PSD (every line, 0 Hz to Nyquist)", qty(sig(pv.rmsPsd, 4), u), "num")}
${!live ? "" : row("Parseval ratio (PSD RMS / segments RMS)", `${fixed(pv.ratio, 4)} (allowed ±${sig(100 * pv.tolerance, 2)} %${pv.toleranceFrom === "record" ? ", from the record's own spread" : ""}): ${esc(parsevalWord(pv))}`, "num")}
${c.band ? row(`RMS from the PSD over ${sig(c.band.fminHz)}–${sig(c.band.fmaxHz)} Hz (--fmin/--fmax)`, qty(sig(c.band.rms, 4), u), "num") : ""}
${row("Averages / degrees of freedom", `${p.averages}${p.skippedSegments ? ` (${p.skippedSegments} segments skipped)` : ""} / ${fixed(p.dof, 1)}`, "num")}
${row("Random error of one line", `±${fixed(100 * p.randomError, 1)} % (1 σ)`, "num")}
${bounds ? row(`${fixed(100 * a.settings.confidence, 0)} % bounds of a line`, `${fixed(dB(bounds.lower), 2)} / +${fixed(dB(bounds.upper), 2)} dB`, "num") : ""}
${c.tones.length ? row("Candidate tones (lines far above their neighbours; peak from the window's kernel)", esc(c.tones.map((t) => `${sig(t.frequencyHz, 6)} Hz ${sig(t.peak, 3)} ${u} peak (+${fixed(t.aboveBackgroundDb, 1)} dB)`).join(", "))) : ""}
${hold ? row("Peak-hold (largest stretch level at each line)", esc(peakHoldLine(c, hold))) : ""}
${c.peaks.length ? row("Strongest peaks", esc(c.peaks.map((k) => `${sig(k.frequencyHz, 5)} Hz ${sig(k.level, 3)}`).join(", ") + ` ${densityLabel(c.units)}`)) : ""}
${row("Mean / standard deviation", `${sig(s.mean, 4)} / ${qty(sig(s.std, 4), u)}`, "num")}
${row("Minimum / maximum", `${sig(s.min, 4)} / ${qty(sig(s.max, 4), u)}`, "num")}
${live ? row("Crest factor (max |x − mean| / σ)", fixed(s.crestFactor, 2), "num") : ""}
${live ? row("Skewness / kurtosis (Gaussian: 0 / 3)", `${fixed(s.skewness, 3)} / ${fixed(s.kurtosis, 3)}`, "num") : ""}
</table>
${histogramOf(c, n)}
${c.notes.length ? `<p class="muted">Notes: ${findingTexts(c.notes).map(esc).join("; ")}</p>` : ""}
${c.doubts.length ? `<p><strong>Doubts:</strong> ${findingTexts(c.doubts).map(esc).join("; ")}</p>` : ""}
</section>`;
}

/**
 * Where the loudest stretch stands furthest above the whole record's average (lines above 0 Hz), as psd's text says it.
 */
function peakHoldLine(c: ChannelAnalysis, h: NonNullable<ChannelAnalysis["peakHold"]>): string {
  const p = c.psd;
  let k = 1;
  for (let i = 1; i < h.psd.length; i++) if (p.psd[i]! > 0 && h.psd[i]! / p.psd[i]! > h.psd[k]! / p.psd[k]!) k = i;
  return `${h.stretches} stretches of ${sig(h.stretchS, 3)} s (${h.averagesPerStretch} averages each); furthest above the average at ${sig(p.frequencyHz[k]!, 5)} Hz: +${fixed(dB(h.psd[k]! / p.psd[k]!), 1)} dB, the stretch from ${sig(h.atS[k]!, 5)} s. A largest of many short estimates: read it as "at most this loud", not as a stationary level.`;
}

/** The result embedded in every PSD report (what `psdgate verify` re-runs and compares). */
export function psdResultDocument(a: RecordingAnalysis, ctx: ReportContext): Record<string, unknown> {
  return {
    kind: "psd",
    created: ctx.when.toISOString(),
    meta: ctx.meta ?? null,
    rerun: ctx.rerun ?? null,
    given: ctx.given ?? [],
    result: psdJson(a, ctx.version, ctx.meta),
  };
}

export function psdHtml(
  a: RecordingAnalysis,
  version: string,
  when: Date,
  context: Omit<ReportContext, "version" | "when"> = {},
): string {
  const ctx: ReportContext = { ...context, version, when };
  const m = ctx.meta;
  const name = a.input.file.split(/[\\/]/).pop() ?? a.input.file;
  const doubts = a.channels.filter((c) => c.doubts.length > 0).length;
  const summary =
    doubts > 0
      ? `PSD of ${a.channels.length} channel(s); ${doubts} channel(s) carry doubts (see their sections): read their spectra with care.`
      : `PSD of ${a.channels.length} channel(s); no data doubts found. No profile was given, so there is no verdict.`;
  const holds = a.channels.some((c) => c.peakHold && c.peakHold.stretches > 0 && c.psd.averages > 0);
  const body = `${holds ? `<style>${PEAK_HOLD_STYLE}</style>\n` : ""}${reportOpening({ verdictClass: "none", word: "PSD", line: summary, meta: m, a, ctx })}
${a.channels.map((c, i) => channelSection(c, a, i + 1)).join("\n")}
<h2>Caution</h2>
<div class="caution">A PSD describes the record as measured. It is not a compliance verdict; where it feeds a decision about people or equipment (a test level, a fixture or exciter limit) the governing standard, the lab's procedure and a qualified engineer decide.</div>
${recordSignOff("PSD record", summary, m, [{ label: "Recording", file: a.input.file, sha256: a.input.sha256 }])}`;
  const page = reportPage(
    {
      title: m?.testId ? `PSD record, test ${m.testId}: ${name}` : `PSD record: ${name}`,
      verdictClass: "none",
      verdictWord: PSD_WORD,
      recordingSha256: a.input.sha256,
      recordingName: name,
      kindLine: "Random-vibration PSD record",
      body,
    },
    ctx,
  );
  return embedResult(page, psdResultDocument(a, ctx));
}
