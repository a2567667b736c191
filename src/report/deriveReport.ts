import { stringify } from "yaml";
import type { ProfileDocument } from "../read/profileFile.js";
import type { DeriveResult } from "../analyses/deriveProfile.js";
import { accelLabel, densityAscii } from "../units.js";
import { DERIVE_CAUTION, SHAKER_CAUTION } from "./cautions.js";
import { fixed, sig, table } from "./format.js";
import { printable } from "./printable.js";
import { finiteOrNull, toolInfo } from "./psdJson.js";
import { findingText, findingTexts } from "./findingTexts.js";

function arr(a: Float64Array): (number | null)[] {
  return Array.from(a, finiteOrNull);
}

/** The profile file's text: YAML for .yaml/.yml, JSON otherwise (psdgate's profile format either way). */
export function profileDocumentText(doc: ProfileDocument, file: string): string {
  if (/\.ya?ml$/i.test(file))
    return `# Written by ${doc.provenance?.derivedBy ?? "psdgate"}: a derived test profile (psdgate's profile format).\n${stringify(doc, { lineWidth: 0 })}`;
  return `${JSON.stringify(doc, null, 2)}\n`;
}

export const DAMAGE_RULE =
  "narrow-band Rayleigh (Miles 1954): E[D] = nu0+ T / C (sqrt 2 K sigma_z)^b Gamma(1 + b/2), stress K z (relative displacement, m), S-N curve N S^b = C with C = K = 1 (a relative damage, as respond gives it)";
export const EXTREME_RULE =
  "Davenport 1964: expected largest peak of the absolute-acceleration response, sigma (sqrt(2 ln(nu0+ T)) + 0.5772 / sqrt(2 ln(nu0+ T)))";
export const TOLERANCE_RULE =
  "one-sided normal tolerance limit on log10 PSD per line: 10^(mean + k s), k = t'_gamma(n - 1, z_p sqrt(n)) / sqrt(n) from the noncentral t (Natrella 1963; NIST/SEMATECH e-Handbook sec. 7.2.6.3; k checked against scipy.stats.nct in psdgate's tests)";

/** The `derive --json` document (README.md, "derive"). */
export function deriveJson(r: DeriveResult, version: string) {
  const t = r.tolerance;
  return {
    tool: toolInfo(version),
    lifeS: r.lifeS,
    lifeRule: r.lifeRule,
    testDurationS: r.testDurationS,
    q: r.q,
    basquinB: r.sn.basquinB,
    damageMargin: r.margin,
    units: {
      psd: densityAscii(r.units),
      extreme: r.units === "g" ? "g" : "m/s2",
      fatigue: "relative damage (C = 1, K = 1 per metre of relative displacement)",
    },
    damageRule: DAMAGE_RULE,
    extremeRule: EXTREME_RULE,
    band: r.band,
    fnHz: arr(r.fnHz),
    fieldFatigue: arr(r.fieldFatigue),
    testFatigue: arr(r.testFatigue),
    fieldExtreme: arr(r.fieldExtreme),
    testExtreme: arr(r.testExtreme),
    extremeRatio: arr(r.extremeRatio),
    extremeLimit: r.extremeLimit,
    extremeWarningsHz: r.extremeWarnings,
    fit: r.fit,
    shocks: {
      rule: "each recording's shock response spectrum (maximax absolute acceleration, whole record, mean removed; ramp-invariant filters as psdgate shock) at the same Q; fieldSrs is the largest over the recordings, null above a recording's fs/4; events at 6 x the background r.m.s., hold 0.05 s; largestEvents[].recording and eventsPerRecording[] follow the order of recordings",
      fieldSrs: arr(r.shocks.fieldSrs),
      shortfallHz: r.shocks.shortfallHz,
      largestEvents: r.shocks.largestEvents,
      eventsPerRecording: r.shocks.eventsPerRecording,
    },
    compression: {
      ...r.compression,
      rule: "flat spectrum: G_test = G_field (T_field / T_test)^(2/b) (equal narrow-band damage, from Miles' 1954 narrow-band form)",
    },
    groups: r.groups.map((g) => ({ name: g.name, serviceS: g.serviceS, damageShare: arr(g.damageShare) })),
    recordings: r.recordings.map((x) => ({
      file: x.file,
      sha256: x.sha256,
      group: x.group,
      channel: x.channel,
      durationS: x.durationS,
      serviceS: x.serviceS,
      sampleRateHz: x.sampleRateHz,
      dof: x.dof,
      averages: x.averages,
      bandRms: x.bandRms,
      stationary: x.stationary ?? null,
      stationarityNote: x.stationarityNote ? findingText(x.stationarityNote) : null,
      fatigue: arr(x.damage),
      extreme: arr(x.extreme),
      ...(x.fromPsd
        ? {
            fatigueFromPsd: arr(x.fromPsd.damage),
            extremeFromPsd: arr(x.fromPsd.extreme),
            kurtosis: x.fromPsd.kurtosis,
          }
        : {}),
    })),
    field: {
      frequencyHz: arr(r.frequencyHz),
      lineSpacingHz: r.lineSpacingHz,
      envelope: arr(r.envelope),
      mean: arr(r.mean),
      meanRule: "each recording weighted by the service time it stands for",
      tolerance:
        "missing" in t
          ? {
              n: t.n,
              coverage: t.coverage,
              confidence: t.confidence,
              k: null,
              limit: null,
              missing: findingText(t.missing),
            }
          : {
              n: t.n,
              coverage: t.coverage,
              confidence: t.confidence,
              k: t.k,
              limit: arr(t.limit),
              rule: TOLERANCE_RULE,
            },
    },
    profile: r.document,
    motion: {
      velocityRmsMs: r.motion.velocityRms,
      displacementRmsM: r.motion.displacementRms,
      displacementPeakToPeakM: r.motion.displacementPeakToPeak,
      rule: "closed form over the profile's band; peak-to-peak 6 x RMS (±3 sigma), common practice",
    },
    stroke: r.stroke ?? null,
    notes: findingTexts(r.notes),
    candidateTones: r.candidateTones,
    caution: DERIVE_CAUTION,
  };
}

