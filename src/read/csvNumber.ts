/**
 * Byte-level number scanner for the CSV fast path. Accepts [+-]digits[.digits][(e|E)[+-]digits]
 * (with `decimal` as the decimal mark) and returns exactly what Number() returns for the same text:
 * with at most 15 digits in all and a decimal exponent within +-22, the value m / 10^k or m * 10^k
 * is one correctly rounded IEEE operation on exact operands (Clinger 1990, "How to read floating point
 * numbers accurately", PLDI); anything else goes to Number() on the text.
 */
/** Exact powers of ten 10^0 .. 10^22 (all exactly representable in a double). */
export const POW10 = new Float64Array(23);
for (let i = 0; i < 23; i++) POW10[i] = Number(`1e${i}`);

export interface ScanState {
  /** Index just after the number, or -1 when the bytes were not a plain number. */
  end: number;
  value: number;
  /** Digits after the decimal mark. */
  fractionDigits: number;
  /** Decimal place of the last digit: the exponent minus the fraction digits (-5 for 1.000020E+01). */
  place: number;
  /** The digits as one integer (exact up to 15 digits): 1000020 for 1.000020E+01. */
  mant: number;
}

/**
 * Scan the number that starts at p. The caller guarantees that a byte which cannot belong to a
 * number (a newline at the latest) follows inside `buf`, so the loops need no bounds checks.
 */
export function scanNumber(buf: Uint8Array, p: number, decimal: number, out: ScanState): void {
  const start = p;
  let c = buf[p]!;
  const neg = c === 45; /* - */
  if (neg || c === 43 /* + */) c = buf[++p]!;
  // Every digit goes into the mantissa (leading zeros too); past 15 digits the slow path takes over,
  // so the mantissa is exact whenever it is used.
  let mant = 0;
  let digits = 0;
  while (c >= 48 && c <= 57) {
    mant = mant * 10 + (c - 48);
    digits++;
    c = buf[++p]!;
  }
  let frac = 0;
  if (c === decimal) {
    c = buf[++p]!;
    while (c >= 48 && c <= 57) {
      mant = mant * 10 + (c - 48);
      frac++;
      c = buf[++p]!;
    }
  }
  if (digits + frac === 0) {
    out.end = -1;
    return;
  }
  let exp10 = -frac;
  if (c === 101 || c === 69) {
    c = buf[++p]!;
    const eneg = c === 45;
    if (eneg || c === 43) c = buf[++p]!;
    let ev = 0;
    let ed = 0;
    while (c >= 48 && c <= 57) {
      if (ev < 100000) ev = ev * 10 + (c - 48);
      ed++;
      c = buf[++p]!;
    }
    if (ed === 0) {
      out.end = -1;
      return;
    }
    exp10 += eneg ? -ev : ev;
  }
  out.end = p;
  out.fractionDigits = frac;
  out.place = exp10;
  out.mant = mant;
  if (digits + frac <= 15 && exp10 >= -22 && exp10 <= 22) {
    const v = exp10 < 0 ? mant / POW10[-exp10]! : mant * POW10[exp10]!;
    out.value = neg ? -v : v;
    return;
  }
  let s = "";
  for (let i = start; i < p; i++) s += String.fromCharCode(buf[i] === decimal ? 46 : buf[i]!);
  out.value = Number(s);
}

/** The text forms a logger writes for a missing or overflowed sample; read as non-finite values. */
export function nonFiniteToken(text: string): number | undefined {
  const t = text.trim().toLowerCase();
  if (t === "nan") return NaN;
  if (t === "inf" || t === "+inf" || t === "infinity" || t === "+infinity") return Infinity;
  if (t === "-inf" || t === "-infinity") return -Infinity;
  return undefined;
}

/** Parse a whole field as text (slow path), with the given decimal mark. NaN means "not a number". */
export function parseNumberText(text: string, decimal: "." | ","): number {
  const t = text.trim();
  if (!/^[+-]?(\d+\.?\d*|\.\d+|\d+,?\d*|,\d+)([eE][+-]?\d+)?$/.test(t)) return NaN;
  if (decimal === "." && t.includes(",")) return NaN;
  if (decimal === "," && t.includes(".")) return NaN;
  return Number(decimal === "," ? t.replace(",", ".") : t);
}

/** Resolution of a number's text (slow path): the place of its last digit and its digits as an integer. */
export function numberTextResolution(text: string): { place: number; mant: number } {
  const m = /^[+-]?(\d*)(?:[.,](\d*))?(?:[eE]([+-]?\d+))?$/.exec(text.trim());
  if (!m) return { place: 0, mant: 0 };
  const frac = m[2] ?? "";
  return { place: Number(m[3] ?? 0) - frac.length, mant: Number((m[1] ?? "") + frac) || 0 };
}
