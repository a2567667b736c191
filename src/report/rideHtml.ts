import { DIRECTIVE_2002_44_EC, EIGHT_HOURS_S } from "../compare/wholeBodyExposure.js";
import type { RideAxis, RideResult } from "../analyses/rideRecording.js";
import { weightingPowerGains } from "../weight/isoWeightings.js";
import { fixed, sig } from "./format.js";
import { embedResult } from "./embeddedResult.js";
import {
  metaRows,
  PEAK_HOLD_STYLE,
  recordDocument,
  recordingRows,
  recordSignOff,
  reportPage,
  row,
  settingsRows,
  startTimeOf,
  type ReportContext,
} from "./reportPage.js";
import { RIDE_CAUTIONS, rideJson, zoneFrom } from "./rideReport.js";
import { escapeXml as esc, svgPlot, type Series } from "./svgPlot.js";
import { basicMethodExceeded, findingTexts } from "./findingTexts.js";

/**
 * The ride report: one self-contained HTML page (inline CSS and SVG, no scripts, a Content-Security-Policy
 * that forbids any fetch), with the recording's identity (path, SHA-256, tool version, settings), the
 * per-axis figures, the exposure against the Directive's values, the stretch r.m.s. over time with the
 * departing stretches marked, a one-third-octave spectrogram per axis, the unweighted and weighted
 * spectra, the notes, the cautions and a sign-off block.
 */
export const RIDE_STYLE = `
.heat rect.cell { stroke: none; }
.stretch-mark { fill: #b0552f; fill-opacity: .18; stroke: none; } .key.stretch-mark { stroke: #b0552f; stroke-width: 8; stroke-opacity: .3; }
.axis-x { fill: none; stroke: #1b4f7a; stroke-width: 1.1; } .axis-y { fill: none; stroke: #3d8a5a; stroke-width: 1.1; } .axis-z { fill: none; stroke: #7a2f6b; stroke-width: 1.3; }
.weighted { fill: none; stroke: #b0552f; stroke-width: 1.2; }
.action { fill: none; stroke: #8a6400; stroke-width: 1.2; stroke-dasharray: 6 3; } .limitline { fill: none; stroke: #9c2f1c; stroke-width: 1.4; }
`;

/** Colour of a level in dB between lo and hi: a light-to-dark blue ramp. */
function heatColour(db: number, lo: number, hi: number): string {
  const t = Math.max(0, Math.min(1, (db - lo) / (hi - lo)));
  const c = (a: number, b: number) => Math.round(a + (b - a) * t);
  return `rgb(${c(240, 18)},${c(244, 50)},${c(248, 110)})`;
}

