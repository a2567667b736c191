/**
 * Date-time stamps in a CSV time column: ISO 8601 calendar date and time of day (ISO 8601-1:2019,
 * extended format), `YYYY-MM-DDThh:mm:ss.fff`, with `T` or a space between date and time, seconds
 * optional, any number of fraction digits after `.` or `,`, and an optional zone `Z`, `+hh:mm`, `+hhmm`
 * or `+hh`. Stamps become seconds since midnight of a base day (the first stamp's date), so that the
 * fraction keeps its digits: a double holds seconds within a few days to far better than 1 ns, where
 * seconds since 1970 would keep only about 0.2 us.
 */
export interface DateTimeScan {
  /** Index just after the stamp, or -1 when the bytes are not one. */
  end: number;
  /** Seconds since 00:00 UTC (or local, without a zone) of `baseDays`. */
  value: number;
  /** Digits after the decimal mark of the seconds. */
  fractionDigits: number;
  /** 1 when the stamp carries a zone (Z or an offset), else 0. */
  zone: 0 | 1;
  /** Days since 1970-01-01 of the stamp's date (before the zone is applied). */
  days: number;
}

/**
 * Days since 1970-01-01 of a proleptic Gregorian date (H. Hinnant, "chrono-Compatible Low-Level Date
 * Algorithms", 2013, days_from_civil).
 */
export function daysFromCivil(y: number, m: number, d: number): number {
  y -= m <= 2 ? 1 : 0;
  const era = Math.floor(y / 400);
  const yoe = y - era * 400;
  const doy = Math.floor((153 * (m + (m > 2 ? -3 : 9)) + 2) / 5) + d - 1;
  const doe = yoe * 365 + Math.floor(yoe / 4) - Math.floor(yoe / 100) + doy;
  return era * 146097 + doe - 719468;
}

/** The inverse (same source, civil_from_days): [year, month, day]. */
export function civilFromDays(z: number): [number, number, number] {
  z += 719468;
  const era = Math.floor(z / 146097);
  const doe = z - era * 146097;
  const yoe = Math.floor((doe - Math.floor(doe / 1460) + Math.floor(doe / 36524) - Math.floor(doe / 146096)) / 365);
  const doy = doe - (365 * yoe + Math.floor(yoe / 4) - Math.floor(yoe / 100));
  const mp = Math.floor((5 * doy + 2) / 153);
  const d = doy - Math.floor((153 * mp + 2) / 5) + 1;
  const m = mp + (mp < 10 ? 3 : -9);
  return [yoe + era * 400 + (m <= 2 ? 1 : 0), m, d];
}

