import type { TransferAnalysis } from "../analyses/analyzeTransfer.js";
import { accelLabel, densityAscii } from "../units.js";
import { TRANSFER_CAUTION } from "./cautions.js";
import { csvField } from "./csvField.js";
import { fixed, rateText, sig, table } from "./format.js";
import { fullScaleLines } from "./psdText.js";
import { finiteOrNull, toolInfo } from "./psdJson.js";
import { findingTexts } from "./findingTexts.js";

function arr(a: Float64Array): (number | null)[] {
  return Array.from(a, finiteOrNull);
}

/** The `transfer --json` document (README.md, "transfer"). */
export function transferJson(t: TransferAnalysis, version: string) {
  const s = t.settings;
  return {
    tool: toolInfo(version),
    input: t.input,
    window: t.window,
    channels: t.channels,
    settings: {
      window: s.window,
      segment: s.segmentLength,
      overlap: s.overlap,
      hop: s.hop,
      detrend: s.detrend,
      confidence: s.confidence,
      resolutionHz: s.resolutionHz,
      scale: s.scale,
      goodCoherence: s.goodCoherence,
    },
    analysis: t.analysis,
    averages: t.averages,
    skippedSegments: t.skippedSegments,
    dof: t.dof,
    disjointAverages: t.disjointAverages,
    units: {
      acceleration: t.units === "g" ? "g" : "m/s2",
      psd: densityAscii(t.units),
      magnitude: "1 (output unit per input unit)",
      phase: "degrees, output relative to input (negative: the output lags)",
    },
    frequencyHz: arr(t.frequencyHz),
    inputChannel: {
      name: t.reference.name,
      position: t.reference.position,
      psd: arr(t.reference.psd),
      rms: t.reference.rms,
    },
    outputs: t.outputs.map((o) => ({
      name: o.name,
      position: o.position,
      h1: {
        magnitude: arr(o.h1Magnitude),
        phaseDeg: arr(o.phaseDeg),
        magnitudeLower: arr(o.h1Lower),
        magnitudeUpper: arr(o.h1Upper),
      },
      h2: { magnitude: arr(o.h2Magnitude), phaseDeg: arr(o.phaseDeg) },
      coherence: arr(o.coherence),
      randomError: {
        magnitude: arr(o.magnitudeError),
        phaseDeg: arr(o.phaseErrorDeg),
        coherence: arr(o.coherenceError),
        rule: "Bendat & Piersol, Random Data, ch. 9; one standard deviation, n_d = DOF / 2",
      },
      predictedOutputPsd: arr(o.predictedOutputPsd),
      measuredOutputPsd: arr(o.measuredOutputPsd),
      predictedRms: finiteOrNull(o.predictedRms),
      measuredRms: finiteOrNull(o.measuredRms),
      wellExplained: {
        lineFraction: finiteOrNull(o.wellExplained.lineFraction),
        powerFraction: finiteOrNull(o.wellExplained.powerFraction),
        meanSquareRatio: finiteOrNull(o.wellExplained.meanSquareRatio),
      },
      lowCoherenceBands: o.lowCoherenceBands,
      resonances: o.resonances.map((r) => ({
        frequencyHz: r.frequencyHz,
        magnitude: r.magnitude,
        q: r.q,
        halfPowerHz: r.halfPowerHz,
        coherence: r.coherence,
        resolutionLimited: r.resolutionLimited,
      })),
    })),
    warnings: findingTexts(t.warnings),
    caution: TRANSFER_CAUTION,
  };
}

/** `--csv`: frequency, the input's PSD, then per output |H1|, phase, |H2|, coherence, predicted and measured PSD. */
export function transferCsv(t: TransferAnalysis): string {
  const u = densityAscii(t.units);
  const head = ["frequency_hz", `${t.reference.name}_psd [${u}]`];
  for (const o of t.outputs)
    head.push(
      `${o.name}_h1`,
      `${o.name}_phase_deg`,
      `${o.name}_h2`,
      `${o.name}_coherence`,
      `${o.name}_predicted_psd [${u}]`,
      `${o.name}_measured_psd [${u}]`,
    );
  // Channel names come from the file: each header field is quoted and guarded (csvField).
  const lines = [head.map(csvField).join(",")];
  for (let k = 0; k < t.frequencyHz.length; k++) {
    const row = [String(t.frequencyHz[k]), String(t.reference.psd[k])];
    for (const o of t.outputs)
      row.push(
        String(o.h1Magnitude[k]),
        String(o.phaseDeg[k]),
        String(o.h2Magnitude[k]),
        String(o.coherence[k]),
        String(o.predictedOutputPsd[k]),
        String(o.measuredOutputPsd[k]),
      );
    lines.push(row.join(","));
  }
  return lines.join("\n") + "\n";
}

