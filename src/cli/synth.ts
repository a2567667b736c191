import type { Command } from "commander";
import { InputError } from "../errors.js";
import { sig } from "../report/format.js";
import { printable } from "../report/printable.js";
import { accelLabel } from "../units.js";
import { VERSION } from "../version.js";
import type { CliIo } from "./io.js";
import { numberOption } from "./options.js";
import type { TestProfile } from "../compare/testProfile.js";
import type { SynthResult } from "../synth/synthesizeProfile.js";

interface SynthFlags {
  profile: string;
  duration: number;
  rate: number;
  out: string;
  seed: number;
  channels: number;
  levelDb: number;
  toneDb: number;
  withoutTones?: boolean;
  force?: boolean;
  json?: boolean;
}

/** A sine tone as written: frequency, peak and phase on the first sample. */
type Tone = { hz: number; peak: number; phaseRad: number };

/** `psdgate synth --profile P`: a seeded random record that follows a profile. */
export function registerSynth(program: Command, io: CliIo): void {
  program
    .command("synth")
    .description(
      "a seeded Gaussian random time history whose PSD follows a profile, plus the profile's sine tones (WAV float32 or CSV)",
    )
    .requiredOption("-p, --profile <file>", "profile to follow")
    .requiredOption(
      "-d, --duration <s>",
      "length in seconds",
      numberOption("--duration", (x) => x > 0 && x <= 86400, "a duration in s, 0 < d <= 86400"),
    )
    .requiredOption(
      "--rate <hz>",
      "sample rate",
      numberOption("--rate", (x) => x > 0 && Number.isInteger(x), "a whole sample rate in Hz"),
    )
    .requiredOption("-o, --out <file>", "output .wav or .csv")
    .option(
      "--seed <n>",
      "random seed (same seed, same record)",
      numberOption("--seed", (x) => Number.isInteger(x) && x >= 0 && x < 2 ** 32, "a whole number 0 <= n < 2^32"),
      1,
    )
    .option(
      "--channels <n>",
      "independent channels",
      numberOption("--channels", (x) => Number.isInteger(x) && x >= 1 && x <= 64, "1 to 64"),
      1,
    )
    .option(
      "--level-db <db>",
      "shift the whole profile by this many dB (a hot or cold run)",
      numberOption("--level-db", (x) => Math.abs(x) <= 60, "a level shift within ±60 dB"),
      0,
    )
    .option(
      "--tone-db <db>",
      "shift the profile's sine tones by this many dB on top of --level-db (a tone low or high)",
      numberOption("--tone-db", (x) => Math.abs(x) <= 60, "a level shift within ±60 dB"),
      0,
    )
    .option("--without-tones", "leave out the profile's sine tones (random only)")
    .option("--force", "replace an existing output file")
    .option(
      "--json",
      "print what was written as JSON (file, samples, seed, per channel RMS, kurtosis, crest factor; the profile's stroke)",
    )
    .option("-q, --quiet", "no progress output (synth shows none; accepted so every command that writes takes it)")
    .action((o: SynthFlags) => runSynth(io, o));
}

/**
 * Writes the record: the profile read, the output checked, the samples synthesised into it, then what was written said.
 */
async function runSynth(io: CliIo, o: SynthFlags): Promise<void> {
  const { loadProfile } = await import("../analyses/checkRecording.js");
  const { createTimeHistoryWriter } = await import("../report/timeHistoryWriter.js");
  const { synthesizeProfile } = await import("../synth/synthesizeProfile.js");
  const profile = await loadProfile(o.profile);
  checkSynthOutput(o);
  const names = Array.from({ length: o.channels }, (_, i) => `ch${i + 1}`);
  const writer = await createTimeHistoryWriter(o.out, {
    sampleRateHz: o.rate,
    channelNames: names,
    units: profile.units,
    force: o.force,
    option: "--out",
    inputs: [o.profile],
  });
  // Every tone starts as a cosine at phase 0 on the first sample, on every channel (stated in the output).
  const toneGain = 10 ** ((o.levelDb + o.toneDb) / 20);
  const tones = o.withoutTones ? [] : profile.tones.map((t) => ({ hz: t.hz, peak: t.peak * toneGain, phaseRad: 0 }));
  let r: SynthResult;
  try {
    r = await synthesizeProfile(
      profile,
      {
        durationS: o.duration,
        sampleRateHz: o.rate,
        seed: o.seed,
        channels: o.channels,
        levelFactor: 10 ** (o.levelDb / 10),
        tones,
      },
      (b, n) => writer.write(b, n),
    );
    await writer.close();
  } catch (e) {
    await writer.abort();
    throw e;
  }
  await printSynth(io, o, { profile, r, names, tones });
}

