import type { ChannelAnalysis, RecordingAnalysis } from "../pass/analyzeRecording.js";
import { META_LABELS, type TestMeta } from "../read/testMeta.js";
import { accelLabel } from "../units.js";
import { RESULT_PLACEHOLDER } from "./embeddedResult.js";
import { fixed, rateText, sig } from "./format.js";
import { printable } from "./printable.js";
import { windowText } from "./psdText.js";
import { escapeXml as esc } from "./svgPlot.js";

/**
 * The frame every psdgate HTML report shares: one self-contained file (inline CSS and SVG, no scripts,
 * no fonts, no network; a Content-Security-Policy forbids any fetch), laid out for A4 and Letter.
 * Printed, every page carries the document's identity in its margins (CSS paged media margin boxes:
 * title, short hash of the recording, verdict, "page N of M"), and the sign-off keeps the verdict
 * and the test's identity beside the signatures.
 */

/** What a report knows besides the result: who made it, when, the test's identity, the options given. */
export interface ReportContext {
  version: string;
  when: Date;
  meta?: TestMeta | undefined;
  /** The options as given on the command line, in words (`--units m/s2`). */
  given?: string[] | undefined;
  /** The analysis options that reproduce the result (kept in the embedded result for `verify`). */
  rerun?: Record<string, unknown> | undefined;
}

export const STYLE = `
* { box-sizing: border-box; }
body { font: 10pt/1.38 "DejaVu Sans", "Helvetica Neue", Arial, sans-serif; color: #1d2428; margin: 0 auto; max-width: 190mm; padding: 10mm 4mm; }
h1 { font-size: 16pt; margin: 0 0 1.5mm; letter-spacing: .01em; }
h2 { font-size: 12pt; margin: 6mm 0 2mm; border-bottom: 1.5px solid #35505c; padding-bottom: 1mm; color: #223a44; }
h3 { font-size: 10.5pt; margin: 3mm 0 1mm; }
p { margin: 1.5mm 0; }
ul { margin: 1mm 0 2mm; padding-left: 6mm; }
table { border-collapse: collapse; width: 100%; margin: 1mm 0 2.5mm; font-size: 9pt; }
th, td { text-align: left; padding: 1mm 2mm; border-bottom: 1px solid #d5dde0; vertical-align: top; }
tr { break-inside: avoid; }
th { color: #4b5c63; font-weight: 600; width: 32%; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
table.grid th { width: auto; }
table.levels th { width: 52%; } table.levels td.num { white-space: normal; }
table.excursions td:last-child { width: 30%; } table.excursions { font-size: 8.5pt; } table.excursions td { padding: .6mm 2mm; }
.hash { font-family: "DejaVu Sans Mono", Menlo, monospace; font-size: 8pt; word-break: break-all; }
.nowrap { white-space: nowrap; }
.verdict { display: flex; align-items: center; gap: 5mm; margin: 4mm 0; padding: 3mm 5mm; border: 2.5px solid; border-radius: 1mm; }
.verdict .word { font-size: 22pt; font-weight: 800; letter-spacing: .12em; }
.verdict.pass { border-color: #1f6f5c; color: #1f6f5c; background: #eef6f3; }
.verdict.fail { border-color: #9c2f1c; color: #9c2f1c; background: #faefec; }
.verdict.inconclusive, .verdict.none { border-color: #8a6400; color: #6f5000; background: #fbf5e6; border-style: dashed; }
.verdict.none { border-color: #35505c; color: #223a44; background: #f1f5f6; }
.chip { display: inline-block; padding: 0 2mm; border-radius: 1mm; font-weight: 700; font-size: 9pt; border: 1px solid; }
.chip.pass { color: #1f6f5c; } .chip.fail { color: #9c2f1c; } .chip.inconclusive { color: #6f5000; }
.plot { width: 100%; height: auto; display: block; margin: 1mm 0; break-inside: avoid; }
.plot-title { font-size: 12px; font-weight: 600; fill: #223a44; }
.tick { font-size: 10px; fill: #4b5c63; }
.axis-label { font-size: 11px; fill: #223a44; }
.legend-text { font-size: 10px; fill: #223a44; }
.grid { stroke: #c9d3d7; stroke-width: .7; } .grid.minor { stroke: #e7ecee; stroke-width: .5; } .grid.zero { stroke: #6d8188; }
.frame { fill: none; stroke: #6d8188; stroke-width: .8; }
.band { fill: #7fa7c9; fill-opacity: .35; stroke: none; } .key.band { stroke: #7fa7c9; stroke-width: 8; stroke-opacity: .5; }
.measured { fill: none; stroke: #1b4f7a; stroke-width: 1.1; }
.required { fill: none; stroke: #111; stroke-width: 2.2; stroke-dasharray: 10 4; }
.limit { fill: none; stroke: #b0552f; stroke-width: 1.2; stroke-dasharray: 2.5 2.5; }
.outer { fill: none; stroke: #7a2a6f; stroke-width: 1.2; stroke-dasharray: 8 3 2 3; }
.deviation { fill: none; stroke: #1b4f7a; stroke-width: 1.1; }
.shown { fill: #c0392b; stroke: #111; stroke-width: .6; }
.tone { fill: #f2c14e; stroke: #111; stroke-width: .6; } .note-tick { stroke: #111; stroke-width: .6; } .note-text { font-size: 9.5px; fill: #111; }
.bars { fill: #9fb8c8; stroke: #5d7f93; stroke-width: .4; } .gauss { fill: none; stroke: #b0552f; stroke-width: 1.6; stroke-dasharray: 6 3; }
.caution { border-left: 4px solid #b0552f; padding: 2mm 4mm; background: #fbf3ee; margin: 3mm 0; break-inside: avoid; }
thead { display: table-header-group; break-inside: avoid; break-after: avoid; } table.grid tbody tr:first-child { break-before: avoid; }
.signoff-block { break-inside: avoid; margin-top: 6mm; }
.signoff { margin-top: 5mm; display: grid; grid-template-columns: 1fr 1fr 0.6fr; gap: 8mm; }
.signoff div { border-top: 1px solid #1d2428; padding-top: 1.5mm; font-size: 9pt; color: #4b5c63; height: 17mm; }
.muted { color: #6d8188; }
.keep { break-inside: avoid; }
details > summary { font-weight: 600; cursor: pointer; }
@media print { body { padding: 0; max-width: none; } h2, h3 { break-after: avoid; } details > summary { list-style: none; } }
`;

