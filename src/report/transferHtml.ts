import type { TransferAnalysis, TransferOutput } from "../analyzeTransfer.js";
import { accelLabel, densityLabel } from "../units.js";
import { fixed, rateText, sig } from "./format.js";
import { escapeXml as esc, svgPlot } from "./svgPlot.js";

/**
 * `transfer --report`: one self-contained HTML page (inline CSS and SVG, no scripts, a
 * Content-Security-Policy that forbids any fetch) with, per output channel, |H1| and |H2| with the
 * |H1| bounds, the phase, the coherence, and the predicted against the measured output PSD.
 */
const STYLE = `
* { box-sizing: border-box; }
body { font: 10.5pt/1.4 "DejaVu Sans", "Helvetica Neue", Arial, sans-serif; color: #1d2428; margin: 0 auto; max-width: 190mm; padding: 10mm 4mm; }
h1 { font-size: 16pt; margin: 0 0 2mm; } h2 { font-size: 12.5pt; margin: 7mm 0 2mm; border-bottom: 1.5px solid #35505c; color: #223a44; }
table { border-collapse: collapse; width: 100%; margin: 1mm 0 3mm; font-size: 9.5pt; }
th, td { text-align: left; padding: 1.2mm 2mm; border-bottom: 1px solid #d5dde0; vertical-align: top; }
th { color: #4b5c63; font-weight: 600; } td.num { text-align: right; font-variant-numeric: tabular-nums; }
.hash { font-family: "DejaVu Sans Mono", Menlo, monospace; font-size: 8.2pt; word-break: break-all; }
.plot { width: 100%; height: auto; display: block; margin: 2mm 0; }
.plot-title { font-size: 12px; font-weight: 600; fill: #223a44; } .tick { font-size: 10px; fill: #4b5c63; }
.axis-label { font-size: 11px; fill: #223a44; } .legend-text { font-size: 10px; fill: #223a44; }
.grid { stroke: #c9d3d7; stroke-width: .7; } .grid.minor { stroke: #e7ecee; stroke-width: .5; } .grid.zero { stroke: #6d8188; }
.frame { fill: none; stroke: #6d8188; stroke-width: .8; }
.band { fill: #7fa7c9; fill-opacity: .35; stroke: none; } .key.band { stroke: #7fa7c9; stroke-width: 8; stroke-opacity: .5; }
.h1 { fill: none; stroke: #1b4f7a; stroke-width: 1.2; } .h2 { fill: none; stroke: #b0552f; stroke-width: 1; stroke-dasharray: 4 2; }
.coherence { fill: none; stroke: #1f6f5c; stroke-width: 1.1; } .phase { fill: none; stroke: #1b4f7a; stroke-width: 1; }
.measured { fill: none; stroke: #202020; stroke-width: 1.6; } .predicted { fill: none; stroke: #1b4f7a; stroke-width: 1.1; stroke-dasharray: 5 2; }
.muted { color: #6d8188; }
@media print { body { padding: 0; max-width: none; } .plot { break-inside: avoid; } }
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
  const mag = positiveRange(o.h1Upper.map((v, k) => Math.max(v, o.h2Magnitude[k]! || 0)), 1);
  const magLo = positiveRange(o.h1Magnitude, 1)[0];
  const psdRange = positiveRange(o.measuredOutputPsd, 1);
  const u = densityLabel(t.units);
  const plots = [
    svgPlot({
      id: `h-${n}`, title: `|H| from ${t.reference.name} to ${o.name}`, xLabel: "frequency (Hz)", yLabel: "magnitude", xDomain, yDomain: [magLo, mag[1]], yLog: true,
      series: [
        { id: "h1-bounds", label: `H1 ${fixed(100 * t.settings.confidence, 0)} % bounds`, x: f, y: o.h1Lower.map((v) => Math.max(v, magLo)), y2: o.h1Upper, className: "band" },
        { id: "h1", label: "H1", x: f, y: o.h1Magnitude, className: "h1" },
        { id: "h2", label: "H2", x: f, y: o.h2Magnitude, className: "h2" },
      ],
    }),
    svgPlot({ id: `phase-${n}`, title: `phase of ${o.name} relative to ${t.reference.name}`, xLabel: "frequency (Hz)", yLabel: "phase (degrees)", xDomain, yDomain: [-180, 180], yLog: false, series: [{ id: "phase", label: "", x: f, y: o.phaseDeg, className: "phase" }] }),
    svgPlot({ id: `coherence-${n}`, title: "coherence γ²", xLabel: "frequency (Hz)", yLabel: "coherence", xDomain, yDomain: [0, 1], yLog: false, series: [{ id: "coherence", label: "", x: f, y: o.coherence, className: "coherence" }] }),
    svgPlot({
      id: `psd-${n}`, title: `output PSD of ${o.name}: measured and predicted |H1|² G_in`, xLabel: "frequency (Hz)", yLabel: u, xDomain, yDomain: psdRange, yLog: true,
      series: [
        { id: "measured", label: "measured", x: f, y: o.measuredOutputPsd, className: "measured" },
        { id: "predicted", label: "predicted", x: f, y: o.predictedOutputPsd, className: "predicted" },
      ],
    }),
  ];
  const res = o.resonances.length === 0
    ? `<p class="muted">No resonance found (a peak needs |H1| ≥ 1, coherence ≥ 0.5 and a half-power point on each side).</p>`
    : `<table><tr><th>f Hz</th><th>|H1|</th><th>Q</th><th>half-power band Hz</th><th>coherence</th><th></th></tr>${o.resonances.map((r) => `<tr><td class="num">${sig(r.frequencyHz, 5)}</td><td class="num">${sig(r.magnitude, 4)}</td><td class="num">${sig(r.q, 3)}</td><td>${sig(r.halfPowerHz[0], 5)}–${sig(r.halfPowerHz[1], 5)}</td><td class="num">${fixed(r.coherence, 3)}</td><td>${r.resolutionLimited ? "Q reads low: under 10 lines across" : ""}</td></tr>`).join("")}</table>`;
  const a = accelLabel(t.units);
  return `<section class="output" id="output-${n}">
