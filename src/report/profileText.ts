import { profileMotion, type TestProfile } from "../compare/testProfile.js";
import { accelLabel, densityAscii, densityLabel, squaredLabel } from "../units.js";
import { SHAKER_CAUTION } from "./cautions.js";
import { fixed, sig, table } from "./format.js";
import { toolInfo } from "./psdJson.js";
import { printable } from "./printable.js";

export function toleranceSummary(p: TestProfile): string {
  const bands = p.bands
    .map((b) => `${sig(b.fromHz)}–${sig(b.toHz)} Hz +${sig(b.upperDb, 3)}/-${sig(b.lowerDb, 3)} dB`)
    .join(", ");
  const rms = p.rmsToleranceDb
    ? `, RMS +${fixed(p.rmsToleranceDb.upper, 2)}/-${fixed(p.rmsToleranceDb.lower, 2)} dB`
    : "";
  const allow = p.allowedOutsidePercent ? `, ${sig(p.allowedOutsidePercent, 3)} % of lines may lie outside` : "";
  const outer = p.outerBands
    ? `; outer limits ${p.outerBands.map((b) => `${sig(b.fromHz)}–${sig(b.toHz)} Hz +${sig(b.upperDb, 3)}/-${sig(b.lowerDb, 3)} dB`).join(", ")}`
    : "";
  return `${bands}${rms}${allow}${p.minDof !== undefined ? `, at least ${p.minDof} DOF` : ""}${outer}`;
}

/**
 * Where a derived profile came from, in one line: "derived from 3 recording(s): a.wav 1a2b3c4d5e6f, … (by psdgate 0.3.0
 * derive, date)".
 */
export function provenanceSummary(p: TestProfile): string | undefined {
  const v = p.provenance;
  if (!v) return undefined;
  const name = (f: string) => f.split(/[\\/]/).pop() ?? f;
  const recordings = v.inputs.filter((i) => i.role === undefined || i.role === "recording");
  const others = v.inputs.filter((i) => i.role !== undefined && i.role !== "recording");
  return `derived from ${recordings.length} recording(s): ${recordings.map((i) => `${name(i.file)}${i.group ? ` (${i.group})` : ""} ${i.sha256.slice(0, 12)}`).join(", ")}${others.map((i) => `; ${i.role} ${name(i.file)} ${i.sha256.slice(0, 12)}`).join("")} (by ${v.derivedBy}${v.created ? `, ${v.created}` : ""})`;
}

/** The derivation's parameters as "key value" pairs, in the file's order. */
export function provenanceParameters(p: TestProfile): string[] {
  return Object.entries(p.provenance?.parameters ?? {}).map(([k, v]) => `${k} ${v === null ? "none" : String(v)}`);
}

/** The shaker caution, saying how the stroke was estimated when the profile has tones. */
function shakerCaution(p: TestProfile): string {
  return p.tones.length === 0
    ? SHAKER_CAUTION
    : SHAKER_CAUTION.replace(
        "(peak-to-peak taken as 6 x RMS, a ±3 sigma excursion: common practice)",
        "(peak-to-peak taken as 6 x the random part's RMS, a ±3 sigma excursion: common practice, plus twice each tone's displacement peak, since the peaks can line up)",
      );
}

/** The tones of a mixed-mode profile and the total RMS (random plus the sum of peak^2 / 2). */
function toneLines(p: TestProfile): string[] {
  if (p.tones.length === 0) return [];
  const u = accelLabel(p.units);
  return [
    ...p.tones.map(
      (t) =>
        `  tone       ${sig(t.hz, 6)} Hz ± ${sig(t.toleranceHz, 3)} Hz, ${sig(t.peak, 5)} ${u} peak (+${sig(t.upperDb, 3)}/-${sig(t.lowerDb, 3)} dB)${t.label !== `tone at ${t.hz} Hz` ? `: ${printable(t.label)}` : ""}`,
    ),
    `  total      ${sig(p.totalRms, 5)} ${u} RMS, random and tones (each tone adds peak²/2 to the mean square)`,
  ];
}

