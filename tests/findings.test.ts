import { readdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { _channelFindings, analyzeRecording } from "../src/pass/analyzeRecording.js";
import { checkRecording, loadProfile } from "../src/analyses/checkRecording.js";
import { judgeSpectrum, withDoubts, type SpectrumUnderTest } from "../src/compare/complianceCheck.js";
import { levelGate } from "../src/compare/levelGate.js";
import { parseProfile } from "../src/compare/testProfile.js";
import { judgeMixedMode } from "../src/compare/toneCheck.js";
import type { Finding } from "../src/findings.js";
import { tempDir } from "./helpers.js";
import { shapedRecord } from "./shapedRecords.js";
import { wavBytes } from "./wavBytes.js";

/**
 * Findings, doubts and verdict reasons carry their numbers twice: in `values` for programs and in the
 * sentence for people. This file makes every finding code psdgate has (the `code: "…"` literals of
 * the modules that make findings) and holds each value to a number its text states, as the text
 * rounds it, so the two cannot drift apart.
 */

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    return statSync(p).isDirectory() ? sources(p) : p.endsWith(".ts") ? [p] : [];
  });
}

/** Every finding code in src/: each `code: "…"` literal in a module that makes findings (imports findings.ts). */
function codesInSource(): Set<string> {
  const found = new Set<string>();
  for (const f of sources("src")) {
    const text = readFileSync(f, "utf8");
    if (!/from "\.{1,2}\/(\.\.\/)*findings\.js"/.test(text)) continue;
    for (const m of text.matchAll(/code: "([A-Z][A-Z0-9_]*)"/g)) found.add(m[1]!);
  }
  return found;
}

interface Stated { value: number; tol: number; below: boolean }

/** The numbers a text states, each with the half-unit of its last digit shown (what rounding can move it by). */
export function statedNumbers(text: string): Stated[] {
  const out: Stated[] = [];
  for (const m of text.matchAll(/(?<![\w.])([-+]?)(\d+)(?:\.(\d+))?(?:e([-+]?\d+))?/g)) {
    const [whole, , int, frac, exp] = m;
    const e = exp === undefined ? 0 : Number(exp);
    // Integers of more than 5 digits come from 5-significant-digit formatting (fmt): their last places are not shown.
    const lastPlace = frac !== undefined ? -frac.length : Math.max(0, int!.replace(/^0+/, "").length - 5);
    const value = Number(whole);
    out.push({ value, tol: 0.5 * 10 ** (lastPlace + e), below: /below\s*$/.test(text.slice(0, m.index)) });
  }
  return out;
}

/** The value is one the text states: within the text's rounding (either sign: "-1.50 dB" for a lower limit of 1.5), or under a stated "below" bound. */
function stated(v: number, text: string): boolean {
  if (!Number.isFinite(v)) return text.includes(String(v));
  return statedNumbers(text).some((s) => Math.abs(Math.abs(s.value) - Math.abs(v)) <= s.tol * (1 + 1e-9) + 1e-12 * Math.abs(v) || (s.below && v < s.value));
}

function wav(x: Float64Array, fs: number, name: string): string {
  const f = join(tempDir(), name);
  writeFileSync(f, wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: fs, samples: Array.from(x) }));
  return f;
}

/** A flat required PSD with a ±1.5 dB band and ±1 dB on the RMS (the shapes judgeSpectrum is tested on). */
const flat = (lo: number, hi: number, extra: Record<string, unknown> = {}, tolerance: Record<string, unknown> = {}) =>
  parseProfile(JSON.stringify({
    title: "flat", units: "g2/Hz", points: [{ hz: lo, level: 0.01 }, { hz: hi, level: 0.01 }],
    tolerance: { bands: [{ fromHz: lo, toHz: hi, upperDb: 1.5, lowerDb: 1.5 }], rmsDb: 1, ...tolerance }, ...extra,
  }), "flat.json");

