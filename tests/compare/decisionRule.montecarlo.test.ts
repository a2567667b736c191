import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { judgeSpectrum, type ChannelCompliance } from "../../src/compare/complianceCheck.js";
import {
  chanceAbove,
  chanceBelow,
  DECISION_RULE,
  lowerFactor,
  ruleLevels,
  upperFactor,
} from "../../src/compare/decisionRule.js";
import { parseProfile, profileLevel } from "../../src/compare/testProfile.js";
import { completePsd, welchPsd } from "../../src/estimate/spectral/psdEstimate.js";
import { SegmentPower } from "../../src/estimate/spectral/segmentPower.js";
import { normalizeWelchOptions } from "../../src/estimate/spectral/welchOptions.js";
import { WelchAccumulator } from "../../src/estimate/spectral/welchPsd.js";
import { spectralWindow } from "../../src/estimate/spectral/windows.js";
import { recordShaper, shapedRecord } from "../shapedRecords.js";
import { lower999, upper999 } from "../binomialBounds.js";

/**
 * The decision rule's rates, proven by seeded Monte Carlo on records this test makes itself
 * (tests/shapedRecords.ts: white Gaussian noise shaped by one FFT with fft.js; not psdgate's synth),
 * each beside its analytic rate. Profile: the KB-210 sample (20-2000 Hz, +-1.5 dB to 1 kHz, +-3 dB
 * above, RMS +-1 dB, minDof 120), 2.5 Hz Hann lines at 5120 Hz, 50 % overlap: 793 lines, 789 judged.
 * A record of K segments has 36 K^2 / (19 K - 1) DOF (docs/REFERENCES.md sec. 2).
 *
 * Bounds on the counts: with n records and a true rate p, the count exceeds the binomial 99.9 %
 * point only once in a thousand runs; the tests assert the observed count against those points for
 * the rate the rule promises (so a pass here proves the rate to that confidence, not to the digit).
 *
 * What each bound catches (binomial tails, scipy.stats.binom 1.17.1): "0 of 200 fail" fails the test with
 * probability 0.87 if the true false-fail rate is 1 % and 0.98 at 2 %; "at least 179 of 200 pass" (the 95 %
 * power at 188 DOF) with 0.96 if the true power is 85 %; "at most 18 of 200" (4 %) with 0.63 at 10 %;
 * "at most 13 of 100" (5 %) with 0.65 at 15 %; "at least 87 of 100 fail" (95 %) with 0.95 at 80 %;
 * "at least 42 of 50" with 0.91 at 75 %. Each bound wrongly fails a correct rule once in a thousand runs.
 *
 * The file is in the slow set (`npm run test:slow`, which CI runs after `npm test`). It is made cheaper, not
 * smaller: each PSD's records come from one recordShaper (FFT tables and gains once) and every record length is
 * judged from one Welch pass; the same seeds give the same records, counts and verdicts as one welchPsd per
 * length (checked by the first test). A/B on this 2-core machine, load 10-16: 43 s of CPU before, 29 s after.
 */
/** More records for a longer table (PSDGATE_MC_SCALE=5 npx vitest run this file); CI runs the default. */
const SCALE = Math.max(1, Number(process.env.PSDGATE_MC_SCALE ?? 1));
const profile = parseProfile(readFileSync("samples/profiles/kb210-controller.json", "utf8"), "kb210-controller.json");
const FS = 5120;
const N = 2048;
const LENGTH = 1 << 17;
const samplesFor = (k: number) => (k - 1) * (N / 2) + N;
const dofOf = (k: number) => (36 * k * k) / (19 * k - 1);
const nominal = (f: number) => (f >= 20 && f <= 2000 ? profileLevel(profile, f) : 0);
const bandDb = (f: number) => (f <= 1000 ? 1.5 : 3);

type Psd = Pick<ReturnType<typeof welchPsd>, "frequencyHz" | "psd" | "dof" | "lineSpacingHz">;
function judgePsd(p: Psd): ChannelCompliance {
  return judgeSpectrum(
    {
      name: "mc",
      frequencyHz: p.frequencyHz,
      psd: p.psd,
      dof: p.dof,
      lineSpacingHz: p.lineSpacingHz,
      sampleRateHz: FS,
      durationS: Infinity,
      window: "hann",
      segmentLength: N,
      detrend: "mean",
      confidence: 0.9,
    },
    profile,
  );
}
function judge(x: Float64Array, k: number): ChannelCompliance {
  return judgePsd(welchPsd(x.subarray(0, samplesFor(k)), FS, { segmentLength: N }));
}

