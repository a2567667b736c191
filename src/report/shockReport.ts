import { SHORT_RECORD_STRETCHES, type ShockResult } from "../analyses/shockRecording.js";
import { srsShortfallBound, type ShockSpectrum } from "../estimate/response/shockResponse.js";
import { accelLabel } from "../units.js";
import { csvField } from "./csvField.js";
import { printable } from "./printable.js";
import { fixed, sig, table } from "./format.js";
import { toolInfo } from "./psdJson.js";
import { findingTexts } from "./findingTexts.js";

export const SHOCK_CAUTION =
  "A shock response spectrum is one engineering summary of a shock: the peak responses of a family of linear, lightly damped single-degree-of-freedom systems at one Q. " +
  "It is not a structural verdict: a real item has several modes, nonlinear joints and its own strength. The governing test standard's tailoring process, " +
  "the item's and fixture's limits and a qualified engineer decide what it means and how a shock test is set.";

export const SHOCK_METHOD =
  "ramp-invariant recursive SDOF filters (Smallwood 1981; the method of ISO 18431-4): exact at the samples for an input straight between samples; " +
  "maximax = max |absolute acceleration|, positive and negative its largest values of each sign (negative as a magnitude), PVSS = 2 pi fn max |relative displacement|";

function arr(a: ArrayLike<number>): (number | null)[] {
  return Array.from(a, (v) => (Number.isFinite(v) ? v : null));
}

function srsJson(s: ShockSpectrum, toMs: number) {
  return {
    fnHz: arr(s.fnHz),
    maximax: arr(s.maximax),
    positive: arr(s.positive),
    negative: arr(s.negative),
    pvss: arr(Array.from(s.pseudoVelocity, (v) => v * toMs)),
  };
}

const G = 9.80665;

export function shockJson(r: ShockResult, version: string) {
  const a = r.analysis;
  return {
    tool: toolInfo(version),
    input: a.input,
    window: a.window,
    method: SHOCK_METHOD,
    settings: {
      fnHz: arr(r.settings.fnHz),
      q: r.settings.q,
      holdS: r.settings.holdS,
      preS: r.settings.preS,
      postS: r.settings.postS,
      threshold: r.settings.thresholdGiven ?? null,
      thresholdFactor: r.settings.thresholdFactor ?? null,
    },
    rate: r.rate,
    channels: r.channels.map((c) => {
      const toMs = c.units === "g" ? G : 1;
      return {
        name: c.name,
        units: c.units === "g" ? "g" : "m/s2",
        pvssUnits: "m/s",
        mean: c.mean,
        backgroundRms: c.backgroundRms,
        threshold: c.threshold,
        thresholdFactor: c.thresholdFactor,
        zeroUpcrossingRateHz: c.zeroUpcrossingRateHz,
        expectedFalseEvents: c.expectedFalseEvents,
        events: c.events.map((e) => {
          const s = srsJson(e.srs, toMs);
          const part = (p: ShockSpectrum | undefined) =>
            p ? { maximax: arr(p.maximax), positive: arr(p.positive), negative: arr(p.negative) } : null;
          return {
            timeS: e.timeS,
            peak: e.peak,
            durationS: e.durationS,
            srs: { fnHz: s.fnHz, maximax: s.maximax, positive: s.positive, negative: s.negative },
            pvss: s.pvss,
            truncated: e.truncated,
            ...(r.settings.primaryResidual ? { primary: part(e.primary), residual: part(e.residual) } : {}),
          };
        }),
        srs: srsJson(c.srs, toMs),
      };
    }),
    notes: findingTexts(r.notes),
    doubts: findingTexts(r.doubts),
    caution: SHOCK_CAUTION,
  };
}

/** One row per (channel, event or record, fn): the whole result in a flat table. */
export function shockCsv(r: ShockResult): string {
  const rows = ["channel,source,event,time_s,peak,duration_s,fn_hz,maximax,positive,negative,pvss_m_per_s,units"];
  for (const c of r.channels) {
    const toMs = c.units === "g" ? G : 1;
    const u = c.units === "g" ? "g" : "m/s2";
    const put = (source: string, event: string, time: string, peak: string, dur: string, s: ShockSpectrum) => {
      for (let i = 0; i < s.fnHz.length; i++) {
        rows.push(
          [
            csvField(c.name),
            source,
            event,
            time,
            peak,
            dur,
            s.fnHz[i],
            s.maximax[i],
            s.positive[i],
            s.negative[i],
            s.pseudoVelocity[i]! * toMs,
            u,
          ].join(","),
        );
      }
    };
    put("record", "", "", "", "", c.srs);
    c.events.forEach((e, k) =>
      put("event", String(k + 1), String(e.timeS), String(e.peak), String(e.durationS), e.srs),
    );
  }
  return rows.join("\n") + "\n";
}

/**
 * The rate's bound in words: the sample peak's (what the result records) and a recorded, band-limited input's (the
 * straight-line reading's sinc^2 besides).
 */
