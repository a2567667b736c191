import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { canonicalJson, settingsDigest, type Job } from "../../src/queue/job.js";

const job: Job = {
  kind: "check",
  file: "runs/a.wav",
  sha256: "ab".repeat(32),
  options: { window: "hann", csv: { sampleRateHz: undefined } },
  profile: { path: "specs/p.json", sha256: "cd".repeat(32) },
};

describe("job", () => {
  it("canonicalJson sorts keys at every depth and leaves out undefined fields", () => {
    expect(canonicalJson({ b: 1, a: { d: [2, { y: 1, x: undefined, w: 0 }], c: undefined } })).toBe(
      '{"a":{"d":[2,{"w":0,"y":1}]},"b":1}',
    );
  });
  it("settingsDigest is the SHA-256 of the canonical kind, options and profile SHA-256", () => {
    // node:crypto createHash("sha256") is the reference for SHA-256 itself (FIPS 180-4).
    const expected = createHash("sha256")
      .update('{"kind":"check","options":{"csv":{},"window":"hann"},"profileSha256":"' + "cd".repeat(32) + '"}')
      .digest("hex");
    expect(settingsDigest(job)).toBe(expected);
  });
  it("settingsDigest ignores the recording's and the profile's paths and key order; changes with any setting", () => {
    const moved = {
      ...job,
      file: "elsewhere/a.wav",
      profile: { path: "other.json", sha256: job.profile!.sha256 },
      options: { csv: {}, window: "hann" as const },
    };
    expect(settingsDigest(moved)).toBe(settingsDigest(job));
    expect(settingsDigest({ ...job, options: { window: "flattop" } })).not.toBe(settingsDigest(job));
    expect(settingsDigest({ ...job, kind: "psd", profile: undefined })).not.toBe(settingsDigest(job));
    expect(settingsDigest({ ...job, profile: { path: "specs/p.json", sha256: "ef".repeat(32) } })).not.toBe(
      settingsDigest(job),
    );
  });
});
