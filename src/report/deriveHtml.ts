import type { DeriveResult } from "../analyses/deriveProfile.js";
import { profileLevel } from "../compare/testProfile.js";
import { accelLabel, densityLabel } from "../units.js";
import { DERIVE_CAUTION, SHAKER_CAUTION } from "./cautions.js";
import { DAMAGE_RULE, deriveJson, EXTREME_RULE, TOLERANCE_RULE } from "./deriveReport.js";
import { embedResult } from "./embeddedResult.js";
import { fixed, maxOf, minOf, sig } from "./format.js";
import {
  metaRows,
  qty,
  recordDocument,
  reportPage,
  row,
  shortHash,
  signOff,
  stamp,
  type ReportContext,
} from "./reportPage.js";
import { escapeXml as esc, svgPlot, type Series } from "./svgPlot.js";
import { findingText, findingTexts } from "./findingTexts.js";

/**
 * The record of a derivation (`derive --report`): the field's spectra with their envelope, mean and
 * statistical limit, the derived profile, the fatigue-damage and extreme-response spectra of field and
 * test, the breakpoints, every input by SHA-256 and every parameter, the cautions and a sign-off. The
 * same page frame as the check and psd records (report/reportPage.ts).
 */
export const DERIVE_WORD = "DERIVED PROFILE";

// Series styles of this page only (the frame's STYLE has the check report's).
export const DERIVE_STYLE = `
.rec0 { fill: none; stroke: #6a9fc4; stroke-width: .8; } .rec1 { fill: none; stroke: #8fb996; stroke-width: .8; } .rec2 { fill: none; stroke: #c9a26b; stroke-width: .8; }
.rec3 { fill: none; stroke: #b58db5; stroke-width: .8; } .rec4 { fill: none; stroke: #9aa7ad; stroke-width: .8; } .rec5 { fill: none; stroke: #d08c8c; stroke-width: .8; }
.envelope { fill: none; stroke: #1d2428; stroke-width: 1.1; } .mean { fill: none; stroke: #1b4f7a; stroke-width: 1.8; }
.tlimit { fill: none; stroke: #b0552f; stroke-width: 1.4; stroke-dasharray: 5 3; }
.field { fill: none; stroke: #1b4f7a; stroke-width: 1.8; } .test { fill: none; stroke: #111; stroke-width: 2; stroke-dasharray: 9 4; }
.ratio { fill: none; stroke: #1b4f7a; stroke-width: 1.6; } .over { fill: #c0392b; stroke: #111; stroke-width: .6; }
.key.rec0, .key.rec1, .key.rec2, .key.rec3, .key.rec4, .key.rec5 { stroke-width: 2; }
`;
const EXTRA_STYLE = `<style>${DERIVE_STYLE}</style>`;

/**
 * Where the written tolerances came from: options given, or psdgate's defaults that the lab confirms against its
 * governing standard.
 */
function toleranceFrom(ctx: ReportContext): string {
  const flags = ["--band-db", "--rms-percent", "--min-dof"];
  const given = flags.filter((f) => ctx.given?.some((g) => g === f || g.startsWith(`${f} `)));
  const defaults = flags.filter((f) => !given.includes(f));
  return [
    given.length ? `Given with ${given.join(", ")}.` : "",
    defaults.length
      ? `${defaults.join(", ")} at psdgate's defaults (±3 dB, ±10 %, 120 DOF): settings the lab confirms against the test standard it works to.`
      : "",
  ]
    .filter(Boolean)
    .join(" ");
}

/** A short legend name: the group when it has one recording, else the file's base name; at most 16 characters. */
function legendName(x: DeriveResult["recordings"][number], r: DeriveResult): string {
  const alone = r.recordings.filter((y) => y.group === x.group).length === 1 && r.recordings.length > 1;
  const n = alone ? x.group : (x.file.split(/[\\/]/).pop() ?? x.file).replace(/\.[^.]*$/, "");
  return n.length > 16 ? `${n.slice(0, 15)}…` : n;
}

/**
 * The field's shocks beside the random test (issue #26): the largest events psdgate shock finds in the recordings, and
 * the field's measured largest response (its SRS, shocks included) against the test's expected largest response (its
 * ERS) on a plot and in a row naming the natural frequencies where the test falls short, where a shock test is needed.
 */