/** A one-third-octave spectrogram as SVG rectangles: time across, band down (low bands at the bottom). */
function svgSpectrogram(id: string, a: RideAxis, fromS: number): string {
  const s = a.spectrogram;
  if (!s || s.meanSquare.length === 0)
    return `<p class="muted">No spectrogram: the window is shorter than one stretch of ${s ? sig(s.stretchS, 3) : "?"} s.</p>`;
  const w = 720;
  const h = 300;
  const m = { top: 30, right: 70, bottom: 40, left: 70 };
  const nx = s.meanSquare.length;
  const ny = s.bandsHz.length;
  const cw = (w - m.left - m.right) / nx;
  const ch = (h - m.top - m.bottom) / ny;
  let hi = -Infinity;
  for (const r of s.meanSquare) for (const v of r) if (v > 0) hi = Math.max(hi, 10 * Math.log10(v));
  const lo = hi - 50;
  const out = [
    `<svg id="${id}" class="plot heat" viewBox="0 0 ${w} ${h}" width="${w}" height="${h}" role="img" aria-label="spectrogram of ${esc(a.axis)}" xmlns="http://www.w3.org/2000/svg">`,
  ];
  out.push(
    `<text class="plot-title" x="${m.left}" y="16">${esc(`${a.axis} (${a.channel}): one-third-octave mean square, ${sig(s.stretchS, 3)} s stretches of ${s.averagesPerStretch} averages, dB re 1 (m/s²)²`)}</text>`,
  );
  for (let i = 0; i < nx; i++) {
    for (let b = 0; b < ny; b++) {
      const v = s.meanSquare[i]![b]!;
      const db = v > 0 ? 10 * Math.log10(v) : lo;
      out.push(
        `<rect class="cell" data-stretch="${i}" data-band="${s.bandsHz[b]!.centre}" x="${(m.left + i * cw).toFixed(1)}" y="${(h - m.bottom - (b + 1) * ch).toFixed(1)}" width="${(cw + 0.3).toFixed(1)}" height="${(ch + 0.3).toFixed(1)}" fill="${heatColour(db, lo, hi)}"><title>${sig(fromS + s.startS[i]!, 4)} s, ${s.bandsHz[b]!.centre} Hz: ${fixed(db, 1)} dB</title></rect>`,
      );
    }
  }
  for (let b = 0; b < ny; b += 3)
    out.push(
      `<text class="tick" x="${m.left - 6}" y="${(h - m.bottom - (b + 0.5) * ch + 4).toFixed(1)}" text-anchor="end">${s.bandsHz[b]!.centre}</text>`,
    );
  // Time ticks at round values (1, 2 or 5 × a power of ten, about 8 across), placed where they fall in the stretches.
  const span = nx * s.stretchS;
  const raw = span / 8;
  const p10 = 10 ** Math.floor(Math.log10(raw));
  const tickStep = [1, 2, 5, 10].map((k) => k * p10).find((v) => v >= raw) ?? 10 * p10;
  for (let t = Math.ceil(fromS / tickStep) * tickStep; t <= fromS + span + 1e-9; t += tickStep) {
    const x = m.left + ((t - fromS) / span) * (w - m.left - m.right);
    out.push(
      `<line class="grid" x1="${x.toFixed(1)}" x2="${x.toFixed(1)}" y1="${h - m.bottom}" y2="${h - m.bottom + 4}"/><text class="tick" x="${x.toFixed(1)}" y="${h - m.bottom + 16}" text-anchor="middle">${sig(t, 6)}</text>`,
    );
  }
  out.push(
    `<rect class="frame" x="${m.left}" y="${m.top}" width="${w - m.left - m.right}" height="${h - m.top - m.bottom}"/>`,
  );
  out.push(
    `<text class="axis-label" x="${(m.left + w - m.right) / 2}" y="${h - 8}" text-anchor="middle">time, s</text>`,
  );
  out.push(
    `<text class="axis-label" transform="translate(16 ${(m.top + h - m.bottom) / 2}) rotate(-90)" text-anchor="middle">band centre, Hz</text>`,
  );
  // Colour key.
  for (let k = 0; k < 10; k++) {
    const db = lo + ((k + 0.5) * (hi - lo)) / 10;
    out.push(
      `<rect x="${w - m.right + 14}" y="${(h - m.bottom - (k + 1) * ((h - m.top - m.bottom) / 10)).toFixed(1)}" width="12" height="${((h - m.top - m.bottom) / 10).toFixed(1)}" fill="${heatColour(db, lo, hi)}"/>`,
    );
  }
  out.push(
    `<text class="tick" x="${w - m.right + 30}" y="${m.top + 8}">${fixed(Math.round(hi) + 0, 0)} dB</text><text class="tick" x="${w - m.right + 30}" y="${h - m.bottom}">${fixed(Math.round(lo) + 0, 0)} dB</text>`,
  );
  out.push("</svg>");
  return out.join("\n");
}

