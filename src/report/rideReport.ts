import { DIRECTIVE_2002_44_EC } from "../compare/wholeBodyExposure.js";
import type { RideResult } from "../analyses/rideRecording.js";
import { weightingPowerGains } from "../weight/isoWeightings.js";
import { csvField } from "./csvField.js";
import { fixed, sig, table } from "./format.js";
import { finiteOrNull, inputJson, settingsJson, stationarityJson, toolInfo } from "./psdJson.js";
import { recordingLines, settingsLine } from "./psdText.js";
import { findingsJson, findingTexts } from "./findingTexts.js";

/** Cautions every ride result carries, in text and JSON. */
export const RIDE_CAUTIONS: readonly string[] = [
  "An engineering estimate from one recording, not an occupational-health assessment: a daily exposure depends on the whole working day, every vehicle, route, speed and task, and on how the recording was made.",
  "Local regulations (Directive 2002/44/EC as transposed where the work happens) and competent persons decide on exposure, risk and action; ISO 2631-1 governs the method. The caution-zone bounds shown are psdgate's defaults for ISO 2631-1:1997 Annex B unless --health-zone gave the lab's own: confirm them against the standard before relying on them.",
];

/** Where the caution zone's bounds came from, in words (text, JSON notes and the record). */
export function zoneFrom(r: RideResult): string {
  return r.healthZone.from === "given"
    ? "bounds given with --health-zone"
    : "psdgate's default bounds for ISO 2631-1:1997 Annex B, to be confirmed by the lab (--health-zone sets them)";
}

function hours(s: number): string {
  if (!Number.isFinite(s)) return "never";
  if (s >= 86400 * 2) return `${sig(s / 86400, 3)} days`;
  return s >= 3600 ? `${sig(s / 3600, 3)} h` : `${sig(s / 60, 3)} min`;
}

const arr = (a: Float64Array): (number | null)[] => Array.from(a, finiteOrNull);