/**
 * The style element a page with a peak-hold spectrum adds (psd, ride): the peak-hold curve dashed in violet
 * beside the blue Welch average (and ride's orange weighted PSD), told apart in greyscale by its dash. A separate
 * element, not part of the frame's STYLE, so records written before it still pass verify's frame check.
 */
export const PEAK_HOLD_STYLE = ".peakhold { fill: none; stroke: #8e44ad; stroke-width: 1; stroke-dasharray: 5 2; }";

/**
 * A CSS string literal that is safe inside an HTML <style> element. The style element is raw text to the
 * HTML parser: it ends at the first `</style`, whatever CSS thinks is a string. So every character but
 * letters, digits, space and a few harmless marks is written as a CSS hex escape (`\3c ` for `<`; CSS
 * Syntax Level 3, 4.3.7), and control and bidirectional characters are first made visible (printable):
 * no `<`, `>`, `&`, quote, backslash, brace or semicolon from user text ever reaches the style element
 * as itself, and the margin shows the text as written. Characters above U+009F other than those printable
 * names are kept: none of them can end the element or the string.
 */
export function cssString(s: string): string {
  return `"${printable(s).replace(/[^A-Za-z0-9 .,:_()+#%!?=·…\u00a0-\uffff-]|[\ud800-\udfff]/gu, (c) => `\\${c.codePointAt(0)!.toString(16)} `)}"`;
}

