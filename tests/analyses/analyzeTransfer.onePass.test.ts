import { execFileSync } from "node:child_process";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeTransfer, type TransferOptions } from "../../src/analyses/analyzeTransfer.js";
import { channelConditionings, scaleSamples } from "../../src/condition/scaleSamples.js";
import { InputError } from "../../src/errors.js";
import { CrossSpectrumAccumulator } from "../../src/estimate/spectral/crossSpectrum.js";
import { frequencyResponse } from "../../src/estimate/spectral/frequencyResponse.js";
import { welchDof } from "../../src/estimate/spectral/welchDof.js";
import { normalizeWelchOptions } from "../../src/estimate/spectral/welchOptions.js";
import { spectralWindow } from "../../src/estimate/spectral/windows.js";
import { clockWindow, frameWindow } from "../../src/pass/resolveAnalysis.js";
import { openTimeHistory } from "../../src/read/openTimeHistory.js";
import { tempDir } from "../helpers.js";

/**
 * transfer runs on the one pass (issue #23): a cross-spectrum listener on pass/analyzeRecording.ts in place
 * of its own read loop. The reference below is transfer's own pass as it was before (open, pick, condition
 * in the input's unit, cut the frame window at the announced rate, push the cross-spectral accumulator),
 * kept here so the move is held to it bit for bit: same blocks, same order, same arithmetic.
 */
async function ownPass(
  file: string,
  o: { input: number; outputs: number[] } & Omit<TransferOptions, "inputChannel" | "outputChannels">,
) {
  const source = await openTimeHistory(file, { ...o.csv });
  const { info } = source;
  const select = [o.input, ...o.outputs];
  const unit = o.resultUnits ?? channelConditionings(info.file, info.channels, [o.input], o)[0]!.resultUnit;
  const conditioning = channelConditionings(info.file, info.channels, select, { ...o, resultUnits: unit });
  const s = normalizeWelchOptions(o, info.sampleRateHz);
  const { first, end } = frameWindow(clockWindow(o, info), info.sampleRateHz);
  const window = spectralWindow(s.window, s.segmentLength);
  const acc = new CrossSpectrumAccumulator(
    { segmentLength: s.segmentLength, hop: s.hop, window, detrend: s.detrend },
    select.length,
    0,
  );
  const views: Float64Array[] = select.map(() => new Float64Array(0));
  let offset = 0;
  let taken = 0;
  const summary = await source.read(select, (blocks, frames) => {
    const a = Math.max(0, first - offset);
    const b = Math.min(frames, end - offset);
    offset += frames;
    if (b <= a) return;
    const n = b - a;
    taken += n;
    for (let c = 0; c < blocks.length; c++) {
      views[c] = a === 0 ? blocks[c]! : blocks[c]!.subarray(a, b);
      scaleSamples(views[c]!, n, conditioning[c]!.factor);
    }
    acc.push(views, n);
  });
  await source.close?.();
  const sums = acc.finish(summary.sampleRateHz);
  const nd = welchDof(window, s.hop, sums.segments) / 2;
  return {
    sums,
    taken,
    outputs: o.outputs.map((_, j) =>
      frequencyResponse(sums.auto[0]!, sums.auto[j + 1]!, sums.crossRe[j + 1]!, sums.crossIm[j + 1]!, nd),
    ),
  };
}

const cases: { name: string; file: string; options: TransferOptions; input: number; outputs: number[] }[] = [
  {
    name: "the transfer sample, whole",
    file: "samples/quarry-bend-bracket.csv",
    options: { inputChannel: "base", csv: { parseWorkers: 0 } },
    input: 0,
    outputs: [1, 2],
  },
  {
    name: "the transfer sample, window 2-9.5 s",
    file: "samples/quarry-bend-bracket.csv",
    options: { inputChannel: "base", outputChannels: ["clamp"], fromS: 2, toS: 9.5, csv: { parseWorkers: 0 } },
    input: 0,
    outputs: [2],
  },
  {
    name: "the ride sample's seat over floor, calibrated, 0.25 Hz lines, linear detrend, Hamming",
    file: "samples/marlow-uv3-ride.wav",
    options: {
      inputChannel: 4,
      outputChannels: ["3"],
      inputUnits: "m/s2",
      scale: 40,
      resolutionHz: 0.25,
      detrend: "linear",
      window: "hamming",
      fromS: 30,
    },
    input: 3,
    outputs: [2],
  },
];

describe("transfer on the one pass equals its own pass before (H1, H2, coherence, spectra bit for bit)", () => {
  for (const c of cases) {
    it(c.name, async () => {
      const t = await analyzeTransfer(c.file, c.options);
      const { inputChannel: _i, outputChannels: _o, ...rest } = c.options;
      const ref = await ownPass(c.file, { ...rest, input: c.input, outputs: c.outputs });
      expect(t.window.frames).toBe(ref.taken);
      expect(t.averages).toBe(ref.sums.segments);
      expect(Array.from(t.reference.psd)).toEqual(Array.from(ref.sums.auto[0]!));
      for (const [j, o] of t.outputs.entries()) {
        const r = ref.outputs[j]!;
        expect(Array.from(o.h1Magnitude)).toEqual(Array.from(r.h1Magnitude));
        expect(Array.from(o.h2Magnitude)).toEqual(Array.from(r.h2Magnitude));
        expect(Array.from(o.coherence)).toEqual(Array.from(r.coherence));
        expect(Array.from(o.phaseDeg)).toEqual(Array.from(r.phaseDeg));
        expect(Array.from(o.measuredOutputPsd)).toEqual(Array.from(ref.sums.auto[j + 1]!));
      }
    });
  }

  it("records the resolved analysis: the channels in order and in one unit, Welch's settings at the final rate, the window as asked", async () => {
    const t = await analyzeTransfer("samples/quarry-bend-bracket.csv", {
      inputChannel: "base",
      outputChannels: ["clamp"],
      fromS: 2,
      toS: 9.5,
      csv: { parseWorkers: 0 },
    });
    expect(t.analysis.channels.map((ch) => [ch.name, ch.position, ch.resultUnits])).toEqual([
      ["base", 1, t.units],
      ["clamp", 3, t.units],
    ]);
    expect(t.analysis.welch).toEqual({
      ...t.analysis.welch,
      segmentLength: t.settings.segmentLength,
      hop: t.settings.hop,
      resolutionHz: t.settings.resolutionHz,
    });
    expect(t.analysis.window).toMatchObject({ fromS: 2, toS: 9.5 });
  });

  it("a FIFO is FILE_UNREADABLE at once (no read that waits for a writer)", async () => {
    const fifo = join(tempDir(), "pipe.csv");
    execFileSync("mkfifo", [fifo]);
    const started = Date.now();
    const e = await analyzeTransfer(fifo, { inputChannel: "1" }).then(
      () => undefined,
      (x: unknown) => x,
    );
    expect(e).toBeInstanceOf(InputError);
    expect((e as InputError).code).toBe("FILE_UNREADABLE");
    expect(Date.now() - started).toBeLessThan(2000);
  });
});