export function rideText(r: RideResult, version: string): string {
  const a = r.analysis;
  const out = [
    `psdgate ${version}: whole-body vibration of ${a.input.file} (${r.posture}, ISO 2631-1 weightings, SI units)`,
    ...recordingLines(a),
    settingsLine(a),
    "",
  ];
  const rows = [
    [
      "axis",
      "channel",
      "weighting",
      "a_w m/s²",
      "from PSD",
      "PSD vs time",
      "crest",
      "VDV m/s^1.75",
      "MTVV m/s²",
      "MTVV/a_w",
      "VDV/(a_w T^¼)",
      "k health",
      "k comfort",
    ],
  ];
  for (const x of r.axes) {
    const d = x.dose;
    rows.push([
      x.axis,
      x.channel,
      x.weighting,
      sig(d.rms, 4),
      sig(x.awFromPsd, 4),
      `${x.routeRatio >= 1 ? "+" : ""}${fixed(100 * (x.routeRatio - 1), 2)} %`,
      fixed(d.crestFactor, 2),
      sig(d.vdv, 4),
      sig(d.mtvv, 4),
      fixed(x.basicMethod.mtvvRatio, 2),
      fixed(x.basicMethod.vdvRatio, 2),
      String(x.rule.healthK),
      String(x.rule.comfortK),
    ]);
  }
  out.push(
    table(rows),
    "  (PSD vs time: a_w from |W(f)|² x PSD against a_w in time over the same samples with Welch's weights)",
    "",
  );
  const e = r.exposure;
  const D = DIRECTIVE_2002_44_EC;
  const Z = r.healthZone;
  out.push(
    `  total      vibration total value ${sig(r.totalValue.comfort, 3)} m/s² with the comfort factors, ${sig(r.totalValue.health, 3)} m/s² with the health factors`,
  );
  out.push(
    `  comfort    ISO 2631-1 Annex C, for ${sig(r.totalValue.comfort, 3)} m/s²: ${r.comfort.reactions.map((w) => `"${w}"`).join(" or ")}`,
  );
  if (e) {
    out.push(
      `  exposure   ${hours(e.durationS)} a day: A(8) ${sig(e.a8, 3)} m/s² (${e.a8Axis}), VDV ${sig(e.vdv, 3)} m/s^1.75 (${e.vdvAxis})`,
    );
    out.push(
      `  Directive 2002/44/EC   A(8) ${e.directive.a8} (action ${D.a8ActionMs2}, reached after ${hours(e.a8ActionAfterS)}; limit ${D.a8LimitMs2}, after ${hours(e.a8LimitAfterS)})`,
    );
    out.push(
      `                         VDV ${e.directive.vdv} (action ${D.vdvActionMs175}, limit ${D.vdvLimitMs175} m/s^1.75)`,
    );
    out.push(
      `  ISO 2631-1 Annex B     A(8) ${e.healthZone.a8} (${Z.a8LowerMs2}–${Z.a8UpperMs2} m/s² at 8 h), VDV ${e.healthZone.vdv} (${Z.vdvLowerMs175}–${Z.vdvUpperMs175} m/s^1.75; ${zoneFrom(r)})`,
    );
  } else
    out.push(
      "  exposure   not stated (--exposure): no A(8), daily VDV or judgement against Directive 2002/44/EC and ISO 2631-1 Annex B",
    );
  if (r.seat)
    out.push(
      `  seat       SEAT ${fixed(100 * r.seat.seat, 1)} %: seat z a_w ${sig(r.seat.awSeat, 4)} over floor z (${r.seat.floorChannel}) ${sig(r.seat.awFloor, 4)} m/s², Wk on both`,
    );
  for (const x of r.axes) {
    const s = x.stationarity;
    if (s.tested)
      out.push(
        `  ${x.axis} level    ${s.stationary ? "stationary" : "NOT stationary"} by reverse arrangements on ${s.stretches} weighted stretches of ${sig(s.stretchS, 3)} s${s.pooled > 1 ? `, pooled ${s.pooled} at a time` : ""} (A = ${s.reverseArrangements!.statistic}, accepted ${s.reverseArrangements!.acceptAbove} < A <= ${s.reverseArrangements!.acceptAtMost})`,
      );
  }
  for (const [c, x] of r.axes.entries()) {
    const h = x.peakHold;
    const p = a.channels[c]!.psd;
    if (!h || h.stretches === 0 || p.averages === 0) continue;
    let k = 1;
    for (let i = 1; i < h.psd.length; i++) if (p.psd[i]! > 0 && h.psd[i]! / p.psd[i]! > h.psd[k]! / p.psd[k]!) k = i;
    out.push(
      `  ${x.axis} peak-hold largest of ${h.stretches} stretches of ${sig(h.stretchS, 3)} s at each line (unweighted); furthest above the average at ${sig(p.frequencyHz[k]!, 4)} Hz: ${fixed(10 * Math.log10(h.psd[k]! / p.psd[k]!), 1)} dB (the stretch from ${sig(h.atS[k]! + a.window.fromS, 5)} s); --json holds it`,
    );
  }
  out.push(
    ...findingTexts(r.doubts).map((d) => `  DOUBT      ${d}`),
    ...findingTexts(r.notes).map((n) => `  note       ${n}`),
  );
  out.push("", ...RIDE_CAUTIONS.map((c) => `  caution    ${c}`), "");
  return out.join("\n");
}