/**
 * At most `n` characters (code points), an ellipsis marking a cut: a long title or test id cannot push "page N of M"
 * off the margin.
 */
function clip(s: string, n: number): string {
  const cps = [...s];
  return cps.length > n ? `${cps.slice(0, n - 1).join("")}…` : s;
}

/** Printed page margins: identity on top, "page N of M" below (CSS Paged Media Level 3 margin boxes). */
function pageRules(title: string, identity: string, footer: string): string {
  return `@page { size: auto; margin: 17mm 12mm 15mm;
  @top-left { content: ${cssString(clip(title, 70))}; font: 600 8pt "DejaVu Sans", Arial, sans-serif; color: #223a44; vertical-align: bottom; padding-bottom: 2mm; }
  @top-right { content: ${cssString(clip(identity, 60))}; font: 8pt "DejaVu Sans", Arial, sans-serif; color: #223a44; vertical-align: bottom; padding-bottom: 2mm; }
  @bottom-left { content: ${cssString(clip(footer, 90))}; font: 7.5pt "DejaVu Sans", Arial, sans-serif; color: #4b5c63; vertical-align: top; padding-top: 2mm; }
  @bottom-right { content: "page " counter(page) " of " counter(pages); font: 8pt "DejaVu Sans", Arial, sans-serif; color: #223a44; vertical-align: top; padding-top: 2mm; }
}`;
}

/**
 * Whether `text` is the style element the frame writes: the @page rules with any three margin strings as
 * cssString writes them (hex escapes only, no raw quote, backslash or angle bracket), then STYLE exactly.
 * `verify` accepts no other style in the frame's place, so an edited page cannot restyle its banner.
 */
export function isFrameStyle(text: string): boolean {
  const slots = ["\u0001", "\u0002", "\u0003"];
  const template = pageRules(slots[0]!, slots[1]!, slots[2]!) + STYLE;
  const literal = '"(?:[A-Za-z0-9 .,:_()+#%!?=\\u00a0-\\uffff-]|\\\\[0-9a-f]{1,6} )*"';
  let re = template.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
  for (const s of slots) re = re.replace(cssString(s).replace(/[.*+?^${}()|[\]\\]/g, "\\$&"), literal);
  return new RegExp(`^${re}$`, "u").test(text);
}

/** The first 12 hex digits of a SHA-256: enough to tell recordings apart on a printed page. */
export function shortHash(sha256: string): string {
  return sha256.slice(0, 12);
}

export function row(k: string, v: string, cls = ""): string {
  return `<tr><th>${esc(k)}</th><td${cls ? ` class="${cls}"` : ""}>${v}</td></tr>`;
}

/** A number and its unit that never wrap apart. */
export function qty(value: string, unit: string): string {
  return `<span class="nowrap">${esc(value)}&nbsp;${esc(unit)}</span>`;
}

export function stamp(when: Date): string {
  return when
    .toISOString()
    .replace("T", " ")
    .replace(/\.\d+Z$/, " UTC");
}

/** The recording's start time, where the reader found one (a date-time time column). */
export function startTimeOf(a: RecordingAnalysis): string | undefined {
  const s = (a.input as { startTime?: unknown }).startTime;
  return typeof s === "string" ? s : s instanceof Date ? s.toISOString() : undefined;
}

/**
 * The opening of a report, the same for check and psd: the verdict box (class, word, sentence), the test
 * identity, the "Record" table (the recording's rows, then `extraRecordRows`) and "Settings and assumptions"
 * (`extraSettingsRows` after the shared ones).
 */
