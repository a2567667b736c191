import { createHash } from "node:crypto";
import Papa from "papaparse";
import { InputError, quoted } from "../errors.js";
import type { AccelUnit } from "../units.js";
import { readSmallText } from "./regularFile.js";

/**
 * A PSD table that `psdgate psd --csv` wrote: a `frequency_hz` column, then per channel
 * `NAME_psd [UNIT]`, `NAME_lower [UNIT]`, `NAME_upper [UNIT]`, UNIT `g2/Hz` or `(m/s2)2/Hz`, lines
 * equally spaced from 0 Hz. Other columns (`NAME_peak_hold [UNIT]` with `--peak-hold`) are not read.
 */
export interface PsdTable {
  file: string;
  sha256: string;
  frequencyHz: Float64Array;
  channels: { name: string; units: AccelUnit; psd: Float64Array }[];
}

/** Whether a text's first line is the header `psd --csv` writes. */
export function looksLikePsdTable(firstLine: string): boolean {
  return /^\ufeff?frequency_hz\s*,/.test(firstLine);
}

/** Largest PSD table read: 64 MiB holds a million lines of several channels. */
export const MAX_PSD_TABLE_BYTES = 64 << 20;

export async function readPsdTable(file: string): Promise<PsdTable> {
  const { text } = await readSmallText(file, {
    what: "a readable PSD table",
    maxBytes: MAX_PSD_TABLE_BYTES,
    tooLarge: "INPUT_TOO_LARGE",
  });
  return parsePsdTable(text, file);
}

export function parsePsdTable(text: string, file: string): PsdTable {
  const sha256 = createHash("sha256").update(text).digest("hex");
  const rows = Papa.parse<string[]>(text.replace(/^\ufeff/, ""), { skipEmptyLines: "greedy" }).data;
  const head = rows[0] ?? [];
  if (!looksLikePsdTable(head.join(",")))
    throw new InputError("PSD_TABLE_HEADER", {
      file,
      line: 1,
      column: 1,
      expected: "a header starting frequency_hz (a PSD table as psdgate writes it)",
      received: quoted(head.join(",")),
    });
  const channels: { name: string; units: AccelUnit; column: number }[] = [];
  for (let c = 1; c < head.length; c++) {
    const m = /^(.*)_psd \[(.+)\]$/.exec(head[c]!.trim());
    if (!m) continue;
    const unit = m[2] === "g2/Hz" ? "g" : m[2] === "(m/s2)2/Hz" ? "m/s2" : undefined;
    if (unit === undefined)
      throw new InputError("PSD_TABLE_HEADER", {
        file,
        line: 1,
        column: c + 1,
        expected: "a unit g2/Hz or (m/s2)2/Hz",
        received: quoted(m[2]!),
      });
    channels.push({ name: m[1]!, units: unit, column: c });
  }
  if (channels.length === 0)
    throw new InputError("PSD_TABLE_HEADER", {
      file,
      line: 1,
      expected: "at least one column NAME_psd [UNIT]",
      received: "none",
    });
  const n = rows.length - 1;
  if (n < 2) throw new InputError("PSD_TABLE_SHORT", { file, expected: "at least two lines of PSD", received: `${n}` });
  const frequencyHz = new Float64Array(n);
  const psd = channels.map(() => new Float64Array(n));
  for (let r = 1; r <= n; r++) {
    const row = rows[r]!;
    const num = (c: number, what: string): number => {
      const t = row[c];
      const v = t === undefined || t.trim() === "" ? NaN : Number(t);
      if (!Number.isFinite(v) || v < 0)
        throw new InputError("PSD_TABLE_NUMBER", {
          file,
          line: r + 1,
          column: c + 1,
          field: head[c],
          expected: `${what} (a number >= 0)`,
          received: t === undefined ? "nothing" : quoted(t),
        });
      return v;
    };
    frequencyHz[r - 1] = num(0, "a frequency in Hz");
    channels.forEach((ch, i) => (psd[i]![r - 1] = num(ch.column, "a density")));
  }
  const df = frequencyHz[1]! - frequencyHz[0]!;
  for (let k = 1; k < n; k++) {
    if (!(Math.abs(frequencyHz[k]! - frequencyHz[0]! - k * df) <= 1e-6 * df) || !(df > 0)) {
      throw new InputError("PSD_TABLE_SPACING", {
        file,
        line: k + 2,
        column: 1,
        expected: `equally spaced lines (${frequencyHz[0]} + k x ${df} Hz)`,
        received: String(frequencyHz[k]),
      });
    }
  }
  return {
    file,
    sha256,
    frequencyHz,
    channels: channels.map((c, i) => ({ name: c.name, units: c.units, psd: psd[i]! })),
  };
}
