import type { ResponseComparison, ResponseSpectra } from "../analyses/responseSpectra.js";
import { accelLabel, densityAscii } from "../units.js";
import { RESPONSE_CAUTION, STROKE_CAUTION } from "./cautions.js";
import { fixed, sig, table } from "./format.js";
import { fullScaleLines } from "./psdText.js";
import { finiteOrNull, toolInfo } from "./psdJson.js";

function arr(a: Float64Array): (number | null)[] {
  return Array.from(a, finiteOrNull);
}

function sourceJson(r: ResponseSpectra) {
  const s = r.source;
  return {
    kind: s.kind,
    file: s.file,
    sha256: s.sha256,
    label: s.label,
    units: densityAscii(s.units),
    settings: s.settings ?? null,
    window: s.window ?? null,
    reading: s.reading ?? null,
    band: r.band,
  };
}

function spectraJson(r: ResponseSpectra) {
  return {
    accelRms: arr(r.accelRms),
    milesRms: arr(r.milesRms),
    relDispRms: arr(r.relDispRms),
    relDispMilesRms: arr(r.relDispMilesRms),
    upcrossingRateHz: arr(r.upcrossingRateHz),
    peakRateHz: arr(r.peakRateHz),
    irregularity: arr(r.irregularity),
    peakFactor: arr(r.peakFactor),
    extremePeak: arr(r.extremePeak),
    durationS: r.durationS ?? null,
    fatigueDamage: arr(r.fatigueDamage),
    ...(r.fromPsd && r.timeDomain
      ? {
          fatigueDamageFromPsd: arr(r.fromPsd.fatigueDamage),
          extremePeakFromPsd: arr(r.fromPsd.extremePeak),
          timeDomain: {
            rule: TIME_DOMAIN_RULE,
            recordS: r.timeDomain.recordS,
            kurtosis: finiteOrNull(r.timeDomain.kurtosis),
            recordPeak: arr(r.timeDomain.recordPeak),
            recordDamage: arr(r.timeDomain.recordDamage),
            skippedHz: r.timeDomain.skippedHz,
            coarseHz: r.timeDomain.coarseHz,
            heldSamples: r.timeDomain.heldSamples,
          },
        }
      : {}),
    needsDuration: r.needsDuration,
    ...(r.tones
      ? {
          tones: r.tones.map((t) => ({
            name: t.label,
            hz: t.hz,
            peak: t.peak,
            accelPeak: arr(t.accelPeak),
            relDispPeak: arr(t.relDispPeak),
          })),
          totalAccelRms: arr(r.totalAccelRms!),
          toneRule:
            "a tone's response is deterministic: its peak x |T(f)| (relative displacement: x |Z/A|). Miles' equation does not apply to tones; milesRms, the rates, extremePeak and fatigueDamage are the random part alone",
        }
      : {}),
  };
}

/** How a recording's fatigueDamage and extremePeak are made (respond --json, the text's legend). */
export const TIME_DOMAIN_RULE =
  "from the recording itself: each sample through the SDOF's ramp-invariant filters (Smallwood 1981); damage = Miner's sum of the rainflow cycles (ASTM E1049-85) of K x relative displacement, N S^b = C, times exposure / record length; " +
  "largest peak = the record's largest |absolute-acceleration response - mean| times Davenport's factor at nu0+ x exposure over the one at nu0+ x record length";

/** The `respond --json` document (README.md, "respond"). */
export function responseJson(
  r: ResponseSpectra,
  version: string,
  against?: { b: ResponseSpectra; c: ResponseComparison },
) {
  const m = r.motion;
  return {
    tool: toolInfo(version),
    source: sourceJson(r),
    fnHz: arr(r.fnHz),
    q: r.q,
    units: {
      accel: r.source.units === "g" ? "g" : "m/s2",
      relDisp: "m",
      extremePeak: r.source.units === "g" ? "g" : "m/s2",
    },
    ...spectraJson(r),
    basquinB: r.sn.basquinB,
    snConstant: r.sn.snConstant,
    stressPerMetre: r.sn.stressPerUnit,
    damageRule:
      "narrow-band Rayleigh (Miles 1954): E[D] = nu0+ T / C (sqrt 2 K sigma_z)^b Gamma(1 + b/2), stress K z, S-N curve N S^b = C; defaults b 8, C 1, K 1 are common practice for a relative spectrum",
    extremeRule:
      "Davenport 1964: sigma (sqrt(2 ln(nu0+ T)) + 0.5772 / sqrt(2 ln(nu0+ T))), nu0+ of the acceleration response",
    kinematics: {
      band: { fromHz: m.fromHz, toHz: m.toHz },
      accelerationRms: m.accelerationRms,
      velocityRms: { value: m.velocityRms, units: "m/s" },
      displacementRms: { value: m.displacementRms, units: "m" },
      displacementPeakToPeak: {
        value: m.displacementPeakToPeak,
        units: "m",
        rule: "6 x RMS (±3 sigma), common practice",
      },
      frequencyHz: arr(m.frequencyHz),
      velocityPsd: { values: arr(m.velocityPsd), units: "(m/s)2/Hz" },
      displacementPsd: { values: arr(m.displacementPsd), units: "m2/Hz" },
      stroke: r.stroke ?? null,
      caution: STROKE_CAUTION,
    },
    against: against
      ? {
          source: sourceJson(against.b),
          ...spectraJson(against.b),
          rmsRatioDb: arr(against.c.rmsRatioDb),
          extremeRatioDb: arr(against.c.extremeRatioDb),
          damageRatio: arr(against.c.damageRatio),
          underTestsHz: against.c.underTestsHz,
        }
      : null,
    caution: RESPONSE_CAUTION,
  };
}

