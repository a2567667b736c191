import type { CheckResult } from "../analyses/checkRecording.js";
import type { ChannelCompliance } from "../compare/complianceCheck.js";
import { densityAscii } from "../units.js";
import { csvField } from "./csvField.js";

/**
 * `check --csv OUT`: the lines judged, one row per line and judged spectrum (each channel, and the
 * control spectrum when there is one): frequency, measured and required levels (the profile seen
 * through the window's kernel), deviation, the band's limits, status as measured and whether the
 * rule shows the line outside. Numbers at full precision (shortest round-trip).
 */
export function checkCsv(r: CheckResult): string {
  const u = densityAscii(r.profile.units);
  const lines = [
    `spectrum,role,frequency_hz,measured [${u}],required [${u}],deviation_db,upper_limit [${u}],lower_limit [${u}],upper_db,lower_db,status,shown`,
  ];
  const add = (name: string, role: string, c: ChannelCompliance) => {
    const q = csvField(name);
    for (const l of c.lines) {
      lines.push(
        [
          q,
          role,
          l.frequencyHz,
          l.measured,
          l.required,
          l.deviationDb,
          l.required * 10 ** (l.upperDb / 10),
          l.required * 10 ** (-l.lowerDb / 10),
          l.upperDb,
          l.lowerDb,
          l.status,
          l.shown ? "shown" : "",
        ].join(","),
      );
    }
  };
  if (r.control) add(`${r.control.rule} of ${r.control.channels.join(" + ")}`, "control spectrum", r.control.judgement);
  r.channels.forEach((c, i) => add(r.analysis.channels[i]!.name, r.roles[i]!, c));
  return lines.join("\n") + "\n";
}
