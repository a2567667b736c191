import type { ResponseComparison, ResponseSpectra } from "../analyses/responseSpectra.js";
import { accelLabel } from "../units.js";
import { RESPONSE_CAUTION, STROKE_CAUTION } from "./cautions.js";
import { embedResult } from "./embeddedResult.js";
import { fixed, sig } from "./format.js";
import {
  givenRow,
  metaRows,
  qty,
  recordDocument,
  recordSignOff,
  reportPage,
  row,
  type ReportContext,
} from "./reportPage.js";
import { responseJson } from "./responseReport.js";
import { escapeXml as esc, svgPlot, type Series } from "./svgPlot.js";

/**
 * The record of `respond --report`: the SDOF response spectra of one input (and of an `--against` input), the
 * input's kinematics and stroke, on the shared page frame (report/reportPage.ts) with its identity, sign-off
 * and embedded result, which `verify` re-runs.
 */
export const RESPOND_WORD = "RESPONSE RECORD";

export const EXTRA_STYLE = `
.exact { fill: none; stroke: #1b4f7a; stroke-width: 1.6; } .miles { fill: none; stroke: #b0552f; stroke-width: 1.1; stroke-dasharray: 5 3; }
.against { fill: none; stroke: #111; stroke-width: 1.6; stroke-dasharray: 9 4; }
table.grid th { width: auto; } table.fn td.num { padding: .5mm 2mm; } table.fn { font-size: 8.5pt; }
thead { display: table-header-group; }
`;

type Against = { b: ResponseSpectra; c: ResponseComparison };

function range(...arrays: Float64Array[]): [number, number] {
  let lo = Infinity;
  let hi = 0;
  for (const a of arrays)
    for (const v of a)
      if (Number.isFinite(v) && v > 0) {
        lo = Math.min(lo, v);
        hi = Math.max(hi, v);
      }
  if (!(hi > 0)) return [1e-3, 1];
  return [Math.max(lo, hi * 1e-9) / 2, hi * 2];
}

function sourceWords(r: ResponseSpectra): string {
  const s = r.source;
  return s.kind === "profile"
    ? `profile "${s.label}"`
    : s.kind === "psd"
      ? `PSD table, channel ${s.label}`
      : `recording, channel ${s.label}`;
}

/** The result embedded in a respond record (what `psdgate verify` re-runs and compares). */
export function responseResultDocument(
  r: ResponseSpectra,
  ctx: ReportContext,
  against?: Against,
): Record<string, unknown> {
  return recordDocument("respond", ctx, responseJson(r, ctx.version, against));
}

/**
 * The respond record: summary, identity, input, settings, plots, kinematics and stroke, the table, cautions, sign-off.
 */
export function responseHtml(
  r: ResponseSpectra,
  version: string,
  when: Date,
  context: Omit<ReportContext, "version" | "when"> = {},
  against?: Against,
): string {
  const ctx: ReportContext = { ...context, version, when };
  const m = ctx.meta;
  const s = r.source;
  const u = accelLabel(s.units);
  const name = s.file.split(/[\\/]/).pop() ?? s.file;
  const fn = r.fnHz;
  const title = m?.testId ? `SDOF response, test ${m.testId}: ${name}` : `SDOF response: ${name}`;
  const summary = responseSummary(r, u);
  const body = `<style>${EXTRA_STYLE}</style>
<div class="verdict none" id="verdict" data-verdict="none"><span class="word">SDOF</span><span>${esc(summary)}</span></div>
<h2>Test identity</h2>
<table class="meta" id="identity">
${metaRows(m)}
</table>
<h2>Input</h2>
<table class="meta">
${inputRows(r, u, against)}
</table>
<h2>Settings and assumptions</h2>
<table class="meta" id="settings">
${row("System", `single degree of freedom, base-driven, Q ${sig(r.q, 4)} (ζ ${sig(1 / (2 * r.q), 3)}), ${fn.length} natural frequencies`)}
${row("Exposure", r.durationS === undefined ? `not given and the source has none: ${esc(r.needsDuration.join(" and "))} need one (--duration)` : `${qty(sig(r.durationS, 5), "s")} for the largest peak and the damage`)}
${row("S-N curve", `N S^b = C with b ${sig(r.sn.basquinB, 3)}, C ${sig(r.sn.snConstant, 3)}, stress ${sig(r.sn.stressPerUnit, 3)} per metre of relative displacement${r.sn.snConstant === 1 && r.sn.stressPerUnit === 1 ? " (a relative damage: only ratios at the same b mean anything)" : ""}`)}
${row("Rules", "response RMS by integrating |T|² G (no white-noise assumption) beside Miles' equation; largest peak by Davenport 1964; damage narrow-band Rayleigh (Miles 1954)")}
${row("Units", `${esc(u)} for accelerations, as the source states; relative displacement in mm; velocity in mm/s`)}
${givenRow(ctx)}
</table>
${responsePlots(r, u, against).join("\n")}
<h2>Input kinematics and stroke</h2>
<table class="meta" id="kinematics">
${kinematicsRows(r)}
</table>
<div class="caution keep">${esc(STROKE_CAUTION)}</div>
<h2>Response at each natural frequency</h2>
<table class="grid fn"><thead><tr><th class="num">fn, Hz</th><th class="num">RMS, ${esc(u)}</th><th class="num">Miles, ${esc(u)}</th><th class="num">rel. disp. RMS, mm</th><th class="num">largest peak, ${esc(u)}</th><th class="num">damage</th>${against ? `<th class="num">RMS against/this, dB</th><th class="num">damage against/this</th>` : ""}</tr></thead>
<tbody>${fnRows(r, against)}</tbody></table>
<h2>Caution</h2>
<div class="caution keep">${esc(RESPONSE_CAUTION)}</div>
${recordSignOff("Response record", summary, m, [{ label: "Source", file: s.file, sha256: s.sha256 }, ...(against ? [{ label: "Against", file: against.b.source.file, sha256: against.b.source.sha256 }] : [])])}`;
  const page = reportPage(
    {
      title,
      verdictClass: "none",
      verdictWord: RESPOND_WORD,
      recordingSha256: s.sha256,
      recordingName: name,
      kindLine: "SDOF response-spectrum record",
      body,
      hashLabel: s.kind === "recording" ? "recording" : "source",
    },
    ctx,
  );
  return embedResult(page, responseResultDocument(r, ctx, against));
}