function stretchPlot(r: RideResult): string {
  const from = r.analysis.window.fromS;
  const series: Series[] = [];
  let top = 0;
  let end = from + 1;
  for (const a of r.axes) {
    const v = a.dose.stretchRms;
    const t = Float64Array.from(v, (_, i) => from + (i + 0.5) * a.dose.stretchS);
    for (const x of v) top = Math.max(top, x);
    end = Math.max(end, from + v.length * a.dose.stretchS);
    series.push({
      id: `stretch-rms-${a.axis}`,
      label: `${a.axis} (${a.weighting})`,
      x: t,
      y: v,
      className: `axis-${a.axis}`,
    });
  }
  // The stretches that depart most from each axis's median, as shaded bands.
  const marks = r.axes.flatMap((a) => a.stationarity.departing.map((d) => d));
  marks.forEach((d, i) =>
    series.unshift({
      id: `departing-${i}`,
      label: i === 0 ? "departing stretches" : "",
      x: [d.fromS, d.toS],
      y: [0, 0],
      y2: [top * 1.1, top * 1.1],
      className: "stretch-mark",
    }),
  );
  return svgPlot({
    id: "stretch-rms",
    title: `weighted r.m.s. per ${sig(r.axes[0]?.dose.stretchS ?? 1, 3)} s stretch (linear running r.m.s. at each stretch's end)`,
    xLabel: "time from the start of the record, s",
    yLabel: "a_w, m/s²",
    xDomain: [from, end],
    yDomain: [0, top * 1.1 || 1],
    yLog: false,
    xLog: false,
    series,
  });
}

function spectrumPlot(a: RideAxis, r: RideResult, n: number): string {
  const c = r.analysis.channels[r.axes.indexOf(a)]!;
  const f = c.psd.frequencyHz;
  const g = weightingPowerGains(a.weighting, f);
  const weighted = Float64Array.from(c.psd.psd, (p, k) => p * g[k]!);
  let top = 0;
  let bottom = Infinity;
  for (let k = 0; k < f.length; k++) {
    if (f[k]! < 0.3 || f[k]! > 100) continue;
    if (c.psd.psd[k]! > 0) top = Math.max(top, c.psd.psd[k]!);
    if (weighted[k]! > 0) bottom = Math.min(bottom, weighted[k]!);
  }
  const hold = a.peakHold && a.peakHold.stretches > 0 && c.psd.averages > 0 ? a.peakHold : undefined;
  if (hold)
    for (let k = 0; k < f.length; k++)
      if (f[k]! >= 0.3 && f[k]! <= 100 && Number.isFinite(hold.psd[k]!)) top = Math.max(top, hold.psd[k]!);
  const lo = Math.max(bottom, top * 1e-8);
  return svgPlot({
    id: `spectrum-${n}`,
    title: `${a.axis} (${a.channel}): unweighted${hold ? " (average and peak-hold)" : ""} and ${a.weighting}-weighted PSD`,
    xLabel: "frequency, Hz",
    yLabel: "PSD, (m/s²)²/Hz",
    xDomain: [0.3, 100],
    yDomain: [lo, top * 2 || 1],
    yLog: true,
    series: [
      { id: `psd-${a.axis}`, label: "unweighted", x: f, y: c.psd.psd, className: "measured" },
      { id: `weighted-${a.axis}`, label: `|${a.weighting}|² × PSD`, x: f, y: weighted, className: "weighted" },
      ...(hold
        ? [
            {
              id: `peak-hold-${a.axis}`,
              label: `unweighted peak-hold (${sig(hold.stretchS, 3)} s)`,
              x: f,
              y: hold.psd,
              className: "peakhold",
            },
          ]
        : []),
    ],
  });
}

function exposurePlot(r: RideResult): string {
  const e = r.exposure;
  if (e === undefined) return "";
  const D = DIRECTIVE_2002_44_EC;
  const worst = e.a8 / Math.sqrt(e.durationS / EIGHT_HOURS_S);
  const hours = Float64Array.from({ length: 121 }, (_, i) => i / 10);
  const a8 = Float64Array.from(hours, (h) => worst * Math.sqrt(h / 8));
  const top = Math.max(D.a8LimitMs2 * 1.2, a8[a8.length - 1]! * 1.05);
  return svgPlot({
    id: "exposure",
    title: `A(8) against daily exposure time (worst axis ${e.a8Axis}, k a_w = ${sig(worst, 3)} m/s²)`,
    xLabel: "exposure a day, h",
    yLabel: "A(8), m/s²",
    xDomain: [0, 12],
    yDomain: [0, top],
    yLog: false,
    xLog: false,
    series: [
      { id: "a8-curve", label: "A(8)", x: hours, y: a8, className: "measured" },
      {
        id: "action-value",
        label: `action ${D.a8ActionMs2}`,
        x: [0, 12],
        y: [D.a8ActionMs2, D.a8ActionMs2],
        className: "action",
      },
      {
        id: "limit-value",
        label: `limit ${D.a8LimitMs2}`,
        x: [0, 12],
        y: [D.a8LimitMs2, D.a8LimitMs2],
        className: "limitline",
      },
      { id: "stated-exposure", label: "", x: [e.durationS / 3600, e.durationS / 3600], y: [0, top], className: "grid" },
    ],
  });
}

