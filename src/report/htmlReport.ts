import type { ChannelAnalysis } from "../pass/analyzeRecording.js";
import {
  noSignal,
  worstFirst,
  type ChannelCompliance,
  type Excursion,
  type Verdict,
} from "../compare/complianceCheck.js";
import { profileLevel } from "../compare/testProfile.js";
import { accelLabel, densityLabel } from "../units.js";
import { VERDICT_CAUTION } from "./cautions.js";
import type { CheckResult } from "../analyses/checkRecording.js";
import { checkJson } from "./checkReport.js";
import { embedResult } from "./embeddedResult.js";
import { decideLine, excursionJudgement, RULE_SUMMARY, ruleLine, TONE_RULE, VERDICT_MEANING } from "./ruleText.js";
import { fixed, maxOf, minOf, parsevalWord, sig, signedDb } from "./format.js";
import { provenanceSummary, toleranceSummary } from "./profileText.js";
import {
  qty,
  reportOpening,
  reportPage,
  STYLE as PAGE_STYLE,
  row,
  segmentRmsLabel,
  shortHash,
  signOff,
  timeRmsLabel,
  type ReportContext,
} from "./reportPage.js";
import { escapeXml as esc, type Series, svgHistogram, svgPlot } from "./svgPlot.js";
import { findingTexts } from "./findingTexts.js";

/**
 * The review report of a check: the verdict, the test's identity, every setting and assumption, per
 * channel the PSD against the profile and its bands, the deviation, statistics and every excursion,
 * the decision rule, cautions and the sign-off; the complete result embedded for `psdgate verify`.
 */
export const VERDICT_TEXT: Record<Verdict, { word: string; line: string }> = {
  pass: { word: "PASS", line: `Pass: ${VERDICT_MEANING.pass}.` },
  fail: { word: "FAIL", line: `Fail: ${VERDICT_MEANING.fail}.` },
  inconclusive: { word: "INCONCLUSIVE", line: `Inconclusive: ${VERDICT_MEANING.inconclusive}.` },
};

/**
 * The report pages' shared style sheet with a plain page margin, for pages not built on reportPage's frame (rideHtml).
 */
export const STYLE = `@page { size: auto; margin: 14mm 12mm; }${PAGE_STYLE}`;

/** The plotted frequency range: the profile's, widened by a ninth of an octave each side, inside the record's lines. */
export function plotRange(p: CheckResult["profile"], f: Float64Array): [number, number] {
  const f0 = p.breakpoints[0]!.hz;
  const fN = p.breakpoints[p.breakpoints.length - 1]!.hz;
  const margin = 2 ** (1 / 9);
  return [Math.max(f[1] ?? f0, f0 / margin), Math.min(f[f.length - 1] ?? fN, fN * margin)];
}

function range(e: Excursion): string {
  return e.fromHz === e.toHz ? qty(sig(e.fromHz, 5), "Hz") : `${qty(`${sig(e.fromHz, 5)}–${sig(e.toHz, 5)}`, "Hz")}`;
}

/** The judgement in a table cell: the words are explained once above the table. */
function shortJudgement(e: Excursion): string {
  if (e.shown) return `shown (adjusted p ${e.adjustedP < 1e-6 ? "< 1e-6" : e.adjustedP.toPrecision(2)})`;
  return `not shown${e.longerRecordFactor ? ` (${e.secondsToShow !== undefined ? `${fixed(e.secondsToShow, 1)} s, ` : ""}${fixed(e.longerRecordFactor, 1)}x as long, shows it at 90 %)` : ""}`;
}

