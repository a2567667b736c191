import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cli, python, tempDir } from "../helpers.js";

/** The mixed-mode sample (samples/README.md: the invented Kestrel DCU on the HX-4 rotorcraft) through the CLI. */
const dir = tempDir();
const PROFILE = "samples/profiles/hx4-avionics.yaml";

/** numpy's least-squares fit of [cos, sin, 1] (normal equations) at frequencies scanned 0.5/T apart within f0 ± half, then refined by ternary search, on a WAV's first channel; one entry per f0. */
function numpyFit(file: string, f0s: number[], half: number): { hz: number; peak: number; phase: number }[] {
  return JSON.parse(
    python(`
import os
os.environ["OPENBLAS_NUM_THREADS"] = "1"
import json, numpy as np, scipy.io.wavfile as wf
fs, x = wf.read("${file}")
x = (x[:, 0] if x.ndim > 1 else x).astype("float64")
t = np.arange(len(x)) / fs
T = len(x) / fs
def fit(f):
    c, s = np.cos(2*np.pi*f*t), np.sin(2*np.pi*f*t)
    A = np.array([[c@c, c@s, c.sum()], [c@s, s@s, s.sum()], [c.sum(), s.sum(), len(x)]])
    b = np.array([x@c, x@s, x.sum()])
    k = np.linalg.solve(A, b)
    return k, float(k @ b)   # explained energy: the residual falls as it rises
out = []
for f0 in ${JSON.stringify(f0s)}:
    grid = np.arange(f0 - ${half}, f0 + ${half}, 0.5 / T)
    best = max(grid, key=lambda f: fit(f)[1])
    lo, hi = best - 0.5 / T, best + 0.5 / T
    for _ in range(25):
        m1, m2 = lo + (hi - lo) / 3, hi - (hi - lo) / 3
        if fit(m1)[1] > fit(m2)[1]: hi = m2
        else: lo = m1
    f = (lo + hi) / 2
    k, _ = fit(f)
    out.append({"hz": f, "peak": float(np.hypot(k[0], k[1])), "phase": float(np.arctan2(-k[1], k[0]))})
print(json.dumps(out))`),
  );
}

describe("mixed mode through the CLI (the HX-4 sample)", () => {
  it("check --json: PASS, and per channel tones[] with hz, requiredPeak, measuredPeak, lowerPeak, upperPeak, verdict; each peak within 1 % of numpy's least-squares fit", async () => {
    const r = await cli("check", "samples/hx4-dcu-run.wav", "--profile", PROFILE, "--json");
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.verdict).toBe("pass");
    const tones = j.channels[0].tones;
    expect(tones.map((t: { hz: number }) => t.hz)).toEqual([21.2, 42.4, 84.8]);
    // numpy's own least-squares fit, independent of psdgate's estimator.
    const refs = numpyFit(
      "samples/hx4-dcu-run.wav",
      tones.map((t: { hz: number }) => t.hz),
      0.05,
    );
    for (const [i, t] of tones.entries()) {
      for (const k of ["hz", "requiredPeak", "measuredPeak", "lowerPeak", "upperPeak", "verdict"])
        expect(t).toHaveProperty(k);
      expect(t.verdict).toBe("pass");
      const ref = refs[i]!;
      expect(Math.abs(t.measuredPeak / ref.peak - 1)).toBeLessThan(0.01);
      expect(Math.abs(t.measuredHz - ref.hz)).toBeLessThan(0.002);
    }
    expect(j.profile.totalRms).toBeCloseTo(2.8677, 4);
    expect(j.channels[0].unjudged.excluded).toBeGreaterThan(0);
  }, 120_000);

  it("check on the run with its tones 2 dB low: FAIL (exit 1), naming the tones shown low", async () => {
    const r = await cli("check", "samples/hx4-dcu-run-tones-low.wav", "--profile", PROFILE);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(
      /because {4}blade pass 1P x 4 \(21\.2 Hz\): peak 0\.9\d+ is -2\.\d\d dB from the required 1\.2, shown below its limits/,
    );
    expect(r.stdout).toMatch(/because {4}blade pass 2nd harmonic \(42\.4 Hz\): .* shown below its limits/);
  }, 60_000);

  it("synth: sine-on-random with every tone a cosine at phase 0 (numpy's fit finds the stated peak and phase), and --without-tones FAILs naming each tone missing", async () => {
    const out = join(dir, "sor.wav");
    const s = await cli(
      "synth",
      "--profile",
      PROFILE,
      "--duration",
      "20",
      "--rate",
      "4096",
      "--seed",
      "9",
      "--out",
      out,
    );
    expect(s.code).toBe(0);
    expect(s.stdout).toMatch(/tone 21\.2 Hz {2}1\.2 g peak, cosine at phase 0 rad on the first sample/);
    const ref = numpyFit(out, [21.2], 0.05)[0]!;
    // Noise sd sqrt(G/T) = sqrt(0.0042/20) = 0.015 g; float32 samples.
    expect(Math.abs(ref.peak - 1.2)).toBeLessThan(0.05);
    expect(Math.abs(ref.phase)).toBeLessThan(0.05);
    const bare = join(dir, "bare.wav");
    expect(
      (
        await cli(
          "synth",
          "--profile",
          PROFILE,
          "--duration",
          "60",
          "--rate",
          "4096",
          "--seed",
          "9",
          "--without-tones",
          "--out",
          bare,
        )
      ).code,
    ).toBe(0);
    const c = await cli("check", bare, "--profile", PROFILE, "--json");
    expect(c.code).toBe(1);
    const codes = JSON.parse(c.stdout).channels[0].findings.map(
      (f: { code: string; text: string }) => `${f.code} ${f.text.split(" (")[0]}`,
    );
    expect(codes).toEqual(
      expect.arrayContaining([
        "TONE_MISSING blade pass 1P x 4",
        "TONE_MISSING blade pass 2nd harmonic",
        "TONE_MISSING blade pass 4th harmonic",
      ]),
    );
  }, 120_000);

  it("the report of a mixed-mode check verifies (the tone fits re-run to the same numbers)", async () => {
    const rep = join(dir, "hx4.html");
    expect((await cli("check", "samples/hx4-dcu-run-tones-low.wav", "--profile", PROFILE, "--report", rep)).code).toBe(
      1,
    );
    const v = await cli("verify", rep);
    expect(v.code).toBe(0);
  }, 120_000);
});