/** The banner's one line: Q and range, the largest response and where, the displacement against any rated stroke. */
function responseSummary(r: ResponseSpectra, u: string): string {
  const fn = r.fnHz;
  let worst = 0;
  for (let i = 1; i < fn.length; i++) if (r.accelRms[i]! > r.accelRms[worst]!) worst = i;
  const st = r.stroke;
  return `Q ${sig(r.q, 4)} over ${sig(fn[0]!, 4)}–${sig(fn[fn.length - 1]!, 4)} Hz: largest response ${sig(r.accelRms[worst]!, 4)} ${u} RMS at ${sig(fn[worst]!, 4)} Hz; displacement ${sig(r.motion.displacementPeakToPeak * 1000, 4)} mm peak-to-peak${st ? ` against ${sig(st.ratedMm, 4)} mm rated stroke: ${st.withinRating ? "within" : "EXCEEDS"}` : " (no rated stroke given)"}.`;
}

/**
 * The input table's rows: the source and its SHA-256, the band used, the recording's PSD, and the input compared
 * against.
 */
function inputRows(r: ResponseSpectra, u: string, against: Against | undefined): string {
  const s = r.source;
  const mo = r.motion;
  return `${row("Source", `${esc(s.file)} (${esc(sourceWords(r))})`)}
${row("Source SHA-256", `<span class="hash">${s.sha256}</span>`)}
${row("Band used", `${qty(sig(r.band.fromHz, 4), "Hz")} to ${qty(sig(r.band.toHz, 5), "Hz")}, ${qty(sig(mo.accelerationRms, 4), u)} RMS`)}
${s.settings ? row("PSD of the recording", `${s.settings.segmentLength}-point segments, ${qty(sig(s.settings.resolutionHz, 4), "Hz")} lines, ${s.settings.averages} averages, ${fixed(s.settings.dof, 1)} DOF`) : ""}
${against ? row("Compared against", `${esc(against.b.source.file)} (${esc(sourceWords(against.b))}), <span class="hash">${against.b.source.sha256.slice(0, 12)}</span>, exposure ${against.b.durationS === undefined ? "not given" : qty(sig(against.b.durationS, 5), "s")}`) : ""}`;
}