const pct = (x: number) => `${fixed(100 * x, 1)} %`;

export function transferText(t: TransferAnalysis, version: string): string {
  const u = accelLabel(t.units);
  const s = t.settings;
  const lines = [
    `psdgate ${version}: transfer ${t.reference.name} -> ${t.outputs.map((o) => o.name).join(", ")} in ${t.input.file}`,
    `  record     ${sig(t.input.durationS, 4)} s at ${rateText(t.input.sampleRateHz)} Hz (${t.input.samples} samples), sha256 ${t.input.sha256}`,
    ...fullScaleLines(t.channels),
    ...(t.window.frames !== t.input.samples
      ? [
          `  window     ${fixed(t.window.fromS, 3)} to ${fixed(t.window.toS, 3)} s (${fixed(t.window.durationS, 3)} s): ${t.window.frames} samples analysed`,
        ]
      : []),
    `  analysis   ${s.window}, ${s.segmentLength}-point segments (${sig(s.resolutionHz, 4)} Hz lines), ${fixed(100 * s.overlap, 0)} % overlap, detrend ${s.detrend}; ${t.averages} averages, ${fixed(t.dof, 1)} DOF (n_d = ${fixed(t.disjointAverages, 1)})`,
    `  input      ${t.reference.name} (channel ${t.reference.position}): ${sig(t.reference.rms, 4)} ${u} RMS`,
  ];
  for (const o of t.outputs) {
    const w = o.wellExplained;
    lines.push(
      "",
      `  output ${o.name} (channel ${o.position})`,
      `    RMS          measured ${sig(o.measuredRms, 4)} ${u}; predicted from the input |H1|² G_in ${sig(o.predictedRms, 4)} ${u} (${pct((o.predictedRms / o.measuredRms) ** 2)} of the mean square)`,
      w.lineFraction > 0
        ? `    coherence    >= ${s.goodCoherence} on ${pct(w.lineFraction)} of the lines, which carry ${pct(w.powerFraction)} of the output's mean square; there the prediction is ${pct(w.meanSquareRatio)} of the measured`
        : `    coherence    below ${s.goodCoherence} on every line: the input explains little of this output`,
    );
    if (o.lowCoherenceBands.length > 0) {
      lines.push(
        `    low coherence (< 0.5), where the prediction falls short: ${o.lowCoherenceBands.map((b) => `${sig(b.fromHz, 4)}–${sig(b.toHz, 4)} Hz (${pct(b.powerFraction)} of the mean square)`).join(", ")}`,
      );
      lines.push(
        "      (output noise, other inputs, nonlinearity, little input power there, or leakage at a resonance narrower than a few lines)",
      );
    }
    if (o.resonances.length === 0)
      lines.push(
        "    resonances   none found (a peak needs |H1| >= 1, coherence >= 0.5 and a half-power point on each side)",
      );
    else {
      const rows = [["f Hz", "|H1|", "Q", "half-power band Hz", "coherence", ""]];
      for (const r of o.resonances)
        rows.push([
          sig(r.frequencyHz, 5),
          sig(r.magnitude, 4),
          sig(r.q, 3),
          `${sig(r.halfPowerHz[0], 5)}–${sig(r.halfPowerHz[1], 5)}`,
          fixed(r.coherence, 3),
          r.resolutionLimited ? "Q reads low: under 10 lines across (finer --resolution)" : "",
        ]);
      lines.push("    resonances (peaks of |H1|, Q from the half-power band)", table(rows, "      "));
    }
  }
  lines.push(
    "",
    `  H1 = G_xy/G_xx (unbiased by output noise), H2 = G_yy/G_yx (unbiased by input noise); their ratio is the coherence. Per-line random errors (Bendat & Piersol ch. 9) and the |H1| bounds: --json, plotted by --report.`,
  );
  for (const w of findingTexts(t.warnings)) lines.push(`  warning: ${w}`);
  lines.push("", `CAUTION: ${TRANSFER_CAUTION}`);
  return lines.join("\n") + "\n";
}
