import { copyFileSync, existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { spawnSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { analyzeRecording } from "../../src/pass/analyzeRecording.js";
import { createProgress, progressEnabled } from "../../src/cli/progress.js";
import { cli, tempDir } from "../helpers.js";

const dir = tempDir();
const kb = "samples/profiles/kb210-controller.json";
const runs = ["samples/kb210-run.wav", "samples/kb210-run-resonance.wav", "samples/kb210-run-short.wav"];

describe("several recordings", () => {
  it("check on several files: one JSON line each, in input order, exit code of the worst verdict", async () => {
    const r = await cli("check", runs[2]!, runs[0]!, "--profile", kb, "--json");
    const lines = r.stdout
      .trim()
      .split("\n")
      .map((l) => JSON.parse(l));
    expect(lines.map((l) => [l.input.file, l.verdict])).toEqual([
      [runs[2], "inconclusive"],
      [runs[0], "pass"],
    ]);
    expect(r.code).toBe(3);
    expect((await cli("check", ...runs, "--profile", kb, "--json")).code).toBe(1);
  });
  it("a summary table without --json; an unreadable file is reported in its row and makes the exit code 2", async () => {
    const r = await cli("check", runs[0]!, join(dir, "missing.wav"), "--profile", kb);
    expect(r.code).toBe(2);
    expect(r.stdout).toMatch(/2 recordings\n\s+file\s+channel\s+RMS\s+vs required\s+DOF\s+verdict\s+worst excursion/);
    expect(r.stdout).toMatch(/kb210-run\.wav\s+ch1\s+8\.478 g/);
    expect(r.stderr).toContain("missing.wav: expected a readable file");
  });
  it("globs, '-' for a list on stdin and --files-from", async () => {
    const g = await cli("psd", "samples/kb210-run*.wav", "--json");
    expect(g.stdout.trim().split("\n").length).toBe(3);
    let out = "";
    const { runCli } = await import("../../src/cli/main.js");
    const code = await runCli(["psd", "-", "--json"], {
      stdout: (s) => (out += s),
      stderr: () => undefined,
      readStdin: async () => `${runs[0]}\n# a comment\n${runs[2]}\n`,
    });
    expect(code).toBe(0);
    expect(
      out
        .trim()
        .split("\n")
        .map((l) => JSON.parse(l).input.file),
    ).toEqual([runs[0], runs[2]]);
    const list = join(dir, "list.txt");
    writeFileSync(list, runs.join("\n"));
    expect((await cli("psd", "--files-from", list, "--json")).stdout.trim().split("\n").length).toBe(3);
    expect((await cli("psd", "samples/nothing-*.wav")).stderr).toContain("[NO_FILES_MATCH]");
  });
  it("--report-dir makes its folder and writes one report per recording; --report with several files is refused", async () => {
    const out = join(dir, "reports", "run-7");
    expect((await cli("check", runs[0]!, runs[2]!, "--profile", kb, "--report-dir", out)).code).toBe(3);
    expect(readdirSync(out).sort()).toEqual(["kb210-run-short.html", "kb210-run.html", "psdgate-batch.html"]);
    const again = await cli("check", runs[0]!, runs[2]!, "--profile", kb, "--report-dir", out);
    expect(again.code).toBe(2);
    expect(again.stderr).toContain("[OUTPUT_EXISTS]");
    expect(again.stderr).not.toMatch(/\n\s+at /);
    const r = await cli("check", runs[0]!, runs[2]!, "--profile", kb, "--report", join(dir, "x.html"));
    expect(r.code).toBe(2);
    expect(r.stderr).toContain("--report-dir");
  });
  it("--report-dir that cannot be made is OUTPUT_UNWRITABLE at once: under /proc (Node's recursive mkdir never settled there), below a file", async () => {
    const underProc = await cli("check", runs[0]!, runs[2]!, "--profile", kb, "--report-dir", "/proc/psdgate-x/y");
    expect(underProc.code).toBe(2);
    expect(underProc.stderr).toContain("[OUTPUT_UNWRITABLE]");
    const file = join(dir, "a-file");
    writeFileSync(file, "x");
    const belowFile = await cli("check", runs[0]!, runs[2]!, "--profile", kb, "--report-dir", join(file, "sub"));
    expect(belowFile.code).toBe(2);
    expect(belowFile.stderr).toContain("[OUTPUT_UNWRITABLE]");
    const onFile = await cli("check", runs[0]!, runs[2]!, "--profile", kb, "--report-dir", file);
    expect(onFile.stderr).toContain("[OUTPUT_UNWRITABLE]");
  }, 20_000);
  it("the worker pool (--jobs 2, built CLI) gives the same JSON lines as --jobs 1", () => {
    const a = spawnSync("node", ["bin/psdgate.js", "check", ...runs, "--profile", kb, "--json", "--jobs", "1"], {
      encoding: "utf8",
    });
    const b = spawnSync("node", ["bin/psdgate.js", "check", ...runs, "--profile", kb, "--json", "--jobs", "2"], {
      encoding: "utf8",
    });
    expect(b.status).toBe(1);
    expect(b.stdout).toBe(a.stdout);
  });
});

describe("CSV parsed on a worker thread (files of 8 MB and more, built code)", () => {
  const big = join(dir, "big.csv");
  let s = "time,ax [g],ay [g]\n";
  for (let i = 0; i < 330000; i++)
    s += `${(i / 2048).toFixed(7)},${Math.sin(i * 0.37).toFixed(6)},${(Math.cos(i * 0.11) * 2).toFixed(6)}\n`;
  writeFileSync(big, s);
  it("gives the same PSD and statistics as the single-thread parser", async () => {
    const r = spawnSync("node", ["bin/psdgate.js", "psd", big, "--json", "-q"], {
      encoding: "utf8",
      maxBuffer: 1 << 26,
    });
    expect(r.status, r.stderr).toBe(0);
    const par = JSON.parse(r.stdout);
    const one = await analyzeRecording(big, { csv: { parseWorkers: 0 } });
    expect(par.input.sampleRateHz).toBe(2048);
    expect(par.channels[1].psd).toEqual(Array.from(one.channels[1]!.psd.psd));
    expect(par.channels[0].stats.max).toBe(one.channels[0]!.stats.max);
    expect(par.input.sha256).toBe(one.input.sha256);
  });
  it("a worker started before the program loaded and never used (a bad option) does not hold the exit", () => {
    // bin.ts starts the parse worker when a file named on the command line is a large CSV (csvWorkerStart.ts).
    const t0 = Date.now();
    const r = spawnSync("node", ["bin/psdgate.js", "psd", big, "--segment", "many"], { encoding: "utf8" });
    expect(r.status).toBe(2);
    expect(r.stderr).toContain("--segment");
    expect(Date.now() - t0).toBeLessThan(10000);
  });
  it("names the exact line of a bad cell deep in a later piece", async () => {
    const lines = s.split("\n");
    lines[300000] = lines[300000]!.replace(/,[^,]*$/, ",oops");
    const bad = join(dir, "bad-big.csv");
    writeFileSync(bad, lines.join("\n"));
    const r = spawnSync("node", ["bin/psdgate.js", "psd", bad, "-q"], { encoding: "utf8" });
    expect(r.status).toBe(2);
    expect(r.stderr).toContain("bad-big.csv:300001:3 (ay)");
    const e = await analyzeRecording(bad, { csv: { parseWorkers: 0 } }).catch((x: Error) => x.message);
    expect(e).toContain("bad-big.csv:300001:3 (ay)");
  });
});

describe("progress", () => {
  it("is drawn only on a terminal, without --quiet, NO_COLOR or CI", () => {
    expect(progressEnabled(true, false, {})).toBe(true);
    expect(progressEnabled(false, false, {})).toBe(false);
    expect(progressEnabled(true, true, {})).toBe(false);
    expect(progressEnabled(true, false, { NO_COLOR: "1" })).toBe(false);
    expect(progressEnabled(true, false, { CI: "true" })).toBe(false);
  });
  it("shows nothing for the first 2 s, then a bar with bytes, rate and ETA, at most ten times a second", () => {
    let t = 0;
    let out = "";
    const p = createProgress(
      true,
      (s) => (out += s),
      () => t,
    );
    t = 1000;
    p.update(10e6, 100e6);
    expect(out).toBe("");
    t = 2500;
    p.update(50e6, 100e6);
    expect(out).toMatch(/\[={10,} +\]\s+50 %\s+50\.0 MB of 100\.0 MB\s+20\.0 MB\/s\s+ETA 3 s/);
    const n = out.length;
    t = 2550;
    p.update(51e6, 100e6);
    expect(out.length).toBe(n);
    p.line("[1/2] a.csv  pass");
    expect(out.endsWith("\r\x1b[2K[1/2] a.csv  pass\n")).toBe(true);
  });
  it("writes nothing at all when disabled", () => {
    let out = "";
    const p = createProgress(
      false,
      (s) => (out += s),
      () => 1e9,
    );
    p.update(1, 2);
    p.line("x");
    p.end();
    expect(out).toBe("");
  });
});

describe("batch worker limits (built code, issue #12)", () => {
  it("runBatch with a 2 MB worker heap: every recording gets one WORKER_LIMIT outcome, in order, and the batch still completes", async () => {
    const { runBatch } = await import(join(process.cwd(), "dist/cli/batch.js"));
    const got: [number, boolean, string][] = [];
    await runBatch(
      runs,
      {},
      undefined,
      2,
      (o: { ok: boolean; error?: { code: string } }, i: number) => got.push([i, o.ok, o.error?.code ?? ""]),
      undefined,
      { maxOldGenerationSizeMb: 2 },
    );
    expect(got).toEqual(runs.map((_, i) => [i, false, "WORKER_LIMIT"]));
  }, 60_000);
  it("the built CLI: a file over the channel limit in a batch is one error line and the other recordings complete", () => {
    const big = join(dir, "channels-32767.wav");
    const wav = Buffer.alloc(44 + 32767 * 2 * 2);
    wav.write("RIFF", 0, "latin1");
    wav.writeUInt32LE(wav.length - 8, 4);
    wav.write("WAVEfmt ", 8, "latin1");
    wav.writeUInt32LE(16, 16);
    wav.writeUInt16LE(1, 20);
    wav.writeUInt16LE(32767, 22);
    wav.writeUInt32LE(1000, 24);
    wav.writeUInt32LE(1000 * 32767 * 2, 28);
    wav.writeUInt16LE(32767 * 2, 32);
    wav.writeUInt16LE(16, 34);
    wav.write("data", 36, "latin1");
    wav.writeUInt32LE(32767 * 2 * 2, 40);
    writeFileSync(big, wav);
    const r = spawnSync(
      process.execPath,
      ["bin/psdgate.js", "check", runs[0]!, big, runs[1]!, runs[2]!, "--profile", kb, "--json", "--jobs", "2"],
      { encoding: "utf8" },
    );
    expect(r.status).toBe(2);
    const lines = r.stdout
      .trim()
      .split("\n")
      .map((l) => JSON.parse(l));
    expect(lines.map((l) => l.verdict ?? l.error.code)).toEqual(["pass", "TOO_MANY_CHANNELS", "fail", "inconclusive"]);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
  }, 60_000);
});

describe("check --meta-table: per recording its test identity from one table", () => {
  const names = ["kb210-run.wav", "kb210-run-resonance.wav", "kb210-run-short.wav"];
  const setup = () => {
    const d = tempDir();
    for (const n of names) copyFileSync(join("samples", n), join(d, n));
    writeFileSync(join(d, "shared.yaml"), "workOrder: WO-5531\noperator: T. Hallberg\n");
    return { d, recs: names.map((n) => join(d, n)) };
  };
  it("a CSV or YAML table names each recording's test; --meta, then the row, then a meta file beside the recording, key by key; the batch index shows them", async () => {
    const { d, recs } = setup();
    // One row by file name, one by the path as given (quoted, with a comma in its notes); the third recording has no row.
    writeFileSync(
      join(d, "runs.csv"),
      `recording,testId,serialNumber,notes\nkb210-run.wav,HF-QA-3001,SN 11,\n\n"${recs[1]}",HF-QA-3002,SN 12,"fixture re-torqued, then run"\n`,
    );
    writeFileSync(join(d, "kb210-run-short.meta.yaml"), "testId: HF-QA-3003\n");
    writeFileSync(join(d, "kb210-run.meta.yaml"), "notes: beside file\n");
    const out = join(d, "out");
    const r = await cli(
      "check",
      ...recs,
      "-p",
      kb,
      "--meta",
      join(d, "shared.yaml"),
      "--meta-table",
      join(d, "runs.csv"),
      "--report-dir",
      out,
      "--json",
      "-q",
    );
    expect(r.code, r.stderr).toBe(1);
    const metas = r.stdout
      .trim()
      .split("\n")
      .map((l) => JSON.parse(l).meta);
    expect(metas[0]).toEqual({
      workOrder: "WO-5531",
      operator: "T. Hallberg",
      testId: "HF-QA-3001",
      serialNumber: "SN 11",
      notes: "beside file",
    });
    expect(metas[1]).toEqual({
      workOrder: "WO-5531",
      operator: "T. Hallberg",
      testId: "HF-QA-3002",
      serialNumber: "SN 12",
      notes: "fixture re-torqued, then run",
    });
    expect(metas[2]).toEqual({ workOrder: "WO-5531", operator: "T. Hallberg", testId: "HF-QA-3003" });
    const index = readFileSync(join(out, "psdgate-batch.html"), "utf8");
    for (const id of ["HF-QA-3001", "HF-QA-3002", "HF-QA-3003"]) expect(index).toContain(`test ${id}`);
    expect(index).toContain("runs.csv");
    expect((await cli("verify", join(out, "psdgate-batch.html"), "-q")).code).toBe(0);
    // The same table in YAML.
    writeFileSync(
      join(d, "runs.yaml"),
      `kb210-run.wav: {testId: HF-QA-3001}\nkb210-run-resonance.wav:\n  testId: HF-QA-3002\n`,
    );
    const y = await cli("check", ...recs, "-p", kb, "--meta-table", join(d, "runs.yaml"), "--json", "-q");
    expect(
      y.stdout
        .trim()
        .split("\n")
        .map((l) => JSON.parse(l).meta?.testId),
    ).toEqual(["HF-QA-3001", "HF-QA-3002", "HF-QA-3003"]);
  });
  it("a row for a recording not in the batch, a recording named twice, a name that fits two, an unknown key: one line with file, line and code; nothing written", async () => {
    const { d, recs } = setup();
    const bad = async (file: string, text: string, code: string, where: RegExp, files = recs) => {
      writeFileSync(join(d, file), text);
      const out = join(d, `out-${file}`);
      const r = await cli("check", ...files, "-p", kb, "--meta-table", join(d, file), "--report-dir", out, "-q");
      expect(r.code, r.stderr).toBe(2);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
      expect(r.stderr).toContain(`[${code}]`);
      expect(r.stderr).toMatch(where);
      expect(existsSync(out) ? readdirSync(out) : []).toEqual([]);
    };
    await bad(
      "t1.csv",
      "recording,testId\nkb210-run.wav,A\nkb210-run-typo.wav,B\n",
      "META_TABLE_UNKNOWN",
      /t1\.csv:3: .*"kb210-run-typo\.wav"/,
    );
    await bad(
      "t2.csv",
      "recording,testId\nkb210-run.wav,A\nkb210-run-short.wav,B\nkb210-run.wav,C\n",
      "META_TABLE_DUPLICATE",
      /t2\.csv:4: .*first at .*t2\.csv line 2/,
    );
    await bad("t3.csv", `recording,testId\nkb210-run.wav,A\n${recs[0]},C\n`, "META_TABLE_DUPLICATE", /t3\.csv:3:/);
    await bad(
      "t4.yaml",
      "kb210-run.wav: {testId: A}\nkb210-run.wav: {testId: B}\n",
      "META_TABLE_DUPLICATE",
      /t4\.yaml:2/,
    );
    await bad(
      "t5.json",
      '{"kb210-run.wav": {"testId": "A"}, "nope.wav": {"testId": "B"}}',
      "META_TABLE_UNKNOWN",
      /t5\.json.*nope\.wav/,
    );
    await bad("t6.csv", "recording,testid\nkb210-run.wav,A\n", "META_INVALID", /t6\.csv:1:2: .*"testid"/);
    await bad(
      "t7.csv",
      "recording,testId,sensorCalibrated\nkb210-run.wav,A,2025-13-40\n",
      "META_INVALID",
      /t7\.csv:2:3: .*calendar date/,
    );
    mkdirSync(join(d, "b"));
    copyFileSync(join("samples", names[0]!), join(d, "b", names[0]!));
    await bad("t8.csv", "recording,testId\nkb210-run.wav,A\n", "META_TABLE_AMBIGUOUS", /t8\.csv:2: .*fits 2/, [
      recs[0]!,
      join(d, "b", names[0]!),
    ]);
  });
});
