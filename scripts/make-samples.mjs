// `npm run samples`: regenerates every recording in samples/ with psdgate's own synth (fixed seeds), so
// the bundled data is reproducible. Needs a build (npm ci does it).
import { execFileSync } from "node:child_process";

const runs = [
  // CSV with a time column and two channels: a Tern-7 gimbal flight-vibration run that meets its profile.
  ["samples/profiles/tern7-gimbal.yaml", "20", "4096", "2", "7", "samples/tern7-flight.csv"],
  // Two-channel float WAV: a KB-210 controller run that meets its profile.
  ["samples/profiles/kb210-controller.json", "40", "5120", "2", "210", "samples/kb210-run.wav"],
  // One channel, driven through a fixture resonance near 480 Hz: fails a band.
  ["samples/profiles/kb210-drive-resonance.json", "40", "5120", "1", "211", "samples/kb210-run-resonance.wav"],
  // Four seconds only: too few degrees of freedom for the profile's 120, so inconclusive.
  ["samples/profiles/kb210-controller.json", "4", "5120", "1", "212", "samples/kb210-run-short.wav"],
  // Sine-on-random: the Kestrel DCU's mixed-mode run on the HX-4 profile (random plus three blade-pass tones): passes.
  ["samples/profiles/hx4-avionics.yaml", "60", "4096", "1", "425", "samples/hx4-dcu-run.wav"],
];
for (const [profile, duration, rate, channels, seed, out] of runs) {
  execFileSync(
    "node",
    [
      "bin/psdgate.js",
      "synth",
      "--profile",
      profile,
      "--duration",
      duration,
      "--rate",
      rate,
      "--channels",
      channels,
      "--seed",
      seed,
      "--out",
      out,
      "--force",
    ],
    { stdio: "inherit" },
  );
}
// The same test with the blade-pass tones 2 dB low (the drive's sine amplitudes set short): fails, naming each tone.
execFileSync(
  "node",
  [
    "bin/psdgate.js",
    "synth",
    "--profile",
    "samples/profiles/hx4-avionics.yaml",
    "--duration",
    "60",
    "--rate",
    "4096",
    "--seed",
    "426",
    "--tone-db",
    "-2",
    "--out",
    "samples/hx4-dcu-run-tones-low.wav",
    "--force",
  ],
  { stdio: "inherit" },
);
// The ride recording is not a profile synthesis: its own script models the vehicle (scripts/make-ride-sample.mjs).
execFileSync("node", ["scripts/make-ride-sample.mjs"], { stdio: "inherit" });
// Three-channel fixture survey (base, bracket tip, cable clamp) for `psdgate transfer`: its own script.
execFileSync("node", ["scripts/make-fixture-survey.mjs"], { stdio: "inherit" });
// Three road recordings of the Corran K7 van for `psdgate derive`: its own script.
execFileSync("node", ["scripts/make-field-samples.mjs"], { stdio: "inherit" });
// The forklift recording with known shocks for `psdgate shock`: its own script.
execFileSync("node", ["scripts/make-shock-sample.mjs"], { stdio: "inherit" });