const mm = (m: number) => sig(m * 1000, 4);

/** Ranges of consecutive grid points in a list, "20–45 Hz, 300 Hz". */
function ranges(grid: Float64Array, hits: number[]): string {
  if (hits.length === 0) return "none";
  const set = new Set(hits);
  const out: string[] = [];
  let start = -1;
  for (let i = 0; i <= grid.length; i++) {
    const on = i < grid.length && set.has(grid[i]!);
    if (on && start < 0) start = i;
    if (!on && start >= 0) {
      out.push(start === i - 1 ? `${sig(grid[start]!, 4)} Hz` : `${sig(grid[start]!, 4)}–${sig(grid[i - 1]!, 4)} Hz`);
      start = -1;
    }
  }
  return out.join(", ");
}

type Against = { b: ResponseSpectra; c: ResponseComparison };

/**
 * respond's text output: the input and system, the response table (and the tones'), what each column means, kinematics,
 * stroke, the against comparison and the cautions.
 */
export function responseText(r: ResponseSpectra, version: string, against?: Against): string {
  const u = accelLabel(r.source.units);
  const lines = [...headerLines(r, version, u), table(responseRows(r, u)), ""];
  if (r.tones) lines.push(...toneResponseLines(r, u));
  if (r.needsDuration.length > 0)
    lines.push(
      `  exposure   not given and the source has none (a profile without durationS, a PSD table): ${r.needsDuration.join(" and ")} need one (--duration); the RMS, Miles, displacement and rates above do not`,
      "",
    );
  lines.push(...methodLines(r), ...kinematicsLines(r));
  if (against) lines.push(...againstLines(r, against));
  lines.push("", `CAUTION: ${RESPONSE_CAUTION}`, `CAUTION: ${STROKE_CAUTION}`, "");
  return lines.join("\n");
}

/** The text's head: the source, the input band and its PSD, any full-scale reading and window, the system. */
function headerLines(r: ResponseSpectra, version: string, u: string): string[] {
  const s = r.source;
  const what =
    s.kind === "profile"
      ? `profile "${s.label}"`
      : s.kind === "psd"
        ? `PSD table, channel ${s.label}`
        : `recording, channel ${s.label}`;
  return [
    `psdgate ${version}: SDOF response to ${s.file} (${what})`,
    `  input      ${sig(r.band.fromHz, 4)}–${sig(r.band.toHz, 5)} Hz, ${sig(r.motion.accelerationRms, 4)} ${u} RMS${s.settings ? `; PSD of ${s.settings.segmentLength}-point segments, ${sig(s.settings.resolutionHz, 4)} Hz lines, ${s.settings.averages} averages` : ""}`,
    ...(s.reading ? fullScaleLines([{ name: s.label, reading: s.reading }]) : []),
    ...(s.window && !s.window.whole
      ? [
          `  window     ${fixed(s.window.fromS, 3)} to ${fixed(s.window.toS, 3)} s of the recording (${fixed(s.window.durationS, 3)} s)`,
        ]
      : []),
    `  system     Q ${sig(r.q, 4)} (zeta ${sig(1 / (2 * r.q), 3)}), base-driven; exposure ${r.durationS === undefined ? "not given" : `${sig(r.durationS, 5)} s`}; Basquin b ${sig(r.sn.basquinB, 3)}, C ${sig(r.sn.snConstant, 3)}, stress ${sig(r.sn.stressPerUnit, 3)} per metre of relative displacement`,
    "",
  ];
}

/**
 * The response table's rows, header first: per natural frequency RMS, Miles, rates, largest peak, damage (and
 * record/PSD ratios).
 */