export function shortfallWords(r: ShockResult): string {
  const b = srsShortfallBound(r.rate.samplesPerPeriod);
  return `the sample peak is within ${fixed(100 * r.rate.peakShortfallBound, 1)} % of the continuous one, ${fixed(100 * b.bandLimited, 1)} % on a recorded, band-limited input`;
}

/** Which stretches the background is the median of: 1 s, or 0.1 s below SHORT_RECORD_STRETCHES whole seconds. */
export function backgroundStretches(r: ShockResult): string {
  const fs = r.analysis.input.sampleRateHz;
  const whole = Math.floor(r.analysis.window.frames / Math.max(2, Math.round(fs)));
  return whole < SHORT_RECORD_STRETCHES ? "0.1 s stretches: under 3 whole 1 s stretches" : "1 s stretches";
}

export function shockText(r: ShockResult, version: string, top = 10): string {
  const a = r.analysis;
  const lines = [
    `psdgate ${version}: shocks in ${printable(a.input.file)} (${sig(a.window.toS - a.window.fromS, 5)} s at ${sig(a.input.sampleRateHz, 6)} Hz)`,
    `  method     ${SHOCK_METHOD}`,
    `  settings   Q ${sig(r.settings.q, 4)}; ${r.settings.fnHz.length} natural frequencies ${sig(r.settings.fnHz[0]!, 4)}–${sig(r.settings.fnHz[r.settings.fnHz.length - 1]!, 5)} Hz; hold ${sig(r.settings.holdS, 3)} s; event window from ${sig(r.settings.preS, 3)} s before to ${sig(r.settings.postS, 3)} s after; the baseline removed (the mean without the shocks' stretches)`,
    `  rate       ${sig(r.rate.samplesPerPeriod, 3)} samples per period at the highest fn (at least 10 asked; ${shortfallWords(r)})`,
    "",
  ];
  const all = r.channels
    .flatMap((c) => c.events.map((e) => ({ c, e })))
    .sort((x, y) => Math.abs(y.e.peak) - Math.abs(x.e.peak) || x.e.timeS - y.e.timeS);
  for (const c of r.channels) {
    const u = accelLabel(c.units);
    lines.push(
      `  ${printable(c.name)}: background ${sig(c.backgroundRms, 4)} ${u} r.m.s. (median of ${backgroundStretches(r)}), threshold ${sig(c.threshold, 4)} ${u} = ${sig(c.thresholdFactor, 3)} x background; ` +
        `${c.events.length} event(s); by chance on a Gaussian background ${c.expectedFalseEvents < 0.01 ? c.expectedFalseEvents.toExponential(1) : sig(c.expectedFalseEvents, 2)} expected (Rice, nu0 ${sig(c.zeroUpcrossingRateHz, 3)} Hz)`,
    );
  }
  lines.push("");
  if (all.length === 0) lines.push("  no events above the threshold", "");
  else {
    const rows = [["#", "channel", "time s", "peak", "duration ms", "largest SRS", "at fn Hz", "PVSS m/s"]];
    all.slice(0, top).forEach(({ c, e }, k) => {
      let best = 0;
      for (let i = 1; i < e.srs.maximax.length; i++) if (e.srs.maximax[i]! > e.srs.maximax[best]!) best = i;
      let pv = 0;
      for (let i = 0; i < e.srs.pseudoVelocity.length; i++) pv = Math.max(pv, e.srs.pseudoVelocity[i]!);
      const u = accelLabel(c.units);
      rows.push([
        String(k + 1),
        printable(c.name),
        fixed(e.timeS, 3),
        `${e.peak >= 0 ? "+" : ""}${sig(e.peak, 4)} ${u}`,
        sig(1000 * e.durationS, 3),
        `${sig(e.srs.maximax[best]!, 4)} ${u}`,
        sig(e.srs.fnHz[best]!, 4),
        sig(pv * (c.units === "g" ? G : 1), 3),
      ]);
    });
    lines.push(
      `  largest events${all.length > top ? ` (${top} of ${all.length}; --top for more, --json for all)` : ""}`,
      table(rows),
      "",
    );
  }
  for (const c of r.channels) {
    const u = accelLabel(c.units);
    const rows = [["fn Hz", `maximax ${u}`, `positive ${u}`, `negative ${u}`, "PVSS m/s"]];
    for (let i = 0; i < c.srs.fnHz.length; i++)
      rows.push([
        sig(c.srs.fnHz[i]!, 4),
        sig(c.srs.maximax[i]!, 4),
        sig(c.srs.positive[i]!, 4),
        sig(c.srs.negative[i]!, 4),
        sig(c.pvssMPerS[i]!, 3),
      ]);
    lines.push(`  ${printable(c.name)}: SRS of the whole record`, table(rows), "");
  }
  for (const n of findingTexts(r.notes)) lines.push(`  note: ${printable(n)}`);
  for (const d of findingTexts(r.doubts)) lines.push(`  DOUBT: ${printable(d)}`);
  if (r.notes.length + r.doubts.length > 0) lines.push("");
  lines.push(`  ${SHOCK_CAUTION}`, "");
  return lines.join("\n");
}