/** Mixed mode: each required tone, its fit and its verdict. */
function toneTable(comp: ChannelCompliance, u: string, n: number): string {
  const tones = comp.tones ?? [];
  if (tones.length === 0) return "";
  const rows = tones
    .map(
      (t) =>
        `<tr><td>${esc(t.name)}</td><td class="num">${sig(t.hz, 6)} ± ${sig(t.toleranceHz, 3)}</td><td class="num">${t.unseen ? "not seen" : sig(t.measuredHz, 7)}</td><td class="num">${sig(t.requiredPeak, 4)} (${sig(t.lowerPeak, 4)}–${sig(t.upperPeak, 4)})</td><td class="num">${t.unseen ? "above Nyquist" : `${sig(t.measuredPeak, 4)} ± ${sig(t.peakSd, 2)}`}</td><td class="num">${t.unseen ? "" : esc(signedDb(t.deviationDb))}</td><td><span class="chip ${t.verdict}">${VERDICT_TEXT[t.verdict].word}</span>${t.status !== "within" ? ` ${esc(t.status)}` : ""}</td></tr>`,
    )
    .join("");
  return `<h3>Tones</h3>
<p>Each tone's peak is a least-squares sine fit over the whole record at the frequency that maximises its periodogram; ± is its standard deviation √(G/T) on the background around it. Its lines (${tones.map((t) => `${sig(t.linesFromHz, 5)}–${sig(t.linesToHz, 5)} Hz`).join(", ")}) are left out of the background's judgement. Each tone's false-fail rate is at most ${sig(100 * tones[0]!.falseFailRate, 2)} % (the tones share 1 % of the 5 %).</p>
<table class="tones grid" id="tones-${n}"><thead><tr><th>tone</th><th class="num">Hz required</th><th class="num">Hz measured</th><th class="num">peak required (limits), ${esc(u)}</th><th class="num">peak measured, ${esc(u)}</th><th class="num">deviation</th><th>verdict</th></tr></thead><tbody>${rows}</tbody></table>`;
}

function excursionTable(list: Excursion[], linesChecked: number, id: string, dead = false): string {
  if (dead) return "<p>None judged: the channel has no signal.</p>";
  if (list.length === 0) return `<p>No line lies outside its tolerance band (${linesChecked} lines checked).</p>`;
  const rows = worstFirst(list)
    .map(
      (e) =>
        `<tr${e.shown ? ' class="shown-row"' : ""}><td>${range(e)} (${e.direction}, ${e.lines} line${e.lines === 1 ? "" : "s"})</td><td class="num">${esc(signedDb(e.worstDb))} at ${qty(sig(e.worstHz, 5), "Hz")}</td><td class="num">${esc(signedDb(e.limitDb))}</td><td>${esc(shortJudgement(e))}</td></tr>`,
    )
    .join("");
  const shown = list.filter((e) => e.shown).length;
  return `<p>${list.length} excursion${list.length === 1 ? "" : "s"} as measured (${shown} shown by the rule), worst first; every one is listed. <em>Shown</em>: ${esc(excursionJudgement({ ...list[0]!, shown: true, adjustedP: 0 }).replace(/^shown \(|; adjusted p.*$/g, ""))}; <em>not shown</em>: chance among the lines tested could explain it; a run of the stated length would show it with 90 % probability if it is as measured.</p>
<table class="excursions grid" id="${id}"><thead><tr><th>range</th><th class="num">worst</th><th class="num">limit</th><th>judgement</th></tr></thead><tbody>${rows}</tbody></table>`;
}

/** Where a channel's plots sit: the profile's ends and the plotted frequency range. */
interface PlotSpan {
  f0: number;
  fN: number;
  lo: number;
  hi: number;
}

/**
 * One channel of a check: its verdict and findings, PSD and deviation plots, levels, tones, excursions and histogram.
 */
