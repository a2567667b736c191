import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { chromium, type Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { cssString } from "../../src/report/reportPage.js";
import { gaussian, cli, tempDir } from "../helpers.js";
import { havePdftotext, printedPages } from "./pdfPages.js";

/**
 * User text reaches a report's page in many places: every --meta field, a profile's title, a mix file's
 * title and derive's --title, a CSV's channel names, the recording's name. None of it may leave the text
 * it sits in: a title that closes the <style> element could turn a FAIL banner and the printed margins
 * into PASS, on a page psdgate wrote and `verify` would accept. Each test writes hostile text into every
 * such place, renders the page in headless Chromium and prints it.
 */
const CHROMIUM = process.env.CHROMIUM ?? "/usr/bin/chromium";

/** Closes the style element, hides the real banner, writes a forged word, breaks the CSS string and the attribute. */
const HOSTILE =
  `</style><style>.verdict{display:none!important} #verdict .word::after{content:"FORGED"} @page{@top-right{content:"FORGED"}}</style>` +
  `"'\\ {}; <script>document.title='FORGED'</script> <img src=x onerror=alert(1)> &amp; \u202eevil\u202c \u0000\u001b[8m\n\r` +
  "</STYLE >";
const META_KEYS = [
  "testId",
  "workOrder",
  "item",
  "serialNumber",
  "axis",
  "fixture",
  "sensor",
  "sensorSerial",
  "operator",
  "location",
  "notes",
];

function hostileMeta(dir: string): string {
  const file = join(dir, "meta.json");
  writeFileSync(file, JSON.stringify(Object.fromEntries(META_KEYS.map((k) => [k, `${k} ${HOSTILE}`]))));
  return file;
}

describe("cssString: a CSS string that cannot end its <style> element", () => {
  it("escapes <, >, &, quotes, backslash, braces, semicolons and controls; keeps letters, digits and non-ASCII text", () => {
    const s = cssString(HOSTILE);
    expect(s).not.toMatch(/[<>&'{};\n\r\u0000\u202e]/);
    expect(s.slice(1, -1)).not.toMatch(/(?<!\\)"/);
    expect(s).not.toMatch(/<\/style/i);
    expect(cssString("KB-210 · Z axis, 5 g")).toBe('"KB-210 · Z axis, 5 g"');
    expect(cssString('a"b')).toBe('"a\\22 b"');
    expect(cssString("</style>")).toBe('"\\3c \\2f style\\3e "');
  });
});

const WANT_PDF = existsSync(CHROMIUM);
describe.skipIf(!WANT_PDF && !process.env.CI)(
  "hostile text in every place it reaches a report, rendered and printed in headless Chromium",
  () => {
    let browser: Browser;
    beforeAll(async () => {
      browser = await chromium.launch({
        executablePath: CHROMIUM,
        args: [
          "--no-sandbox",
          "--disable-gpu",
          "--no-first-run",
          "--disable-background-networking",
          "--disable-component-update",
          "--disable-sync",
        ],
      });
    });
    afterAll(async () => browser?.close());

    /** The rendered page: one style element, no script, the banner shown with the verdict psdgate wrote; printed margins say it on every page. */
    async function expectBannerHolds(file: string, word: string, marginWord: string, verdictClass: string) {
      const html = readFileSync(file, "utf8");
      expect(html).not.toMatch(/<script/i);
      // Only psdgate's own style elements: as many closing tags (any case, any spacing) as it opens.
      expect((html.match(/<\/style/gi) ?? []).length).toBe((html.match(/<style>/g) ?? []).length);
      expect(html.match(/<style>/g)!.length).toBeLessThanOrEqual(2);
      const page = await browser.newPage();
      const dialogs: string[] = [];
      page.on("dialog", (d) => {
        dialogs.push(d.message());
        void d.dismiss();
      });
      await page.goto(pathToFileURL(file).href);
      expect(await page.locator("style").count()).toBe(html.match(/<style>/g)!.length);
      expect(await page.locator("script").count()).toBe(0);
      expect(await page.locator("img").count()).toBe(0);
      expect(await page.title()).not.toBe("FORGED");
      expect(await page.locator("#verdict").count()).toBe(1);
      expect(await page.getAttribute("#verdict", "data-verdict")).toBe(verdictClass);
      expect(await page.locator("#verdict").isVisible()).toBe(true);
      const shown = await page.locator("#verdict .word").evaluate((e) => {
        const g = globalThis as unknown as {
          getComputedStyle(el: unknown, pseudo?: string): { content: string; display: string };
        };
        return {
          text: e.textContent,
          after: g.getComputedStyle(e, "::after").content,
          display: g.getComputedStyle(e).display,
        };
      });
      expect(shown.text).toBe(word);
      expect(shown.after).toBe("none");
      expect(shown.display).not.toBe("none");
      if (havePdftotext()) {
        const pages = printedPages(await page.pdf({ format: "A4" }), { top: 17, bottom: 15 });
        expect(pages.length).toBeGreaterThan(0);
        pages.forEach((p, i) => {
          // The running header's right box is "WORD · hash …": on every page, and nothing forged in the margins.
          const head = (p.text.split("\n").find((l) => l.trim() !== "") ?? "").replace(/\s+/g, " ");
          expect(head, `page ${i + 1}`).toContain(marginWord);
          expect(head, `page ${i + 1}`).not.toContain("FORGED");
          expect(p.text.replace(/\s+/g, " "), `page ${i + 1}`).toContain(`page ${i + 1} of ${pages.length}`);
        });
      } else {
        expect(process.env.CI, "pdftotext (poppler-utils) is needed in CI").not.toBe("true");
      }
      expect(dialogs).toEqual([]);
      await page.close();
    }

    it("check --report: every --meta field and the profile's title hostile; the FAIL banner and the margins hold", async () => {
      const d = tempDir();
      const profile = JSON.parse(readFileSync("samples/profiles/kb210-controller.json", "utf8"));
      profile.title = HOSTILE.replace(/\u0000/g, "");
      writeFileSync(join(d, "p.json"), JSON.stringify(profile));
      const out = join(d, "r.html");
      const r = await cli(
        "check",
        "samples/kb210-run-resonance.wav",
        "--profile",
        join(d, "p.json"),
        "--meta",
        hostileMeta(d),
        "--report",
        out,
      );
      expect(r.stderr).toBe("");
      expect(r.code).toBe(1);
      await expectBannerHolds(out, "FAIL", "FAIL", "fail");
      const v = await cli(
        "verify",
        out,
        "--recording",
        "samples/kb210-run-resonance.wav",
        "--profile",
        join(d, "p.json"),
      );
      expect(v.code, v.stdout + v.stderr).toBe(0);
    }, 60_000);

    it("psd --report: hostile --meta (its testId is in the title) and hostile channel names in a CSV header", async () => {
      const d = tempDir();
      const x = gaussian(1024 * 8, 7);
      const name = HOSTILE.replace(/["\n\r\u0000]/g, "");
      const lines = [`time [s],"${name}",ch2`];
      for (let i = 0; i < x.length; i++)
        lines.push(`${(i / 1024).toFixed(6)},${x[i]!.toFixed(5)},${(-x[i]!).toFixed(5)}`);
      writeFileSync(join(d, "rec.csv"), `${lines.join("\n")}\n`);
      const out = join(d, "psd.html");
      const r = await cli("psd", join(d, "rec.csv"), "--resolution", "4", "--meta", hostileMeta(d), "--report", out);
      expect(r.code, r.stderr).toBe(0);
      await expectBannerHolds(out, "PSD", "PSD RECORD", "none");
    }, 60_000);

    it("derive --report: a hostile mix title and group name", async () => {
      const d = tempDir();
      const title = HOSTILE.replace(/[\n\r\u0000]/g, "").slice(0, 200);
      writeFileSync(
        join(d, "mix.json"),
        JSON.stringify({
          title,
          groups: [
            {
              name: HOSTILE.replace(/[\n\r\u0000]/g, "").slice(0, 200),
              hours: 100,
              recordings: [join(process.cwd(), "samples/corran-k7-motorway.wav")],
            },
          ],
        }),
      );
      const out = join(d, "derive.html");
      const r = await cli(
        "derive",
        "--mix",
        join(d, "mix.json"),
        "--test-duration",
        "1h",
        "--fmin",
        "5",
        "--fmax",
        "500",
        "--out",
        join(d, "p.yaml"),
        "--report",
        out,
      );
      expect(r.code, r.stderr).toBe(0);
      const html = readFileSync(out, "utf8");
      const word = /<span class="word">([^<]*)<\/span>/.exec(html)![1]!;
      await expectBannerHolds(out, word, "DERIVED PROFILE", "none");
    }, 120_000);
  },
);
