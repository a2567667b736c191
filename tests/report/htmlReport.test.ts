import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { chromium } from "playwright-core";
import { describe, expect, it } from "vitest";
import { cli, tempDir } from "../helpers.js";

const CHROMIUM = process.env.CHROMIUM ?? "/usr/bin/chromium";

describe.skipIf(!existsSync(CHROMIUM))("HTML report in headless Chromium", () => {
  it("renders the verdict, both plots with all series, the histogram and the sign-off, and requests nothing from the network", async () => {
    const out = join(tempDir(), "report.html");
    const r = await cli("check", "samples/kb210-run-resonance.wav", "--profile", "samples/profiles/kb210-controller.json", "--report", out);
    expect(r.code).toBe(1);
    const html = readFileSync(out, "utf8");
    expect(html).not.toMatch(/<script|https?:\/\/(?!www\.w3\.org)/);
    const browser = await chromium.launch({
      executablePath: CHROMIUM,
      args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
    });
    try {
      const page = await browser.newPage();
      const requests: string[] = [];
      const errors: string[] = [];
      page.on("request", (q) => requests.push(q.url()));
      page.on("console", (m) => m.type() === "error" && errors.push(m.text()));
      await page.goto(pathToFileURL(out).href);
      expect(requests.filter((u) => !u.startsWith("file:"))).toEqual([]);
      expect(errors).toEqual([]);
      expect(await page.getAttribute("#verdict", "data-verdict")).toBe("fail");
      for (const s of ["measured", "required", "confidence", "limits-upper", "limits-lower"]) {
        const n = Number(await page.getAttribute(`#psd-1 path[data-series="${s}"]`, "data-points"));
        expect(n, s).toBeGreaterThan(1);
      }
      expect(Number(await page.getAttribute(`#dev-1 path[data-series="deviation"]`, "data-points"))).toBeGreaterThan(700);
      const box = await page.locator("#psd-1").boundingBox();
      expect(box!.width).toBeGreaterThan(300);
      expect(await page.locator('#hist-1 path[data-series="histogram"]').count()).toBe(1);
      expect(await page.locator(".signoff div").count()).toBe(3);
      expect(await page.textContent("body")).toContain("395–557.5 Hz");
      const pdf = await page.pdf({ format: "A4" });
      expect(pdf.length).toBeGreaterThan(10000);
    } finally {
      await browser.close();
    }
  });
});
