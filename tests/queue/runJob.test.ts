import { copyFileSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeRecording } from "../../src/pass/analyzeRecording.js";
import { checkRecording, loadProfile } from "../../src/analyses/checkRecording.js";
import { checkJson } from "../../src/report/checkReport.js";
import { psdJson } from "../../src/report/psdJson.js";
import { errorFromWire, InputError } from "../../src/errors.js";
import { VERSION } from "../../src/version.js";
import type { Job } from "../../src/queue/job.js";
import { runJob } from "../../src/queue/runJob.js";
import { tempDir } from "../helpers.js";

const root = tempDir();
mkdirSync(join(root, "runs"));
mkdirSync(join(root, "specs"));
copyFileSync("samples/kb210-run-short.wav", join(root, "runs", "short.wav"));
copyFileSync("samples/profiles/kb210-controller.json", join(root, "specs", "kb210.json"));
writeFileSync(join(root, "runs", "bad.csv"), "time,ax [g]\n0,1\n0.001,oops\n");
const profile = await loadProfile(join(root, "specs", "kb210.json"));
const local = await analyzeRecording("samples/kb210-run-short.wav");
const sha = local.input.sha256;

describe("runJob", () => {
  it("runJob(psd job) gives psdJson's line for the recording, named by the job's path", async () => {
    const o = await runJob({ kind: "psd", file: "runs/short.wav", sha256: sha, options: {} }, { root });
    expect(o.ok).toBe(true);
    const expected = psdJson(local, VERSION);
    expected.input.file = "runs/short.wav";
    expected.analysis = { ...expected.analysis, file: "runs/short.wav" };
    expect(JSON.stringify(o.line)).toBe(JSON.stringify(expected));
    if (o.ok) expect(o.verdict).toBe(null);
  });
  it("runJob(check job) gives checkJson's line and the verdict, profile named by the job's path", async () => {
    const job: Job = {
      kind: "check",
      file: "runs/short.wav",
      sha256: sha,
      options: {},
      profile: { path: "specs/kb210.json", sha256: profile.sha256 },
    };
    const o = await runJob(job, { root, profiles: new Map() });
    const r = await checkRecording("samples/kb210-run-short.wav", profile, { histogram: false });
    const expected = checkJson(r, VERSION);
    expected.input.file = "runs/short.wav";
    expected.analysis = { ...expected.analysis, file: "runs/short.wav" };
    expected.profile.file = "specs/kb210.json";
    expect(JSON.stringify(o.line)).toBe(JSON.stringify(expected));
    expect(o.ok && o.verdict).toBe("inconclusive");
    if (o.ok)
      expect(o.figures.channels[0]).toMatchObject({
        name: "ch1",
        verdict: "inconclusive",
        rms: r.channels[0]!.rms.measured,
        dof: r.analysis.channels[0]!.psd.dof,
      });
  });
  it("runJob(check job, { reportDir }) writes the HTML report at the job's path and gives the same line", async () => {
    const reportDir = join(tempDir(), "reports");
    const job: Job = {
      kind: "check",
      file: "runs/short.wav",
      sha256: sha,
      options: {},
      profile: { path: "specs/kb210.json", sha256: profile.sha256 },
    };
    const plain = await runJob(job, { root });
    const o = await runJob(job, { root, reportDir });
    expect(o.ok && o.report).toBe("runs/short.html");
    // The same line but for the recorded analysis, which says the report's histogram was made.
    const line = o.line as { analysis: { histogram: boolean } };
    expect(line.analysis.histogram).toBe(true);
    expect(JSON.stringify({ ...line, analysis: { ...line.analysis, histogram: false } })).toBe(
      JSON.stringify(plain.line),
    );
    const html = readFileSync(join(reportDir, "runs", "short.html"), "utf8");
    expect(html).toMatch(/^<!DOCTYPE html>/i);
    expect(html).toContain("runs/short.wav");
    expect((await runJob(job, { root, reportDir })).ok).toBe(true); // a retried job may replace its report
  });
  it("an input error is an outcome with its code and the batch's error line, named by the job's path", async () => {
    // Its real SHA-256: the file's identity is checked before it is read as a recording.
    const badSha = (await import("node:crypto"))
      .createHash("sha256")
      .update(readFileSync(join(root, "runs", "bad.csv")))
      .digest("hex");
    const o = await runJob({ kind: "psd", file: "runs/bad.csv", sha256: badSha, options: {} }, { root });
    expect(o.ok).toBe(false);
    if (!o.ok) {
      expect(o.error.code).toBe("CSV_NOT_A_NUMBER");
      expect(o.error.message).toMatch(/^runs\/bad\.csv:3:2 \(ax\): expected a number/);
      expect(o.line).toEqual({
        tool: { name: "psdgate", version: VERSION },
        input: { file: "runs/bad.csv" },
        error: { code: o.error.code, message: o.error.message },
      });
      // The outcome carries the error in its wire form: the same InputError rebuilds from it on the other side.
      expect(o.error.details).toMatchObject({ file: "runs/bad.csv", line: 3, column: 2, field: "ax" });
      const back = errorFromWire(o.error);
      expect(back).toBeInstanceOf(InputError);
      expect([(back as InputError).code, back.message]).toEqual([o.error.code, o.error.message]);
    }
  });
  it("a recording or profile changed since it was queued, and a path out of the root, are refused", async () => {
    const changed = await runJob(
      { kind: "psd", file: "runs/short.wav", sha256: "f".repeat(64), options: {} },
      { root },
    );
    expect(!changed.ok && changed.error.code).toBe("RECORDING_CHANGED");
    const prof = await runJob(
      {
        kind: "check",
        file: "runs/short.wav",
        sha256: sha,
        options: {},
        profile: { path: "specs/kb210.json", sha256: "e".repeat(64) },
      },
      { root },
    );
    expect(!prof.ok && prof.error.code).toBe("PROFILE_CHANGED");
    const out = await runJob({ kind: "psd", file: "../x.wav", sha256: sha, options: {} }, { root });
    expect(!out.ok && out.error.code).toBe("JOB_PATH_REFUSED");
  });
  it("a recording swapped after add for a 40 GB sparse file is refused by its size at once, before any analysis or hash", async () => {
    const { truncateSync, statSync } = await import("node:fs");
    const d = join(root, "runs", "swapped.wav");
    copyFileSync("samples/kb210-run-short.wav", d);
    const bytes = statSync(d).size;
    truncateSync(d, 40 * 2 ** 30);
    const t0 = Date.now();
    const r = await runJob({ kind: "psd", file: "runs/swapped.wav", sha256: sha, bytes, options: {} }, { root });
    expect(Date.now() - t0).toBeLessThan(1000);
    expect(!r.ok && r.error.code).toBe("RECORDING_CHANGED");
    expect(!r.ok && r.error.message).toMatch(
      new RegExp(
        `runs/swapped\\.wav: expected the recording queued with SHA-256 ${sha} \\(${bytes} bytes\\), received 42949672960 bytes`,
      ),
    );
    // The same size but other bytes: the streamed SHA-256 refuses it before the analysis.
    const same = join(root, "runs", "same-size.wav");
    writeFileSync(same, Buffer.alloc(bytes, 7));
    const s2 = await runJob({ kind: "psd", file: "runs/same-size.wav", sha256: sha, bytes, options: {} }, { root });
    expect(!s2.ok && s2.error.code).toBe("RECORDING_CHANGED");
  });
  it("a folder link planted inside --report-dir is not followed: the job fails alone with JOB_PATH_REFUSED, nothing written outside", async () => {
    const { symlinkSync, readdirSync } = await import("node:fs");
    const reportDir = tempDir();
    const outside = tempDir();
    symlinkSync(outside, join(reportDir, "runs"));
    const r = await runJob(
      {
        kind: "check",
        file: "runs/short.wav",
        sha256: sha,
        options: {},
        profile: { path: "specs/kb210.json", sha256: profile.sha256 },
      },
      { root, reportDir },
    );
    expect(!r.ok && r.error.code).toBe("JOB_PATH_REFUSED");
    expect(!r.ok && r.error.message).toMatch(/option --report-dir|report folder inside/);
    expect(readdirSync(outside)).toEqual([]);
  });
});
