import type { AccelUnit, UnitSpec } from "../units.js";

/** What a reader learns from a file before the samples flow. */
export interface RecordingInfo {
  file: string;
  format: "csv" | "wav";
  /** Provisional for CSV with a time column (from the first rows); final value in ReadSummary. */
  sampleRateHz: number;
  channels: ChannelInfo[];
  /** Frames, when the header says (WAV). */
  frames?: number | undefined;
  bytes: number;
  /** Format details for the report (CSV dialect, WAV encoding). */
  layout: string;
  /** Lines before a CSV header that are not comments (a logger's metadata), as text. */
  preamble?: string[] | undefined;
  /** The first date-time stamp, when the file has them (so --from/--to can be clock times). */
  firstStamp?: FirstStamp | undefined;
  /** How a CSV was read (detected or as told), for a result that says how to reproduce it. */
  dialect?: CsvDialect | undefined;
}

export interface CsvDialect {
  delimiter: "," | ";" | "\t" | "whitespace";
  decimal: "." | ",";
  header: boolean;
  unitsRow: boolean;
  /** Lines before the header kept as metadata. */
  preambleLines: number;
  /** The time column used (null: none; the rate was given). */
  timeColumn: string | null;
  /** A time column found and left unused, as asked (`csv.timeColumn: false`). */
  ignoredTimeColumn: string | null;
  /**
   * Seconds per unit of the time column's numbers (1 for s, 0.001 for ms; 86400 for days); null for date-time stamps or
   * no column.
   */
  timeUnitS: number | null;
  dateTimeStamps: boolean;
  /** Where the rate comes from: the time column, or the rate given (`csv.sampleRateHz`). */
  rateFrom: "time column" | "given";
  trailingEmptyColumn: boolean;
}

export interface ChannelInfo {
  name: string;
  /** Base unit (g or m/s2) of the acceleration unit the file states (a CSV header such as `az [mg]`), if any. */
  declaredUnit?: AccelUnit | undefined;
  /** That unit in full: its name and its factor to the base unit. */
  declaredUnitSpec?: UnitSpec | undefined;
  /** Volts per file unit, when the file states a voltage (`V`, `mV`). */
  declaredVolts?: number | undefined;
  /** The unit text exactly as the file states it (known or not). */
  declaredUnitText?: string | undefined;
  /** Where the unit text stands (1-based line and column), for messages. */
  unitPlace?: { line: number; column: number } | undefined;
  /** The file holds integer converter codes (a PCM WAV), read as fractions of full scale (±1). */
  integerFullScale?: boolean | undefined;
  /** The step between neighbouring codes in file units (a PCM WAV: 2^-(bits-1) of full scale), when the file has one. */
  quantum?: number | undefined;
  /** A calibration the file itself carries (psdgate's WAV 'pgcl' chunk): file value x scale = declaredUnitSpec. */
  fileScale?: number | undefined;
}

/** The first time stamp of a record with date-time stamps, known from the sniffed head (before the read). */
export interface FirstStamp {
  /** Day number (days since 1970-01-01) the stamps count seconds from. */
  baseDays: number;
  /** Seconds of the first stamp after 00:00 of baseDays (UTC when `zoned`). */
  seconds: number;
  /** The stamps carry a zone (Z or an offset). */
  zoned: boolean;
}

export interface ReadSummary {
  frames: number;
  sampleRateHz: number;
  /** ISO 8601 time of the first sample, when the file's stamps are date-times (UTC with Z when they carried a zone). */
  startTime?: string | undefined;
  sha256: string;
  bytes: number;
}

/**
 * Receives blocks of samples: one Float64Array per selected channel, `frames` valid values each.
 * The arrays are reused for the next block (its length varies): copy what must outlive the call.
 */
export type BlockSink = (channels: Float64Array[], frames: number) => void;

export interface TimeHistorySource {
  info: RecordingInfo;
  /** Streams the selected channels (indexes into info.channels) once through `sink`. */
  read(select: number[], sink: BlockSink, onProgress?: (bytesDone: number) => void): Promise<ReadSummary>;
  /** Releases what the source holds for a read that will not come (a large CSV's waiting worker thread). */
  close?(): Promise<void>;
}