/** The `ride --json` document: SI units throughout (m/s², m/s^1.75, s). */
export function rideJson(r: RideResult, version: string) {
  const a = r.analysis;
  const e = r.exposure;
  return {
    tool: toolInfo(version),
    input: inputJson(a),
    settings: {
      ...settingsJson(a),
      runningRmsS: r.axes[0]?.dose.runningRmsS ?? null,
      stretchS: r.axes[0]?.dose.stretchS ?? null,
    },
    analysis: a.analysis,
    posture: r.posture,
    window: {
      fromS: a.window.fromS,
      toS: a.window.toS,
      durationS: a.window.frames / a.input.sampleRateHz,
      frames: a.window.frames,
    },
    axes: r.axes.map((x) => ({
      axis: x.axis,
      channel: x.channel,
      weighting: x.weighting,
      aw: finiteOrNull(x.dose.rms),
      awFromPsd: finiteOrNull(x.awFromPsd),
      awWelchWeighted: finiteOrNull(x.awWelchWeighted),
      routeRatio: finiteOrNull(x.routeRatio),
      crestFactor: finiteOrNull(x.dose.crestFactor),
      vdv: finiteOrNull(x.dose.vdv),
      mtvv: finiteOrNull(x.dose.mtvv),
      mtvvAtS: finiteOrNull(x.dose.mtvvAtS + a.window.fromS),
      peak: finiteOrNull(x.dose.peak),
      durationS: x.dose.durationS,
      kHealth: x.rule.healthK,
      kComfort: x.rule.comfortK,
      mtvvRatio: finiteOrNull(x.basicMethod.mtvvRatio),
      vdvRatio: finiteOrNull(x.basicMethod.vdvRatio),
      basicMethodAdequate: x.basicMethod.adequate,
      stationarity: stationarityJson(x.stationarity),
      filterMaxErrorPct: x.filter.maxErrorPct,
      filterMaxErrorAtHz: x.filter.maxErrorAtHz,
      filterTopCentreHz: x.filter.topCentreHz,
      filterMethod: x.filter.method,
      ...(x.peakHold
        ? {
            peakHold: {
              stretchS: x.peakHold.stretchS,
              stretches: x.peakHold.stretches,
              averagesPerStretch: x.peakHold.averagesPerStretch,
              frequencyHz: arr(a.channels[r.axes.indexOf(x)]!.psd.frequencyHz),
              psd: arr(x.peakHold.psd),
              average: arr(a.channels[r.axes.indexOf(x)]!.psd.psd),
              atS: arr(x.peakHold.atS),
              units: "(m/s2)2/Hz, unweighted",
            },
          }
        : {}),
    })),
    totalValue: { comfort: finiteOrNull(r.totalValue.comfort), health: finiteOrNull(r.totalValue.health) },
    comfort: { reactions: r.comfort.reactions },
    exposure: e
      ? {
          durationS: e.durationS,
          a8: finiteOrNull(e.a8),
          a8Axis: e.a8Axis,
          vdv: finiteOrNull(e.vdv),
          vdvAxis: e.vdvAxis,
          a8ActionAfterS: finiteOrNull(e.a8ActionAfterS),
          a8LimitAfterS: finiteOrNull(e.a8LimitAfterS),
          directive2002_44_EC: { a8: e.directive.a8, vdv: e.directive.vdv, ...DIRECTIVE_2002_44_EC },
          iso2631HealthGuidanceZone: { a8: e.healthZone.a8, vdv: e.healthZone.vdv, ...r.healthZone },
        }
      : null,
    seat: r.seat
      ? {
          floorChannel: r.seat.floorChannel,
          awFloor: r.seat.awFloor,
          awFloorFromPsd: r.seat.awFloorFromPsd,
          awFloorWelchWeighted: r.seat.awFloorWelchWeighted,
          awSeat: r.seat.awSeat,
          seat: r.seat.seat,
        }
      : null,
    notes: findingTexts(r.notes),
    doubts: findingTexts(r.doubts),
    findings: { notes: findingsJson(r.notes), doubts: findingsJson(r.doubts) },
    cautions: RIDE_CAUTIONS,
  };
}

