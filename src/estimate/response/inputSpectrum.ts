/**
 * An acceleration spectrum as a function of frequency, for integrals of the form
 * integral weight(f) G(f) df: a profile (power-law segments between breakpoints, exact) or a measured
 * PSD (each line's level held over its own band f_k +- df/2, so the integral of G alone is sum(P) df, the
 * PSD's own mean square).
 */
export interface InputSpectrum {
  fminHz: number;
  fmaxHz: number;
  /** Sorted frequencies where the level's formula changes (fmin and fmax included). */
  breaksHz: Float64Array;
  /** One-sided density at f (fmin <= f <= fmax), (unit)^2/Hz. */
  level(f: number): number;
}

/** Power-law segments G(f) = g1 (f / f1)^exponent on [f1, f2] (a test profile's normalised table). */
export function powerLawSpectrum(
  segments: readonly { f1: number; f2: number; g1: number; exponent: number }[],
): InputSpectrum {
  if (segments.length === 0) throw new RangeError("a spectrum needs at least one segment");
  const breaks = new Float64Array(segments.length + 1);
  breaks[0] = segments[0]!.f1;
  segments.forEach((s, i) => (breaks[i + 1] = s.f2));
  return {
    fminHz: breaks[0]!,
    fmaxHz: breaks[segments.length]!,
    breaksHz: breaks,
    level(f: number): number {
      let lo = 0;
      let hi = segments.length - 1;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (f > segments[mid]!.f2) lo = mid + 1;
        else hi = mid;
      }
      const s = segments[lo]!;
      return s.g1 * Math.pow(f / s.f1, s.exponent);
    },
  };
}

/**
 * A measured PSD on equally spaced lines f_k = k df, lines with fminHz <= f_k <= fmaxHz kept; line k
 * holds its level over [f_k - df/2, f_k + df/2] (the DC line over [0, df/2]).
 */
export function lineSpectrum(
  frequencyHz: Float64Array,
  psd: Float64Array,
  fminHz = 0,
  fmaxHz = Infinity,
): InputSpectrum {
  const n = frequencyHz.length;
  if (n < 2) throw new RangeError("a line spectrum needs at least two lines");
  const df = frequencyHz[1]! - frequencyHz[0]!;
  let first = 0;
  while (first < n && frequencyHz[first]! < fminHz - 1e-9 * df) first++;
  let last = n - 1;
  while (last >= 0 && frequencyHz[last]! > fmaxHz + 1e-9 * df) last--;
  if (last < first) throw new RangeError(`no line between ${fminHz} and ${fmaxHz} Hz`);
  const count = last - first + 1;
  const breaks = new Float64Array(count + 1);
  for (let i = 0; i <= count; i++) breaks[i] = Math.max(0, frequencyHz[first]! + (i - 0.5) * df);
  const f0 = frequencyHz[0]!;
  return {
    fminHz: breaks[0]!,
    fmaxHz: breaks[count]!,
    breaksHz: breaks,
    level(f: number): number {
      const k = Math.min(last, Math.max(first, Math.round((f - f0) / df)));
      return psd[k]!;
    },
  };
}

/**
 * The same spectrum cut to exactly [loHz, hiHz] (inside its range): a line spectrum's first and last
 * lines then hold their level over part of their band only, so two spectra cut alike cover the same band
 * to the Hz, whatever their lines.
 */
export function clippedSpectrum(s: InputSpectrum, loHz: number, hiHz: number): InputSpectrum {
  const lo = Math.max(loHz, s.fminHz);
  const hi = Math.min(hiHz, s.fmaxHz);
  if (!(hi > lo)) throw new RangeError(`no part of the spectrum between ${loHz} and ${hiHz} Hz`);
  const inner = [...s.breaksHz].filter((f) => f > lo && f < hi);
  return { fminHz: lo, fmaxHz: hi, breaksHz: Float64Array.from([lo, ...inner, hi]), level: (f) => s.level(f) };
}

// 8-point Gauss-Legendre nodes and weights on [-1, 1] (Abramowitz & Stegun 1964, Table 25.4).
const GL_X = [0.1834346424956498, 0.525532409916329, 0.7966664774136267, 0.9602898564975363];
const GL_W = [0.362683783378362, 0.3137066458778873, 0.2223810344533745, 0.1012285362903763];

export interface SpectralMoments {
  /** m_n = integral f^n weight(f) G(f) df, f in Hz (one-sided Hz moments, docs/REFERENCES.md sec. 10). */
  m0: number;
  m2: number;
  m4: number;
}

/**
 * The moments m0, m2, m4 of weight(f) G(f) over the spectrum's range, by 8-point Gauss-Legendre on
 * sub-intervals that never cross a break of G and whose width stays below a fifth of the distance to the
 * sharp feature of the weight at `focusHz` (plus its width `focusWidthHz`) and a fifth of
 * f + focusWidthHz, so a resonance of bandwidth f_n / Q gets tens of nodes. Relative error below 1e-9
 * on the SDOF weights against their closed forms (tests/estimate/response/sdofResponse.test.ts).
 */
export function spectralMoments(
  s: InputSpectrum,
  weight: (f: number) => number,
  focusHz: number,
  focusWidthHz: number,
): SpectralMoments {
  const b = s.breaksHz;
  let m0 = 0;
  let m2 = 0;
  let m4 = 0;
  for (let i = 0; i + 1 < b.length; i++) {
    const hi = b[i + 1]!;
    let a = b[i]!;
    while (a < hi) {
      const h = 0.2 * Math.min(Math.abs(a - focusHz) + focusWidthHz, a + focusWidthHz);
      let e = a + h;
      // Do not step over the focus: end at it, then start beside it.
      if (a < focusHz && e > focusHz) e = focusHz;
      if (e > hi || hi - e < 1e-3 * h) e = hi;
      const c = 0.5 * (a + e);
      const r = 0.5 * (e - a);
      for (let j = 0; j < 8; j++) {
        const f = c + r * (j < 4 ? -GL_X[j]! : GL_X[j - 4]!);
        const v = r * GL_W[j & 3]! * weight(f) * s.level(f);
        const f2 = f * f;
        m0 += v;
        m2 += v * f2;
        m4 += v * f2 * f2;
      }
      a = e;
    }
  }
  return { m0, m2, m4 };
}
