import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { chromium, type Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { cli, tempDir } from "../helpers.js";
import { havePdftotext, printedPages } from "./pdfPages.js";

const CHROMIUM = process.env.CHROMIUM ?? "/usr/bin/chromium";
const PROFILE = "samples/profiles/kb210-controller.json";
const META = `testId: KB-210-Q-0417
workOrder: WO-88213
item: KB-210 controller board
serialNumber: SN 0042
axis: Z
fixture: FX-12 cube
sensor: TA-3 triaxial
sensorCalibrated: "2026-09-14"
operator: R. Okonkwo
`;

function dir(): { dir: string; meta: string } {
  const d = tempDir();
  writeFileSync(join(d, "meta.yaml"), META);
  return { dir: d, meta: join(d, "meta.yaml") };
}

describe("check --report and psd --report pages (no browser)", () => {
  it("check --report --meta: the identity, every setting given, the whole excursion list, the rule and its rates, no script, one caution", async () => {
    const { dir: d, meta } = dir();
    const out = join(d, "report.html");
    const r = await cli(
      "check",
      "samples/kb210-run-resonance.wav",
      "--profile",
      PROFILE,
      "--report",
      out,
      "--meta",
      meta,
      "--units",
      "g",
      "--overlap",
      "0.5",
    );
    expect(r.code).toBe(1);
    const html = readFileSync(out, "utf8");
    expect(html).not.toMatch(/<script|https?:\/\/(?!www\.w3\.org)/);
    for (const s of [
      "KB-210-Q-0417",
      "WO-88213",
      "SN 0042",
      "TA-3 triaxial",
      "2026-09-14",
      "R. Okonkwo",
      "<code>--units g</code>",
      "<code>--overlap 0.5</code>",
      "given with --units",
      "from the WAV header",
    ])
      expect(html).toContain(s);
    expect(html).toContain("false-fail rate at most 5 %");
    expect(html).toContain("Prepared by (name, signature)");
    expect(html).not.toContain("prepared by psdgate");
    expect(html).not.toMatch(/more in the JSON/);
    // No velocity or displacement figure is shown, so no caution speaks of them.
    expect(html).not.toMatch(/Displacement and velocity figures/);
    expect(html).not.toContain("m/s²²");
  });

  it("check under control: page 1 says this run's reasons before the identity, outer limits are drawn on both plots, and the text shows every channel's own verdict", async () => {
    const d = tempDir();
    const profile = join(d, "outer.json");
    const p = JSON.parse(readFileSync(PROFILE, "utf8"));
    p.tolerance.outerLimits = [{ fromHz: 20, toHz: 2000, upperDb: 6, lowerDb: 6 }];
    writeFileSync(profile, JSON.stringify(p));
    const out = join(d, "r.html");
    const r = await cli(
      "check",
      "samples/kb210-run-short.wav",
      "--profile",
      profile,
      "--control",
      "1",
      "--report",
      out,
    );
    const html = readFileSync(out, "utf8");
    const reasons = html.indexOf('id="run-reasons"');
    expect(reasons).toBeGreaterThan(0);
    expect(reasons).toBeLessThan(html.indexOf("Test identity"));
    expect(html.slice(reasons, html.indexOf("Test identity"))).toMatch(/DOF of \d+ a pass needs/);
    for (const id of ["outer-upper", "outer-lower", "dev-outer-upper", "dev-outer-lower"])
      expect(html).toMatch(new RegExp(`data-series="${id}" data-points="[1-9]`));
    expect(r.stdout).toMatch(
      /control channel judged alone; the record's verdict rests on the control spectrum\): (PASS|FAIL|INCONCLUSIVE)/,
    );
    if (r.code === 3) expect(r.stdout).toMatch(/because {4}a run of [\d.]+ s \(\d+ DOF\) would decide this verdict/);
  });

  it("check --report in m/s2: every unit label is an acceleration or its square, never m/s²²", async () => {
    const d = tempDir();
    const profile = join(d, "p.json");
    const p = JSON.parse(readFileSync(PROFILE, "utf8"));
    p.units = "(m/s2)2/Hz";
    p.points = p.points.map((x: { hz: number; level?: number }) =>
      x.level !== undefined ? { ...x, level: x.level * 9.80665 ** 2 } : x,
    );
    writeFileSync(profile, JSON.stringify(p));
    const out = join(d, "r.html");
    await cli("check", "samples/kb210-run-resonance.wav", "--profile", profile, "--units", "g", "--report", out);
    const html = readFileSync(out, "utf8");
    expect(html).toContain("(m/s²)²/Hz");
    expect(html).toContain("m/s²");
    expect(html).not.toContain("m/s²²");
    const prof = await cli("profile", profile);
    expect(prof.stdout).toContain("(m/s²)²");
    expect(prof.stdout).not.toContain("m/s²²");
  });

  it("psd --report on a CSV with date-time stamps shows when the recording started", async () => {
    const d = tempDir();
    const rows = ["time,az [g]"];
    for (let i = 0; i < 4000; i++)
      rows.push(`2026-11-30T08:15:${(i / 1000).toFixed(3).padStart(6, "0")}Z,${Math.sin(i * 0.7).toFixed(5)}`);
    writeFileSync(join(d, "dt.csv"), rows.join("\n") + "\n");
    expect((await cli("psd", join(d, "dt.csv"), "--segment", "512", "--report", join(d, "dt.html"))).code).toBe(0);
    expect(readFileSync(join(d, "dt.html"), "utf8")).toContain(
      "<th>Recording started</th><td>2026-11-30T08:15:00.000Z",
    );
  });

  it("psd --meta FILE carries the identity into --json; a misspelt key is refused with its name", async () => {
    const { dir: d, meta } = dir();
    const r = await cli("psd", "samples/kb210-run.wav", "--meta", meta, "--json");
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).meta).toMatchObject({ testId: "KB-210-Q-0417", sensorCalibrated: "2026-09-14" });
    writeFileSync(join(d, "bad.yaml"), "testID: X\n");
    const bad = await cli("psd", "samples/kb210-run.wav", "--meta", join(d, "bad.yaml"));
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/bad\.yaml.*testID.*expected one of the keys testId.*\[META_INVALID\]/);
    writeFileSync(join(d, "date.yaml"), 'sensorCalibrated: "2026-02-30"\n');
    const date = await cli("check", "samples/kb210-run.wav", "-p", PROFILE, "--meta", join(d, "date.yaml"));
    expect(date.code).toBe(2);
    expect(date.stderr).toMatch(
      /sensorCalibrated.*expected a calendar date YYYY-MM-DD.*received "2026-02-30" \[META_INVALID\]/,
    );
  });
});