function channelSection(
  c: ChannelAnalysis,
  comp: ChannelCompliance,
  r: CheckResult,
  n: number,
  role: CheckResult["roles"][number],
): string {
  const p = r.profile;
  const u = accelLabel(c.units);
  const [lo, hi] = plotRange(p, c.psd.frequencyHz);
  const span: PlotSpan = { f0: p.breakpoints[0]!.hz, fN: p.breakpoints[p.breakpoints.length - 1]!.hz, lo, hi };
  const psdPlot = channelPsdPlot(c, comp, r, n, span);
  const devPlot = deviationPlot(comp, n, span);
  const hist = histogramOf(c, n);
  return `<section class="channel" id="channel-${n}">
<h2>Channel ${c.position} “${esc(c.name)}” ${role === "judged" ? `<span class="chip ${comp.verdict}">${VERDICT_TEXT[comp.verdict].word}</span>` : `<span class="muted">${role === "control" ? "control channel" : "monitoring channel"} judged alone (the record's verdict rests on the control spectrum above):</span> <span class="chip ${comp.verdict}">${VERDICT_TEXT[comp.verdict].word}</span>`}</h2>
<ul>${findingTexts(comp.findings)
    .map((x) => `<li>${esc(x)}</li>`)
    .join("")}</ul>
${psdPlot}
${devPlot}
<h3>Levels and statistics</h3>
<table class="levels">
${levelRows(c, comp, r, role !== "monitor", span)}
</table>
${toneTable(comp, u, n)}
<h3>Excursions</h3>${excursionTable(comp.excursions, comp.lines.length, `excursions-${n}`, noSignal(comp))}
${hist}
${c.notes.length ? `<p class="muted">Notes: ${findingTexts(c.notes).map(esc).join("; ")}</p>` : ""}
${c.doubts.length ? `<p><strong>Doubts:</strong> ${findingTexts(c.doubts).map(esc).join("; ")}</p>` : ""}
</section>`;
}

/**
 * The outer limits as two series, as levels on the PSD plot or in dB on the deviation plot; none without outer limits.
 */
function outerSeries(comp: ChannelCompliance, dev: boolean): Series[] {
  const outerLines = comp.lines.filter((l) => l.outerUpperDb !== undefined);
  return outerLines.length === 0
    ? []
    : [
        {
          id: dev ? "dev-outer-upper" : "outer-upper",
          label: "outer limits",
          x: outerLines.map((l) => l.frequencyHz),
          y: outerLines.map((l) => (dev ? l.outerUpperDb! : l.required * 10 ** (l.outerUpperDb! / 10))),
          className: "outer",
        },
        {
          id: dev ? "dev-outer-lower" : "outer-lower",
          label: "",
          x: outerLines.map((l) => l.frequencyHz),
          y: outerLines.map((l) => (dev ? -l.outerLowerDb! : l.required * 10 ** (-l.outerLowerDb! / 10))),
          className: "outer",
        },
      ];
}

/**
 * Mixed mode: each tone marked on the measured PSD's highest line within its lines, with its required and measured
 * peak.
 */
function tonePeaks(c: ChannelAnalysis, comp: ChannelCompliance, u: string) {
  const f = c.psd.frequencyHz;
  return (comp.tones ?? []).map((t) => {
    let best = -1;
    for (let k = 0; k < f.length; k++)
      if (f[k]! >= t.linesFromHz && f[k]! <= t.linesToHz && (best < 0 || c.psd.psd[k]! > c.psd.psd[best]!)) best = k;
    return {
      x: best >= 0 ? f[best]! : t.hz,
      y: best >= 0 ? c.psd.psd[best]! : NaN,
      id: `tone-${sig(t.hz, 6)}`,
      text: `${sig(t.hz, 5)} Hz: ${sig(t.requiredPeak, 3)} required, ${sig(t.measuredPeak, 3)} ${u} peak measured`,
    };
  });
}

/**
 * A channel's PSD with its confidence band, the required profile, its tolerance (and outer limits), lines shown outside
 * and tones.
 */
function channelPsdPlot(
  c: ChannelAnalysis,
  comp: ChannelCompliance,
  r: CheckResult,
  n: number,
  span: PlotSpan,
): string {
  const p = r.profile;
  const u = accelLabel(c.units);
  const f = c.psd.frequencyHz;
  const { f0, fN } = span;
  const up: number[] = [];
  const dn: number[] = [];
  const lx = comp.lines.map((l) => l.frequencyHz);
  for (const l of comp.lines) {
    up.push(l.required * 10 ** (l.upperDb / 10));
    dn.push(l.required * 10 ** (-l.lowerDb / 10));
  }
  const shownLines = comp.lines.filter((l) => l.shown);
  const outerLines = comp.lines.filter((l) => l.outerUpperDb !== undefined);
  // Required profile drawn through its breakpoints (exact corners).
  const reqX = p.breakpoints.map((b) => b.hz);
  const reqY = reqX.map((x) => profileLevel(p, x));
  const vals: number[] = [];
  // The y range follows the profile's band and the record inside it; the rest is clipped.
  for (let k = 0; k < f.length; k++)
    if (f[k]! >= f0 && f[k]! <= fN && c.psd.lower[k]! > 0) vals.push(c.psd.lower[k]!, c.psd.upper[k]!);
  const peaks = tonePeaks(c, comp, u);
  const oy = outerLines.flatMap((l) => [
    l.required * 10 ** (l.outerUpperDb! / 10),
    l.required * 10 ** (-l.outerLowerDb! / 10),
  ]);
  const ymin = minOf(vals, dn, up, oy) / 3;
  const ymax = maxOf(vals, dn, up, oy) * 3;
  return svgPlot({
    id: `psd-${n}`,
    title: `PSD of channel ${c.position} "${c.name}" with ${fixed(100 * r.analysis.settings.confidence, 0)} % confidence band`,
    xLabel: "frequency (Hz)",
    yLabel: `PSD (${densityLabel(c.units)})`,
    xDomain: [span.lo, span.hi],
    yDomain: [ymin, ymax],
    yLog: true,
    xMarks: [f0, fN],
    series: [
      { id: "confidence", label: "confidence band", x: f, y: c.psd.lower, y2: c.psd.upper, className: "band" },
      { id: "limits-upper", label: "tolerance", x: lx, y: up, className: "limit" },
      { id: "limits-lower", label: "", x: lx, y: dn, className: "limit" },
      ...outerSeries(comp, false),
      { id: "required", label: "required", x: reqX, y: reqY, className: "required" },
      { id: "measured", label: "measured", x: f, y: c.psd.psd, className: "measured" },
      ...(shownLines.length > 0
        ? [
            {
              id: "shown",
              label: "line shown outside",
              x: shownLines.map((l) => l.frequencyHz),
              y: shownLines.map((l) => l.measured),
              className: "shown",
              markers: true,
            },
          ]
        : []),
      ...(peaks.length > 0
        ? [
            {
              id: "tones",
              label: "tone",
              x: peaks.map((t) => t.x),
              y: peaks.map((t) => t.y),
              className: "tone",
              markers: true,
            },
          ]
        : []),
    ],
    notes: peaks.map((t) => ({ x: t.x, y: t.y, text: t.text, id: t.id })),
  });
}

/**
 * A channel's deviation from the required profile in dB, with its band limits (and outer limits) and the lines shown
 * outside.
 */
function deviationPlot(comp: ChannelCompliance, n: number, span: PlotSpan): string {
  const lx = comp.lines.map((l) => l.frequencyHz);
  const shownLines = comp.lines.filter((l) => l.shown);
  const outerLines = comp.lines.filter((l) => l.outerUpperDb !== undefined);
  const devs = comp.lines.map((l) => l.deviationDb);
  const dmax = maxOf(
    [6],
    comp.lines.map((l) => l.upperDb + 1),
    outerLines.map((l) => Math.max(l.outerUpperDb!, l.outerLowerDb!) + 1),
    devs.filter(Number.isFinite).map((d) => Math.abs(d) + 1),
  );
  return svgPlot({
    id: `dev-${n}`,
    title: "Deviation from the required profile (same frequency axis)",
    xLabel: "frequency (Hz)",
    yLabel: "deviation (dB)",
    xDomain: [span.lo, span.hi],
    yDomain: [-dmax, dmax],
    yLog: false,
    xMarks: [span.f0, span.fN],
    height: 250,
    series: [
      { id: "dev-upper", label: "band limits", x: lx, y: comp.lines.map((l) => l.upperDb), className: "limit" },
      { id: "dev-lower", label: "", x: lx, y: comp.lines.map((l) => -l.lowerDb), className: "limit" },
      ...outerSeries(comp, true),
      { id: "deviation", label: "10 log10(measured / required)", x: lx, y: devs, className: "deviation" },
      ...(shownLines.length > 0
        ? [
            {
              id: "dev-shown",
              label: "shown outside",
              x: shownLines.map((l) => l.frequencyHz),
              y: shownLines.map((l) => l.deviationDb),
              className: "shown",
              markers: true,
            },
          ]
        : []),
    ],
  });
}

/**
 * The lines not judged, in words: at the profile's ends, biased by detrending, above the record's Nyquist frequency.
 */
function unjudgedWords(comp: ChannelCompliance): string {
  const un = comp.unjudged;
  return [
    un.edge ? `${un.edge} at the profile's ends (the window's kernel reaches past them)` : "",
    un.detrend ? `${un.detrend} biased by detrending` : "",
    un.aboveRecord ? `${un.aboveRecord} above the record's Nyquist frequency` : "",
  ]
    .filter(Boolean)
    .join(", ");
}

