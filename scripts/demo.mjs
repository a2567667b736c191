// `npm run demo`: the main job on the bundled samples. Checks three KB-210 runs against their profile
// (one passes, one fails a band, one is inconclusive) and writes the review report of every run, writes
// the PSD record of the Tern-7 CSV recording and the whole-body vibration of the Marlow UV-3 ride, then
// verifies one report against its inputs; derives a lab profile from the Corran K7 field recordings; finds the
// shocks in the Brackley FT-2 forklift recording.
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
const check = (name) =>
  run([
    "check",
    `samples/${name}.wav`,
    "--profile",
    profile,
    "--meta",
    "samples/kb210-run-meta.yaml",
    "--report",
    `demo-output/${name}-report.html`,
    "--force",
  ]);
const codes = [
  check("kb210-run"),
  check("kb210-run-resonance"),
  check("kb210-run-short"),
  run([
    "psd",
    "samples/tern7-flight.csv",
    "--resolution",
    "2",
    "--fmin",
    "10",
    "--fmax",
    "1500",
    "--report",
    "demo-output/tern7-flight-psd.html",
    "--force",
  ]),
  // A ride: whole-body vibration of the invented Marlow UV-3 recording, with its report.
  run([
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
    "--meta",
    "samples/marlow-uv3-meta.yaml",
    "--report",
    "demo-output/marlow-uv3-ride-report.html",
    "--force",
  ]),
  run(["verify", "demo-output/kb210-run-resonance-report.html"]),
  // The Quarry Bend fixture survey: the bracket's frequency response, and what its lab profile does to a single mode.
  run([
    "transfer",
    "samples/quarry-bend-bracket.csv",
    "--in",
    "base",
    "--meta",
    "samples/quarry-bend-meta.yaml",
    "--report",
    "demo-output/quarry-bend-transfer.html",
    "--force",
  ]),
  run([
    "respond",
    "samples/profiles/quarry-bend-bracket.yaml",
    "--fn",
    "20:1000",
    "--q",
    "10",
    "--stroke-mm",
    "25",
    "--meta",
    "samples/quarry-bend-meta.yaml",
    "--report",
    "demo-output/quarry-bend-respond.html",
    "--force",
  ]),
  // Field to lab: a fatigue-equivalent profile from the invented Corran K7 road recordings and their service mix.
  run([
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
    "--meta",
    "samples/corran-k7-meta.yaml",
    "--out",
    "demo-output/corran-k7-lab.yaml",
    "--report",
    "demo-output/corran-k7-derive.html",
    "--force",
  ]),
  // Every record re-run by verify.
  ...["marlow-uv3-ride-report", "quarry-bend-transfer", "quarry-bend-respond", "corran-k7-derive"].map((n) =>
    run(["verify", `demo-output/${n}.html`]),
  ),
  // Shocks: the events and shock response spectra of the invented Brackley FT-2 forklift recording, with its record.
  run([
    "shock",
    "samples/brackley-ft2-warehouse.csv",
    "--fn",
    "5:160:2",
    "--top",
    "5",
    "--report",
    "demo-output/brackley-ft2-shock.html",
    "--force",
  ]),
];
const expected = [0, 1, 3, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0];
console.log(`\nReports written to demo-output/. Exit codes ${codes.join(", ")} (expected ${expected.join(", ")}).`);
process.exit(codes.every((c, i) => c === expected[i]) ? 0 : 1);