/**
 * `ride --csv OUT`: every figure as one row (long form, one value a row, ready for a pivot table or
 * a filter): `axis,channel,quantity,frequency_hz,time_s,value,unit`. Per axis its figures (a_w, a_w
 * from the PSD, crest factor, VDV, MTVV with its time, peak, the k factors, the filter's error), then
 * its unweighted and weighted PSD at each line (`psd`, `weighted_psd` = |W(f)|² × PSD, with
 * `frequency_hz`; with --peak-hold also `peak_hold_psd`, `time_s` the start of the stretch that holds
 * it), then its weighted running r.m.s. at the end of each stretch (`running_rms`, with
 * `time_s` from the record's first sample); last the whole-ride figures (the total values with an
 * empty axis; A(8) and the daily VDV with --exposure, on the axis that gives each, `time_s` the daily
 * exposure; SEAT with --floor, its channel the floor's). SI units; numbers at full precision
 * (shortest round-trip); a figure that could not be had is an empty field.
 */
export function rideCsv(r: RideResult): string {
  const a = r.analysis;
  const from = a.window.fromS;
  const lines = ["axis,channel,quantity,frequency_hz,time_s,value,unit"];
  const num = (v: number | undefined) => (v !== undefined && Number.isFinite(v) ? String(v) : "");
  const add = (
    axis: string,
    channel: string,
    quantity: string,
    f: number | undefined,
    t: number | undefined,
    v: number,
    unit: string,
  ) => lines.push([axis, channel === "" ? "" : csvField(channel), quantity, num(f), num(t), num(v), unit].join(","));
  r.axes.forEach((x, i) => {
    const ch = x.channel;
    add(x.axis, ch, "aw", undefined, undefined, x.dose.rms, "m/s2");
    add(x.axis, ch, "aw_from_psd", undefined, undefined, x.awFromPsd, "m/s2");
    add(x.axis, ch, "crest_factor", undefined, undefined, x.dose.crestFactor, "1");
    add(x.axis, ch, "vdv", undefined, undefined, x.dose.vdv, "m/s1.75");
    add(x.axis, ch, "mtvv", undefined, x.dose.mtvvAtS + from, x.dose.mtvv, "m/s2");
    add(x.axis, ch, "peak", undefined, undefined, x.dose.peak, "m/s2");
    add(x.axis, ch, "k_health", undefined, undefined, x.rule.healthK, "1");
    add(x.axis, ch, "k_comfort", undefined, undefined, x.rule.comfortK, "1");
    add(x.axis, ch, "filter_max_error", x.filter.maxErrorAtHz, undefined, x.filter.maxErrorPct, "%");
    const psd = a.channels[i]!.psd;
    const g = weightingPowerGains(x.weighting, psd.frequencyHz);
    for (let k = 0; k < psd.frequencyHz.length; k++)
      add(x.axis, ch, "psd", psd.frequencyHz[k], undefined, psd.psd[k]!, "(m/s2)2/Hz");
    for (let k = 0; k < psd.frequencyHz.length; k++)
      add(x.axis, ch, "weighted_psd", psd.frequencyHz[k], undefined, psd.psd[k]! * g[k]!, "(m/s2)2/Hz");
    const ph = x.peakHold;
    if (ph)
      for (let k = 0; k < ph.psd.length; k++)
        add(x.axis, ch, "peak_hold_psd", psd.frequencyHz[k], from + ph.atS[k]!, ph.psd[k]!, "(m/s2)2/Hz");
    const v = x.dose.stretchRms;
    for (let k = 0; k < v.length; k++)
      add(x.axis, ch, "running_rms", undefined, from + (k + 1) * x.dose.stretchS, v[k]!, "m/s2");
  });
  add("", "", "total_value_health", undefined, undefined, r.totalValue.health, "m/s2");
  add("", "", "total_value_comfort", undefined, undefined, r.totalValue.comfort, "m/s2");
  const e = r.exposure;
  if (e) {
    add(e.a8Axis, "", "a8", undefined, e.durationS, e.a8, "m/s2");
    add(e.vdvAxis, "", "daily_vdv", undefined, e.durationS, e.vdv, "m/s1.75");
  }
  if (r.seat) add("z", r.seat.floorChannel, "seat", undefined, undefined, r.seat.seat, "1");
  return lines.join("\n") + "\n";
}