/** Refuses an output synth cannot write: not .wav or .csv, under 2 samples, or a WAV over the RIFF's 4 GiB. */
function checkSynthOutput(o: SynthFlags): void {
  if (!/\.(wav|csv)$/i.test(o.out)) {
    throw new InputError("OUTPUT_FORMAT", {
      option: "--out",
      expected: "a file name ending .wav or .csv (what synth writes)",
      received: JSON.stringify(o.out),
    });
  }
  const frames = Math.round(o.duration * o.rate);
  if (!(frames >= 2)) {
    throw new InputError("OPTION_INVALID", {
      option: "--duration",
      expected: "a duration of at least 2 samples at the rate",
      received: `${o.duration} s x ${o.rate} Hz = ${frames} samples`,
    });
  }
  if (/\.wav$/i.test(o.out) && 44 + Math.ceil(o.duration * o.rate) * o.channels * 4 > 0xffffffff) {
    throw new InputError("OPTION_INVALID", {
      option: "--duration",
      expected: "a WAV output under 4 GiB (the RIFF size field is 32-bit)",
      received: `${o.duration} s x ${o.rate} Hz x ${o.channels} channel(s)`,
      hint: "write .csv, or fewer seconds or channels",
    });
  }
}

/** What synth wrote, as JSON or text, with the stroke caution. */
async function printSynth(
  io: CliIo,
  o: SynthFlags,
  w: { profile: TestProfile; r: SynthResult; names: string[]; tones: Tone[] },
): Promise<void> {
  const { profile, r, names, tones } = w;
  const u = accelLabel(profile.units);
  const { profileMotion } = await import("../compare/testProfile.js");
  const { STROKE_CAUTION } = await import("../report/cautions.js");
  const level = 10 ** (o.levelDb / 20);
  const m = profileMotion(profile);
  const pkpkMm = m.displacementPeakToPeak * level * 1000;
  if (o.json) {
    io.stdout(
      JSON.stringify({
        tool: { name: "psdgate", version: VERSION },
        file: o.out,
        samples: r.frames,
        channels: o.channels,
        sampleRateHz: o.rate,
        seed: o.seed,
        filterTaps: r.filterTaps,
        levelDb: o.levelDb,
        profile: {
          file: profile.file,
          sha256: profile.sha256,
          title: profile.title,
          rms: profile.rms * level,
          displacementPeakToPeakM: pkpkMm / 1000,
        },
        channelStats: r.stats.map((s, i) => ({
          name: names[i],
          rms: s.rms,
          kurtosis: s.kurtosis,
          crestFactor: s.crestFactor,
        })),
        caution: STROKE_CAUTION,
      }) + "\n",
    );
    return;
  }
  io.stdout(
    `psdgate ${VERSION}: wrote ${printable(o.out)}: ${r.frames} samples x ${o.channels} channel(s) at ${o.rate} Hz, seed ${o.seed}, ${r.filterTaps}-tap shaping filter\n`,
  );
  io.stdout(
    `  profile "${printable(profile.title)}" ${sig(profile.rms, 4)} ${u} RMS${o.levelDb !== 0 ? `, shifted ${o.levelDb} dB to ${sig(profile.rms * level, 4)} ${u}` : ""}; stroke ${sig(pkpkMm, 4)} mm peak-to-peak estimate (6 x RMS displacement over the profile's band)\n`,
  );
  for (const t of tones)
    io.stdout(
      `  tone ${sig(t.hz, 6)} Hz  ${sig(t.peak, 4)} ${u} peak, cosine at phase 0 rad on the first sample, every channel\n`,
    );
  if (o.withoutTones && profile.tones.length > 0) io.stdout(`  tones left out (--without-tones): random only\n`);
  r.stats.forEach((s, i) =>
    io.stdout(
      `  ${names[i]}  RMS ${sig(s.rms, 4)} ${u}, kurtosis ${s.kurtosis.toFixed(3)}, crest factor ${s.crestFactor.toFixed(2)}\n`,
    ),
  );
  io.stdout(`CAUTION: ${STROKE_CAUTION}\n`);
}
