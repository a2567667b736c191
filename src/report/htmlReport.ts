import type { ChannelAnalysis } from "../analyzeRecording.js";
import { worstFirst, type ChannelCompliance, type Verdict } from "../compare/complianceCheck.js";
import { profileLevel } from "../compare/testProfile.js";
import { accelLabel, densityLabel } from "../units.js";
import { SHAKER_CAUTION, VERDICT_CAUTION } from "./cautions.js";
import type { CheckResult } from "../checkRecording.js";
import { excursionJudgement, RULE_SUMMARY, ruleLine, VERDICT_MEANING } from "./ruleText.js";
import { fixed, maxOf, minOf, sig, signedDb } from "./format.js";
import { toleranceSummary } from "./profileText.js";
import { escapeXml as esc, svgHistogram, svgPlot } from "./svgPlot.js";

/**
 * The review report: one self-contained HTML file (inline CSS and SVG, no scripts, no fonts, no
 * network; a Content-Security-Policy forbids any fetch), laid out for A4 and Letter printing.
 */
const VERDICT_TEXT: Record<Verdict, { word: string; line: string }> = {
  pass: { word: "PASS", line: `Pass: ${VERDICT_MEANING.pass}.` },
  fail: { word: "FAIL", line: `Fail: ${VERDICT_MEANING.fail}.` },
  inconclusive: { word: "INCONCLUSIVE", line: `Inconclusive: ${VERDICT_MEANING.inconclusive}.` },
};

const STYLE = `
@page { size: auto; margin: 14mm 12mm; }
* { box-sizing: border-box; }
body { font: 10.5pt/1.4 "DejaVu Sans", "Helvetica Neue", Arial, sans-serif; color: #1d2428; margin: 0 auto; max-width: 190mm; padding: 10mm 4mm; }
h1 { font-size: 16pt; margin: 0 0 2mm; letter-spacing: .01em; }
h2 { font-size: 12.5pt; margin: 7mm 0 2mm; border-bottom: 1.5px solid #35505c; padding-bottom: 1mm; color: #223a44; }
h3 { font-size: 11pt; margin: 4mm 0 1mm; }
table { border-collapse: collapse; width: 100%; margin: 1mm 0 3mm; font-size: 9.5pt; }
th, td { text-align: left; padding: 1.2mm 2mm; border-bottom: 1px solid #d5dde0; vertical-align: top; }
th { color: #4b5c63; font-weight: 600; width: 34%; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
.meta th { width: 24%; }
table.excursions th { width: auto; }
table.excursions td:last-child { width: 45%; }
.hash { font-family: "DejaVu Sans Mono", Menlo, monospace; font-size: 8.2pt; word-break: break-all; }
.verdict { display: flex; align-items: center; gap: 5mm; margin: 5mm 0; padding: 3.5mm 5mm; border: 2.5px solid; border-radius: 1mm; }
.verdict .word { font-size: 22pt; font-weight: 800; letter-spacing: .12em; }
.verdict.pass { border-color: #1f6f5c; color: #1f6f5c; background: #eef6f3; }
.verdict.fail { border-color: #9c2f1c; color: #9c2f1c; background: #faefec; }
.verdict.inconclusive { border-color: #8a6400; color: #6f5000; background: #fbf5e6; border-style: dashed; }
.chip { display: inline-block; padding: 0 2mm; border-radius: 1mm; font-weight: 700; font-size: 9pt; border: 1px solid; }
.chip.pass { color: #1f6f5c; } .chip.fail { color: #9c2f1c; } .chip.inconclusive { color: #6f5000; }
.plot { width: 100%; height: auto; display: block; margin: 2mm 0; }
.plot-title { font-size: 12px; font-weight: 600; fill: #223a44; }
.tick { font-size: 10px; fill: #4b5c63; }
.axis-label { font-size: 11px; fill: #223a44; }
.legend-text { font-size: 10px; fill: #223a44; }
.grid { stroke: #c9d3d7; stroke-width: .7; } .grid.minor { stroke: #e7ecee; stroke-width: .5; } .grid.zero { stroke: #6d8188; }
.frame { fill: none; stroke: #6d8188; stroke-width: .8; }
.band { fill: #7fa7c9; fill-opacity: .35; stroke: none; } .key.band { stroke: #7fa7c9; stroke-width: 8; stroke-opacity: .5; }
.measured { fill: none; stroke: #1b4f7a; stroke-width: 1.2; }
.required { fill: none; stroke: #202020; stroke-width: 2; }
.limit { fill: none; stroke: #b0552f; stroke-width: 1.1; stroke-dasharray: 5 3; }
.deviation { fill: none; stroke: #1b4f7a; stroke-width: 1.1; }
.bars { fill: #9fb8c8; stroke: #5d7f93; stroke-width: .4; } .gauss { fill: none; stroke: #b0552f; stroke-width: 1.6; }
.caution { border-left: 4px solid #b0552f; padding: 2mm 4mm; background: #fbf3ee; margin: 3mm 0; }
.signoff { margin-top: 6mm; display: grid; grid-template-columns: 1fr 1fr 0.6fr; gap: 8mm; }
.signoff div { border-top: 1px solid #1d2428; padding-top: 1.5mm; font-size: 9pt; color: #4b5c63; height: 20mm; }
.muted { color: #6d8188; }
section.channel { break-inside: auto; }
.keep { break-inside: avoid; }
@media print { body { padding: 0; max-width: none; } h2 { break-after: avoid; } .plot { break-inside: avoid; } }
`;