<h2>Output ${esc(o.name)} (channel ${o.position})</h2>
<table>
<tr><th>RMS measured</th><td>${sig(o.measuredRms, 4)} ${a}</td></tr>
<tr><th>RMS predicted from the input</th><td>${sig(o.predictedRms, 4)} ${a} (${fixed(100 * (o.predictedRms / o.measuredRms) ** 2, 1)} % of the mean square)</td></tr>
<tr><th>Coherence ≥ ${t.settings.goodCoherence}</th><td>${fixed(100 * o.wellExplained.lineFraction, 1)} % of the lines, carrying ${fixed(100 * o.wellExplained.powerFraction, 1)} % of the output's mean square</td></tr>
</table>
${plots.join("\n")}
<h3>Resonances</h3>
${res}
</section>`;
}

export function transferHtml(t: TransferAnalysis, version: string, when: Date): string {
  const s = t.settings;
  const title = `Frequency response: ${t.reference.name} to ${t.outputs.map((o) => o.name).join(", ")}`;
  return `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<meta name="generator" content="psdgate ${esc(version)}">
<title>${esc(title)}</title>
<style>${STYLE}</style></head>
<body>
<h1>${esc(title)}</h1>
<div class="muted">Prepared by psdgate ${esc(version)} on ${esc(when.toISOString().replace("T", " ").replace(/\.\d+Z$/, " UTC"))}</div>
<h2>Record</h2>
<table>
<tr><th>Recording</th><td>${esc(t.input.file)}</td></tr>
<tr><th>SHA-256</th><td><span class="hash">${t.input.sha256}</span></td></tr>
<tr><th>Samples</th><td>${t.input.samples} at ${rateText(t.input.sampleRateHz)} Hz (${fixed(t.input.durationS, 3)} s)</td></tr>
<tr><th>Window analysed</th><td>${fixed(t.window.fromS, 3)} to ${fixed(t.window.toS, 3)} s (${fixed(t.window.durationS, 3)} s): ${t.window.frames} samples${t.window.frames === t.input.samples ? ", the whole record" : ""}</td></tr>
<tr><th>Input</th><td>${esc(t.reference.name)} (channel ${t.reference.position}), ${sig(t.reference.rms, 4)} ${accelLabel(t.units)} RMS</td></tr>
<tr><th>Analysis</th><td>${s.window} window, ${s.segmentLength}-point segments (${sig(s.resolutionHz, 4)} Hz lines), ${fixed(100 * s.overlap, 1)} % overlap, detrend ${s.detrend}; ${t.averages} averages, ${fixed(t.dof, 1)} DOF; H1 bounds at ${fixed(100 * s.confidence, 0)} % (Bendat &amp; Piersol, Random Data, ch. 9)</td></tr>
</table>
${t.outputs.map((o, i) => outputSection(t, o, i + 1)).join("\n")}
${t.warnings.map((w) => `<p class="muted">warning: ${esc(w)}</p>`).join("\n")}
</body></html>
`;
}
