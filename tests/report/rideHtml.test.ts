import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { rideRecording } from "../../src/analyses/rideRecording.js";
import { rideHtml } from "../../src/report/rideHtml.js";
import { cli, tempDir } from "../helpers.js";

const dir = tempDir();

describe("rideHtml", () => {
  it("one self-contained page: identity, per-axis figures, exposure against the limits, level over time, spectrograms, spectra, cautions", async () => {
    const r = await rideRecording("samples/marlow-uv3-ride.wav", {
      inputUnits: "m/s2",
      scale: 40,
      axes: { x: "1", y: "2", z: "3" },
      floor: "4",
      posture: "seated",
      exposureS: 8 * 3600,
      spectrogram: true,
    });
    const html = rideHtml(r, "9.9.9", new Date("2026-12-02T01:00:00Z"));
    expect(html).toContain(`content="default-src 'none'; style-src 'unsafe-inline'; img-src data:"`);
    expect(html).not.toMatch(/<script|(src|href)="https?:/);
    expect(html).toContain(r.analysis.input.sha256);
    expect(html).toContain("psdgate 9.9.9");
    for (const id of ["a8-curve", "action-value", "limit-value", "stretch-rms-z", "psd-z", "weighted-z"])
      expect(html).toContain(`data-series="${id}"`);
    // 240 s in 16.384 s stretches: 14 columns of 23 one-third-octave bands, per axis.
    expect(r.axes[2]!.spectrogram!.meanSquare.length).toBe(14);
    expect(html.match(/<rect class="cell"/g)!.length).toBe(3 * 14 * 23);
    expect(html).toContain("not an occupational-health assessment");
    expect(html).toContain("competent persons decide");
  });
  it("with a peak-hold spectrum each axis's spectrum plot draws it beside the average, with a legend entry and its style element; without one, neither", async () => {
    const opts = {
      inputUnits: "m/s2" as const,
      scale: 40,
      axes: { x: "1", y: "2", z: "3" },
      posture: "seated" as const,
      exposureS: 8 * 3600,
    };
    const r = await rideRecording("samples/marlow-uv3-ride.wav", { ...opts, peakHoldS: 10 });
    const html = rideHtml(r, "9.9.9", new Date("2026-12-02T01:00:00Z"));
    const { PEAK_HOLD_STYLE } = await import("../../src/report/reportPage.js");
    for (const axis of ["x", "y", "z"])
      expect(html).toMatch(new RegExp(`class="peakhold" data-series="peak-hold-${axis}" data-points="[1-9]`));
    expect(html.match(/>unweighted peak-hold \(10 s\)</g)).toHaveLength(3);
    expect(html).toContain(`<style>${PEAK_HOLD_STYLE}</style>`);
    const plain = rideHtml(
      await rideRecording("samples/marlow-uv3-ride.wav", opts),
      "9.9.9",
      new Date("2026-12-02T01:00:00Z"),
    );
    expect(plain).not.toContain("peak-hold");
    expect(plain).not.toContain(PEAK_HOLD_STYLE);
  });
  it("without an exposure: no A(8) plot, the exposure row says what is missing, and the weighting's error is among the notes", async () => {
    const r = await rideRecording("samples/marlow-uv3-ride.wav", {
      inputUnits: "m/s2",
      scale: 40,
      axes: { z: "3" },
      posture: "seated",
      spectrogram: true,
      fromS: 100,
      toS: 140,
    });
    const html = rideHtml(r, "9.9.9", new Date("2026-12-02T01:00:00Z"));
    expect(html).not.toContain(`data-series="a8-curve"`);
    expect(html).toContain("not stated: no A(8), daily VDV or judgement against the Directive and Annex B");
    expect(html).toMatch(
      /time-domain weighting is within [\d.]+ % of ISO 2631-1&#39;s \|W\(f\)\||time-domain weighting is within [\d.]+ % of ISO 2631-1's \|W\(f\)\|/,
    );
  });
  it("the spectrogram has one row per whole stretch inside the window (40 s: two of 16.4 s), every band mean square >= 0", async () => {
    const r = await rideRecording("samples/marlow-uv3-ride.wav", {
      inputUnits: "m/s2",
      scale: 40,
      axes: { z: "3" },
      posture: "seated",
      exposureS: 3600,
      spectrogram: true,
      fromS: 100,
      toS: 140,
    });
    const s = r.axes[0]!.spectrogram!;
    expect(s.meanSquare.length).toBe(2);
    for (const row of s.meanSquare) expect(row.every((v) => v >= 0)).toBe(true);
  });
  it("psdgate ride --report writes the page atomically and refuses to replace it without --force", async () => {
    const out = join(dir, "ride.html");
    const args = [
      "ride",
      "samples/marlow-uv3-ride.wav",
      "--units",
      "m/s2",
      "--scale",
      "40",
      "--axes",
      "z=3",
      "--exposure",
      "4h",
      "--report",
      out,
    ];
    expect((await cli(...args)).code).toBe(0);
    expect(existsSync(out)).toBe(true);
    expect(readFileSync(out, "utf8")).toContain("<h2>Spectrograms</h2>");
    const again = await cli(...args);
    expect(again.code).toBe(2);
    expect(again.stderr).toContain("OUTPUT_EXISTS");
    expect((await cli(...args, "--force")).code).toBe(0);
  });
});