function responseRows(r: ResponseSpectra, u: string): string[][] {
  const td = r.timeDomain;
  const psd = r.fromPsd;
  const num = (x: number, f: (v: number) => string) => (Number.isFinite(x) ? f(x) : "-");
  const rows = [
    [
      "fn Hz",
      `accel RMS ${u}`,
      `Miles ${u}`,
      "exact/Miles",
      "rel. disp. RMS mm",
      "nu0+ /s",
      `largest peak ${u}`,
      "damage",
      ...(td ? ["peak rec/PSD", "damage rec/PSD"] : []),
    ],
  ];
  for (let i = 0; i < r.fnHz.length; i++) {
    rows.push([
      sig(r.fnHz[i]!, 4),
      sig(r.accelRms[i]!, 4),
      Number.isFinite(r.milesRms[i]!) ? sig(r.milesRms[i]!, 4) : "-",
      Number.isFinite(r.milesRms[i]!) ? fixed(r.accelRms[i]! / r.milesRms[i]!, 3) : "-",
      mm(r.relDispRms[i]!),
      sig(r.upcrossingRateHz[i]!, 4),
      num(r.extremePeak[i]!, (v) => sig(v, 4)),
      num(r.fatigueDamage[i]!, (v) => v.toExponential(3)),
      ...(td && psd
        ? [
            num(r.extremePeak[i]! / psd.extremePeak[i]!, (v) => fixed(v, 2)),
            num(r.fatigueDamage[i]! / psd.fatigueDamage[i]!, (v) => sig(v, 3)),
          ]
        : []),
    ]);
  }
  return rows;
}

/**
 * The profile's sine tones: what their responses are, and each tone's response peak and the total RMS per natural
 * frequency.
 */
function toneResponseLines(r: ResponseSpectra, u: string): string[] {
  const tones = r.tones!;
  const rowsT = [["fn Hz", ...tones.map((t) => `${sig(t.hz, 5)} Hz tone peak ${u}`), `total RMS ${u}`]];
  for (let i = 0; i < r.fnHz.length; i++)
    rowsT.push([sig(r.fnHz[i]!, 4), ...tones.map((t) => sig(t.accelPeak[i]!, 4)), sig(r.totalAccelRms![i]!, 4)]);
  return [
    `  tones      the profile's sine tones (${tones.map((t) => `${sig(t.hz, 5)} Hz ${sig(t.peak, 4)} ${u} peak`).join(", ")}): each tone's response is deterministic, its peak x |T(f)|;`,
    "             Miles' equation does not apply to a tone. The columns above (Miles, rates, largest peak, damage) are the random part alone;",
    "             total RMS = sqrt(random² + sum of (tone response peak)² / 2). The damage and largest peak of sine plus random together are not computed.",
    "",
    table(rowsT),
    "",
  ];
}

/**
 * What the columns are: exact, Miles (and its scatter on a measured PSD), the record's own peak and damage, Davenport's
 * peak, the damage.
 */
function methodLines(r: ResponseSpectra): string[] {
  const s = r.source;
  const td = r.timeDomain;
  return [
    "  exact      integral of |T|² G (absolute acceleration) and of the relative-displacement transfer over the input, no white-noise assumption.",
    "  Miles      sqrt(pi/2 fn Q G(fn)): assumes the input flat around fn and drops the 1/Q term, so exact/Miles is sqrt(1 + 1/Q²) on a flat input;",
    "             it moves away from that where the input slopes or has peaks near fn, and near the band edges (part of the resonance falls outside).",
    ...(s.kind !== "profile"
      ? [
          `             On a measured PSD Miles reads the one line at fn, which scatters by ${s.settings ? `about ±${fixed(100 * Math.sqrt(2 / s.settings.dof), 0)} % (1 sigma, chi-square)` : "the PSD's random error"}, while the integral averages the lines across the resonance.`,
        ]
      : []),
    ...(td
      ? [
          `  recording  largest peak and damage come from the record itself (${sig(td.recordS, 5)} s, kurtosis ${fixed(td.kurtosis, 2)}; 3 for a Gaussian record): the SDOF filtered in time, its largest`,
          "             |response| grown to the exposure by Davenport's factors, the damage by rainflow (ASTM E1049-85) scaled by exposure / record length.",
          "             rec/PSD compares them with the PSD's Davenport peak and narrow-band damage (in --json as extremePeakFromPsd, fatigueDamageFromPsd):",
          "             well above 1 where shocks or other non-Gaussian content carry the damage, a little below 1 on a Gaussian record.",
          ...(td.skippedHz.length
            ? [
                `             Not computed in time above fs/4 (${td.skippedHz.map((f) => sig(f, 4)).join(", ")} Hz): shown as -.`,
              ]
            : []),
          ...(td.coarseHz.length
            ? [
                `             Between fs/10 and fs/4 (${td.coarseHz.map((f) => sig(f, 4)).join(", ")} Hz) the sampled peak can fall short by up to 1 - cos(pi fn/fs).`,
              ]
            : []),
        ]
      : []),
    "  peak       Davenport's expected largest peak over the exposure (about 1-2 % high for a narrow-band response, by psdgate's own simulation check).",
    "  damage     narrow-band Rayleigh, relative: only ratios at the same b and C mean anything.",
  ];
}

