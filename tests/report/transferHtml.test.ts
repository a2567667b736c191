import { describe, expect, it } from "vitest";
import { analyzeTransfer } from "../../src/analyses/analyzeTransfer.js";
import { transferHtml } from "../../src/report/transferHtml.js";

describe("transferHtml", () => {
  it("one self-contained page: no script, a CSP, per output the magnitude (H1, H2, bounds), phase, coherence and output-PSD plots and the resonance table", async () => {
    const t = await analyzeTransfer("samples/quarry-bend-bracket.csv", {
      inputChannel: "base",
      outputChannels: ["tip", "clamp"],
      segmentLength: 1024,
      csv: { parseWorkers: 0 },
    });
    const html = transferHtml(t, "test", new Date(Date.UTC(2026, 0, 2, 3, 4, 5)));
    expect(html).not.toMatch(/<script/i);
    expect(html).toContain(`content="default-src 'none'; style-src 'unsafe-inline'; img-src data:"`);
    expect(html).toContain("2026-01-02 03:04:05 UTC");
    for (const n of [1, 2])
      for (const id of ["h", "phase", "coherence", "psd"]) expect(html).toContain(`id="${id}-${n}"`);
    for (const s of ["h1", "h2", "h1-bounds", "phase", "coherence", "measured", "predicted"])
      expect(html).toMatch(new RegExp(`data-series="${s}" data-points="[1-9]\\d*"`));
    expect(html.match(/<section class="output"/g)!.length).toBe(2);
    expect(html).toContain(t.input.sha256);
    expect(html).toMatch(/<td class="num">18\d\.\d+<\/td>/);
  });
});
