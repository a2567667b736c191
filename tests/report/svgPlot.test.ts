import { describe, expect, it } from "vitest";
import { axisLabels, svgPlot } from "../../src/report/svgPlot.js";

describe("svgPlot", () => {
  it("axisLabels uses one style per axis: plain decimals when all fit, powers of ten for every label otherwise", () => {
    expect(axisLabels([0.001, 0.01, 0.1])).toEqual(["0.001", "0.01", "0.1"]);
    expect(axisLabels([0.0001, 0.001, 0.002])).toEqual(["10⁻⁴", "10⁻³", "2×10⁻³"]);
    expect(axisLabels([-6, 0, 6])).toEqual(["-6", "0", "6"]);
  });

  it("svgPlot on 18–2200 Hz labels the 1-2-5 steps and the profile's ends 20 and 2000 Hz", () => {
    const svg = svgPlot({
      id: "p",
      title: "t",
      xLabel: "f",
      yLabel: "y",
      xDomain: [18, 2200],
      yDomain: [1e-3, 1],
      yLog: true,
      xMarks: [20, 2000],
      series: [],
    });
    const labels = [...svg.matchAll(/class="tick x-tick"[^>]*>([^<]+)</g)].map((m) => m[1]);
    expect(labels).toEqual(["20", "50", "100", "200", "500", "1000", "2000"]);
  });

  it("svgPlot draws a markers series as one diamond per point, in and out of the legend", () => {
    const svg = svgPlot({
      id: "p",
      title: "t",
      xLabel: "f",
      yLabel: "y",
      xDomain: [10, 100],
      yDomain: [0, 1],
      yLog: false,
      series: [{ id: "m", label: "marked", x: [20, 30, 40], y: [0.5, 0.5, 0.5], className: "shown", markers: true }],
    });
    expect(svg).toMatch(/data-series="m" data-points="3" d="(M[^M]*){3}"/);
    expect(svg).toContain(">marked<");
  });

  it("svgPlot draws each rule inside the y domain as a dashed horizontal line at its value, and none outside", () => {
    const svg = svgPlot({
      id: "p",
      title: "t",
      xLabel: "s",
      yLabel: "g",
      xDomain: [0, 10],
      yDomain: [-2, 2],
      yLog: false,
      xLog: false,
      rules: [1, -1, 5],
      series: [],
    });
    const rules = [
      ...svg.matchAll(/<line class="limit rule" data-rule="([^"]+)" x1="70" x2="704" y1="([^"]+)" y2="\2"\/>/g),
    ].map((m) => [Number(m[1]), Number(m[2])]);
    // Height 340, margins 40 top and 44 bottom: y runs 296 (at -2) to 40 (at +2), so ±1 fall at 232 and 104.
    expect(rules).toEqual([
      [1, 104],
      [-1, 232],
    ]);
  });
});

describe("thinLine and thinBand: a plot holds what a page can show", () => {
  it("a 200 000-point line keeps at most 4 points per pixel column, every column's extremes among them; a short line is kept whole", async () => {
    const { thinLine, thinBand } = await import("../../src/report/svgPlot.js");
    const n = 200_000;
    const pts: [number, number][] = [];
    for (let i = 0; i < n; i++)
      pts.push([70 + (634 * i) / n, 200 + 100 * Math.sin(i / 37) + (i === 123_457 ? -150 : 0)]);
    const lo = (a: number[]) => a.reduce((m, v) => Math.min(m, v), Infinity);
    const hi = (a: number[]) => a.reduce((m, v) => Math.max(m, v), -Infinity);
    const thin = thinLine(pts);
    expect(thin.length).toBeLessThanOrEqual(4 * 635);
    expect(thin.length).toBeGreaterThan(634);
    expect(lo(thin.map((p) => p[1]))).toBe(lo(pts.map((p) => p[1])));
    expect(hi(thin.map((p) => p[1]))).toBe(hi(pts.map((p) => p[1])));
    for (let k = 1; k < thin.length; k++) expect(thin[k]![0]).toBeGreaterThanOrEqual(thin[k - 1]![0]);
    const few: [number, number][] = [
      [70, 1],
      [80, 2],
      [90, 3],
    ];
    expect(thinLine(few)).toBe(few);
    const band = thinBand(pts.map(([x, y]) => [x, y + 10, y - 10] as const));
    expect(band.length).toBeLessThanOrEqual(635);
    expect(hi(band.map((b) => b[1]))).toBe(hi(pts.map((p) => p[1] + 10)));
    expect(lo(band.map((b) => b[2]))).toBe(lo(pts.map((p) => p[1] - 10)));
  });
});