/** The input's kinematics (velocity, displacement, peak-to-peak) and its stroke against any rating. */
function kinematicsLines(r: ResponseSpectra): string[] {
  const m = r.motion;
  const lines = [
    "",
    `  kinematics ${sig(m.fromHz, 4)}–${sig(m.toHz, 5)} Hz${r.tones ? " (random part; `profile` gives velocity and stroke with the tones)" : ""}: velocity ${sig(m.velocityRms * 1000, 4)} mm/s RMS, displacement ${mm(m.displacementRms)} mm RMS, peak-to-peak estimate ${mm(m.displacementPeakToPeak)} mm (6 x RMS)`,
  ];
  if (r.source.kind !== "profile")
    lines.push("             (the lowest lines dominate the displacement: --fmin sets the band that matters)");
  if (r.stroke) {
    const st = r.stroke;
    lines.push(
      `  stroke     ${fixed(st.estimateMm, 3)} mm estimated against ${sig(st.ratedMm, 4)} mm rated: ${st.withinRating ? `within the rating (margin x${fixed(st.margin, 2)})` : `EXCEEDS the rating by ${fixed(100 * (1 / st.margin - 1), 0)} %`}`,
    );
  }
  return lines;
}

/** The --against comparison: B's source and exposure, B/A per natural frequency, and where B under-tests A. */
function againstLines(r: ResponseSpectra, against: Against): string[] {
  const { b, c } = against;
  const lines = [
    "",
    `  against    ${b.source.file} (${b.source.kind === "profile" ? `profile "${b.source.label}"` : `${b.source.kind}, channel ${b.source.label}`}), exposure ${b.durationS === undefined ? "not given" : `${sig(b.durationS, 5)} s`} against ${r.durationS === undefined ? "not given" : `${sig(r.durationS, 5)} s`}`,
  ];
  const rows2 = [["fn Hz", "RMS B/A dB", "largest peak B/A dB", "damage B/A", ""]];
  for (let i = 0; i < r.fnHz.length; i++) {
    const short = c.rmsRatioDb[i]! < 0 || c.extremeRatioDb[i]! < 0 || c.damageRatio[i]! < 1;
    rows2.push([
      sig(r.fnHz[i]!, 4),
      fixed(c.rmsRatioDb[i]!, 2),
      fixed(c.extremeRatioDb[i]!, 2),
      sig(c.damageRatio[i]!, 3),
      short ? "B under-tests" : "",
    ]);
  }
  lines.push(table(rows2), "");
  lines.push(
    `  B under-tests A in RMS at ${ranges(r.fnHz, c.underTestsHz.rms)}; in largest peak at ${ranges(r.fnHz, c.underTestsHz.extreme)}; in damage at ${ranges(r.fnHz, c.underTestsHz.damage)}`,
  );
  return lines;
}

/**
 * `respond --csv`: per natural frequency the response RMS (exact, Miles), relative displacement, largest peak and
 * damage; with --against, B's and the ratios.
 */
export function responseCsv(r: ResponseSpectra, against?: { b: ResponseSpectra; c: ResponseComparison }): string {
  const u = r.source.units === "g" ? "g" : "m/s2";
  const head = [
    "fn_hz",
    `accel_rms [${u}]`,
    `miles_rms [${u}]`,
    "rel_disp_rms [m]",
    `extreme_peak [${u}]`,
    "fatigue_damage [relative]",
  ];
  if (against)
    head.push(
      `against_accel_rms [${u}]`,
      `against_extreme_peak [${u}]`,
      "against_fatigue_damage [relative]",
      "rms_ratio_db",
      "extreme_ratio_db",
      "damage_ratio",
    );
  const lines = [head.join(",")];
  for (let i = 0; i < r.fnHz.length; i++) {
    const row = [r.fnHz[i], r.accelRms[i], r.milesRms[i], r.relDispRms[i], r.extremePeak[i], r.fatigueDamage[i]];
    if (against)
      row.push(
        against.b.accelRms[i],
        against.b.extremePeak[i],
        against.b.fatigueDamage[i],
        against.c.rmsRatioDb[i],
        against.c.extremeRatioDb[i],
        against.c.damageRatio[i],
      );
    lines.push(row.map((v) => (Number.isFinite(v!) ? String(v) : "")).join(","));
  }
  return lines.join("\n") + "\n";
}
