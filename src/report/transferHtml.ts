import type { TransferAnalysis, TransferOutput } from "../analyses/analyzeTransfer.js";
import { accelLabel, densityLabel } from "../units.js";
import { TRANSFER_CAUTION } from "./cautions.js";
import { embedResult } from "./embeddedResult.js";
import { fixed, rateText, sig } from "./format.js";
import {
  givenRow,
  metaRows,
  qty,
  readingWords,
  recordDocument,
  recordSignOff,
  reportPage,
  row,
  type ReportContext,
} from "./reportPage.js";
import { transferJson } from "./transferReport.js";
import { escapeXml as esc, svgPlot } from "./svgPlot.js";
import { findingTexts } from "./findingTexts.js";

/**
 * `transfer --report`: one self-contained HTML page (inline CSS and SVG, no scripts, a
 * Content-Security-Policy that forbids any fetch) with, per output channel, |H1| and |H2| with the
 * |H1| bounds, the phase, the coherence, and the predicted against the measured output PSD.
 */
// Series styles of this page only (the frame's STYLE has the rest).
export const EXTRA_STYLE = `
.h1 { fill: none; stroke: #1b4f7a; stroke-width: 1.2; } .h2 { fill: none; stroke: #b0552f; stroke-width: 1; stroke-dasharray: 4 2; }
.coherence { fill: none; stroke: #1f6f5c; stroke-width: 1.1; } .phase { fill: none; stroke: #1b4f7a; stroke-width: 1; }
.predicted { fill: none; stroke: #1b4f7a; stroke-width: 1.1; stroke-dasharray: 5 2; }
table.resonances th { width: auto; }
`;