function row(k: string, v: string, cls = ""): string {
  return `<tr><th>${esc(k)}</th><td${cls ? ` class="${cls}"` : ""}>${v}</td></tr>`;
}

function channelSection(c: ChannelAnalysis, comp: ChannelCompliance, r: CheckResult, n: number, role: CheckResult["roles"][number]): string {
  const p = r.profile;
  const u = accelLabel(c.units);
  const f = c.psd.frequencyHz;
  const f0 = p.breakpoints[0]!.hz;
  const fN = p.breakpoints[p.breakpoints.length - 1]!.hz;
  const lo = Math.max(f[1] ?? f0, f0 / 2);
  const hi = Math.min(f[f.length - 1] ?? fN, fN * 2);
  const req: number[] = [];
  const up: number[] = [];
  const dn: number[] = [];
  const lx = comp.lines.map((l) => l.frequencyHz);
  for (const l of comp.lines) {
    req.push(l.required);
    up.push(l.required * 10 ** (l.upperDb / 10));
    dn.push(l.required * 10 ** (-l.lowerDb / 10));
  }
  // Required profile drawn through its breakpoints too (exact corners).
  const reqX = [...p.breakpoints.map((b) => b.hz)];
  const reqY = reqX.map((x) => profileLevel(p, x));
  const vals: number[] = [];
  // The y range follows the profile's band (roll-off outside it would squash the plot); the rest is clipped.
  for (let k = 0; k < f.length; k++) if (f[k]! >= f0 && f[k]! <= fN && c.psd.lower[k]! > 0) vals.push(c.psd.lower[k]!, c.psd.upper[k]!);
  const ymin = minOf(vals, dn, up) / 4;
  const ymax = maxOf(vals, dn, up) * 3;
  const psdPlot = svgPlot({
    id: `psd-${n}`, title: `PSD of channel ${c.position} "${c.name}" with ${fixed(100 * r.analysis.settings.confidence, 0)} % confidence band`,
    xLabel: "frequency (Hz)", yLabel: `PSD (${densityLabel(c.units)})`, xDomain: [lo, hi], yDomain: [ymin, ymax], yLog: true,
    series: [
      { id: "confidence", label: "confidence band", x: f, y: c.psd.lower, y2: c.psd.upper, className: "band" },
      { id: "limits-upper", label: "tolerance", x: lx, y: up, className: "limit" },
      { id: "limits-lower", label: "", x: lx, y: dn, className: "limit" },
      { id: "required", label: "required", x: reqX, y: reqY, className: "required" },
      { id: "measured", label: "measured", x: f, y: c.psd.psd, className: "measured" },
    ],
  });
  const devs = comp.lines.map((l) => l.deviationDb);
  const dmax = maxOf([6], comp.lines.map((l) => l.upperDb + 1), devs.filter(Number.isFinite).map((d) => Math.abs(d) + 1));
  const devPlot = svgPlot({
    id: `dev-${n}`, title: "Deviation from the required profile", xLabel: "frequency (Hz)", yLabel: "deviation (dB)",
    xDomain: [Math.max(lo, f0), Math.min(hi, fN)], yDomain: [-dmax, dmax], yLog: false,
    series: [
      { id: "dev-upper", label: "band limits", x: lx, y: comp.lines.map((l) => l.upperDb), className: "limit" },
      { id: "dev-lower", label: "", x: lx, y: comp.lines.map((l) => -l.lowerDb), className: "limit" },
      { id: "deviation", label: "10 log10(measured / required)", x: lx, y: devs, className: "deviation" },
    ],
  });
  const h = c.histogram ?? { edges: [], density: [], underflow: 0, overflow: 0, count: 0 };
  const gx: number[] = [];
  const gy: number[] = [];
  if (h.edges.length > 1) {
    const a = h.edges[0]!;
    const b = h.edges[h.edges.length - 1]!;
    for (let i = 0; i <= 200; i++) {
      const v = a + ((b - a) * i) / 200;
      gx.push(v);
      gy.push(Math.exp(-0.5 * ((v - c.stats.mean) / c.stats.std) ** 2) / (c.stats.std * Math.sqrt(2 * Math.PI)));
    }
  }
  const hist = svgHistogram(`hist-${n}`, `Amplitude histogram of channel ${c.position} and the Gaussian of the same mean and σ`, `acceleration (${u})`, h.edges, h.density, { x: gx, y: gy });
  const tolRms = comp.rms.upperDb !== undefined ? `+${fixed(comp.rms.upperDb, 2)} / −${fixed(comp.rms.lowerDb!, 2)} dB` : "none stated";
  const exc = comp.excursions.length === 0
    ? `<p>No line lies outside its tolerance band (${comp.lines.length} lines checked).</p>`
    : `<table class="excursions"><tr><th>range</th><th class="num">worst</th><th class="num">limit</th><th>judgement</th></tr>${worstFirst(comp.excursions)
      .map((e) => `<tr><td>${sig(e.fromHz, 5)}–${sig(e.toHz, 5)} Hz (${e.direction})</td><td class="num">${signedDb(e.worstDb)} at ${sig(e.worstHz, 5)} Hz</td><td class="num">${signedDb(e.limitDb)}</td><td>${esc(excursionJudgement(e))}</td></tr>`).join("")}</table>`;
  const s = c.stats;
  return `<section class="channel">
<h2>Channel ${c.position} “${esc(c.name)}” ${role === "judged" ? `<span class="chip ${comp.verdict}">${VERDICT_TEXT[comp.verdict].word}</span>` : `<span class="muted">${role === "control" ? "control channel (judged in the control spectrum above)" : "monitoring channel (shown, not judged)"}</span>`}</h2>
${role === "judged" ? `<ul>${comp.reasons.map((x) => `<li>${esc(x)}</li>`).join("")}</ul>` : ""}
${psdPlot}
${devPlot}
<div class="keep"><h3>Levels and statistics</h3>
<table>
${row("RMS from the time history (mean removed)", `${sig(c.parseval.rmsTime, 4)} ${u}`, "num")}
${row("RMS of the detrended segments", `${sig(c.parseval.rmsSegments, 4)} ${u}`, "num")}
${row("RMS from the PSD (whole band)", `${sig(c.parseval.rmsPsd, 4)} ${u}`, "num")}
${row("Parseval ratio (PSD / segments)", `${fixed(c.parseval.ratio, 4)} (allowed ±${sig(100 * c.parseval.tolerance, 2)} %${c.parseval.toleranceFrom === "record" ? ", from the record's own spread" : ""})`, "num")}
${row("RMS in the profile's range, measured", `${sig(comp.rms.measured, 4)} ${u}`, "num")}
${row("RMS required", `${sig(comp.rms.required, 4)} ${u}`, "num")}
${row("RMS deviation / tolerance", `${signedDb(comp.rms.deviationDb)} / ${tolRms}`, "num")}
${row("Degrees of freedom", `${fixed(comp.dof.achieved, 1)} achieved${comp.dof.required !== undefined ? `, ${comp.dof.required} required by the profile` : ""}, ${comp.dof.forPower} for the rule's power (${c.psd.averages} averages)`, "num")}
${row("Decision rule here", esc(ruleLine(comp)))}
${row("Random error of one line", `±${fixed(100 * c.psd.randomError, 1)} % (1 σ)`, "num")}
${row("Mean / standard deviation", `${sig(s.mean, 4)} / ${sig(s.std, 4)} ${u}`, "num")}
${row("Minimum / maximum", `${sig(s.min, 4)} / ${sig(s.max, 4)} ${u}`, "num")}
${row("Crest factor (max |x − mean| / σ)", fixed(s.crestFactor, 2), "num")}
${row("Skewness / kurtosis (Gaussian: 0 / 3)", `${fixed(s.skewness, 3)} / ${fixed(s.kurtosis, 3)}`, "num")}
</table></div>
<div class="keep"><h3>Excursions</h3>${exc}</div>
<div class="keep">${hist}${h.underflow + h.overflow > 0 ? `<p class="muted">${h.underflow + h.overflow} samples fell outside the histogram's range.</p>` : ""}</div>
${c.warnings.length ? `<p class="muted">Notes: ${c.warnings.map(esc).join("; ")}</p>` : ""}
</section>`;
}

function controlSection(r: CheckResult): string {
  const c = r.control!;
  const j = c.judgement;
  return `<section class="channel"><h2>Control spectrum: ${esc(c.rule)} of ${c.channels.map(esc).join(", ")} <span class="chip ${j.verdict}">${VERDICT_TEXT[j.verdict].word}</span></h2>
<ul>${j.reasons.map((x) => `<li>${esc(x)}</li>`).join("")}</ul>
<table>${row("RMS in the profile's range, measured / required", `${sig(j.rms.measured, 4)} / ${sig(j.rms.required, 4)} (${signedDb(j.rms.deviationDb)})`, "num")}
${row("Degrees of freedom", `${fixed(j.dof.achieved, 1)} (the smallest of the control channels'), ${j.dof.forPower} for the rule's power`, "num")}
${row("Decision rule here", esc(ruleLine(j)))}</table>
<table class="excursions"><tr><th>range</th><th class="num">worst</th><th class="num">limit</th><th>judgement</th></tr>${worstFirst(j.excursions).map((e) => `<tr><td>${sig(e.fromHz, 5)}–${sig(e.toHz, 5)} Hz (${e.direction})</td><td class="num">${signedDb(e.worstDb)} at ${sig(e.worstHz, 5)} Hz</td><td class="num">${signedDb(e.limitDb)}</td><td>${esc(excursionJudgement(e))}</td></tr>`).join("")}</table>
</section>`;
}

export function checkHtml(r: CheckResult, version: string, when: Date): string {
  const a = r.analysis;
  const p = r.profile;
  const s = a.settings;
  const v = VERDICT_TEXT[r.verdict];
  return `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<meta name="generator" content="psdgate ${esc(version)}">
<title>${esc(p.title)}: ${v.word}</title>
<style>${STYLE}</style></head>
<body>
<header>
<h1>${esc(p.title)}</h1>
<div class="muted">Random-vibration compliance record, prepared by psdgate ${esc(version)} on ${esc(when.toISOString().replace("T", " ").replace(/\.\d+Z$/, " UTC"))}</div>
</header>
<div class="verdict ${r.verdict}" id="verdict" data-verdict="${r.verdict}"><span class="word">${v.word}</span><span>${esc(v.line)}</span></div>
<h2>Record</h2>
<table class="meta">
${row("Recording", esc(a.input.file))}
${row("Recording SHA-256", `<span class="hash">${a.input.sha256}</span>`)}
${row("Format", esc(a.input.layout))}
${row("Samples", `${a.input.samples} at ${sig(a.input.sampleRateHz, 6)} Hz (${fixed(a.input.durationS, 3)} s), ${a.channels.length} channel(s) analysed`)}
${row("Profile", esc(p.file))}
${row("Profile SHA-256", `<span class="hash">${p.sha256}</span>`)}
${row("Profile range and level", `${sig(p.breakpoints[0]!.hz)}–${sig(p.breakpoints[p.breakpoints.length - 1]!.hz)} Hz, ${sig(p.rms, 4)} ${accelLabel(p.units)} RMS`)}
${row("Tolerance", esc(toleranceSummary(p)))}
${row("Analysis", `Welch PSD, ${s.window} window, ${s.segmentLength}-point segments (${sig(s.resolutionHz, 4)} Hz lines), ${fixed(100 * s.overlap, 1)} % overlap, detrend ${s.detrend}, ${fixed(100 * s.confidence, 0)} % chi-square bounds${s.scale !== 1 ? `, calibration ×${s.scale}` : ""}`)}
${row("Tool", `psdgate ${esc(version)}`)}
</table>
${r.control ? controlSection(r) : ""}
${a.channels.map((c, i) => channelSection(c, r.channels[i]!, r, i + 1, r.roles[i]!)).join("\n")}
<h2>Decision rule</h2>
<p>${esc(RULE_SUMMARY)}</p>
<h2>Cautions</h2>
<div class="caution">${esc(VERDICT_CAUTION)}</div>
<div class="caution">${esc(SHAKER_CAUTION)}</div>
<h2>Sign-off</h2>
<div class="signoff keep"><div>Prepared by (name, signature)</div><div>Reviewed by (name, signature)</div><div>Date</div></div>
</body></html>
`;
}
