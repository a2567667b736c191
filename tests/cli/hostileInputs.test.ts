import { copyFileSync, existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { execFileSync, spawnSync } from "node:child_process";
import { join } from "node:path";
import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { cli, tempDir } from "../helpers.js";

// Issue #12, end to end: names that came from files, batches with hostile members, small option cases.
const kb = "samples/profiles/kb210-controller.json";

function csvWithNames(names: string[]): string {
  const rows = [`time,${names.map((n) => `"${n.replace(/"/g, '""')}"`).join(",")}`];
  for (let i = 0; i < 4096; i++)
    rows.push(`${(i / 1024).toFixed(6)},${names.map((_, c) => Math.sin(0.3 * i + c).toFixed(5)).join(",")}`);
  return rows.join("\n") + "\n";
}

describe("names from files in outputs", () => {
  it("psd --csv: a channel name with a comma is one quoted field, and =, +, -, @ names get an apostrophe (RFC 4180, OWASP)", async () => {
    const dir = tempDir();
    const rec = join(dir, "names.csv");
    writeFileSync(rec, csvWithNames(["ax, left", "=HYPERLINK(1)", "+ay", "-az", "@b"]));
    const out = join(dir, "out.csv");
    const r = await cli("psd", rec, "--csv", out, "--segment", "1024");
    expect(r.code, r.stderr).toBe(0);
    const rows = Papa.parse<string[]>(readFileSync(out, "utf8").trim(), {}).data;
    expect(rows[0]!.length).toBe(1 + 5 * 3);
    expect(rows.every((row) => row.length === rows[0]!.length)).toBe(true);
    expect(rows[0]![1]).toBe("ax, left_psd [g2/Hz]");
    for (const f of rows[0]!.slice(4)) expect(f).toMatch(/^'[=+\-@]/);
  });

  it("transfer --csv and check --csv: channel names are quoted and guarded as in psd --csv (RFC 4180, OWASP)", async () => {
    const dir = tempDir();
    const rec = join(dir, "names.csv");
    writeFileSync(rec, csvWithNames(["=in,put", "@out"]));
    const tOut = join(dir, "transfer.csv");
    const t = await cli("transfer", rec, "--in", "=in,put", "--csv", tOut, "--segment", "512");
    expect(t.code, t.stderr).toBe(0);
    const tRows = Papa.parse<string[]>(readFileSync(tOut, "utf8").trim(), {}).data;
    expect(tRows.every((row) => row.length === tRows[0]!.length)).toBe(true);
    expect(tRows[0]![1]).toBe("'=in,put_psd [g2/Hz]");
    for (const f of tRows[0]!.slice(2)) expect(f).toMatch(/^'@out_/);
    const cOut = join(dir, "check.csv");
    const c = await cli("check", rec, "--profile", kb, "--csv", cOut, "--segment", "512", "--rate", "1024");
    expect([0, 1, 3], c.stderr).toContain(c.code);
    const cRows = Papa.parse<string[]>(readFileSync(cOut, "utf8").trim(), {}).data;
    expect(cRows.every((row) => row.length === cRows[0]!.length)).toBe(true);
    expect(new Set(cRows.slice(1).map((row) => row[0]))).toEqual(new Set(["'=in,put", "'@out"]));
  });

  it("check --report: a bidi override in the profile title is shown as an escape in the page, never as itself (Unicode UAX #9)", async () => {
    const dir = tempDir();
    const p = JSON.parse(readFileSync(kb, "utf8"));
    p.title = "Rig 4 \u202e SSAP";
    const file = join(dir, "rlo.json");
    writeFileSync(file, JSON.stringify(p));
    const html = join(dir, "rlo.html");
    const r = await cli("check", "samples/kb210-run-resonance.wav", "--profile", file, "--report", html);
    expect(r.code).toBe(1);
    // The embedded result (a <template>, never rendered) keeps the title as the profile wrote it.
    const page = readFileSync(html, "utf8").replace(/<template id="psdgate-result"[\s\S]*<\/template>/, "");
    expect(page).not.toMatch(/[\u202a-\u202e\u2066-\u2069]/u);
    expect(page).toContain("<title>Rig 4 \\u{202e} SSAP: FAIL</title>");
    const v = await cli("verify", html);
    expect(v.code, v.stdout + v.stderr).toBe(0);
  });

  it("check: a profile title with newlines and ESC[8m cannot print a fake verdict or hide the real one", async () => {
    const dir = tempDir();
    const p = JSON.parse(readFileSync(kb, "utf8"));
    p.title = "spoof\n\nVERDICT  PASS\n\u001b[8m";
    const file = join(dir, "spoof.json");
    writeFileSync(file, JSON.stringify(p));
    const r = await cli("check", "samples/kb210-run-resonance.wav", "--profile", file);
    expect(r.code).toBe(1);
    expect(r.stdout).not.toContain("\u001b");
    const verdicts = r.stdout.split("\n").filter((l) => l.startsWith("VERDICT"));
    expect(verdicts.length).toBe(1);
    expect(verdicts[0]).toMatch(/^VERDICT {2}FAIL\b/);
    expect(r.stdout).toContain('against "spoof\\n\\nVERDICT  PASS\\n\\x1b[8m"');
    const pr = await cli("profile", file);
    expect(pr.stdout).not.toContain("\u001b");
  });

  it("inspect: a channel name holding ESC, BEL and a C1 control is printed escaped", async () => {
    const dir = tempDir();
    const rec = join(dir, "esc.csv");
    writeFileSync(rec, csvWithNames(["a\u001b[2Jx\u0007y\u009bz"]));
    const r = await cli("inspect", rec);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('"a\\x1b[2Jx\\x07y\\x9bz"');
    expect(r.stdout).not.toContain("\u001b");
  });
});

describe("batches with hostile members", () => {
  it("check --report-dir: two run.wav in different folders give two reports named after their paths, none lost", async () => {
    const dir = tempDir();
    for (const d of ["a", "b"]) mkdirSync(join(dir, d));
    copyFileSync("samples/kb210-run.wav", join(dir, "a", "run.wav"));
    copyFileSync("samples/kb210-run-resonance.wav", join(dir, "b", "run.wav"));
    const reports = join(dir, "reports");
    const r = await cli(
      "check",
      join(dir, "a", "run.wav"),
      join(dir, "b", "run.wav"),
      "--profile",
      kb,
      "--report-dir",
      reports,
      "--quiet",
    );
    expect(r.code, r.stderr).toBe(1);
    expect(readdirSync(reports).sort()).toEqual(["a__run.html", "b__run.html", "psdgate-batch.html"]);
    expect(readFileSync(join(reports, "b__run.html"), "utf8")).toMatch(/FAIL/);
    // Again without --force: both exist, nothing is replaced.
    const again = await cli(
      "check",
      join(dir, "a", "run.wav"),
      join(dir, "b", "run.wav"),
      "--profile",
      kb,
      "--report-dir",
      reports,
      "--quiet",
    );
    expect(again.code).toBe(2);
    expect(again.stderr).toContain("[OUTPUT_EXISTS]");
  });

  it("a FIFO inside a batch is one error line; the other recordings are analysed", async () => {
    const dir = tempDir();
    const fifo = join(dir, "pipe.wav");
    execFileSync("mkfifo", [fifo]);
    const r = await cli("psd", "samples/kb210-run.wav", fifo, "samples/kb210-run-short.wav", "--json");
    expect(r.code).toBe(2);
    const lines = r.stdout
      .trim()
      .split("\n")
      .map((l) => JSON.parse(l));
    expect(lines.length).toBe(3);
    expect(lines[1].error.code).toBe("FILE_UNREADABLE");
    expect(lines[0].channels.length).toBe(2);
    expect(r.stderr).toContain("received a FIFO (named pipe)");
  });

  it("psd --json batch: a record too short for one segment has an error object in its line", async () => {
    const r = await cli("psd", "samples/kb210-run-short.wav", "samples/kb210-run.wav", "--json", "--segment", "262144");
    const lines = r.stdout
      .trim()
      .split("\n")
      .map((l) => JSON.parse(l));
    expect(r.code).toBe(2);
    expect(lines[0].error).toMatchObject({ code: "RECORD_TOO_SHORT" });
  });

  it("a literal file name with glob characters that exists is taken as it is", async () => {
    const dir = tempDir();
    copyFileSync("samples/kb210-run-short.wav", join(dir, "run[1].wav"));
    copyFileSync("samples/kb210-run.wav", join(dir, "run1.wav"));
    const r = await cli("psd", join(dir, "run[1].wav"), "--json");
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout.trim().split("\n").length).toBe(1);
    expect(JSON.parse(r.stdout).input.file).toBe(join(dir, "run[1].wav"));
  });
});

describe("report at a fine resolution", () => {
  it("check --report with --segment 131072 writes the report (no call-stack overflow)", async () => {
    const out = join(tempDir(), "fine.html");
    const r = await cli("check", "samples/kb210-run.wav", "--profile", kb, "--segment", "131072", "--report", out);
    expect(r.code, r.stderr).toBe(3);
    expect(existsSync(out)).toBe(true);
  }, 30_000);
});

describe("under a memory cap", () => {
  it("a queue command under ulimit -v says its one line and exits 2: no raw stack from the HTTP parser node-postgres makes Node load", () => {
    // The built CLI (bin/psdgate.js) in a shell with a 1.5 GB address-space cap; port 1 refuses the connection.
    const r = spawnSync(
      "bash",
      ["-c", "ulimit -v 1500000 && exec node bin/psdgate.js queue status --db postgres://nobody@127.0.0.1:1/none"],
      { encoding: "utf8", timeout: 30_000 },
    );
    expect(r.status, r.stderr).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/\[DB_UNREACHABLE\]/);
  }, 40_000);
});