function positiveRange(a: Float64Array, from: number): [number, number] {
  let lo = Infinity;
  let hi = 0;
  for (let k = from; k < a.length; k++) {
    const v = a[k]!;
    if (Number.isFinite(v) && v > 0) {
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
  }
  if (!(hi > 0)) return [1e-3, 1];
  return [Math.max(lo, hi * 1e-5) / 1.5, hi * 1.5];
}

function outputSection(t: TransferAnalysis, o: TransferOutput, n: number): string {
  const f = t.frequencyHz;
  const xDomain: [number, number] = [f[1]!, f[f.length - 1]!];
  const mag = positiveRange(
    o.h1Upper.map((v, k) => Math.max(v, o.h2Magnitude[k]! || 0)),
    1,
  );
  const magLo = positiveRange(o.h1Magnitude, 1)[0];
  const psdRange = positiveRange(o.measuredOutputPsd, 1);
  const u = densityLabel(t.units);
  const plots = [
    svgPlot({
      id: `h-${n}`,
      title: `|H| from ${t.reference.name} to ${o.name}`,
      xLabel: "frequency (Hz)",
      yLabel: "magnitude",
      xDomain,
      yDomain: [magLo, mag[1]],
      yLog: true,
      series: [
        {
          id: "h1-bounds",
          label: `H1 ${fixed(100 * t.settings.confidence, 0)} % bounds`,
          x: f,
          y: o.h1Lower.map((v) => Math.max(v, magLo)),
          y2: o.h1Upper,
          className: "band",
        },
        { id: "h1", label: "H1", x: f, y: o.h1Magnitude, className: "h1" },
        { id: "h2", label: "H2", x: f, y: o.h2Magnitude, className: "h2" },
      ],
    }),
    svgPlot({
      id: `phase-${n}`,
      title: `phase of ${o.name} relative to ${t.reference.name}`,
      xLabel: "frequency (Hz)",
      yLabel: "phase (degrees)",
      xDomain,
      yDomain: [-180, 180],
      yLog: false,
      height: 230,
      series: [{ id: "phase", label: "", x: f, y: o.phaseDeg, className: "phase" }],
    }),
    svgPlot({
      id: `coherence-${n}`,
      title: "coherence γ²",
      xLabel: "frequency (Hz)",
      yLabel: "coherence",
      xDomain,
      yDomain: [0, 1],
      yLog: false,
      height: 230,
      series: [{ id: "coherence", label: "", x: f, y: o.coherence, className: "coherence" }],
    }),
    svgPlot({
      id: `psd-${n}`,
      title: `output PSD of ${o.name}: measured and predicted |H1|² G_in`,
      xLabel: "frequency (Hz)",
      yLabel: u,
      xDomain,
      yDomain: psdRange,
      yLog: true,
      series: [
        { id: "measured", label: "measured", x: f, y: o.measuredOutputPsd, className: "measured" },
        { id: "predicted", label: "predicted", x: f, y: o.predictedOutputPsd, className: "predicted" },
      ],
    }),
  ];
  const res =
    o.resonances.length === 0
      ? `<p class="muted">No resonance found (a peak needs |H1| ≥ 1, coherence ≥ 0.5 and a half-power point on each side).</p>`
      : `<table class="grid resonances"><thead><tr><th class="num">f, Hz</th><th class="num">|H1|</th><th class="num">Q</th><th class="num">half-power band, Hz</th><th class="num">coherence</th><th>note</th></tr></thead><tbody>${o.resonances.map((r) => `<tr><td class="num">${sig(r.frequencyHz, 5)}</td><td class="num">${sig(r.magnitude, 4)}</td><td class="num">${sig(r.q, 3)}</td><td class="num">${sig(r.halfPowerHz[0], 5)}–${sig(r.halfPowerHz[1], 5)}</td><td class="num">${fixed(r.coherence, 3)}</td><td>${r.resolutionLimited ? "Q reads low: under 10 lines across" : ""}</td></tr>`).join("")}</tbody></table>`;
  const a = accelLabel(t.units);
  return `<section class="output" id="output-${n}">
<h2>Output ${esc(o.name)} (channel ${o.position})</h2>
<table class="meta">
<tr><th>RMS measured</th><td>${sig(o.measuredRms, 4)} ${a}</td></tr>
<tr><th>RMS predicted from the input</th><td>${sig(o.predictedRms, 4)} ${a} (${fixed(100 * (o.predictedRms / o.measuredRms) ** 2, 1)} % of the mean square)</td></tr>
<tr><th>Coherence ≥ ${t.settings.goodCoherence}</th><td>${fixed(100 * o.wellExplained.lineFraction, 1)} % of the lines, carrying ${fixed(100 * o.wellExplained.powerFraction, 1)} % of the output's mean square</td></tr>
</table>
${plots.join("\n")}
<h3>Resonances</h3>
${res}
</section>`;
}

/** The result embedded in a transfer record (what `psdgate verify` re-runs and compares). */
export function transferResultDocument(t: TransferAnalysis, ctx: ReportContext): Record<string, unknown> {
  return recordDocument("transfer", ctx, transferJson(t, ctx.version));
}

export const TRANSFER_WORD = "TRANSFER RECORD";

export function transferHtml(
  t: TransferAnalysis,
  version: string,
  when: Date,
  context: Omit<ReportContext, "version" | "when"> = {},
): string {
  const ctx: ReportContext = { ...context, version, when };
  const m = ctx.meta;
  const s = t.settings;
  const name = t.input.file.split(/[\\/]/).pop() ?? t.input.file;
  const title = `${m?.testId ? `Frequency response, test ${m.testId}` : "Frequency response"}: ${t.reference.name} to ${t.outputs.map((o) => o.name).join(", ")}`;
  const peaks = t.outputs
    .flatMap((o) => o.resonances.map((r) => ({ o, r })))
    .sort((x, y) => y.r.magnitude - x.r.magnitude);
  const summary = `${t.outputs.length} output(s) against ${t.reference.name}; ${peaks.length === 0 ? "no resonance found" : `${peaks.length} resonance(s), the strongest |H1| ${sig(peaks[0]!.r.magnitude, 3)} at ${sig(peaks[0]!.r.frequencyHz, 4)} Hz on ${peaks[0]!.o.name} (Q ${sig(peaks[0]!.r.q, 3)})`}.`;
  const body = `<style>${EXTRA_STYLE}</style>
<div class="verdict none" id="verdict" data-verdict="none"><span class="word">FRF</span><span>${esc(summary)}</span></div>
<h2>Test identity</h2>
<table class="meta" id="identity">
${metaRows(m)}
</table>
<h2>Record</h2>
<table class="meta">
${row("Recording", esc(t.input.file))}
${row("Recording SHA-256", `<span class="hash">${t.input.sha256}</span>`)}
${row("Format", esc(t.input.layout))}
${row("Samples", `${t.input.samples} at ${qty(rateText(t.input.sampleRateHz), "Hz")} = ${qty(fixed(t.input.durationS, 3), "s")}`)}
${row("Window analysed", `${fixed(t.window.fromS, 3)} to ${fixed(t.window.toS, 3)} s (${fixed(t.window.durationS, 3)} s): ${t.window.frames} samples${t.window.frames === t.input.samples ? ", the whole record" : ""}`)}
${row("Input (reference)", `${esc(t.reference.name)} (channel ${t.reference.position}), ${qty(sig(t.reference.rms, 4), accelLabel(t.units))} RMS`)}
${row("Outputs", esc(t.outputs.map((o) => `${o.name} (channel ${o.position})`).join(", ")))}
</table>
<h2>Settings and assumptions</h2>
<table class="meta" id="settings">
${row("Units", `every channel in ${accelLabel(t.units)} (the input's unit, or --result-units); |H| is output unit per input unit`)}
${t.channels.map((x) => row(`Channel ${x.name}`, esc(readingWords(x.reading, x.reading.factor, accelLabel(t.units))))).join("\n")}
${row("Analysis", `${s.window} window, ${s.segmentLength}-point segments (${qty(sig(s.resolutionHz, 4), "Hz")} lines), ${fixed(100 * s.overlap, 1)} % overlap, detrend ${s.detrend}; ${t.averages} averages, ${fixed(t.dof, 1)} DOF`)}
${row("Estimators", `H1 = G_xy / G_xx and H2 = G_yy / G_yx, coherence γ²; H1 bounds at ${fixed(100 * s.confidence, 0)} %, Student's t on 2 n_d − 2 DOF (Goodman 1965; Bendat &amp; Piersol, Random Data, ch. 9)`)}
${row("Good coherence", `γ² ≥ ${s.goodCoherence}`)}
${givenRow(ctx)}
</table>
${t.outputs.map((o, i) => outputSection(t, o, i + 1)).join("\n")}
${
  t.warnings.length
    ? `<h2>Notes</h2><ul>${findingTexts(t.warnings)
        .map((w) => `<li>${esc(w)}</li>`)
        .join("")}</ul>`
    : ""
}
<h2>Caution</h2>
<div class="caution keep">${esc(TRANSFER_CAUTION)}</div>
${recordSignOff("Transfer record", summary, m, [{ label: "Recording", file: t.input.file, sha256: t.input.sha256 }])}`;
  const page = reportPage(
    {
      title,
      verdictClass: "none",
      verdictWord: TRANSFER_WORD,
      recordingSha256: t.input.sha256,
      recordingName: name,
      kindLine: "Frequency-response (transfer) record",
      body,
    },
    ctx,
  );
  return embedResult(page, transferResultDocument(t, ctx));
}