function shockSection(r: DeriveResult, lo: number, hi: number, u: string): string {
  const s = r.shocks;
  const total = s.eventsPerRecording.reduce((a, x) => a + x, 0);
  const fn = r.fnHz;
  const short = new Set(s.shortfallHz);
  const shortX = Float64Array.from(fn.filter((x) => short.has(x)));
  const shortY = shortX.map((x) => s.fieldSrs[[...fn].indexOf(x)]!);
  const finite = [...s.fieldSrs, ...r.testExtreme].filter((v) => Number.isFinite(v) && v > 0);
  const plot =
    finite.length === 0
      ? `<p class="muted">No field SRS: every natural frequency lies above a quarter of the recordings' sample rates.</p>`
      : svgPlot({
          id: "field-srs",
          title: `Field SRS (measured largest response, shocks included) against the test's ERS, Q ${r.q}`,
          xLabel: "natural frequency (Hz)",
          yLabel: `largest response (${u})`,
          xDomain: [lo, hi],
          yDomain: [Math.min(...finite) / 1.5, Math.max(...finite) * 1.5],
          yLog: true,
          xMarks: [lo, hi],
          series: [
            { id: "field-srs", label: "field SRS", x: fn, y: s.fieldSrs, className: "field" },
            { id: "test-ers-shock", label: "test ERS", x: fn, y: r.testExtreme, className: "test" },
            {
              id: "shock-shortfall",
              label: shortX.length ? "test falls short" : "",
              x: shortX,
              y: shortY,
              className: "over",
              markers: true,
            },
          ],
        });
  const rows = s.largestEvents
    .map(
      (e, k) =>
        `<tr><td class="num">${k + 1}</td><td>${esc(r.recordings[e.recording]?.file ?? "?")}</td><td class="num">${fixed(e.timeS, 3)}</td><td class="num">${e.peak >= 0 ? "+" : ""}${sig(e.peak, 4)}</td><td class="num">${sig(1000 * e.durationS, 3)}</td></tr>`,
    )
    .join("\n");
  const verdict = s.shortfallHz.length
    ? `<strong>The test falls short</strong> ${s.shortfallHz.length === fn.length ? `at every one of the ${fn.length} natural frequencies (${sig(fn[0]!, 4)}–${sig(fn[fn.length - 1]!, 4)} Hz)` : `at ${s.shortfallHz.length} of ${fn.length} natural frequencies (${esc(s.shortfallHz.map((x) => sig(x, 4)).join(", "))} Hz)`}: the random test does not reach the field's shocks there, so a shock test is needed for them.`
    : "The test's expected largest response reaches the field's SRS at every natural frequency.";
  return `<h2>Field shocks</h2>
<table class="meta" id="shocks">
${row("Events", `${total} in the field recordings (${esc(s.eventsPerRecording.join(", "))} by recording; threshold 6 × each record's background r.m.s., hold 0.05 s, as psdgate shock)`)}
${row("Field SRS against the test's ERS", verdict)}
</table>
${
  rows
    ? `<table class="grid"><tr><th class="num">#</th><th>recording</th><th class="num">time s</th><th class="num">peak ${esc(u)}</th><th class="num">duration ms</th></tr>
${rows}
</table>`
    : ""
}
${plot}`;
}

/** The field PSDs with their envelope, mean and limit, and the derived profile, on one log plot. */
function fieldPsdPlot(r: DeriveResult, lo: number, hi: number): string {
  const p = r.profile;
  const f = r.frequencyHz;
  const inBand = (k: number) => f[k]! >= lo && f[k]! <= hi;
  let top = 0;
  let bottom = Infinity;
  const tl = "missing" in r.tolerance ? undefined : r.tolerance;
  for (let k = 0; k < f.length; k++) {
    if (!inBand(k)) continue;
    top = Math.max(top, r.envelope[k]!, tl ? tl.limit[k]! || 0 : 0);
    for (const x of r.recordings) if (x.psd[k]! > 0) bottom = Math.min(bottom, x.psd[k]!);
  }
  for (const b of p.breakpoints) top = Math.max(top, b.level);
  if (!(top > 0) || !Number.isFinite(bottom)) {
    top = 1;
    bottom = 1e-6;
  }
  bottom = Math.max(bottom, top * 1e-6);
  const px = Float64Array.from(p.breakpoints.map((b) => b.hz));
  const py = px.map((x) => profileLevel(p, x));
  const psdSeries: Series[] = [
    ...r.recordings
      .slice(0, 6)
      .map((x, i) => ({ id: `field-${i}`, label: legendName(x, r), x: f, y: x.psd, className: `rec${i}` })),
    { id: "envelope", label: "envelope", x: f, y: r.envelope, className: "envelope" },
    { id: "mean", label: "mean", x: f, y: r.mean, className: "mean" },
    ...(tl
      ? [
          {
            id: "tolerance-limit",
            label: `P${fixed(100 * tl.coverage, 0)}/${fixed(100 * tl.confidence, 0)} limit`,
            x: f,
            y: tl.limit,
            className: "tlimit",
          },
        ]
      : []),
    { id: "profile", label: "derived profile", x: px, y: py, className: "required" },
  ];
  return svgPlot({
    id: "field-psd",
    title: `Field PSDs (${sig(r.lineSpacingHz, 3)} Hz lines) with their envelope, mean and limit, and the derived profile`,
    xLabel: "frequency (Hz)",
    yLabel: `PSD (${densityLabel(r.units)})`,
    xDomain: [lo, hi],
    yDomain: [bottom / 2, top * 2],
    yLog: true,
    xMarks: [lo, hi],
    series: psdSeries,
    height: 380,
  });
}

/** The fatigue-damage and extreme-response spectra, field and test, and their ratios, one plot each. */
function damagePlots(r: DeriveResult, lo: number, hi: number, u: string): string {
  const fdsTop = maxOf(r.fieldFatigue, r.testFatigue);
  const fdsBottom = minOf(r.fieldFatigue, r.testFatigue);
  const fdsPlot = svgPlot({
    id: "fds",
    title: `Fatigue-damage spectra: field over ${sig(r.lifeS / 3600, 4)} h, test over ${sig(r.testDurationS, 4)} s (Q ${r.q}, b ${r.sn.basquinB})`,
    xLabel: "natural frequency (Hz)",
    yLabel: "damage (relative)",
    xDomain: [lo, hi],
    yDomain: [fdsBottom / 3, fdsTop * 3],
    yLog: true,
    xMarks: [lo, hi],
    series: [
      { id: "field-fds", label: "field", x: r.fnHz, y: r.fieldFatigue, className: "field" },
      { id: "test-fds", label: "test", x: r.fnHz, y: r.testFatigue, className: "test" },
    ],
  });
  const ersTop = maxOf(r.fieldExtreme, r.testExtreme);
  const ersBottom = minOf(r.fieldExtreme, r.testExtreme);
  const ersPlot = svgPlot({
    id: "ers",
    title: "Extreme-response spectra: expected largest peak, field over its life, test over its duration",
    xLabel: "natural frequency (Hz)",
    yLabel: `largest peak (${u})`,
    xDomain: [lo, hi],
    yDomain: [ersBottom / 1.5, ersTop * 1.5],
    yLog: true,
    xMarks: [lo, hi],
    series: [
      { id: "field-ers", label: "field", x: r.fnHz, y: r.fieldExtreme, className: "field" },
      { id: "test-ers", label: "test", x: r.fnHz, y: r.testExtreme, className: "test" },
    ],
  });
  const over = Float64Array.from(r.fnHz.filter((_, i) => r.extremeRatio[i]! > r.extremeLimit));
  const fdsRatio = r.testFatigue.map((v, i) => v / r.fieldFatigue[i]!);
  const ratioPlot = svgPlot({
    id: "ratios",
    title: "Test over field: extreme response, and damage^(1/b) (1 = just covered)",
    xLabel: "natural frequency (Hz)",
    yLabel: "ratio",
    xDomain: [lo, hi],
    yDomain: [Math.min(0.9, minOf(r.extremeRatio) * 0.95), Math.max(r.extremeLimit, maxOf(r.extremeRatio)) * 1.1],
    yLog: false,
    xMarks: [lo, hi],
    height: 280,
    series: [
      {
        id: "extreme-limit",
        label: `limit ×${r.extremeLimit}`,
        x: Float64Array.of(lo, hi),
        y: Float64Array.of(r.extremeLimit, r.extremeLimit),
        className: "limit",
      },
      { id: "extreme-ratio", label: "test ERS / field ERS", x: r.fnHz, y: r.extremeRatio, className: "ratio" },
      {
        id: "damage-ratio",
        label: "(test FDS / field FDS)^(1/b)",
        x: r.fnHz,
        y: fdsRatio.map((v) => v ** (1 / r.sn.basquinB)),
        className: "test",
      },
      {
        id: "extreme-over",
        label: over.length ? "above the limit" : "",
        x: over,
        y: over.map((x) => r.extremeRatio[[...r.fnHz].indexOf(x)]!),
        className: "over",
        markers: true,
      },
    ],
  });
  return `${fdsPlot}
${ersPlot}
${ratioPlot}`;
}

/**
 * "The derived profile": its file, hash, level, motion, stroke, tolerance, coverage and extremes, its breakpoints and
 * the PSD plot.
 */
function derivedSection(
  r: DeriveResult,
  ctx: ReportContext,
  outFile: string,
  lo: number,
  hi: number,
  u: string,
): string {
  const d = r.document;
  const p = r.profile;
  const pts = p.breakpoints
    .map(
      (b, i) =>
        `<tr><td class="num">${sig(b.hz, 5)}</td><td class="num">${sig(b.level, 4)}</td><td class="num">${p.segments[i] ? fixed(p.segments[i]!.slopeDbPerOctave, 2) : ""}</td></tr>`,
    )
    .join("\n");
  return `<h2>The derived profile</h2>
<table class="meta" id="derived">
${row("Profile file", esc(outFile))}
${row("Profile SHA-256", `<span class="hash">${p.sha256}</span>`)}
${row("Title", esc(d.title))}
${row("Range and level", `${qty(`${sig(lo)}–${sig(hi)}`, "Hz")}, ${qty(sig(p.rms, 4), u)} RMS, ${qty(sig(r.testDurationS, 6), "s")}`)}
${row("Velocity and displacement", `${qty(sig(r.motion.velocityRms * 1000, 4), "mm/s")} RMS velocity, ${qty(sig(r.motion.displacementRms * 1000, 4), "mm")} RMS displacement, ${qty(sig(r.motion.displacementPeakToPeak * 1000, 4), "mm")} peak-to-peak estimate (6 × RMS)`)}
${row("Against the rated stroke", r.stroke ? `${qty(fixed(r.stroke.estimateMm, 2), "mm")} against ${qty(sig(r.stroke.ratedMm, 4), "mm")} rated (--stroke-mm): ${r.stroke.withinRating ? `within the rating (margin ×${fixed(r.stroke.margin, 2)})` : `<strong>EXCEEDS</strong> the rating by ${fixed(100 * (1 / r.stroke.margin - 1), 0)} %`}` : `<strong>not checked</strong>: no rated stroke given (--stroke-mm)`)}
${row("Tolerance written", `±${d.tolerance.bands[0]!.upperDb} dB band, RMS ±${d.tolerance.rmsPercent} %, at least ${d.minDof} DOF, ${sig(d.resolutionHz!, 4)} Hz lines (the field's line spacing). ${esc(toleranceFrom(ctx))}`)}
${row("Coverage", `test FDS / field FDS from ${fixed(r.fit.minRatio, 4)} (at ${sig(r.fit.minRatioHz, 4)} Hz) to ${fixed(r.fit.maxRatio, 3)}, median ${fixed(r.fit.medianRatio, 3)}; damage margin ×${r.margin}`)}
${row("Time compression", `flat case G_test = G_field (T_field / T_test)^(2/b) = ×${sig(r.compression.flatFactor, 4)} in level; this profile ${sig(p.rms, 4)} ${esc(u)} RMS against the mean field's ${sig(r.compression.meanFieldRms, 4)} ${esc(u)} (×${sig(r.compression.rmsRatio ** 2, 4)} in power)`)}
${row("Extreme response", `test / field from ${fixed(minOf(r.extremeRatio), 3)} to ${fixed(maxOf(r.extremeRatio), 3)}, limit ×${r.extremeLimit}: ${r.extremeWarnings.length === r.fnHz.length ? "<strong>exceeded</strong> at every natural frequency" : r.extremeWarnings.length ? `<strong>exceeded</strong> at ${esc(r.extremeWarnings.map((x) => sig(x, 4)).join(", "))} Hz` : "not exceeded"}`)}
</table>
<table class="grid"><tr><th class="num">Hz</th><th class="num">level ${esc(densityLabel(r.units))}</th><th class="num">slope to next, dB/oct</th></tr>
${pts}
</table>
${fieldPsdPlot(r, lo, hi)}`;
}

/**
 * "Field recordings and the service life": how the life was shared, the mean and the limit, the groups and each
 * recording.
 */
function fieldSection(r: DeriveResult, u: string): string {
  const t = r.tolerance;
  const rec = r.recordings
    .map(
      (x) =>
        `<tr><td>${esc(x.file)}<br><span class="hash">${x.sha256}</span></td><td>${esc(x.group)}</td><td class="num">${fixed(x.durationS, 1)}</td><td class="num">${sig(x.serviceS / 3600, 5)}</td><td class="num">${sig(x.bandRms, 4)}</td><td class="num">${fixed(x.dof, 0)}</td><td>${x.stationary === undefined ? "not tested" : x.stationary ? "yes" : `<strong>no</strong>: ${esc(x.stationarityNote ? findingText(x.stationarityNote) : "")}`}</td></tr>`,
    )
    .join("\n");
  const groups = r.groups
    .map((g) => {
      const share = [...g.damageShare];
      return `<tr><td>${esc(g.name)}</td><td class="num">${sig(g.serviceS / 3600, 5)}</td><td class="num">${fixed(100 * Math.min(...share), 1)}–${fixed(100 * Math.max(...share), 1)} %</td></tr>`;
    })
    .join("\n");
  return `<h2>Field recordings and the service life</h2>
<table class="meta">
${row("Service life", `${qty(sig(r.lifeS / 3600, 6), "h")} (${esc(r.lifeRule === "mix file hours" ? "the mix file's hours" : "given with --life, shared by the recordings' analysed durations")}); each group's time is shared among its recordings by their analysed durations`)}
${row("Mean PSD", "each recording weighted by the service time it stands for")}
${row("Statistical limit", "missing" in t ? esc(findingText(t.missing)) : `P${fixed(100 * t.coverage, 0)}/${fixed(100 * t.confidence, 0)}: ${esc(TOLERANCE_RULE)}; n = ${t.n}, k = ${fixed(t.k, 4)}`)}
</table>
<table class="grid"><tr><th>group</th><th class="num">service h</th><th class="num">share of the damage</th></tr>
${groups}
</table>
<table class="grid"><tr><th>recording and SHA-256</th><th>group</th><th class="num">analysed s</th><th class="num">service h</th><th class="num">RMS ${esc(u)}</th><th class="num">DOF</th><th>stationary</th></tr>
${rec}
</table>`;
}

/** The settings table: damage and extreme rules, the SDOF systems, the fit, the options given, the version. */
function settingsTable(
  r: DeriveResult,
  ctx: ReportContext,
  version: string,
  when: Date,
  lo: number,
  hi: number,
): string {
  const given = ctx.given?.length
    ? ctx.given.map((g) => `<code>${esc(g)}</code>`).join(" ")
    : `<span class="muted">none (every setting at its default)</span>`;
  return `<table class="meta" id="settings">
${row("Damage", esc(DAMAGE_RULE))}
${row("Extreme response", esc(EXTREME_RULE))}
${row("SDOF systems", `Q ${r.q}${ctx.given?.some((g) => g.startsWith("--q ")) ? " (given with --q)" : " (psdgate's default 10, common practice; --q sets it)"}, Basquin b ${r.sn.basquinB}${ctx.given?.some((g) => g.startsWith("--basquin ")) ? " (given with --basquin)" : " (psdgate's default 8, common practice: the lab sets the material's with --basquin)"}, ${r.fnHz.length} natural frequencies from ${sig(lo)} to ${sig(hi)} Hz; field and test spectra both cut to that band`)}
${row("Fit", `at most ${r.fit.maxBreakpoints} breakpoints on the grid, log-log; upper envelope of the inverted FDS by dynamic programming, then one uniform scale (×${fixed(r.fit.scale, 4)}) so that coverage holds everywhere, checked with the full computation`)}
${row("Options given", given)}
${row("Computed", `psdgate ${esc(version)}, ${esc(stamp(when))}`)}
</table>`;
}

export function deriveHtml(
  r: DeriveResult,
  version: string,
  when: Date,
  context: Omit<ReportContext, "version" | "when"> & { outFile: string },
): string {
  const ctx: ReportContext = { ...context, version, when };
  const u = accelLabel(r.units);
  const d = r.document;
  const p = r.profile;
  const name = context.outFile.split(/[\\/]/).pop() ?? context.outFile;
  const [lo, hi] = [r.band.fromHz, r.band.toHz];
  const summary = `${d.points.length} breakpoints, ${sig(p.rms, 4)} ${u} RMS for ${sig(r.testDurationS, 5)} s: test damage ≥ ${fixed(r.fit.minRatio, 3)} × the field's over ${sig(r.lifeS / 3600, 5)} h at every natural frequency from ${sig(lo)} to ${sig(hi)} Hz${r.extremeWarnings.length ? `; the extreme-response ratio exceeds ×${r.extremeLimit} at ${r.extremeWarnings.length} of ${r.fnHz.length} natural frequencies` : ""}.`;
  const body = `${EXTRA_STYLE}
<div class="verdict none" id="verdict" data-verdict="none"><span class="word">PROFILE</span><span>${esc(summary)}</span></div>
<h2>Test identity</h2>
<table class="meta" id="identity">
${metaRows(ctx.meta)}
</table>
${derivedSection(r, ctx, context.outFile, lo, hi, u)}
${fieldSection(r, u)}
<h2>Damage and extremes</h2>
${damagePlots(r, lo, hi, u)}
${settingsTable(r, ctx, version, when, lo, hi)}
${shockSection(r, lo, hi, u)}
${
  r.notes.length
    ? `<h2>Notes</h2><ul>${findingTexts(r.notes)
        .map((n) => `<li>${esc(n)}</li>`)
        .join("")}</ul>`
    : ""
}
<h2>Caution</h2>
<div class="caution keep">${esc(DERIVE_CAUTION)}</div>
<div class="caution keep">${esc(SHAKER_CAUTION)}</div>
${signOff(`<strong>Derived profile</strong>: ${esc(summary)}`, [
  [
    "Test",
    esc(
      [ctx.meta?.testId, ctx.meta?.workOrder && `work order ${ctx.meta.workOrder}`].filter(Boolean).join(", ") ||
        "not identified (no --meta)",
    ),
  ],
  [
    "Item",
    esc(
      [ctx.meta?.item, ctx.meta?.serialNumber && `serial ${ctx.meta.serialNumber}`].filter(Boolean).join(", ") ||
        "not stated",
    ),
  ],
  ["Profile", `${esc(d.title)} <span class="hash">${shortHash(p.sha256)}</span>`],
  ["Field recordings", esc(`${r.recordings.length} (${r.groups.map((g) => g.name).join(", ")})`)],
  ["Operator", esc(ctx.meta?.operator ?? "not stated")],
])}`;
  const page = reportPage(
    {
      title: ctx.meta?.testId
        ? `Derived test profile, test ${ctx.meta.testId}: ${d.title}`
        : `Derived test profile: ${d.title}`,
      verdictClass: "none",
      verdictWord: DERIVE_WORD,
      recordingSha256: p.sha256,
      recordingName: name,
      kindLine: "Field-to-lab derivation record",
      body,
      hashLabel: "profile",
    },
    ctx,
  );
  return embedResult(
    page,
    recordDocument("derive", ctx, deriveJson(r, version), { written: { file: context.outFile, sha256: p.sha256 } }),
  );
}