export function reportOpening(o: {
  verdictClass: string;
  word: string;
  line: string;
  meta: TestMeta | undefined;
  a: RecordingAnalysis;
  ctx: ReportContext;
  extraRecordRows?: string;
  extraSettingsRows?: string;
  /** This run's reasons (HTML), right under the verdict on page 1. */
  reasons?: string;
}): string {
  return `<div class="verdict ${o.verdictClass}" id="verdict" data-verdict="${o.verdictClass}"><span class="word">${o.word}</span><span>${esc(o.line)}</span></div>
${o.reasons ?? ""}
<h2>Test identity</h2>
<table class="meta" id="identity">
${identityRows(o.meta, o.a)}
</table>
<h2>Record</h2>
<table class="meta">
${recordingRows(o.a)}
${o.extraRecordRows ?? ""}
</table>
<h2>Settings and assumptions</h2>
<table class="meta" id="settings">
${settingsRows(o.a, o.ctx)}
${o.extraSettingsRows ?? ""}
</table>`;
}

/** The recording's rows of the "Record" table, shared by the check and psd reports. */
export function recordingRows(a: RecordingAnalysis): string {
  return `${row("Recording", esc(a.input.file))}
${row("Recording SHA-256", `<span class="hash">${a.input.sha256}</span>`)}
${row("Format", esc(a.input.layout))}
${row("Samples", `${a.input.samples} at ${qty(rateText(a.input.sampleRateHz), "Hz")} = ${qty(fixed(a.input.durationS, 3), "s")}, ${a.channels.length} channel(s) analysed`)}
${row("Window analysed", esc(windowText(a)))}`;
}

/** The test's identity as table rows (every key given), or a line saying none was given. */
export function identityRows(meta: TestMeta | undefined, a: RecordingAnalysis): string {
  const rows = META_LABELS.filter(([k]) => meta?.[k] !== undefined).map(([k, label]) => row(label, esc(meta![k]!)));
  const start = startTimeOf(a);
  if (start !== undefined) rows.push(row("Recording started", esc(start)));
  if (rows.length === 0)
    rows.push(
      row(
        "Identity",
        `<span class="muted">none given (psdgate --meta FILE names the test, item, serial, axis, fixture, sensor and operator)</span>`,
      ),
    );
  return rows.join("\n");
}

const DETREND_WORDS = {
  none: "nothing removed",
  mean: "the mean removed",
  linear: "the linear trend removed",
} as const;

/** What the RMS from the time history includes: the whole record with the detrend setting's trend removed. */
export function timeRmsLabel(a: RecordingAnalysis): string {
  return `RMS of the whole time history (${DETREND_WORDS[a.settings.detrend]})`;
}

export function segmentRmsLabel(a: RecordingAnalysis): string {
  return `RMS of the Welch segments (${DETREND_WORDS[a.settings.detrend]} per segment)`;
}

const UNIT_FROM: Record<string, string> = {
  header: "stated in the file's header",
  "file calibration": "from the file's own calibration",
  "--units": "given with --units",
  default: "not stated by the file: g assumed (the default; --units sets it)",
  sensitivity: "from the sensitivity given",
};

/** How the file's numbers became accelerations, per channel (unit and its source, calibration, sensitivity). */
function readingText(c: ChannelAnalysis): string {
  const r = c.reading;
  const parts = [`${r.fileUnit} ${UNIT_FROM[r.unitFrom] ?? r.unitFrom}`];
  if (r.sensitivity) parts.push(`sensitivity ${r.sensitivity}`);
  if (r.fileScale !== 1) parts.push(`the file's calibration ×${r.fileScale}`);
  if (r.scale !== 1) parts.push(`--scale ×${r.scale}`);
  if (r.unitFactor !== 1) parts.push(`unit factor ×${r.unitFactor}`);
  return parts.join(", ");
}

