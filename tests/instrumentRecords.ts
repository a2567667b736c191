import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { wavBytes } from "./wavBytes.js";

/**
 * Test-only files shaped the way instruments write them, not the way psdgate writes them: time stamps
 * rounded by a logger's print format, a units row under the header, integer WAV codes with and without
 * a calibration, gravity on an axis, an offset while the sensor settles. Every file is made here from
 * samples the test chooses, so a reader's answer can be compared with the same samples read another way
 * (a 64-bit float WAV, whose values are exact).
 */

/** A stamp printed as a C logger would: `%.Nf` (fixed decimals) or `%.Ng` (significant digits, trailing zeros dropped). */
export type StampFormat = { fixed: number } | { significant: number };

export function printStamp(t: number, f: StampFormat): string {
  if ("fixed" in f) return t.toFixed(f.fixed);
  // %.Ng: N significant digits, trailing zeros and a trailing point dropped (what C's printf does for
  // magnitudes from 1e-4 to 10^N; the stamps here stay inside that range).
  if (t === 0) return "0";
  return Number(t.toPrecision(f.significant)).toString();
}

export interface StampedCsv {
  /** Channel columns: name and samples (all the same length). */
  channels: { name: string; samples: Float64Array; unit?: string | undefined }[];
  sampleRateHz: number;
  /** Unit the stamps are printed in. */
  timeUnit: "s" | "ms";
  format: StampFormat;
  /** Time of the first sample, s (a logger that counts from power-on). Default 0. */
  startS?: number | undefined;
  /** Write the units in a row under the header (`ms,g,m/s2`) instead of in the header (`time [ms]`). */
  unitsRow?: boolean | undefined;
}

/** A CSV of a time column and channels, its stamps rounded by `format`; the samples in full (shortest round-trip text). */
export function stampedCsvText(o: StampedCsv): string {
  const k = o.timeUnit === "ms" ? 1000 : 1;
  const start = o.startS ?? 0;
  const n = o.channels[0]!.samples.length;
  const lines: string[] = [];
  if (o.unitsRow) {
    lines.push(["time", ...o.channels.map((c) => c.name)].join(","));
    lines.push([o.timeUnit, ...o.channels.map((c) => c.unit ?? "")].join(","));
  } else {
    lines.push(
      [`time [${o.timeUnit}]`, ...o.channels.map((c) => (c.unit ? `${c.name} [${c.unit}]` : c.name))].join(","),
    );
  }
  for (let i = 0; i < n; i++) {
    let row = printStamp((start + i / o.sampleRateHz) * k, o.format);
    for (const c of o.channels) row += "," + String(c.samples[i]);
    lines.push(row);
  }
  return lines.join("\n") + "\n";
}

export function writeStampedCsv(dir: string, name: string, o: StampedCsv): string {
  const file = join(dir, name);
  writeFileSync(file, stampedCsvText(o));
  return file;
}

/** The same samples as a 64-bit float WAV (exact values), the reference a CSV of them is compared with. */
export function writeFloatWav(dir: string, name: string, channels: Float64Array[], sampleRateHz: number): string {
  const n = channels[0]!.length;
  const samples: number[] = new Array(n * channels.length);
  for (let i = 0; i < n; i++)
    for (let c = 0; c < channels.length; c++) samples[i * channels.length + c] = channels[c]![i]!;
  const file = join(dir, name);
  writeFileSync(file, wavBytes({ tag: 3, bits: 64, channels: channels.length, sampleRate: sampleRateHz, samples }));
  return file;
}

/**
 * A 16-bit PCM WAV as a recorder writes it: codes = round(x / fullScale x 32768), clipped to the codes.
 * With `calibration`, psdgate's `pgcl` chunk says what full scale is ({"unit", "scale"}); without, the
 * file holds bare codes, as most recorders write them.
 */
export function writeInt16Wav(
  dir: string,
  name: string,
  channels: Float64Array[],
  sampleRateHz: number,
  fullScale: number,
  calibration?: { unit: string; scale: number },
): string {
  const n = channels[0]!.length;
  const samples: number[] = new Array(n * channels.length);
  for (let i = 0; i < n; i++) {
    for (let c = 0; c < channels.length; c++)
      samples[i * channels.length + c] = Math.max(
        -32768,
        Math.min(32767, Math.round((channels[c]![i]! / fullScale) * 32768)),
      );
  }
  const file = join(dir, name);
  writeFileSync(
    file,
    wavBytes({
      tag: 1,
      bits: 16,
      channels: channels.length,
      sampleRate: sampleRateHz,
      samples,
      extraChunks: calibration ? [["pgcl", Buffer.from(JSON.stringify(calibration))]] : undefined,
    }),
  );
  return file;
}

/** Gravity on an axis: 1 g (or 9.80665 m/s²) added to every sample. */
export function onGravity(x: Float64Array, g = 1): Float64Array {
  return x.map((v) => v + g);
}

/** A sensor that settles: the first `seconds` carry an offset decaying from `offset` (a charge amplifier's start). */
export function settlingStart(x: Float64Array, sampleRateHz: number, seconds: number, offset: number): Float64Array {
  const n = Math.round(seconds * sampleRateHz);
  return x.map((v, i) => (i < n ? v + offset * Math.exp((-3 * i) / n) : v));
}
