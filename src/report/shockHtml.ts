import type { ShockChannel, ShockResult } from "../analyses/shockRecording.js";
import { accelLabel } from "../units.js";
import { embedResult } from "./embeddedResult.js";
import { fixed, sig } from "./format.js";
import { qty, reportOpening, reportPage, row, recordSignOff, type ReportContext } from "./reportPage.js";
import { backgroundStretches, SHOCK_CAUTION, SHOCK_METHOD, shockJson, shortfallWords } from "./shockReport.js";
import { escapeXml as esc, svgPlot } from "./svgPlot.js";
import { findingTexts } from "./findingTexts.js";

/**
 * `shock --report`: the shared record frame (identity, record, settings, sign-off, embedded result for
 * `verify`) with, per channel, the event timeline (signed peak against time, the threshold either side),
 * the SRS on log-log axes (the whole record's maximax and each of the largest events'), and the event table.
 */
const SHOCK_WORD = "SHOCK";
/** Events drawn as their own SRS curve on the plot (the largest; the table lists all). */
const PLOTTED_EVENTS = 3;

function logRange(values: ArrayLike<number>[]): [number, number] {
  let lo = Infinity;
  let hi = 0;
  for (const a of values) {
    for (let i = 0; i < a.length; i++) {
      const v = a[i]!;
      if (Number.isFinite(v) && v > 0) {
        lo = Math.min(lo, v);
        hi = Math.max(hi, v);
      }
    }
  }
  if (!(hi > 0)) return [1e-3, 1];
  return [Math.max(lo, hi * 1e-4) / 1.5, hi * 1.5];
}

function channelSection(c: ShockChannel, r: ShockResult, n: number): string {
  const a = r.analysis;
  const u = accelLabel(c.units);
  const fn = c.srs.fnHz;
  const largest = c.events.slice(0, PLOTTED_EVENTS);
  const series = [
    { id: `record-${n}`, label: "whole record", x: fn, y: c.srs.maximax, className: "measured" },
    ...largest.map((e, k) => ({
      id: `event-${n}-${k + 1}`,
      label: `event ${k + 1}`,
      x: fn,
      y: e.srs.maximax,
      className: k === 0 ? "required" : "limit",
    })),
  ];
  const srsPlot = svgPlot({
    id: `srs-${n}`,
    title: `SRS of ${c.name}: maximax absolute acceleration, Q ${sig(r.settings.q, 3)}`,
    xLabel: "natural frequency (Hz)",
    yLabel: u,
    xDomain: [fn[0]!, fn[fn.length - 1]! > fn[0]! ? fn[fn.length - 1]! : fn[0]! * 2],
    yDomain: logRange([c.srs.maximax, ...largest.map((e) => e.srs.maximax)]),
    yLog: true,
    series,
  });
  const t0 = a.window.fromS;
  const t1 = a.window.toS > t0 ? a.window.toS : t0 + 1;
  let top = c.threshold;
  for (const e of c.events) top = Math.max(top, Math.abs(e.peak));
  const timeline = svgPlot({
    id: `timeline-${n}`,
    title: `events of ${c.name}: signed peak against time (threshold ±${sig(c.threshold, 3)} ${u})`,
    xLabel: "time (s)",
    yLabel: u,
    xLog: false,
    xDomain: [t0, t1],
    yDomain: [-1.15 * top, 1.15 * top],
    yLog: false,
    height: 240,
    rules: [c.threshold, -c.threshold],
    series: [
      {
        id: `peaks-${n}`,
        label: "event peak",
        x: c.events.map((e) => e.timeS),
        y: c.events.map((e) => e.peak),
        className: "shown",
        markers: true,
      },
    ],
  });
  const rows = c.events.map((e, k) => {
    let best = 0;
    for (let i = 1; i < e.srs.maximax.length; i++) if (e.srs.maximax[i]! > e.srs.maximax[best]!) best = i;
    let pv = 0;
    for (let i = 0; i < e.srs.pseudoVelocity.length; i++) pv = Math.max(pv, e.srs.pseudoVelocity[i]!);
    return `<tr><td class="num">${k + 1}</td><td class="num">${fixed(e.timeS, 3)}</td><td class="num">${e.peak >= 0 ? "+" : ""}${sig(e.peak, 4)}</td><td class="num">${sig(1000 * e.durationS, 3)}</td><td class="num">${sig(e.srs.maximax[best]!, 4)} at ${sig(e.srs.fnHz[best]!, 4)} Hz</td><td class="num">${sig(pv * (c.units === "g" ? 9.80665 : 1), 3)}</td><td>${e.truncated ? "window cut by the record's end" : ""}</td></tr>`;
  });
  return `<section class="channel" id="channel-${n}">
<h2>Channel ${esc(c.name)}</h2>
<table class="meta">
${row("Mean removed", qty(sig(c.mean, 4), u))}
${row("Background", `${qty(sig(c.backgroundRms, 4), u)} r.m.s. (median of ${backgroundStretches(r)})`)}
${row("Threshold", `${qty(sig(c.threshold, 4), u)} = ${sig(c.thresholdFactor, 3)} × background`)}
${row("Chance events on a Gaussian background", `${c.expectedFalseEvents < 0.01 ? c.expectedFalseEvents.toExponential(1) : sig(c.expectedFalseEvents, 2)} over the record (Rice: 2 ν₀ exp(−k²/2), ν₀ ${sig(c.zeroUpcrossingRateHz, 3)} Hz from the PSD)`)}
${row("Events", String(c.events.length))}
</table>
${timeline}
${srsPlot}
${
  c.events.length === 0
    ? `<p class="muted">No events above the threshold.</p>`
    : `<table class="grid"><tr><th class="num">#</th><th class="num">time s</th><th class="num">peak ${esc(u)}</th><th class="num">duration ms</th><th class="num">largest SRS ${esc(u)}</th><th class="num">PVSS m/s</th><th></th></tr>
${rows.join("\n")}
</table>`
}
</section>`;
}

