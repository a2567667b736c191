import { describe, expect, it } from "vitest";
import { axisLabels, svgPlot } from "../../src/report/svgPlot.js";

describe("svgPlot", () => {
  it("axisLabels uses one style per axis: plain decimals when all fit, powers of ten for every label otherwise", () => {
    expect(axisLabels([0.001, 0.01, 0.1])).toEqual(["0.001", "0.01", "0.1"]);
    expect(axisLabels([0.0001, 0.001, 0.002])).toEqual(["10⁻⁴", "10⁻³", "2×10⁻³"]);
    expect(axisLabels([-6, 0, 6])).toEqual(["-6", "0", "6"]);
  });

  it("svgPlot on 18–2200 Hz labels the 1-2-5 steps and the profile's ends 20 and 2000 Hz", () => {
    const svg = svgPlot({ id: "p", title: "t", xLabel: "f", yLabel: "y", xDomain: [18, 2200], yDomain: [1e-3, 1], yLog: true, xMarks: [20, 2000], series: [] });
    const labels = [...svg.matchAll(/class="tick x-tick"[^>]*>([^<]+)</g)].map((m) => m[1]);
    expect(labels).toEqual(["20", "50", "100", "200", "500", "1000", "2000"]);
  });

  it("svgPlot draws a markers series as one diamond per point, in and out of the legend", () => {
    const svg = svgPlot({ id: "p", title: "t", xLabel: "f", yLabel: "y", xDomain: [10, 100], yDomain: [0, 1], yLog: false, series: [{ id: "m", label: "marked", x: [20, 30, 40], y: [0.5, 0.5, 0.5], className: "shown", markers: true }] });
    expect(svg).toMatch(/data-series="m" data-points="3" d="(M[^M]*){3}"/);
    expect(svg).toContain(">marked<");
  });
});