/**
 * The rows of a channel's "Levels and statistics" table: RMS four ways, Parseval, DOF, rule, lines judged, statistics.
 */
function levelRows(
  c: ChannelAnalysis,
  comp: ChannelCompliance,
  r: CheckResult,
  judged: boolean,
  span: PlotSpan,
): string {
  const a = r.analysis;
  const u = accelLabel(c.units);
  const { f0, fN } = span;
  const tolRms =
    comp.rms.upperDb !== undefined
      ? `+${fixed(comp.rms.upperDb, 2)} / −${fixed(comp.rms.lowerDb!, 2)} dB`
      : "none stated";
  const s = c.stats;
  const unjudged = unjudgedWords(comp);
  // A dead channel (NO_SIGNAL): no Parseval ratio, RMS deviation, rule or shape figures of 0 / 0 (its doubt says it).
  const live = !noSignal(comp);
  return `${row(timeRmsLabel(a), qty(sig(c.parseval.rmsTime, 4), u), "num")}
${row(segmentRmsLabel(a), qty(sig(c.parseval.rmsSegments, 4), u), "num")}
${row("RMS from the PSD (every line, 0 Hz to Nyquist)", qty(sig(c.parseval.rmsPsd, 4), u), "num")}
${!live ? "" : row("Parseval ratio (PSD RMS / segments RMS)", `${fixed(c.parseval.ratio, 4)} (allowed ±${sig(100 * c.parseval.tolerance, 2)} %${c.parseval.toleranceFrom === "record" ? ", from the record's own spread" : ""}): ${esc(parsevalWord(c.parseval))}`, "num")}
${row(`RMS from the PSD in the profile's range (${sig(f0)}–${sig(fN)} Hz), measured`, qty(sig(comp.rms.measured, 4), u), "num")}
${row("RMS required over the same range", qty(sig(comp.rms.required, 4), u), "num")}
${live ? row("RMS deviation / tolerance", `${esc(signedDb(comp.rms.deviationDb))} / ${esc(tolRms)}`, "num") : ""}
${row("Degrees of freedom", `${fixed(comp.dof.achieved, 1)} achieved${comp.dof.required !== undefined ? `, ${comp.dof.required} required by the profile` : ""}, ${comp.dof.forPower} for the rule's power (${c.psd.averages} averages)`, "num")}
${judged && live ? row("Decision rule here", esc(ruleLine(comp))) : ""}
${decideLine(comp) ? row("Run length to decide", esc(decideLine(comp)!)) : ""}
${row("Lines judged", `${comp.lines.length}${unjudged ? `; not judged: ${esc(unjudged)}` : ""}`)}
${row("Random error of one line", `±${fixed(100 * c.psd.randomError, 1)} % (1 σ)`, "num")}
${row("Mean / standard deviation", `${sig(s.mean, 4)} / ${qty(sig(s.std, 4), u)}`, "num")}
${row("Minimum / maximum", `${sig(s.min, 4)} / ${qty(sig(s.max, 4), u)}`, "num")}
${live ? row("Crest factor (max |x − mean| / σ)", fixed(s.crestFactor, 2), "num") : ""}
${live ? row("Skewness / kurtosis (Gaussian: 0 / 3)", `${fixed(s.skewness, 3)} / ${fixed(s.kurtosis, 3)}`, "num") : ""}`;
}

/** The amplitude histogram and the Gaussian of the same mean and σ. */
export function histogramOf(c: ChannelAnalysis, n: number): string {
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
  const hist = svgHistogram(
    `hist-${n}`,
    `Amplitude histogram of channel ${c.position} and the Gaussian of the same mean and σ (dashed)`,
    `acceleration (${accelLabel(c.units)})`,
    h.edges,
    h.density,
    { x: gx, y: gy },
  );
  return `<div class="keep">${hist}${h.underflow + h.overflow > 0 ? `<p class="muted">${h.underflow + h.overflow} samples fell outside the histogram's range.</p>` : ""}</div>`;
}

function controlSection(r: CheckResult): string {
  const c = r.control!;
  const j = c.judgement;
  return `<section class="channel" id="control"><h2>Control spectrum: ${esc(c.rule)} of ${c.channels.map(esc).join(", ")} <span class="chip ${j.verdict}">${VERDICT_TEXT[j.verdict].word}</span></h2>
<ul>${findingTexts(j.findings)
    .map((x) => `<li>${esc(x)}</li>`)
    .join("")}</ul>
<table>${row("RMS in the profile's range, measured / required", `${sig(j.rms.measured, 4)} / ${sig(j.rms.required, 4)} (${esc(signedDb(j.rms.deviationDb))})`, "num")}
${row("Degrees of freedom", `${fixed(j.dof.achieved, 1)} (the smallest of the control channels'), ${j.dof.forPower} for the rule's power`, "num")}
${row("Decision rule here", esc(ruleLine(j)))}</table>
${excursionTable(j.excursions, j.lines.length, "excursions-control", noSignal(j))}
</section>`;
}

/**
 * This run's reasons, for page 1: each spectrum the verdict rests on (the control spectrum, or every
 * judged channel) with its verdict, its findings, the worst excursion (lines and band) and, when
 * inconclusive, the DOF and seconds that would decide it.
 */
function runReasons(r: CheckResult): string {
  const deciding: [string, ChannelCompliance][] = r.control
    ? [[`control spectrum (${r.control.rule} of ${r.control.channels.join(", ")})`, r.control.judgement]]
    : r.channels.map(
        (c, i) =>
          [`channel ${r.analysis.channels[i]!.position} “${r.analysis.channels[i]!.name}”`, c] as [
            string,
            ChannelCompliance,
          ],
      );
  const items = deciding.map(([name, c]) => {
    const w = worstFirst(c.excursions)[0];
    const worst = w
      ? `worst excursion ${w.fromHz === w.toHz ? `${sig(w.fromHz, 5)} Hz` : `${sig(w.fromHz, 5)}–${sig(w.toHz, 5)} Hz`} (${w.lines} line${w.lines === 1 ? "" : "s"}, ${w.direction}) ${signedDb(w.worstDb)} against a limit of ${signedDb(w.limitDb)}, ${w.shown ? "shown" : "not shown"}`
      : "no line outside its band";
    const decide = decideLine(c);
    const because = findingTexts(c.findings)
      .map((x) => esc(x))
      .join("; ");
    return `<li><strong>${esc(name)}: ${VERDICT_TEXT[c.verdict].word}</strong>. ${because.charAt(0).toUpperCase() + because.slice(1)}. ${esc(worst.charAt(0).toUpperCase() + worst.slice(1))}; ${fixed(c.dof.achieved, 1)} DOF of ${Math.max(c.dof.forPower, c.dof.required ?? 0)} a pass needs.${decide ? ` ${esc(decide.charAt(0).toUpperCase() + decide.slice(1))}.` : ""}</li>`;
  });
  return `<div id="run-reasons"><h2>This run</h2><ul>${items.join("")}</ul></div>`;
}

/** The result embedded in every check report (what `psdgate verify` re-runs and compares). */
export function checkResultDocument(r: CheckResult, ctx: ReportContext): Record<string, unknown> {
  return {
    kind: "check",
    created: ctx.when.toISOString(),
    meta: ctx.meta ?? null,
    rerun: ctx.rerun ?? null,
    given: ctx.given ?? [],
    result: checkJson(r, ctx.version, ctx.meta),
  };
}

export function checkHtml(
  r: CheckResult,
  version: string,
  when: Date,
  context: Omit<ReportContext, "version" | "when"> = {},
): string {
  const ctx: ReportContext = { ...context, version, when };
  const a = r.analysis;
  const p = r.profile;
  const v = VERDICT_TEXT[r.verdict];
  const m = ctx.meta;
  const body = `${reportOpening({
    verdictClass: r.verdict,
    word: v.word,
    line: v.line,
    meta: m,
    a,
    ctx,
    reasons: runReasons(r),
    extraRecordRows: `${row("Duration required", p.durationS !== undefined ? `${qty(sig(p.durationS, 4), "s")} (the profile's durationS): ${a.window.frames / a.input.sampleRateHz >= p.durationS * (1 - 1e-9) ? "met" : "NOT met"} by the ${a.window.frames === a.input.samples ? "record's" : "analysed window's"} ${qty(fixed(a.window.frames / a.input.sampleRateHz, 3), "s")}` : "none stated by the profile")}
${row("Profile", esc(p.file))}
${row("Profile SHA-256", `<span class="hash">${p.sha256}</span>`)}
${row("Profile range and level", `${qty(`${sig(p.breakpoints[0]!.hz)}–${sig(p.breakpoints[p.breakpoints.length - 1]!.hz)}`, "Hz")}, ${qty(sig(p.rms, 4), accelLabel(p.units))} RMS`)}
${row("Tolerance", esc(toleranceSummary(p)))}
${p.resolutionHz !== undefined ? row("Resolution required", qty(sig(p.resolutionHz, 4), "Hz")) : ""}
${p.defaultsApplied.length ? row("Profile defaults applied", esc(p.defaultsApplied.join("; "))) : ""}
${p.provenance ? row("Profile origin", `profile ${esc(provenanceSummary(p)!)}`) : ""}`,
    extraSettingsRows: `${r.control ? row("Control", `${esc(r.control.rule)} of ${esc(r.control.channels.join(", "))}; the other channels are monitoring channels`) : ""}`,
  })}
${r.control ? controlSection(r) : ""}
${a.channels.map((c, i) => channelSection(c, r.channels[i]!, r, i + 1, r.roles[i]!)).join("\n")}
<h2>Decision rule</h2>
<p id="rule">${esc(RULE_SUMMARY)}</p>${r.profile.tones.length > 0 ? `\n<p id="tone-rule">${esc(TONE_RULE)}</p>` : ""}
<h2>Caution</h2>
<div class="caution">${esc(VERDICT_CAUTION)}</div>
${signOff(`<strong>${v.word}</strong>: ${esc(VERDICT_MEANING[r.verdict])}.`, [
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
  ["Recording", `${esc(a.input.file)} <span class="hash">${shortHash(a.input.sha256)}</span>`],
  ["Profile", `${esc(p.title)} <span class="hash">${shortHash(p.sha256)}</span>`],
  ["Operator", esc(m?.operator ?? "not stated")],
])}`;
  const page = reportPage(
    {
      title: p.title,
      verdictClass: r.verdict,
      verdictWord: v.word,
      recordingSha256: a.input.sha256,
      recordingName: a.input.file.split(/[\\/]/).pop() ?? a.input.file,
      kindLine: "Random-vibration compliance record",
      body,
    },
    ctx,
  );
  return embedResult(page, checkResultDocument(r, ctx));
}