/** The result embedded in a shock record (what `psdgate verify` re-runs and compares). */
export function shockResultDocument(r: ShockResult, ctx: ReportContext): Record<string, unknown> {
  return {
    kind: "shock",
    created: ctx.when.toISOString(),
    meta: ctx.meta ?? null,
    rerun: ctx.rerun ?? null,
    given: ctx.given ?? [],
    result: shockJson(r, ctx.version),
  };
}

export function shockHtml(
  r: ShockResult,
  version: string,
  when: Date,
  context: Omit<ReportContext, "version" | "when"> = {},
): string {
  const ctx: ReportContext = { ...context, version, when };
  const m = ctx.meta;
  const a = r.analysis;
  const name = a.input.file.split(/[\\/]/).pop() ?? a.input.file;
  const total = r.channels.reduce((s, c) => s + c.events.length, 0);
  const summary = `${total} event(s) in ${r.channels.length} channel(s) above their thresholds; shock response spectra at Q ${sig(r.settings.q, 3)}, ${r.settings.fnHz.length} natural frequencies. No limit was given, so there is no verdict.`;
  const settings = [
    row("Method", esc(SHOCK_METHOD)),
    row(
      "Natural frequencies",
      `${r.settings.fnHz.length}, ${qty(sig(r.settings.fnHz[0]!, 4), "Hz")} to ${qty(sig(r.settings.fnHz[r.settings.fnHz.length - 1]!, 5), "Hz")}; Q ${sig(r.settings.q, 4)}`,
    ),
    row(
      "Sample rate against the highest fn",
      `${sig(r.rate.samplesPerPeriod, 3)} samples per period (10 or more asked); ${shortfallWords(r)}`,
    ),
    row(
      "Events",
      `hold ${qty(sig(r.settings.holdS, 3), "s")}; each event's SRS from ${qty(sig(r.settings.preS, 3), "s")} before its first exceedance to ${qty(sig(r.settings.postS, 3), "s")} after its last; each channel's baseline removed (its mean without the shocks' stretches)`,
    ),
  ].join("\n");
  const body = `${reportOpening({ verdictClass: "none", word: SHOCK_WORD, line: summary, meta: m, a, ctx, extraSettingsRows: settings })}
${r.channels.map((c, i) => channelSection(c, r, i + 1)).join("\n")}
${r.notes.length ? `<p class="muted">Notes: ${findingTexts(r.notes).map(esc).join("; ")}</p>` : ""}
${r.doubts.length ? `<p><strong>Doubts:</strong> ${findingTexts(r.doubts).map(esc).join("; ")}</p>` : ""}
<h2>Caution</h2>
<div class="caution">${esc(SHOCK_CAUTION)}</div>
${recordSignOff("Shock record", summary, m, [{ label: "Recording", file: a.input.file, sha256: a.input.sha256 }])}`;
  const page = reportPage(
    {
      title: m?.testId ? `Shock record, test ${m.testId}: ${name}` : `Shock record: ${name}`,
      verdictClass: "none",
      verdictWord: SHOCK_WORD,
      recordingSha256: a.input.sha256,
      recordingName: name,
      kindLine: "Shock events and shock response spectra record",
      body,
    },
    ctx,
  );
  return embedResult(page, shockResultDocument(r, ctx));
}