const DAYS_IN_MONTH = [31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
const POW10 = [1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15];

function digitsAt(buf: Uint8Array, p: number, n: number): number {
  let v = 0;
  for (let i = 0; i < n; i++) {
    const c = buf[p + i]! - 48;
    if (c < 0 || c > 9) return -1;
    v = v * 10 + c;
  }
  return v;
}

/**
 * The last stamp prefix read, `YYYY-MM-DDThh:mm` (16 bytes), with what it gave: consecutive stamps of a
 * logger share it for a minute, so the next stamp compares 16 bytes instead of reading and checking a
 * date and a time of day again. Its seconds before the seconds field, (days - baseDays) * 86400 +
 * h * 3600 + mi * 60, are an integer well inside 2^53, so the sum is exact in either order and the
 * stamp's double is the same as without the cache.
 */
const prefixKey = new Uint8Array(16);
let prefixBase = NaN;
let prefixSeconds = 0;
let prefixDays = 0;

/** Whether buf[p, p + 16) is the cached prefix (compared from the minute's last digit, which changes first). */
function samePrefix(buf: Uint8Array, p: number): boolean {
  for (let i = 15; i >= 0; i--) if (buf[p + i] !== prefixKey[i]) return false;
  return true;
}

/**
 * Scan a stamp at p (the caller guarantees a byte that ends it follows inside buf). `baseDays` is
 * the day the values count from.
 */
export function scanDateTime(buf: Uint8Array, p: number, baseDays: number, out: DateTimeScan): void {
  out.end = -1;
  let q = p + 16;
  let days: number;
  let minuteSeconds: number;
  if (baseDays === prefixBase && p + 16 <= buf.length && samePrefix(buf, p)) {
    days = prefixDays;
    minuteSeconds = prefixSeconds;
  } else {
    const y = digitsAt(buf, p, 4);
    if (y < 0 || buf[p + 4] !== 45 || buf[p + 7] !== 45) return;
    const mo = digitsAt(buf, p + 5, 2);
    const d = digitsAt(buf, p + 8, 2);
    const sep = buf[p + 10];
    if (
      mo < 1 ||
      mo > 12 ||
      d < 1 ||
      d > DAYS_IN_MONTH[mo - 1]! ||
      (mo === 2 && d === 29 && !(y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0)))
    )
      return;
    if (sep !== 84 /* T */ && sep !== 32 && sep !== 116 /* t */) return;
    const h = digitsAt(buf, p + 11, 2);
    const mi = buf[p + 13] === 58 ? digitsAt(buf, p + 14, 2) : -1;
    if (h < 0 || h > 23 || mi < 0 || mi > 59) return;
    days = daysFromCivil(y, mo, d);
    minuteSeconds = (days - baseDays) * 86400 + h * 3600 + mi * 60;
    for (let i = 0; i < 16; i++) prefixKey[i] = buf[p + i]!;
    prefixBase = baseDays;
    prefixDays = days;
    prefixSeconds = minuteSeconds;
  }
  let s = 0;
  let frac = 0;
  let fracDigits = 0;
  if (buf[q] === 58 /* : */) {
    s = digitsAt(buf, q + 1, 2);
    if (s < 0 || s > 59) return;
    q += 3;
    if (buf[q] === 46 || buf[q] === 44) {
      q++;
      let c = buf[q]! - 48;
      while (c >= 0 && c <= 9) {
        if (fracDigits < 15) {
          frac = frac * 10 + c;
          fracDigits++;
        } else return;
        c = buf[++q]! - 48;
      }
      if (fracDigits === 0) return;
    }
  }
  let offset = 0;
  let zone: 0 | 1 = 0;
  const z = buf[q];
  if (z === 90 /* Z */ || z === 122) {
    zone = 1;
    q++;
  } else if (z === 43 || z === 45) {
    const oh = digitsAt(buf, q + 1, 2);
    if (oh < 0 || oh > 23) return;
    let om = 0;
    let len = 3;
    if (buf[q + 3] === 58) {
      om = digitsAt(buf, q + 4, 2);
      len = 6;
    } else if (digitsAt(buf, q + 3, 2) >= 0) {
      om = digitsAt(buf, q + 3, 2);
      len = 5;
    }
    if (om < 0 || om > 59) return;
    offset = (z === 43 ? 1 : -1) * (oh * 3600 + om * 60);
    zone = 1;
    q += len;
  }
  const whole = minuteSeconds + s - offset;
  out.value = fracDigits === 0 ? whole : whole + frac / POW10[fracDigits]!;
  out.fractionDigits = fracDigits;
  out.zone = zone;
  out.days = days;
  out.end = q;
}

const scratch: DateTimeScan = { end: -1, value: 0, fractionDigits: 0, zone: 0, days: 0 };

/** A whole text field as a stamp (the slow path and the sniffer), or undefined. */
export function parseDateTimeText(text: string, baseDays?: number): DateTimeScan | undefined {
  const t = text.trim();
  const b = Buffer.from(t + "\n", "latin1");
  scanDateTime(b, 0, baseDays ?? 0, scratch);
  if (scratch.end !== t.length) return undefined;
  if (baseDays === undefined) scanDateTime(b, 0, scratch.days, scratch);
  return { ...scratch };
}

/** A cheap look: does the text start like a date-time stamp? */
export function looksLikeDateTime(text: string): boolean {
  return parseDateTimeText(text) !== undefined;
}

/**
 * ISO 8601 text of `seconds` after 00:00 of `baseDays`: UTC with `Z` when the stamps carried a zone,
 * else local time as written (no designator). `fractionDigits` as in the stamps.
 */
export function isoDateTime(baseDays: number, seconds: number, fractionDigits: number, zone: boolean): string {
  const dayOffset = Math.floor(seconds / 86400);
  let sod = seconds - dayOffset * 86400;
  const [y, m, d] = civilFromDays(baseDays + dayOffset);
  const scale = 10 ** fractionDigits;
  let units = Math.round(sod * scale);
  if (units >= 86400 * scale) units = 86400 * scale - 1;
  const whole = Math.floor(units / scale);
  sod = whole;
  const hh = Math.floor(sod / 3600);
  const mm = Math.floor((sod % 3600) / 60);
  const ss = sod % 60;
  const p2 = (n: number) => String(n).padStart(2, "0");
  const f = fractionDigits > 0 ? "." + String(units - whole * scale).padStart(fractionDigits, "0") : "";
  return `${String(y).padStart(4, "0")}-${p2(m)}-${p2(d)}T${p2(hh)}:${p2(mm)}:${p2(ss)}${f}${zone ? "Z" : ""}`;
}