const WANT_PDF = existsSync(CHROMIUM);
describe.skipIf(!WANT_PDF && !process.env.CI)("HTML reports in headless Chromium, printed to A4 and Letter", () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await chromium.launch({
      executablePath: CHROMIUM,
      args: [
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
      ],
    });
  });
  afterAll(async () => browser?.close());

  async function open(file: string) {
    const page = await browser.newPage();
    const requests: string[] = [];
    const errors: string[] = [];
    page.on("request", (q) => requests.push(q.url()));
    page.on("console", (m) => m.type() === "error" && errors.push(m.text()));
    await page.goto(pathToFileURL(file).href);
    expect(requests.filter((u) => !u.startsWith("file:"))).toEqual([]);
    expect(errors).toEqual([]);
    return page;
  }

  /** Every printed page names the document and its place; no page but the last is less than half full. */
  async function checkPrint(file: string, identity: string[]) {
    if (!havePdftotext()) {
      // CI installs poppler-utils (.ci/run); a developer machine without it skips only the read-back.
      expect(process.env.CI, "pdftotext (poppler-utils) is needed in CI").not.toBe("true");
      return;
    }
    const page = await open(file);
    for (const format of ["A4", "Letter"] as const) {
      const pages = printedPages(await page.pdf({ format }), { top: 17, bottom: 15 });
      expect(pages.length, format).toBeGreaterThan(1);
      pages.forEach((p, i) => {
        const flat = p.text.replace(/\s+/g, " ");
        expect(flat, `${format} page ${i + 1}`).toContain(`page ${i + 1} of ${pages.length}`);
        for (const s of identity) expect(flat, `${format} page ${i + 1}`).toContain(s);
        if (i < pages.length - 1)
          expect(p.fill, `${format} page ${i + 1} of ${pages.length} fill`).toBeGreaterThan(0.6);
      });
      const last = pages[pages.length - 1]!.text.replace(/\s+/g, " ");
      // The sign-off keeps the verdict and the identity on its page.
      expect(last).toContain("Prepared by (name, signature)");
      expect(last).toMatch(/Sign-off .*(FAIL|PASS|INCONCLUSIVE|PSD record)/);
      expect(last).toContain("KB-210-Q-0417");
    }
    await page.close();
  }

  it("check --report: verdict, plots with every series, marked lines, shared axes, histogram, sign-off; A4 and Letter pages carry title, hash, verdict and page N of M, none half empty", async () => {
    const { dir: d, meta } = dir();
    const out = join(d, "report.html");
    const r = await cli(
      "check",
      "samples/kb210-run-resonance.wav",
      "--profile",
      PROFILE,
      "--report",
      out,
      "--meta",
      meta,
    );
    expect(r.code).toBe(1);
    const page = await open(out);
    expect(await page.getAttribute("#verdict", "data-verdict")).toBe("fail");
    for (const s of ["measured", "required", "confidence", "limits-upper", "limits-lower", "shown"]) {
      const n = Number(await page.getAttribute(`#psd-1 path[data-series="${s}"]`, "data-points"));
      expect(n, s).toBeGreaterThan(1);
    }
    expect(Number(await page.getAttribute(`#dev-1 path[data-series="deviation"]`, "data-points"))).toBeGreaterThan(700);
    // Measured, required and limits differ by dash pattern as well as colour (greyscale print).
    const dash = async (s: string) =>
      page
        .locator(`#psd-1 path[data-series="${s}"]`)
        .evaluate(
          (e) =>
            (globalThis as unknown as { getComputedStyle(el: unknown): { strokeDasharray: string } }).getComputedStyle(
              e,
            ).strokeDasharray,
        );
    expect(new Set([await dash("measured"), await dash("required"), await dash("limits-upper")]).size).toBe(3);
    // x ticks: 1-2-5 steps and the profile's ends (20 and 2000 Hz); the two plots share the axis.
    const ticks = async (id: string) =>
      page.locator(`#${id} .x-tick`).evaluateAll((es) => es.map((e) => [e.textContent, e.getAttribute("x")]));
    const psdTicks = await ticks("psd-1");
    expect(psdTicks.map((t) => t[0])).toEqual(
      expect.arrayContaining(["20", "50", "100", "200", "500", "1000", "2000"]),
    );
    expect(await ticks("dev-1")).toEqual(psdTicks);
    // One number style per axis.
    const yt = await page.locator("#psd-1 .y-tick").allTextContents();
    expect(yt.every((t) => /^\d/.test(t)) || yt.every((t) => /10/.test(t))).toBe(true);
    expect(await page.locator('#hist-1 path[data-series="histogram"]').count()).toBe(1);
    expect(await page.locator(".signoff div").count()).toBe(3);
    expect(await page.textContent("body")).toMatch(/395–557\.5\u00a0Hz/);
    await page.close();
    await checkPrint(out, ["KB-210 pump controller", "FAIL", "recording 60649813942d"]);
  });

  it("psd --report: PSD with its band per channel, Parseval, statistics, histogram; the same page identity rules", async () => {
    const { dir: d, meta } = dir();
    const out = join(d, "psd.html");
    const r = await cli(
      "psd",
      "samples/tern7-flight.csv",
      "--resolution",
      "2",
      "--fmin",
      "10",
      "--fmax",
      "1500",
      "--report",
      out,
      "--meta",
      meta,
    );
    expect(r.code).toBe(0);
    const html = readFileSync(out, "utf8");
    expect(html).not.toMatch(/<script|https?:\/\/(?!www\.w3\.org)/);
    const page = await open(out);
    const channels = await page.locator("section.channel").count();
    expect(channels).toBeGreaterThan(0);
    for (let n = 1; n <= channels; n++) {
      for (const s of ["measured", "confidence"])
        expect(
          Number(await page.getAttribute(`#psd-${n} path[data-series="${s}"]`, "data-points")),
          `${n} ${s}`,
        ).toBeGreaterThan(100);
      expect(await page.locator(`#hist-${n} path[data-series="histogram"]`).count()).toBe(1);
    }
    expect(await page.textContent("body")).toContain("Parseval ratio");
    await page.close();
    const sha = JSON.parse((await cli("psd", "samples/tern7-flight.csv", "--json")).stdout).input.sha256 as string;
    await checkPrint(out, ["PSD record", "PSD RECORD", `recording ${sha.slice(0, 12)}`]);
  });
});