/** An exact spectrum (no estimation noise): level(f) at every line, the Nyquist line stored at half, as the estimate stores it. */
function exact(level: (f: number) => number, o: { fs?: number; n?: number; dof: number; durationS?: number; detrend?: "none" | "mean" | "linear" }): SpectrumUnderTest {
  const fs = o.fs ?? 2560;
  const n = o.n ?? 1024;
  const df = fs / n;
  const frequencyHz = new Float64Array(n / 2 + 1).map((_, k) => k * df);
  const psd = frequencyHz.map((f, k) => (k === n / 2 ? 0.5 : 1) * level(f));
  return { name: "t", frequencyHz, psd, dof: o.dof, lineSpacingHz: df, sampleRateHz: fs, durationS: o.durationS ?? 600, window: "hann", segmentLength: n, detrend: o.detrend ?? "mean", confidence: 0.9 };
}

async function allFindings(): Promise<Finding[]> {
  const out: Finding[] = [];
  const fs = 5120;
  const broadband = (f: number) => (f >= 20 && f <= 2000 ? 0.01 : 0);

  // A record that changes level halfway, analysed to past its end: NOT_STATIONARY, WINDOW_PAST_END.
  const stepped = shapedRecord(broadband, fs, 1 << 16, 21);
  for (let i = stepped.length / 2; i < stepped.length; i++) stepped[i] = 3 * stepped[i]!;
  const a = await analyzeRecording(wav(stepped, fs, "stepped.wav"), { segmentLength: 1024, toS: 100 });
  out.push(...a.channels[0]!.notes, ...a.channels[0]!.doubtFindings);

  // One channel's notes and doubts with each figure pushed past its gate (the sentences and values are made from these inputs).
  const base = (await analyzeRecording(wav(shapedRecord(broadband, fs, 1 << 16, 22), fs, "plain.wav"), { segmentLength: 1024 })).channels[0]!;
  const { stats: s, psd: p, parseval: pv } = base;
  const variants: Parameters<typeof _channelFindings>[] = [
    [{ ...s, nonFinite: 17, atMax: 40, atMin: 31 }, { ...p, skippedSegments: 3 }, pv, 65536, 1024, true, 12.8],
    [s, { ...p, averages: 0 }, pv, 900, 1024, true, 0.2],
    [{ ...s, mean: 0.4321 * s.std }, { ...p, averages: 3, randomError: 0.5774 }, pv, 4096, 1024, true, 0.8],
    [s, p, { ...pv, ok: false, ratio: 1.0345, belowFirstLineShare: 0.1234 }, 65536, 1024, true, 12.8],
    [s, p, { ...pv, ok: false, ratio: 0.9512, toleranceFrom: "record" }, 65536, 1024, true, 12.8],
    [s, { ...p, detrendedCrestFactor: 1.6, detrendedKurtosis: 1.9 }, pv, 65536, 1024, true, 12.8],
    [s, { ...p, detrendedCrestFactor: 40, detrendedKurtosis: 7.5 }, pv, 65536, 1024, true, 12.8],
  ];
  for (const v of variants) {
    const f = _channelFindings(...v);
    out.push(...f.notes, ...f.doubts);
  }

  // The verdicts on exact spectra: each rule of the judgement met or missed on purpose.
  const on = (f: number) => (f >= 20 && f <= 1000 ? 0.01 : 0);
  const db = (x: number) => 10 ** (x / 10);
  const judged = [
    judgeSpectrum(exact(on, { dof: 400 }), flat(20, 1000)), // PASS
    judgeSpectrum(exact((f) => on(f) * (f > 300 && f < 500 ? 4 : 1), { dof: 200 }), flat(20, 1000)), // LINES_OUTSIDE, RMS_OUTSIDE
    judgeSpectrum(exact((f) => on(f) * (f > 300 && f < 600 ? 4 : 1), { dof: 200 }), flat(20, 1000, {}, { allowedOutsidePercent: 5 })), // with an allowance
    judgeSpectrum(exact((f) => on(f) * (f > 400 && f < 430 ? 10 : 1), { dof: 200 }), flat(20, 1000, {}, { allowedOutsidePercent: 5, outerLimits: [{ fromHz: 20, toHz: 1000, upperDb: 6, lowerDb: 6 }] })), // OUTER_LIMIT
    judgeSpectrum(exact((f) => on(f) * db(1.3), { dof: 2 }), flat(20, 1000)), // RMS_UNRESOLVED, DOF_BELOW_POWER
    judgeSpectrum(exact(on, { dof: 400 }), flat(20, 1000, { minDof: 1000, durationS: 900, resolutionHz: 1 })), // DOF_BELOW_PROFILE, DURATION_SHORT, RESOLUTION_COARSE
    judgeSpectrum({ ...exact(on, { dof: 400, durationS: 25 }), analysedWindow: { fromS: 5, toS: 30 } }, flat(20, 1000, { durationS: 40 })), // DURATION_SHORT of a --from/--to window
    judgeSpectrum(exact((f) => (f >= 20 ? 0.01 * db(3) : 0), { dof: 200 }), flat(20, 2000)), // RANGE_ABOVE_RECORD, RMS over what the record covers
    judgeSpectrum(exact(on, { dof: 400 }), flat(20, 21)), // NO_LINES
    // NOTCH_LINES_LEFT_OUT: a 40 dB notch 35 Hz above the profile's start, where the wide kernel reaches past it.
    judgeSpectrum(exact(on, { dof: 400 }), parseProfile(JSON.stringify({
      title: "notch", units: "g2/Hz", points: [{ hz: 20, level: 0.01 }, { hz: 50, level: 0.01 }, { hz: 55, level: 0.000001 }, { hz: 60, level: 0.01 }, { hz: 1000, level: 0.01 }],
      tolerance: { bands: [{ fromHz: 20, toHz: 1000, upperDb: 1.5, lowerDb: 1.5 }], rmsDb: 1 },
    }), "notch.json")),
  ];
  for (const c of judged) out.push(...c.findings);

  // Mixed mode on an exact spectrum with hand-made tone fits: pass, low, missing, off frequency, unresolved.
  const mixed = flat(20, 1000, { tones: [{ name: "hum", hz: 120, peak: 2, toleranceDb: 1, toleranceHz: 0.5 }] });
  const fit = (peak: number, hz = 120, durationS = 600) => [{ nominalHz: 120, frequencyHz: hz, peak, phaseRad: 0, samples: 1, durationS, searchHalfWidthHz: 1 }];
  for (const f of [fit(2), fit(1.5), fit(0.01), fit(2, 121.5), fit(1.95, 120, 0.01), fit(1.7, 120, 0.5)]) out.push(...judgeMixedMode(exact(on, { dof: 400 }), mixed, f).findings);
  // A tone the record cannot hold (a profile to 2000 Hz, a record at 2560 Hz).
  out.push(...judgeMixedMode(exact(on, { dof: 400 }), flat(20, 2000, { tones: [{ hz: 1500, peak: 1, toleranceDb: 1 }] }), fit(1)).findings);
  // The level gate: a run loud for its first half and quiet for its second, and drift that dominates.
  const step = Array.from({ length: 64 }, (_, i) => (i < 32 ? db(2) : db(-2.9)));
  out.push(...levelGate(step, 1, 1, 0.64, 20));
  out.push(...withDoubts(judged[1]!, [{ code: "CLIPPING", values: {}, text: "in doubt" }]).findings.filter((f) => f.code === "FAIL_IN_DOUBT"));

  // And the real thing: the samples checked as a user would, control channels as one spectrum.
  const kb210 = await loadProfile("samples/profiles/kb210-controller.json");
  for (const file of ["samples/kb210-run.wav", "samples/kb210-run-short.wav", "samples/kb210-run-resonance.wav"]) {
    const r = await checkRecording(file, kb210, { histogram: false, control: { channels: ["1"], rule: "average" } });
    for (const c of [...r.channels, r.control!.judgement]) out.push(...c.findings);
  }
  // Held samples (a 50 Hz sensor written at 200 Hz): HELD_SAMPLES on the pass, HELD_BAND in a check above its Nyquist.
  const readings = shapedRecord((f) => (f >= 1 && f <= 20 ? 0.01 : 0), 50, 4096, 23);
  const heldX = Float64Array.from({ length: 4 * readings.length }, (_, i) => readings[Math.floor(i / 4)]!);
  const heldFile = wav(heldX, 200, "held.wav");
  const held = await checkRecording(heldFile, flat(5, 80), { histogram: false, segmentLength: 256 });
  out.push(...held.analysis.channels[0]!.notes, ...held.channels[0]!.findings);

  // ride: the weighting's error and band, exposure, axes, postures, the floor, a short window, held and NaN samples.
  const { rideRecording } = await import("../src/analyses/rideRecording.js");
  const ride = "samples/marlow-uv3-ride.wav";
  const rideBase = { inputUnits: "m/s2", scale: 40 } as const;
  const rides = [
    await rideRecording(ride, { ...rideBase, axes: { x: "1", z: "3" }, posture: "standing" }),
    await rideRecording(ride, { ...rideBase, axes: { x: "1" }, floor: "4", posture: "recumbent", exposureS: 3600 }),
    await rideRecording(ride, { ...rideBase, axes: { z: "3" }, posture: "seated", fromS: 10, toS: 12 }),
  ];
  const slow = Float64Array.from({ length: 100 * 60 }, (_, i) => 9.8 + 0.3 * Math.sin(0.37 * i) + (i === 700 ? NaN : 0));
  rides.push(await rideRecording(wav(slow, 100, "slow-ride.wav"), { inputUnits: "m/s2", axes: { z: "1" }, posture: "seated" }));
  rides.push(await rideRecording(heldFile, { inputUnits: "m/s2", axes: { z: "1" }, posture: "seated" }));
  // Curves and a stop on a lateral axis (tests/rideRecording.test.ts): the NOT_STATIONARY notes of ride.
  const cn = shapedRecord((f) => (f >= 0.5 && f <= 80 ? 0.0005 : 0), 1000, 1 << 18, 24);
  const curves = Float64Array.from(cn, (v, i) => (Math.floor(i / 20000) % 2 === 1 ? 0.8 : -1) + (i > 100000 && i < 160000 ? 0.2 : 1) * v);
  rides.push(await rideRecording(wav(curves, 1000, "curves.wav"), { inputUnits: "m/s2", axes: { y: "1" }, posture: "seated" }));
  for (const r of rides) out.push(...r.noteFindings, ...r.doubtFindings);
  return out;
}