/** Every setting and assumption the numbers rest on, as table rows. */
export function settingsRows(a: RecordingAnalysis, ctx: ReportContext): string {
  const s = a.settings;
  const rerun = (ctx.rerun ?? {}) as { csv?: { sampleRateHz?: number }; scale?: number; resultUnits?: string };
  const rateFrom =
    a.input.format === "wav"
      ? "the WAV header"
      : rerun.csv?.sampleRateHz !== undefined
        ? "given with --rate"
        : "the CSV time column (span ÷ (samples − 1))";
  const units = [...new Set(a.channels.map(readingText))];
  const result = [...new Set(a.channels.map((c) => accelLabel(c.units)))].join(", ");
  const given =
    ctx.given && ctx.given.length > 0
      ? ctx.given.map((g) => `<code>${esc(g)}</code>`).join(" ")
      : `<span class="muted">none (every setting at its default or from the profile)</span>`;
  return [
    row("Sample rate", `${qty(rateText(a.input.sampleRateHz), "Hz")}, from ${esc(rateFrom)}`),
    row("Units of the samples", esc(units.join("; "))),
    row("Units of the results", esc(result)),
    row(
      "Calibration",
      a.channels.some((c) => c.reading.factor !== 1)
        ? esc(
            [
              ...new Set(
                a.channels.map(
                  (c) =>
                    `×${sig(c.reading.factor, 8)} from file number to result${a.input.format === "wav" ? " (per full scale)" : ""}`,
                ),
              ),
            ].join("; ") +
              (a.channels.some((c) => c.reading.fullScaleAssumed)
                ? `; full scale read as 1 ${[...new Set(a.channels.filter((c) => c.reading.fullScaleAssumed).map((c) => c.reading.fileUnit))].join(" or ")} (--scale sets it)`
                : ""),
          )
        : a.input.format === "wav"
          ? "none: full scale read as 1 (--scale or a sensitivity sets it)"
          : "none: samples read as written (×1)",
    ),
    row("Channels analysed", esc(a.channels.map((c) => `${c.position} "${c.name}"`).join(", "))),
    row(
      "PSD estimate",
      `Welch, one-sided, ${esc(s.window)} window (periodic), ${s.segmentLength}-point segments = ${qty(sig(s.resolutionHz, 4), "Hz")} lines, ${fixed(100 * s.overlap, 1)} % overlap (hop ${s.hop}), ${esc(DETREND_WORDS[s.detrend])} per segment`,
    ),
    row(
      "Confidence bounds",
      `${fixed(100 * s.confidence, 0)} % chi-square interval with the equivalent DOF of the overlapped segments`,
    ),
    row("Options given", given),
  ].join("\n");
}

export interface PageParts {
  /** <title> and printed header. */
  title: string;
  /** Verdict class for the banner: pass, fail, inconclusive or none (no verdict). */
  verdictClass: string;
  verdictWord: string;
  /** Printed in every page's top right, with the short hash. */
  recordingSha256: string;
  recordingName: string;
  kindLine: string;
  body: string;
  /** What the hash in the header and margins is of (default "recording"). */
  hashLabel?: string | undefined;
}

export function reportPage(parts: PageParts, ctx: ReportContext): string {
  const hashLabel = parts.hashLabel ?? "recording";
  const identity = `${parts.verdictWord} · ${hashLabel} ${shortHash(parts.recordingSha256)}`;
  const footer = `psdgate ${ctx.version} · ${parts.recordingName}${ctx.meta?.testId ? ` · test ${ctx.meta.testId}` : ""}`;
  return `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<meta name="generator" content="psdgate ${esc(ctx.version)}">
<title>${esc(parts.title)}: ${esc(parts.verdictWord)}</title>
<style>${pageRules(parts.title, identity, footer)}${STYLE}</style></head>
<body>
<header>
<h1>${esc(parts.title)}</h1>
<div class="muted">${esc(parts.kindLine)}, computed by psdgate ${esc(ctx.version)} on ${esc(stamp(ctx.when))}. ${esc(hashLabel[0]!.toUpperCase() + hashLabel.slice(1))} SHA-256 <span class="hash">${esc(shortHash(parts.recordingSha256))}…</span> (in full below). Prepared and reviewed by the people who sign at the end.</div>
</header>
${parts.body}
${RESULT_PLACEHOLDER}
</body></html>
`;
}

/** The sign-off: verdict summary and identity beside the signature lines, kept together on one page. */
export function signOff(summary: string, identity: [string, string][]): string {
  return `<section class="signoff-block" id="signoff">
<h2>Sign-off</h2>
<p>${summary}</p>
<table>${identity.map(([k, v]) => row(k, v)).join("")}</table>
<div class="signoff"><div>Prepared by (name, signature)</div><div>Reviewed by (name, signature)</div><div>Date</div></div>
</section>`;
}