/** The result embedded in a ride record (what `psdgate verify` re-runs and compares). */
export function rideResultDocument(r: RideResult, ctx: ReportContext): Record<string, unknown> {
  return recordDocument("ride", ctx, rideJson(r, ctx.version));
}

export const RIDE_WORD = "RIDE RECORD";

export function rideHtml(
  r: RideResult,
  version: string,
  when: Date,
  context: Omit<ReportContext, "version" | "when"> = {},
): string {
  const ctx: ReportContext = { ...context, version, when };
  const m = ctx.meta;
  const a = r.analysis;
  const e = r.exposure;
  const D = DIRECTIVE_2002_44_EC;
  const Z = r.healthZone;
  const name = a.input.file.split(/[\\/]/).pop() ?? a.input.file;
  const title = m?.testId ? `Whole-body vibration, test ${m.testId}: ${name}` : `Whole-body vibration: ${name}`;
  const axisRows = r.axes
    .map(
      (x) =>
        `<tr><td>${esc(x.axis)}</td><td>${esc(x.channel)}</td><td>${x.weighting}</td><td class="num">${sig(x.dose.rms, 4)}</td><td class="num">${sig(x.awFromPsd, 4)}</td><td class="num">${fixed(x.dose.crestFactor, 2)}</td><td class="num">${sig(x.dose.vdv, 4)}</td><td class="num">${sig(x.dose.mtvv, 4)}</td><td class="num">${x.rule.healthK}</td><td>${x.basicMethod.adequate ? "adequate" : esc(basicMethodExceeded(x.basicMethod))}</td><td>${x.stationarity.tested ? (x.stationarity.stationary ? "stationary" : "not stationary") : "not tested"}</td></tr>`,
    )
    .join("\n");
  const top = r.axes.reduce((w, x) => (x.rule.healthK * x.dose.rms > w.rule.healthK * w.dose.rms ? x : w), r.axes[0]!);
  const summary = e
    ? `A(8) ${sig(e.a8, 3)} m/s² (${e.a8Axis}) for ${sig(e.durationS / 3600, 3)} h a day: ${e.directive.a8} of Directive 2002/44/EC; VDV ${sig(e.vdv, 3)} m/s^1.75 (${e.vdvAxis}): ${e.directive.vdv}.`
    : `k a_w ${sig(top.rule.healthK * top.dose.rms, 3)} m/s² on ${top.axis}, VDV of the recording ${sig(top.dose.vdv, 3)} m/s^1.75; no daily exposure stated, so no A(8) or judgement against the Directive.`;
  const holds = r.axes.some((x) => x.peakHold && x.peakHold.stretches > 0);
  const body = `<style>${RIDE_STYLE}</style>${holds ? `<style>${PEAK_HOLD_STYLE}</style>` : ""}
<div class="verdict none" id="verdict" data-verdict="none"><span class="word">RIDE</span><span>${esc(summary)}</span></div>
<h2>Test identity</h2>
<table class="meta" id="identity">
${metaRows(m, startTimeOf(a))}
</table>
<h2>Record</h2>
<table class="meta">
${recordingRows(a)}
${row("Posture", esc(r.posture))}
</table>
<h2>Settings and assumptions</h2>
<table class="meta" id="settings">
${settingsRows(a, ctx)}
${row("Running r.m.s.", `${sig(r.axes[0]?.dose.runningRmsS ?? 1, 3)} s, linear integration (MTVV and the level over time)`)}
${row("Weightings", "ISO 2631-1:1997 Wk (z) and Wd (x, y), with the k factors of its health guidance (1.4 on x and y seated)")}
${row("Exposure values", `Directive 2002/44/EC Article 3: A(8) action ${D.a8ActionMs2}, limit ${D.a8LimitMs2} m/s²; VDV action ${D.vdvActionMs175}, limit ${D.vdvLimitMs175} m/s^1.75`)}
${row("Caution zone", `A(8) ${Z.a8LowerMs2}–${Z.a8UpperMs2} m/s², VDV ${Z.vdvLowerMs175}–${Z.vdvUpperMs175} m/s^1.75 at 8 h: ${esc(zoneFrom(r))}`)}
</table>
<h2>Per axis (m/s², VDV in m/s^1.75)</h2>
<table class="grid axes"><thead><tr><th>axis</th><th>channel</th><th>weighting</th><th class="num">a_w</th><th class="num">a_w from PSD</th><th class="num">crest</th><th class="num">VDV</th><th class="num">MTVV</th><th class="num">k health</th><th>basic method</th><th>level</th></tr></thead>
<tbody>${axisRows}</tbody>
</table>
<h2>Exposure</h2>
<table class="meta" id="exposure-table">
${
  e
    ? `${row("Stated exposure", `${sig(e.durationS / 3600, 3)} h a day`)}
${row("A(8)", `${sig(e.a8, 3)} m/s² (${e.a8Axis}): ${esc(e.directive.a8)} of Directive 2002/44/EC (action ${D.a8ActionMs2}, limit ${D.a8LimitMs2} m/s²)`)}
${row("VDV for the exposure", `${sig(e.vdv, 3)} m/s^1.75 (${e.vdvAxis}): ${esc(e.directive.vdv)} (action ${D.vdvActionMs175}, limit ${D.vdvLimitMs175} m/s^1.75)`)}
${row("ISO 2631-1 Annex B", `A(8) ${esc(e.healthZone.a8)} (${Z.a8LowerMs2}–${Z.a8UpperMs2} m/s²), VDV ${esc(e.healthZone.vdv)} (${Z.vdvLowerMs175}–${Z.vdvUpperMs175} m/s^1.75)`)}`
    : row("Stated exposure", "not stated: no A(8), daily VDV or judgement against the Directive and Annex B")
}
${row("Vibration total value", `${sig(r.totalValue.comfort, 3)} m/s² (comfort factors), ${sig(r.totalValue.health, 3)} m/s² (health factors)`)}
${row("Comfort (ISO 2631-1 Annex C)", esc(r.comfort.reactions.join(" or ")))}
${r.seat ? row("Seat (SEAT)", `${fixed(100 * r.seat.seat, 1)} %: seat z ${sig(r.seat.awSeat, 4)} over floor z (${esc(r.seat.floorChannel)}) ${sig(r.seat.awFloor, 4)} m/s²`) : ""}
</table>
${exposurePlot(r)}
<h2>Level over time</h2>
${stretchPlot(r)}
<h2>Spectrograms</h2>
${r.axes.map((x, i) => svgSpectrogram(`spectrogram-${i + 1}`, x, a.window.fromS)).join("\n")}
<h2>Spectra</h2>
${r.axes.map((x, i) => spectrumPlot(x, r, i + 1)).join("\n")}
<h2>Notes</h2>
${r.doubts.length + r.notes.length === 0 ? `<p class="muted">None.</p>` : `<ul>${[...findingTexts(r.doubts).map((d) => `<li><b>DOUBT</b> ${esc(d)}</li>`), ...findingTexts(r.notes).map((n) => `<li>${esc(n)}</li>`)].join("")}</ul>`}
<h2>Cautions</h2>
${RIDE_CAUTIONS.map((c) => `<div class="caution keep">${esc(c)}</div>`).join("\n")}
${recordSignOff("Ride record", summary, m, [{ label: "Recording", file: a.input.file, sha256: a.input.sha256 }])}`;
  const page = reportPage(
    {
      title,
      verdictClass: "none",
      verdictWord: RIDE_WORD,
      recordingSha256: a.input.sha256,
      recordingName: name,
      kindLine: "Ride vibration record (ISO 2631-1 weightings, Directive 2002/44/EC values)",
      body,
    },
    ctx,
  );
  return embedResult(page, rideResultDocument(r, ctx));
}