describe("findings: codes, values and text (src/findings.ts)", () => {
  it("statedNumbers reads numbers as printed: signs, decimals, exponents, and what rounding hides", () => {
    expect(statedNumbers("RMS +1.23 dB, 5120 Hz, 1.23e+5 times, -0.50 %, 3-12 s, 123460").map((s) => [s.value, s.tol])).toEqual([
      [1.23, 0.005], [5120, 0.5], [123000, 500], [-0.5, 0.005], [3, 0.5], [12, 0.5], [123460, 5],
    ]);
    expect(stated(0.00003, "false-fail rate here below 0.01 %")).toBe(true);
    expect(stated(1.236, "RMS 1.23 dB")).toBe(false);
  });

  it("every finding code in src/ is made here, and each finding's values are numbers its text states", async () => {
    const all = await allFindings();
    const seen = new Set(all.map((f) => f.code));
    const inSource = codesInSource();
    expect(inSource.size).toBeGreaterThan(20);
    const drift: string[] = [];
    for (const f of all) {
      expect(typeof f.values).toBe("object");
      for (const [k, v] of Object.entries(f.values)) {
        expect(typeof v).toBe("number");
        if (!stated(v, f.text)) drift.push(`${f.code}.${k} = ${v} not in "${f.text}"`);
      }
    }
    expect(drift).toEqual([]);
    // RANGE_BELOW_JUDGED needs more detrend-biased lines than the kernel's half-width + 1: no window and
    // segment length gives that with a line left to judge (rectangular, linear detrend, 16 points biases
    // all 9 lines), so no record can make it today; its values are held to its text by reading.
    // Ride's route check out of tolerance on a stationary record (ROUTES_DIFFER: a fault of the method, which no
    // seeded record here makes) and RATE_MOVED (a CSV whose time column moves the rate after the filters were
    // designed; no values) are held to their texts by reading: ROUTES_DIFFER's values and text come from the
    // same expressions as ROUTES_DIFFER_NOT_STATIONARY's, which is made here.
    expect([...inSource].filter((c) => !seen.has(c)).sort()).toEqual(["RANGE_BELOW_JUDGED", "RATE_MOVED", "ROUTES_DIFFER"]);
  }, 60_000);
});