/**
 * The record frame's parts for every kind that is not a single-recording check or psd (ride, transfer,
 * respond, derive): the identity rows from --meta, a sign-off naming the test, the item and every input
 * by short hash, and the embedded result document, one shape for every kind (what `verify` dispatches on).
 */
export type RecordKind = "check" | "psd" | "ride" | "transfer" | "respond" | "derive" | "batch" | "shock";

/** The test identity from --meta as table rows (every key given), or a line saying none was given. */
export function metaRows(meta: TestMeta | undefined, startTime?: string): string {
  const rows = META_LABELS.filter(([k]) => meta?.[k] !== undefined).map(([k, label]) => row(label, esc(meta![k]!)));
  if (startTime !== undefined) rows.push(row("Recording started", esc(startTime)));
  if (rows.length === 0)
    rows.push(
      row(
        "Identity",
        `<span class="muted">none given (psdgate --meta FILE names the test, item, serial, axis, fixture, sensor and operator)</span>`,
      ),
    );
  return rows.join("\n");
}

/** The sign-off of any record: its word and summary, the test, the item, every input by short hash, the operator. */
export function recordSignOff(
  word: string,
  summary: string,
  meta: TestMeta | undefined,
  inputs: { label: string; file: string; sha256: string }[],
): string {
  const m = meta;
  return signOff(`<strong>${esc(word)}</strong>: ${esc(summary)}`, [
    [
      "Test",
      esc(
        [m?.testId, m?.workOrder && `work order ${m.workOrder}`].filter(Boolean).join(", ") ||
          "not identified (no --meta)",
      ),
    ],
    [
      "Item",
      esc(
        [m?.item, m?.serialNumber && `serial ${m.serialNumber}`, m?.axis && `axis ${m.axis}`]
          .filter(Boolean)
          .join(", ") || "not stated",
      ),
    ],
    ...inputs.map((i): [string, string] => [
      i.label,
      `${esc(i.file)} <span class="hash">${shortHash(i.sha256)}</span>`,
    ]),
    ["Operator", esc(m?.operator ?? "not stated")],
  ]);
}

/** The result embedded in a record: kind, when, identity, the options that re-run it, the options given, the result. */
export function recordDocument(
  kind: RecordKind,
  ctx: ReportContext,
  result: unknown,
  extra: Record<string, unknown> = {},
): Record<string, unknown> {
  return {
    kind,
    created: ctx.when.toISOString(),
    meta: ctx.meta ?? null,
    rerun: ctx.rerun ?? null,
    given: ctx.given ?? [],
    ...extra,
    result,
  };
}

/** "Options given" as a table row: each flag as code, or a line saying none was given. */
export function givenRow(ctx: ReportContext): string {
  const given =
    ctx.given && ctx.given.length > 0
      ? ctx.given.map((g) => `<code>${esc(g)}</code>`).join(" ")
      : `<span class="muted">none (every setting at its default)</span>`;
  return row("Options given", given);
}

/**
 * How one channel's file numbers became accelerations, in words (unit and its source, sensitivity, calibration,
 * conversion).
 */
export function readingWords(r: ChannelAnalysis["reading"], factor: number, resultUnit: string): string {
  const parts = [`${r.fileUnit} ${UNIT_FROM[r.unitFrom] ?? r.unitFrom}`];
  if (r.sensitivity) parts.push(`sensitivity ${r.sensitivity}`);
  if (r.fileScale !== 1) parts.push(`the file's calibration ×${r.fileScale}`);
  if (r.scale !== 1) parts.push(`--scale ×${r.scale}`);
  parts.push(
    factor === 1 ? `read as ${resultUnit} (×1)` : `overall ×${sig(factor, 8)} from file number to ${resultUnit}`,
  );
  return parts.join(", ");
}