const settings = normalizeWelchOptions({ segmentLength: N }, FS);
const hann = spectralWindow(settings.window, N);
/**
 * The record's first K segments judged for every K in `ks` (ascending) from one Welch pass: the
 * accumulator is read after each prefix (reading it changes nothing), so each estimate is the very
 * double array welchPsd gives on that prefix, at a third of the work of one pass per K.
 */
function judgePrefixes(x: Float64Array, ks: number[]): ChannelCompliance[] {
  const acc = new WelchAccumulator(
    { segmentLength: N, hop: settings.hop, window: hann, detrend: settings.detrend },
    new SegmentPower(N),
  );
  let pushed = 0;
  return ks.map((k) => {
    const end = samplesFor(k);
    acc.push(x.subarray(pushed, end));
    pushed = end;
    return judgePsd(completePsd(acc.finish(FS), hann, settings, FS));
  });
}

/** Verdict counts over `records` seeded records of the PSD `level`, each judged at every K (prefixes of one record). */
function monteCarlo(level: (f: number) => number, ks: number[], records: number, seed: number) {
  const out = ks.map(() => ({ fail: 0, pass: 0, inconclusive: 0 }));
  const record = recordShaper(level, FS, LENGTH);
  for (let r = 0; r < records; r++) {
    judgePrefixes(record(seed + r), ks).forEach((c, i) => out[i]![c.verdict]++);
  }
  // The table behind each assertion, printed with the test run (DEVELOPERS.md quotes a longer run).
  console.log(
    ks
      .map(
        (k, i) =>
          `${dofOf(k).toFixed(1)} DOF: fail ${out[i]!.fail}, pass ${out[i]!.pass}, inconclusive ${out[i]!.inconclusive} of ${records}`,
      )
      .join("; "),
  );
  return out;
}