export function deriveText(r: DeriveResult, version: string, outFile: string): string {
  const u = accelLabel(r.units);
  const h = (s: number) => `${sig(s / 3600, 5)} h`;
  const rec = [["recording", "group", "analysed s", "service", "RMS " + u, "DOF", "stationary"]];
  for (const x of r.recordings)
    rec.push([
      printable(x.file),
      printable(x.group),
      fixed(x.durationS, 1),
      h(x.serviceS),
      sig(x.bandRms, 4),
      fixed(x.dof, 0),
      x.stationary === undefined ? "not tested" : x.stationary ? "yes" : "NO",
    ]);
  const pts = [["Hz", `level ${densityAscii(r.units)}`]];
  for (const p of r.document.points) pts.push([sig(p.hz, 5), sig(p.level!, 4)]);
  const t = r.tolerance;
  const grid = [["fn Hz", "field FDS", "test FDS", "test/field", "field ERS " + u, "test ERS " + u, "ratio"]];
  r.fnHz.forEach((f, i) =>
    grid.push([
      sig(f, 4),
      sig(r.fieldFatigue[i]!, 4),
      sig(r.testFatigue[i]!, 4),
      fixed(r.testFatigue[i]! / r.fieldFatigue[i]!, 3),
      sig(r.fieldExtreme[i]!, 4),
      sig(r.testExtreme[i]!, 4),
      fixed(r.extremeRatio[i]!, 3) + (r.extremeRatio[i]! > r.extremeLimit ? " !" : ""),
    ]),
  );
  return [
    `psdgate ${version}: derived profile "${printable(r.document.title)}" written to ${printable(outFile)}`,
    `  life       ${h(r.lifeS)} of service (${r.lifeRule === "mix file hours" ? "the mix file's hours" : "shared by the recordings' durations"}), test ${sig(r.testDurationS, 6)} s`,
    `  groups     ${r.groups.map((g) => `${printable(g.name)} ${h(g.serviceS)}`).join(", ")}`,
    "",
    table(rec),
    "",
    `  field      ${sig(r.lineSpacingHz, 4)} Hz lines; band ${sig(r.band.fromHz)}–${sig(r.band.toHz)} Hz; service-weighted mean ${sig(r.compression.meanFieldRms, 4)} ${u} RMS`,
    `  limit      ${"missing" in t ? findingText(t.missing) : `P${fixed(100 * t.coverage, 0)}/${fixed(100 * t.confidence, 0)} normal tolerance limit on log10 PSD over ${t.n} recordings, k = ${fixed(t.k, 4)}`}`,
    `  damage     Q ${r.q}, Basquin b ${r.sn.basquinB} (defaults Q 10, b 8: common practice), narrow-band Miner, damage margin ×${r.margin}`,
    "",
    table(pts),
    "",
    `  profile    ${sig(r.profile.rms, 4)} ${u} RMS, ${r.document.points.length} breakpoints (at most ${r.fit.maxBreakpoints}); tolerance ±${r.document.tolerance.bands[0]!.upperDb} dB, RMS ±${r.document.tolerance.rmsPercent} %, ${r.document.minDof} DOF, ${r.document.resolutionHz} Hz lines, ${r.document.durationS} s`,
    `  motion     ${sig(r.motion.velocityRms * 1000, 4)} mm/s RMS velocity, ${sig(r.motion.displacementRms * 1000, 4)} mm RMS displacement, ${sig(r.motion.displacementPeakToPeak * 1000, 4)} mm peak-to-peak estimate (6 x RMS)`,
    `  stroke     ${r.stroke ? `${fixed(r.stroke.estimateMm, 2)} mm against ${sig(r.stroke.ratedMm, 4)} mm rated: ${r.stroke.withinRating ? `within the rating (margin x${fixed(r.stroke.margin, 2)})` : `EXCEEDS the rating by ${fixed(100 * (1 / r.stroke.margin - 1), 0)} %`}` : "not checked: give the exciter's rated peak-to-peak stroke with --stroke-mm"}`,
    `  coverage   test FDS / field FDS ≥ ${fixed(r.fit.minRatio, 4)} everywhere (lowest at ${sig(r.fit.minRatioHz, 4)} Hz); median ${fixed(r.fit.medianRatio, 3)}, largest ${fixed(r.fit.maxRatio, 3)} (the over-test the fit leaves)`,
    `  compression flat case G_test = G_field (T_field / T_test)^(2/b) = ×${sig(r.compression.flatFactor, 4)} in level; this profile's RMS is ×${sig(r.compression.rmsRatio, 4)} the mean field's (×${sig(r.compression.rmsRatio ** 2, 4)} in power)`,
    `  shocks     ${r.shocks.eventsPerRecording.reduce((s, x) => s + x, 0)} event(s) in the field recordings${r.shocks.largestEvents.length ? ` (largest ${r.shocks.largestEvents[0]!.peak >= 0 ? "+" : ""}${sig(r.shocks.largestEvents[0]!.peak, 4)} ${u} at ${fixed(r.shocks.largestEvents[0]!.timeS, 3)} s in ${printable(r.recordings[r.shocks.largestEvents[0]!.recording]!.file)})` : ""}; ` +
      (r.shocks.shortfallHz.length
        ? `the test's largest response falls below the field's SRS at ${r.shocks.shortfallHz.length} natural frequencies: a shock test is needed (NOTE below)`
        : "the test's largest response reaches the field's SRS at every natural frequency"),
    `  extremes   test ERS / field ERS from ${fixed(Math.min(...r.extremeRatio), 3)} to ${fixed(Math.max(...r.extremeRatio), 3)}; limit ×${r.extremeLimit}${r.extremeWarnings.length ? `: EXCEEDED at ${r.extremeWarnings.length} natural frequencies (! below)` : ": not exceeded"}`,
    "",
    table(grid),
    "",
    ...r.candidateTones.map(
      (t) =>
        `TONE: ${printable(t.file)}: ${sig(t.frequencyHz, 6)} Hz, ${sig(t.peak, 3)} peak, ${fixed(t.aboveBackgroundDb, 1)} dB above the lines around it (a candidate for the lab profile's tones)`,
    ),
    ...findingTexts(r.notes).map((n) => `NOTE: ${printable(n)}`),
    ...(r.notes.length ? [""] : []),
    `CAUTION: ${DERIVE_CAUTION}`,
    `CAUTION: ${SHAKER_CAUTION}`,
    "",
  ].join("\n");
}
