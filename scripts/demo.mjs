// `npm run demo`: the main job on the bundled samples. Checks three KB-210 runs against their profile
// (one passes, one fails a band, one is inconclusive), writes the review report of the passing run,
// prints the PSD summary of the Tern-7 CSV recording, and the whole-body vibration of the Marlow UV-3 ride.
import { spawnSync } from "node:child_process";
import { mkdirSync } from "node:fs";

mkdirSync("demo-output", { recursive: true });
const run = (args) => {
  console.log(`\n$ psdgate ${args.join(" ")}`);
  const r = spawnSync("node", ["bin/psdgate.js", ...args], { stdio: "inherit" });
  console.log(`(exit code ${r.status})`);
  return r.status;
};
const profile = "samples/profiles/kb210-controller.json";
const codes = [
  run(["check", "samples/kb210-run.wav", "--profile", profile, "--report", "demo-output/kb210-run-report.html", "--force"]),
  run(["check", "samples/kb210-run-resonance.wav", "--profile", profile, "--report", "demo-output/kb210-run-resonance-report.html", "--force"]),
  run(["check", "samples/kb210-run-short.wav", "--profile", profile]),
  run(["psd", "samples/tern7-flight.csv", "--resolution", "2", "--fmin", "10", "--fmax", "1500"]),
  // A ride: whole-body vibration of the invented Marlow UV-3 recording, with its report.
  run(["ride", "samples/marlow-uv3-ride.wav", "--units", "m/s2", "--scale", "40", "--axes", "x=1,y=2,z=3", "--floor", "4", "--exposure", "8h", "--report", "demo-output/marlow-uv3-ride-report.html", "--force"]),
];
const expected = [0, 1, 3, 0, 0];
console.log(`\nReports written to demo-output/. Verdict exit codes ${codes.join(", ")} (expected ${expected.join(", ")}).`);
process.exit(codes.every((c, i) => c === expected[i]) ? 0 : 1);