describe("decision rule by Monte Carlo (records made by the test, not by synth)", () => {
  const ks = [66, 79, 99, 127]; // 125.2, 149.8, 187.7, 240.6 DOF

  it("the one-pass prefixes give welchPsd's own estimate and verdict at every K (bit for bit)", () => {
    const x = shapedRecord(nominal, FS, LENGTH, 7);
    const acc = new WelchAccumulator(
      { segmentLength: N, hop: settings.hop, window: hann, detrend: settings.detrend },
      new SegmentPower(N),
    );
    let pushed = 0;
    for (const k of ks) {
      acc.push(x.subarray(pushed, samplesFor(k)));
      pushed = samplesFor(k);
      const one = completePsd(acc.finish(FS), hann, settings, FS);
      const own = welchPsd(x.subarray(0, samplesFor(k)), FS, { segmentLength: N });
      expect(Buffer.compare(Buffer.from(one.psd.buffer), Buffer.from(own.psd.buffer)), `K ${k}`).toBe(0);
      expect(one.dof).toEqual(own.dof);
    }
    expect(judgePrefixes(x, ks).map((c) => c.verdict)).toEqual(ks.map((k) => judge(x, k).verdict));
  });

  it("a record whose true PSD equals the profile never fails by chance: 0 of 200 at 125-241 DOF (analytic: below 1e-6)", () => {
    const n = 200 * SCALE;
    const mc = monteCarlo(nominal, ks, n, 10_000);
    ks.forEach((k, i) => {
      expect(mc[i]!.fail, `K ${k}, ${dofOf(k).toFixed(1)} DOF`).toBeLessThanOrEqual(upper999(n, 1e-6));
    });
    // Below the DOF the rule's power needs (228 here: departures in runs of 3 lines or wider, seen through the
    // Hann kernel, beside the widest band), no pass; above it, a pass (the right verdict only grows with length).
    expect(mc[0]!.pass + mc[1]!.pass + mc[2]!.pass).toBe(0);
    expect(mc[3]!.pass).toBeGreaterThanOrEqual(lower999(n, 0.95));
  }, 300_000);

  it("a true PSD on the band edges everywhere (alternating +band/-band every 50 Hz, RMS inside) fails at most 5 %: analytic bound 4 %", () => {
    const n = 200 * SCALE;
    const edge = (f: number) => nominal(f) * 10 ** (((Math.floor(f / 50) % 2 ? 1 : -1) * bandDb(f)) / 10);
    const mc = monteCarlo(edge, [66, 127], n, 20_000);
    // The line tests' share of the false-fail rate is DECISION_RULE.lines = 4 % (Bonferroni bound).
    for (const c of mc) expect(c.fail).toBeLessThanOrEqual(upper999(n, DECISION_RULE.lines));
  }, 300_000);

  it("an RMS on its tolerance edge (all lines +1 dB) fails at most 5 %", () => {
    const n = 100 * SCALE;
    const mc = monteCarlo((f) => nominal(f) * 10 ** 0.1, [66, 127], n, 30_000);
    for (const c of mc) expect(c.fail).toBeLessThanOrEqual(upper999(n, DECISION_RULE.falseFailRate));
  }, 300_000);

  it("a departure 1.5 dB beyond the band over 5 % of the lines in one stretch (40 lines at 350-450 Hz) fails at least 95 % at 125 DOF", () => {
    const n = 100 * SCALE;
    const lv = ruleLevels(789, false);
    // Analytic: the one stretch of 16 lines inside the departure, its DOF nu 16 / (1 + 2 (15/16) 4/9 + 2 (14/16) 1/36).
    const nu16 = (dofOf(66) * 16) / (1 + 2 * (15 / 16) * (4 / 9) + 2 * (14 / 16) * (1 / 36));
    const part = (789 * 0.25) / (3 * Math.floor((789 - 16) / 8 + 1));
    const g = 10 ** (DECISION_RULE.departureDb / 10);
    const analyticUp = chanceAbove(nu16, g, upperFactor(nu16, lv.upper.lineTest * part));
    const analyticDown = chanceBelow(nu16, 1 / g, lowerFactor(nu16, lv.lower.lineTest * part));
    expect(analyticUp).toBeGreaterThan(0.99);
    expect(analyticDown).toBeGreaterThan(0.99);
    const up = monteCarlo((f) => nominal(f) * (f >= 350 && f < 450 ? 10 ** 0.3 : 1), [66], n, 40_000)[0]!;
    const down = monteCarlo((f) => nominal(f) * (f >= 350 && f < 450 ? 10 ** -0.3 : 1), [66], n, 50_000)[0]!;
    expect(up.fail).toBeGreaterThanOrEqual(lower999(n, 0.95));
    expect(down.fail).toBeGreaterThanOrEqual(lower999(n, 0.95));
  }, 300_000);

  it("the same 5 % in five scattered stretches of 8 lines fails at least 95 % at the DOF the rule asks for a pass (analytic 95 %)", () => {
    const n = 100 * SCALE;
    const starts = [62.5, 237.5, 412.5, 612.5, 862.5];
    const inRuns = (f: number) => starts.some((s) => f >= s - 1.25 && f < s + 20 - 1.25);
    const probe = judge(shapedRecord(nominal, FS, LENGTH, 1), 66);
    const k = Math.ceil((19 * probe.dof.forPower) / 36 + 1);
    expect(dofOf(k)).toBeGreaterThanOrEqual(probe.dof.forPower);
    const up = monteCarlo((f) => nominal(f) * (inRuns(f) ? 10 ** 0.3 : 1), [k], n, 60_000)[0]!;
    const down = monteCarlo((f) => nominal(f) * (inRuns(f) ? 10 ** -0.3 : 1), [k], n, 70_000)[0]!;
    expect(up.fail).toBeGreaterThanOrEqual(lower999(n, 0.95));
    expect(down.fail).toBeGreaterThanOrEqual(lower999(n, 0.95));
  }, 300_000);

  it("an RMS 0.5 dB outside its tolerance (every line +-1.5 dB) fails at least 95 % at 125 DOF", () => {
    const n = 50 * SCALE;
    const hot = monteCarlo((f) => nominal(f) * 10 ** 0.15, [66], n, 80_000)[0]!;
    const cold = monteCarlo((f) => nominal(f) * 10 ** -0.15, [66], n, 90_000)[0]!;
    expect(hot.fail).toBeGreaterThanOrEqual(lower999(n, 0.95));
    expect(cold.fail).toBeGreaterThanOrEqual(lower999(n, 0.95));
  }, 300_000);
});
