// Number and stamp spellings of the bench's CSV files (bench/generate.mjs writes them, bench/kernels.mjs parses them).

/** C's %.Ne: the exponent with at least two digits (1.234567e-01). */
export const sci = (v, d) => v.toExponential(d).replace(/e([+-])(\d)$/, "e$10$2");

/** C's %.Pg (printf's default for %g is P = 6): P significant digits, trailing zeros dropped, e-notation below 1e-4 or from 10^P. */
export const cg = (v, p = 6) => {
  if (v === 0) return "0";
  const x = Number(v.toExponential(p - 1).split("e")[1]);
  if (x < -4 || x >= p) return sci(v, p - 1).replace(/\.?0+e/, "e");
  const f = v.toFixed(p - 1 - x);
  return f.includes(".") ? f.replace(/\.?0+$/, "") : f;
};

const pad = (n, w) => String(n).padStart(w, "0");

/** ISO 8601 stamps to the microsecond from an invented start, 2026-03-09T08:15:00 (what loggers with a clock write). */
export const iso = (t) => {
  const us = Math.round(t * 1e6);
  const s = Math.floor(us / 1e6);
  const m = 15 + Math.floor(s / 60);
  return `2026-03-09T${pad(8 + Math.floor(m / 60), 2)}:${pad(m % 60, 2)}:${pad(s % 60, 2)}.${pad(us % 1e6, 6)}`;
};
