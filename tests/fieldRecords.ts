import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { shapedRecord } from "./shapedRecords.js";
import { wavBytes } from "./wavBytes.js";

/**
 * Test-only field records: seeded Gaussian records of a chosen PSD (tests/shapedRecords.ts, independent of
 * psdgate's synth), written as 1-channel float32 WAV files of 2^17 samples at 2048 Hz (64 s).
 */
export const FIELD_RATE_HZ = 2048;
export const FIELD_LENGTH = 1 << 17;

export function writeFieldRecord(
  dir: string,
  name: string,
  level: (f: number) => number,
  seed: number,
  length = FIELD_LENGTH,
): string {
  const x = shapedRecord(level, FIELD_RATE_HZ, length, seed);
  const file = join(dir, name);
  writeFileSync(file, wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: FIELD_RATE_HZ, samples: Array.from(x) }));
  return file;
}

/** A flat PSD of g0 (g^2/Hz) from 2 to 900 Hz, nothing outside. */
export const flat = (g0: number) => (f: number) => (f >= 2 && f <= 900 ? g0 : 0);