export function profileText(p: TestProfile, version: string): string {
  const u = accelLabel(p.units);
  const m = profileMotion(p);
  const rows = [["Hz", `level ${densityLabel(p.units)}`, "slope to next dB/oct", `area ${squaredLabel(p.units)}`]];
  p.breakpoints.forEach((b, i) => {
    const s = p.segments[i];
    rows.push([sig(b.hz, 5), sig(b.level, 5), s ? fixed(s.slopeDbPerOctave, 3) : "", s ? sig(s.area, 5) : ""]);
  });
  return [
    `psdgate ${version}: profile "${printable(p.title)}"`,
    `  file       ${printable(p.file)}, sha256 ${p.sha256}`,
    "",
    table(rows),
    "",
    `  ${p.tones.length > 0 ? "random " : "overall"}    ${sig(p.rms, 5)} ${u} RMS over ${sig(p.breakpoints[0]!.hz)}–${sig(p.breakpoints[p.breakpoints.length - 1]!.hz)} Hz`,
    ...toneLines(p),
    `  velocity   ${sig(m.velocityRms * 1000, 4)} mm/s RMS`,
    `  stroke     ${sig(m.displacementRms * 1000, 4)} mm RMS displacement, ${sig(m.displacementPeakToPeak * 1000, 4)} mm peak-to-peak estimate (${p.tones.length > 0 ? "6 x the random part's RMS plus twice each tone's peak" : "6 x RMS"})`,
    `  tolerance  ${toleranceSummary(p)}`,
    ...(p.resolutionHz !== undefined ? [`  analysis   ${p.resolutionHz} Hz resolution`] : []),
    ...(p.durationS !== undefined ? [`  duration   ${p.durationS} s`] : []),
    ...p.defaultsApplied.map((d) => `  default    ${d}`),
    ...(p.provenance
      ? [
          `  origin     ${printable(provenanceSummary(p)!)}`,
          ...(p.provenance.method ? [`  method     ${printable(p.provenance.method)}`] : []),
          `  parameters ${printable(provenanceParameters(p).join(", "))}`,
          ...p.provenance.inputs.map(
            (i) =>
              `  input      ${printable(i.file)}${i.group ? ` [${printable(i.group)}]` : ""}${i.serviceHours !== undefined ? ` ${sig(i.serviceHours, 5)} h of service` : ""}, sha256 ${i.sha256}`,
          ),
        ]
      : []),
    "",
    `CAUTION: ${shakerCaution(p)}`,
    "",
  ].join("\n");
}

export function profileJson(p: TestProfile, version: string) {
  const m = profileMotion(p);
  return {
    tool: toolInfo(version),
    title: p.title,
    file: p.file,
    sha256: p.sha256,
    units: densityAscii(p.units),
    points: p.breakpoints.map((b, i) => ({
      hz: b.hz,
      level: b.level,
      slopeDbPerOctave: p.segments[i]?.slopeDbPerOctave ?? null,
      area: p.segments[i]?.area ?? null,
    })),
    rms: p.rms,
    rmsUnits: p.units === "g" ? "g" : "m/s2",
    tones: p.tones.map((t) => ({
      name: t.label,
      hz: t.hz,
      peak: t.peak,
      upperDb: t.upperDb,
      lowerDb: t.lowerDb,
      toleranceHz: t.toleranceHz,
    })),
    totalRms: p.totalRms,
    velocityRms: { value: m.velocityRms, units: "m/s" },
    displacementRms: { value: m.displacementRms, units: "m" },
    displacementPeakToPeak: {
      value: m.displacementPeakToPeak,
      units: "m",
      rule:
        p.tones.length > 0
          ? "6 x the random part's RMS (±3 sigma, common practice) plus twice each tone's displacement peak"
          : "6 x RMS (±3 sigma), common practice",
    },
    tolerance: {
      bands: p.bands,
      rmsDb: p.rmsToleranceDb ?? null,
      allowedOutsidePercent: p.allowedOutsidePercent ?? null,
      outerLimits: p.outerBands ?? null,
    },
    defaultsApplied: p.defaultsApplied,
    minDof: p.minDof ?? null,
    resolutionHz: p.resolutionHz ?? null,
    durationS: p.durationS ?? null,
    provenance: p.provenance ?? null,
    caution: shakerCaution(p),
  };
}