/** The plots: response RMS (exact, Miles, against), and with an exposure the largest peak and the damage. */
function responsePlots(r: ResponseSpectra, u: string, against: Against | undefined): string[] {
  const fn = r.fnHz;
  const xDomain: [number, number] = [fn[0]!, fn[fn.length - 1]! > fn[0]! ? fn[fn.length - 1]! : fn[0]! * 2];
  const accelSeries: Series[] = [
    { id: "accel-exact", label: "exact", x: fn, y: r.accelRms, className: "exact" },
    { id: "accel-miles", label: "Miles", x: fn, y: r.milesRms, className: "miles" },
    ...(against
      ? [
          {
            id: "accel-against",
            label: `against: ${against.b.source.label}`,
            x: fn,
            y: against.b.accelRms,
            className: "against",
          },
        ]
      : []),
  ];
  return [
    svgPlot({
      id: "response-rms",
      title: `Response RMS (absolute acceleration), Q ${sig(r.q, 4)}`,
      xLabel: "natural frequency (Hz)",
      yLabel: `RMS (${u})`,
      xDomain,
      yDomain: range(r.accelRms, r.milesRms, ...(against ? [against.b.accelRms] : [])),
      yLog: true,
      series: accelSeries,
    }),
    ...(r.durationS === undefined
      ? []
      : [
          svgPlot({
            id: "extreme",
            title: `Expected largest peak over ${sig(r.durationS, 5)} s${against?.b.durationS !== undefined ? ` (against: ${sig(against.b.durationS, 5)} s)` : ""}`,
            xLabel: "natural frequency (Hz)",
            yLabel: `peak (${u})`,
            xDomain,
            yDomain: range(r.extremePeak, ...(against ? [against.b.extremePeak] : [])),
            yLog: true,
            series: [
              { id: "extreme-a", label: "this input", x: fn, y: r.extremePeak, className: "exact" },
              ...(against
                ? [{ id: "extreme-b", label: "against", x: fn, y: against.b.extremePeak, className: "against" }]
                : []),
            ],
          }),
          svgPlot({
            id: "damage",
            title: `Fatigue damage (relative; b ${sig(r.sn.basquinB, 3)}, C ${sig(r.sn.snConstant, 3)})`,
            xLabel: "natural frequency (Hz)",
            yLabel: "damage",
            xDomain,
            yDomain: range(r.fatigueDamage, ...(against ? [against.b.fatigueDamage] : [])),
            yLog: true,
            series: [
              { id: "damage-a", label: "this input", x: fn, y: r.fatigueDamage, className: "exact" },
              ...(against
                ? [{ id: "damage-b", label: "against", x: fn, y: against.b.fatigueDamage, className: "against" }]
                : []),
            ],
          }),
        ]),
  ];
}

/** The kinematics table's rows: the band integrated, velocity and displacement, and the stroke against any rating. */
function kinematicsRows(r: ResponseSpectra): string {
  const mo = r.motion;
  const st = r.stroke;
  return `${row("Band integrated", `${qty(sig(mo.fromHz, 4), "Hz")} to ${qty(sig(mo.toHz, 5), "Hz")} (the lowest frequency dominates the displacement)`)}
${row("Velocity RMS", qty(sig(mo.velocityRms * 1000, 4), "mm/s"))}
${row("Displacement RMS", qty(sig(mo.displacementRms * 1000, 4), "mm"))}
${row("Displacement peak-to-peak estimate", `${qty(sig(mo.displacementPeakToPeak * 1000, 4), "mm")} (6 × RMS)`)}
${row("Against the rated stroke", st ? `${qty(fixed(st.estimateMm, 3), "mm")} against ${qty(sig(st.ratedMm, 4), "mm")} rated: ${st.withinRating ? `within the rating (margin ×${fixed(st.margin, 2)})` : `<strong>EXCEEDS</strong> the rating by ${fixed(100 * (1 / st.margin - 1), 0)} %`}` : `<span class="muted">no rated stroke given (--stroke-mm)</span>`)}`;
}

/**
 * The table of every natural frequency: RMS, Miles, relative displacement, largest peak, damage (and the against
 * ratios).
 */
function fnRows(r: ResponseSpectra, against: Against | undefined): string {
  return Array.from(
    r.fnHz,
    (f, i) =>
      `<tr><td class="num">${sig(f, 4)}</td><td class="num">${sig(r.accelRms[i]!, 4)}</td><td class="num">${Number.isFinite(r.milesRms[i]!) ? sig(r.milesRms[i]!, 4) : "–"}</td><td class="num">${sig(r.relDispRms[i]! * 1000, 4)}</td><td class="num">${Number.isFinite(r.extremePeak[i]!) ? sig(r.extremePeak[i]!, 4) : "–"}</td><td class="num">${Number.isFinite(r.fatigueDamage[i]!) ? r.fatigueDamage[i]!.toExponential(3) : "–"}</td>${against ? `<td class="num">${fixed(against.c.rmsRatioDb[i]!, 2)}</td><td class="num">${sig(against.c.damageRatio[i]!, 3)}</td>` : ""}</tr>`,
  ).join("\n");
}
