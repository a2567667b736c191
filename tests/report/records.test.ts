import { copyFileSync, existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { chromium, type Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { embedResult, extractResult, RESULT_PLACEHOLDER } from "../../src/report/embeddedResult.js";
import { cli, tempDir } from "../helpers.js";
import { havePdftotext, printedPages } from "./pdfPages.js";

/**
 * Every kind of record psdgate writes (check, psd, ride, transfer, respond, derive), made once from the
 * samples with one --meta: printed to A4 and Letter in one headless Chromium, each page read back for its
 * identity; `verify` reproduces each; a number edited in each (the result's digests recomputed, as a
 * forger would) is caught by the re-run and named by its JSON path.
 */
const CHROMIUM = process.env.CHROMIUM ?? "/usr/bin/chromium";
const META = `testId: HF-QA-2291
workOrder: WO-40917
item: invented test item
serialNumber: SN 7
operator: J. Amadi
`;

interface Kind {
  kind: string;
  args: (d: string) => string[];
  /** A number in the embedded result to edit, by JSON path, and the page's word in every printed header. */
  edit: (string | number)[];
  word: string;
  hash: "recording" | "source" | "profile";
}

const KINDS: Kind[] = [
  {
    kind: "check",
    args: (_d) => ["check", "samples/kb210-run.wav", "-p", "samples/profiles/kb210-controller.json"],
    edit: ["channels", 0, "rms", "measured"],
    word: "PASS",
    hash: "recording",
  },
  {
    kind: "psd",
    args: () => ["psd", "samples/tern7-flight.csv", "--resolution", "2"],
    edit: ["channels", 0, "rmsTime"],
    word: "PSD RECORD",
    hash: "recording",
  },
  {
    kind: "ride",
    args: () => [
      "ride",
      "samples/marlow-uv3-ride.wav",
      "--units",
      "m/s2",
      "--scale",
      "40",
      "--axes",
      "x=1,y=2,z=3",
      "--floor",
      "4",
      "--exposure",
      "8h",
      "-q",
    ],
    edit: ["axes", 2, "aw"],
    word: "RIDE RECORD",
    hash: "recording",
  },
  {
    kind: "transfer",
    args: () => ["transfer", "samples/quarry-bend-bracket.csv", "--in", "base", "--resolution", "2.5"],
    edit: ["outputs", 0, "resonances", 0, "q"],
    word: "TRANSFER RECORD",
    hash: "recording",
  },
  {
    kind: "respond",
    args: () => [
      "respond",
      "samples/quarry-bend-bracket.csv",
      "--channel",
      "tip",
      "--fn",
      "20:1000:3",
      "--q",
      "10",
      "--stroke-mm",
      "25",
      "--against",
      "samples/profiles/quarry-bend-bracket.yaml",
    ],
    edit: ["accelRms", 5],
    word: "RESPONSE RECORD",
    hash: "recording",
  },
  {
    kind: "derive",
    args: (d) => [
      "derive",
      "--mix",
      "samples/corran-k7-mix.yaml",
      "--test-duration",
      "1h",
      "--fmin",
      "5",
      "--fmax",
      "500",
      "--stroke-mm",
      "51",
      "--out",
      join(d, "k7.yaml"),
    ],
    edit: ["motion", "displacementPeakToPeakM"],
    word: "DERIVED PROFILE",
    hash: "profile",
  },
];

let dir: string;
const made = new Map<string, string>();

beforeAll(async () => {
  dir = tempDir();
  writeFileSync(join(dir, "meta.yaml"), META);
  for (const k of KINDS) {
    const out = join(dir, `${k.kind}.html`);
    const r = await cli(...k.args(dir), "--meta", join(dir, "meta.yaml"), "--report", out);
    expect([0, 1, 3], `${k.kind}: ${r.stderr}`).toContain(r.code);
    made.set(k.kind, out);
  }
  // A batch: three recordings copied into one folder, one with its own meta file beside it.
  const b = join(dir, "batch");
  mkdirSync(b);
  for (const f of ["kb210-run.wav", "kb210-run-resonance.wav", "kb210-run-short.wav"])
    copyFileSync(join("samples", f), join(b, f));
  writeFileSync(join(b, "kb210-run-short.meta.yaml"), "testId: HF-QA-2292\nserialNumber: SN 8\n");
  const r = await cli(
    "check",
    join(b, "kb210-run.wav"),
    join(b, "kb210-run-resonance.wav"),
    join(b, "kb210-run-short.wav"),
    "-p",
    "samples/profiles/kb210-controller.json",
    "--meta",
    join(dir, "meta.yaml"),
    "--report-dir",
    join(b, "out"),
    "-q",
  );
  expect(r.code, r.stderr).toBe(1);
  made.set("batch", join(b, "out", "psdgate-batch.html"));
}, 120_000);

/** Change one number in a record's embedded result and recompute both digests (what a forger with psdgate's source could do). */
function forge(html: string, path: (string | number)[]): { html: string; was: number } {
  const x = extractResult(html);
  const doc = x.doc as Record<string, unknown>;
  let o = doc.result as Record<string | number, unknown>;
  for (const k of path.slice(0, -1)) o = o[k] as Record<string | number, unknown>;
  const last = path[path.length - 1]!;
  const was = o[last] as number;
  expect(typeof was, `${path.join(".")} is a number`).toBe("number");
  o[last] = was * 1.01 + 1e-6;
  const { format: _f, page: _p, ...rest } = doc;
  const page = html.replace(/<template id="psdgate-result"[^>]*>[\s\S]*?<\/template>/, RESULT_PLACEHOLDER);
  return { html: embedResult(page, rest), was };
}

describe("every kind of record: identity, verify, an edited number named", () => {
  for (const k of KINDS) {
    it(`${k.kind} --report --meta: the identity and sign-off on the page, verify reproduces it, an edited ${k.edit.join(".")} is named`, async () => {
      const file = made.get(k.kind)!;
      const html = readFileSync(file, "utf8");
      for (const s of [
        "HF-QA-2291",
        "WO-40917",
        "J. Amadi",
        "Prepared by (name, signature)",
        'id="signoff"',
        'page " counter(page) " of " counter(pages)',
      ])
        expect(html, s).toContain(s);
      expect(html).not.toMatch(/from memory|<script/);
      const v = await cli("verify", file, "--json");
      const j = JSON.parse(v.stdout);
      expect(j.status, v.stdout).toBe("reproduced");
      expect(j.kind).toBe(k.kind);
      expect(j.compared).toBeGreaterThan(10);
      const d = tempDir();
      const forged = join(d, `${k.kind}.html`);
      writeFileSync(forged, forge(html, k.edit).html);
      if (k.kind === "derive") writeFileSync(join(d, "k7.yaml"), readFileSync(join(dir, "k7.yaml")));
      const f = await cli("verify", forged);
      expect(f.code, f.stdout).toBe(1);
      // The path is printed with array indices in brackets: channels[0].rms.measured.
      const named = k.edit.reduce<string>((p, x) => (typeof x === "number" ? `${p}[${x}]` : p ? `${p}.${x}` : x), "");
      expect(f.stdout).toContain(`differs: ${named}: recorded`);
      expect(f.stdout).toMatch(/FAIL\s+rerun\s+1 value\(s\) differ/);
      // A figure edited on the page itself (here the operator's name) breaks the page's digest.
      writeFileSync(forged, html.replace("J. Amadi", "J. Amado"));
      const p = await cli("verify", forged);
      expect(p.code).toBe(1);
      expect(p.stdout).toMatch(/FAIL\s+page\s+page edited outside the result/);
    }, 60_000);
  }

  it("the batch index is a record: per recording its verdict, reason, worst excursion, test id (its own meta file) and link; a caution; verify checks every linked report", async () => {
    const file = made.get("batch")!;
    const html = readFileSync(file, "utf8");
    const rows = [...html.matchAll(/<tr><td><a href="([^"]+)">[\s\S]*?<\/tr>/g)].map((m) => m[0]);
    expect(rows).toHaveLength(3);
    const short = rows.find((x) => x.includes("kb210-run-short"))!;
    expect(short).toContain("test HF-QA-2292");
    expect(short).toMatch(/INCONCLUSIVE.*degrees of freedom/);
    const res = rows.find((x) => x.includes("kb210-run-resonance"))!;
    expect(res).toMatch(/FAIL.*ch1: \d+ of \d+ lines shown outside.*Hz \+\d\.\d+ dB \(limit \+\d\.\d+ dB\), shown/);
    expect(rows.find((x) => x.includes("kb210-run.wav"))).toContain("test HF-QA-2291");
    expect(html).toContain("It does not replace the governing test standard");
    expect(readFileSync(join(dir, "batch", "out", "kb210-run-short.html"), "utf8")).toContain("HF-QA-2292");
    const v = await cli("verify", file);
    expect(v.code, v.stdout).toBe(0);
    expect(v.stdout).toMatch(/3 of 3 linked reports are the ones the index lists/);
    const edited = readFileSync(join(dir, "batch", "out", "kb210-run.html"), "utf8").replace("J. Amadi", "J. Amado");
    writeFileSync(join(dir, "batch", "out", "kb210-run.html"), edited);
    const e = await cli("verify", file);
    expect(e.code).toBe(1);
    expect(e.stdout).toMatch(/kb210-run\.html: SHA-256 differs from the one the index recorded/);
  });

  it("verify on a file that is not a record: one line, NOT_A_REPORT, exit 2", async () => {
    const d = tempDir();
    writeFileSync(join(d, "x.html"), "<!DOCTYPE html><html><body>hello</body></html>");
    const r = await cli("verify", join(d, "x.html"));
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/x\.html.*\[NOT_A_REPORT\]/);
  });
});

const WANT_PDF = existsSync(CHROMIUM);
describe.skipIf(!WANT_PDF && !process.env.CI)(
  "every kind of record printed to A4 and Letter in headless Chromium (one browser)",
  () => {
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

    it('each printed page carries the title, the record\'s word and short hash, the test id and "page N of M"', async () => {
      if (!havePdftotext()) {
        expect(process.env.CI, "pdftotext (poppler-utils) is needed in CI").not.toBe("true");
        return;
      }
      const page = await browser.newPage();
      const seen: string[] = [];
      const fills: string[] = [];
      for (const k of [...KINDS, { kind: "batch", word: "BATCH", hash: "profile" } as const]) {
        const file = made.get(k.kind)!;
        const html = readFileSync(file, "utf8");
        const res = (
          extractResult(html).doc as {
            result: { input?: { sha256: string }; source?: { sha256: string }; profile?: { sha256: string } };
          }
        ).result;
        // The printed identity: the recording's (or respond's source's) hash; derive and the batch index name their profile.
        const short =
          k.kind === "derive"
            ? /DERIVED PROFILE · profile ([0-9a-f]{12})/.exec(html)![1]!
            : (res.input ?? res.source ?? res.profile)!.sha256.slice(0, 12);
        await page.goto(pathToFileURL(file).href);
        for (const format of ["A4", "Letter"] as const) {
          const pages = printedPages(await page.pdf({ format }), { top: 17, bottom: 15 });
          expect(pages.length, `${k.kind} ${format}`).toBeGreaterThan(1);
          pages.forEach((p, i) => {
            const where = `${k.kind} ${format} page ${i + 1}`;
            expect(p.text, where).toContain(`page ${i + 1} of ${pages.length}`);
            expect(p.text, where).toContain(`${k.word} · ${k.hash} ${short}`);
            expect(p.text, where).toContain("test HF-QA-2291");
          });
          // No page but the last is less than 60 % full (measured 0.62 at the lowest, transfer on Letter).
          fills.push(`${k.kind} ${format}: ${pages.map((p) => p.fill.toFixed(2)).join("/")}`);
          pages
            .slice(0, -1)
            .forEach((p, i) => expect(p.fill, `${k.kind} ${format} page ${i + 1} fill`).toBeGreaterThanOrEqual(0.6));
          // The sign-off is whole on the last page, with the identity beside it.
          const last = pages[pages.length - 1]!.text;
          expect(last, `${k.kind} ${format}`).toMatch(/Prepared by \(name, signature\)/);
          expect(last).toContain("HF-QA-2291");
          seen.push(`${k.kind} ${format} ${pages.length}`);
        }
      }
      expect(seen).toHaveLength((KINDS.length + 1) * 2);
      if (process.env.PSDGATE_PRINT_FILLS) console.log(fills.join("\n"));
    }, 180_000);
  },
);
