import { chiSquareUpperQuantile } from "../statistics/distributions.js";
import { ComplexFft } from "./realFft.js";
import { kernelDensityAt } from "./spectralKernel.js";

/**
 * Sine tones in a record: their frequency, peak amplitude and phase, and what a Welch spectrum shows of them.
 *
 * **The fit (check).** A tone's amplitude is the least-squares sine fit over the whole record at the frequency
 * that maximises the record's periodogram near the tone's nominal frequency: for a sinusoid in locally white
 * Gaussian noise that frequency is the maximum-likelihood (= least-squares) estimate, and the amplitude
 * 2|X(f)|/N the least-squares amplitude at it (Rife & Boorstyn 1974, IEEE Trans. Inf. Theory 20(5):591-598;
 * Kay, Fundamentals of Statistical Signal Processing: Estimation Theory, Prentice Hall 1993, Example 7.16 —
 * from memory). The full-record DFT has no window, so no scalloping: the tone's own amplitude comes out exact
 * at the fitted frequency.
 *
 * Streaming: the record is demodulated at the nominal frequency in short stretches of L samples, and each stretch
 * keeps the moments M_k = sum x[n] e^(-i w n) u^k, u = (n - centre) / L, k = 0..4. The DFT at w + dw is then
 * sum_b e^(-i dw c_b) sum_k M_k (-i dw L)^k / k!, exact to the Taylor remainder (|dw L / 2| <= pi/8 by the
 * choice of L: below 8e-5 relative). A zero-padded FFT of the M_0 sequence finds the peak on a grid of a quarter
 * of 1/T; a golden-section search on the exact sum refines it. Memory: 10 numbers per stretch per tone and
 * channel (L = fs / (8 x search half-width), e.g. 16 stretches a second for a ±2 Hz search).
 *
 * **Uncertainty.** On a background of one-sided density G near the tone, over T seconds, the amplitude's standard
 * deviation is sqrt(G / T) and the frequency's sqrt(3 G) / (pi A T^1.5): the Cramer-Rao bounds 2 sigma^2 / N and
 * 12 / ((2 pi)^2 eta N^3) (eta = A^2 / (2 sigma^2)) for white noise of variance sigma^2 = G fs / 2 (Kay 1993,
 * Example 3.14 — from memory; the amplitude's is held to a simulation in tests/estimate/spectral/toneEstimate.test.ts).
 */

export interface ToneRequest {
  /** Nominal frequency, Hz. */
  hz: number;
  /** The fit looks for the tone within hz ± this, Hz. */
  searchHalfWidthHz: number;
}

export interface ToneFit {
  nominalHz: number;
  /** The fitted frequency, Hz. */
  frequencyHz: number;
  /** Least-squares peak amplitude at that frequency, in the samples' unit. */
  peak: number;
  /** Phase of the cosine at the first analysed sample: x ~ peak cos(2 pi f t + phase), rad. */
  phaseRad: number;
  /** Samples fitted, and their span, s. */
  samples: number;
  durationS: number;
  searchHalfWidthHz: number;
}

const ORDER = 4;
const WIDTH = 2 * (ORDER + 1);
const FACTORIAL = [1, 1, 2, 6, 24];

/** One tone on one channel: the stretch moments so far. */
class ToneTrack {
  stretches = new Float64Array(WIDTH * 64);
  count = 0;
  readonly cur = new Float64Array(WIDTH);

  close(): void {
    if (this.count * WIDTH + WIDTH > this.stretches.length) {
      const grown = new Float64Array(this.stretches.length * 2);
      grown.set(this.stretches);
      this.stretches = grown;
    }
    this.stretches.set(this.cur, this.count * WIDTH);
    this.count++;
    this.cur.fill(0);
  }
}

/**
 * The tone fits of every selected channel, as an extra listener on the one pass (analyzeRecording's
 * PassAccumulator). finish() gives fits[channel][tone].
 */
export class ToneFitAccumulator {
  private stretchLength: number[] = [];
  private tracks: ToneTrack[][] = [];
  private designFs = NaN;
  private n = 0;

  /** `tones`: what to fit; the channels are those the pass hands over, in its order. */
  constructor(public tones: ToneRequest[]) {}

  start(designRateHz: number): void {
    this.designFs = designRateHz;
    // The search never reaches past fs/16, so a stretch holds at least one sample.
    this.tones = this.tones.map((t) => ({ ...t, searchHalfWidthHz: Math.min(t.searchHalfWidthHz, designRateHz / 16) }));
    this.stretchLength = this.tones.map((t) => Math.max(1, Math.floor(designRateHz / (8 * t.searchHalfWidthHz))));
    this.tracks = [];
    this.n = 0;
  }

  push(blocks: Float64Array[], frames: number): void {
    const fs = this.designFs;
    while (this.tracks.length < blocks.length) this.tracks.push(this.tones.map(() => new ToneTrack()));
    for (let t = 0; t < this.tones.length; t++) {
      const L = this.stretchLength[t]!;
      const hz = this.tones[t]!.hz;
      const w = (2 * Math.PI * hz) / fs;
      const cw = Math.cos(w);
      const sw = Math.sin(w);
      for (let c = 0; c < blocks.length; c++) {
        const x = blocks[c]!;
        const tr = this.tracks[c]![t]!;
        const m = tr.cur;
        let i = 0;
        while (i < frames) {
          const n0 = this.n + i;
          const pos = n0 % L;
          const start = n0 - pos;
          const take = Math.min(frames - i, L - pos);
          // e^(-i w n) at n0, from the phase in cycles (exact for long records), then rotated sample by sample.
          const cyc = (hz * n0) / fs;
          const ph = 2 * Math.PI * (cyc - Math.floor(cyc));
          let cr = Math.cos(ph);
          let ci = -Math.sin(ph);
          const centre = start + (L - 1) / 2;
          let u = (n0 - centre) / L;
          const du = 1 / L;
          let m0r = m[0]!,
            m0i = m[1]!,
            m1r = m[2]!,
            m1i = m[3]!,
            m2r = m[4]!,
            m2i = m[5]!,
            m3r = m[6]!,
            m3i = m[7]!,
            m4r = m[8]!,
            m4i = m[9]!;
          for (let j = 0; j < take; j++) {
            let v = x[i + j]!;
            if (!Number.isFinite(v)) v = 0;
            const a = v * cr;
            const b = v * ci;
            const u2 = u * u;
            m0r += a;
            m0i += b;
            m1r += a * u;
            m1i += b * u;
            m2r += a * u2;
            m2i += b * u2;
            m3r += a * u2 * u;
            m3i += b * u2 * u;
            m4r += a * u2 * u2;
            m4i += b * u2 * u2;
            const t2 = cr * cw + ci * sw;
            ci = ci * cw - cr * sw;
            cr = t2;
            u += du;
          }
          m[0] = m0r;
          m[1] = m0i;
          m[2] = m1r;
          m[3] = m1i;
          m[4] = m2r;
          m[5] = m2i;
          m[6] = m3r;
          m[7] = m3i;
          m[8] = m4r;
          m[9] = m4i;
          i += take;
          if (pos + take === L) tr.close();
        }
      }
    }
    this.n += frames;
  }

  finish(sampleRateHz: number): ToneFit[][] {
    const scale = sampleRateHz / this.designFs;
    return this.tracks.map((perTone) =>
      perTone.map((tr, t) => {
        const tone = this.tones[t]!;
        if (this.n % this.stretchLength[t]! !== 0) tr.close();
        return fitTrack(tr, tone, this.stretchLength[t]!, this.designFs, this.n, scale);
      }),
    );
  }
}

/** The DFT of the record at nominal + dHz (design rate), from the stretch moments. */
function dftAt(tr: ToneTrack, L: number, fs: number, dHz: number): { re: number; im: number } {
  const dw = (2 * Math.PI * dHz) / fs;
  // Taylor weights (-i dw L)^k / k!.
  const z = -dw * L;
  const wr = new Float64Array(ORDER + 1);
  const wi = new Float64Array(ORDER + 1);
  let pr = 1;
  let pi = 0;
  for (let k = 0; k <= ORDER; k++) {
    wr[k] = pr / FACTORIAL[k]!;
    wi[k] = pi / FACTORIAL[k]!;
    // multiply by i z
    const t = -pi * z;
    pi = pr * z;
    pr = t;
  }
  let re = 0;
  let im = 0;
  const s = tr.stretches;
  // The phase e^(-i dw c_b) advanced by rotation from stretch to stretch.
  const c0 = (L - 1) / 2;
  let er = Math.cos(-dw * c0);
  let ei = Math.sin(-dw * c0);
  const rr = Math.cos(-dw * L);
  const ri = Math.sin(-dw * L);
  for (let b = 0; b < tr.count; b++) {
    let sr = 0;
    let si = 0;
    const o = b * WIDTH;
    for (let k = 0; k <= ORDER; k++) {
      const mr = s[o + 2 * k]!;
      const mi = s[o + 2 * k + 1]!;
      sr += mr * wr[k]! - mi * wi[k]!;
      si += mr * wi[k]! + mi * wr[k]!;
    }
    re += sr * er - si * ei;
    im += sr * ei + si * er;
    const t = er * rr - ei * ri;
    ei = er * ri + ei * rr;
    er = t;
    if ((b & 1023) === 1023) {
      // Re-anchor the rotation against drift over long records.
      const ph = -dw * (c0 + (b + 1) * L);
      er = Math.cos(ph);
      ei = Math.sin(ph);
    }
  }
  return { re, im };
}

function fitTrack(tr: ToneTrack, tone: ToneRequest, L: number, fs: number, n: number, scale: number): ToneFit {
  const base = {
    nominalHz: tone.hz,
    samples: n,
    durationS: n / (fs * scale),
    searchHalfWidthHz: tone.searchHalfWidthHz,
  };
  if (tr.count === 0 || n === 0) return { ...base, frequencyHz: tone.hz, peak: 0, phaseRad: 0 };
  // Coarse: zero-padded FFT of the M_0 sequence, bins fs / (L P) apart (at most a quarter of 1/T).
  let P = 2;
  while (P < 4 * tr.count) P *= 2;
  const seq = new Float64Array(2 * P);
  for (let b = 0; b < tr.count; b++) {
    seq[2 * b] = tr.stretches[b * WIDTH]!;
    seq[2 * b + 1] = tr.stretches[b * WIDTH + 1]!;
  }
  const F = new ComplexFft(P).forward(seq);
  const step = fs / (L * P);
  let best = 0;
  let bestMag = -1;
  for (let m = 0; m < P; m++) {
    const d = (m < P / 2 ? m : m - P) * step;
    if (Math.abs(d) > tone.searchHalfWidthHz) continue;
    const mag = F[2 * m]! * F[2 * m]! + F[2 * m + 1]! * F[2 * m + 1]!;
    if (mag > bestMag) {
      bestMag = mag;
      best = d;
    }
  }
  // Fine: golden section on the exact |X|^2 within one grid step either side.
  const mag2 = (d: number) => {
    const x = dftAt(tr, L, fs, d);
    return x.re * x.re + x.im * x.im;
  };
  let a = Math.max(-tone.searchHalfWidthHz, best - step);
  let b = Math.min(tone.searchHalfWidthHz, best + step);
  const g = (Math.sqrt(5) - 1) / 2;
  let x1 = b - g * (b - a);
  let x2 = a + g * (b - a);
  let f1 = mag2(x1);
  let f2 = mag2(x2);
  for (let it = 0; it < 60 && b - a > 1e-9 * Math.max(1, tone.hz); it++) {
    if (f1 > f2) {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - g * (b - a);
      f1 = mag2(x1);
    } else {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + g * (b - a);
      f2 = mag2(x2);
    }
  }
  const d = (a + b) / 2;
  const X = dftAt(tr, L, fs, d);
  return {
    ...base,
    frequencyHz: (tone.hz + d) * scale,
    peak: (2 * Math.hypot(X.re, X.im)) / n,
    phaseRad: Math.atan2(X.im, X.re),
  };
}

/**
 * Standard deviation of a fitted tone's peak on a background of one-sided density G over T s: sqrt(G / T) (Kay 1993,
 * Example 3.14, from memory).
 */
export function tonePeakSd(backgroundDensity: number, durationS: number): number {
  return Math.sqrt(Math.max(0, backgroundDensity) / durationS);
}

/**
 * Standard deviation of a fitted tone's frequency: sqrt(3 G) / (pi A T^1.5), Hz (Kay 1993, Example 3.14, from memory).
 */
export function toneFrequencySd(backgroundDensity: number, peak: number, durationS: number): number {
  return peak > 0
    ? Math.sqrt(3 * Math.max(0, backgroundDensity)) / (Math.PI * peak * Math.pow(durationS, 1.5))
    : Infinity;
}

// ---- What a Welch spectrum shows of a tone.

/**
 * The lines a tone occupies through the window's kernel: every line whose expected leakage from a tone of
 * peak A at f, (A^2/2) h(delta) / df, exceeds `share` of the background density there (h the kernel density,
 * spectralKernel.ts kernelDensityAt, taken as the largest over ±0.5 bin so that the exact position between
 * lines does not matter). Returns the first and last line index.
 */
export function toneLines(
  window: Float64Array,
  lineSpacingHz: number,
  lineCount: number,
  hz: number,
  peak: number,
  background: (i: number) => number,
  share = 0.01,
): { first: number; last: number } {
  const centre = hz / lineSpacingHz;
  const power = (peak * peak) / 2 / lineSpacingHz;
  const leaks = (i: number) => {
    const d = i - centre;
    let h = 0;
    for (const e of [-0.5, -0.25, 0, 0.25, 0.5]) h = Math.max(h, kernelDensityAt(window, Math.abs(d + e)));
    return power * h > share * background(i);
  };
  const k0 = Math.round(centre);
  let first = Math.max(0, k0 - 1);
  let last = Math.min(lineCount - 1, k0 + 1);
  const cap = 64;
  while (first > 0 && k0 - first < cap && leaks(first - 1)) first--;
  while (last < lineCount - 1 && last - k0 < cap && leaks(last + 1)) last++;
  return { first, last };
}

/**
 * The kernel-shape test of a tone candidate (spectralTones): the level at which lines that do fit the kernel are
 * taken for a resonance, and the share of the tone's own part allowed beside the lines' chi-square scatter (the fit's
 * 1/32-bin grid moves a line's share of the tone by up to about 5 % on the kernel's flank). Chosen here and held to a
 * Monte Carlo on test-made records (tests/estimate/spectral/toneShape.montecarlo.test.ts).
 */
const SHAPE_LEVEL = 1e-4;
const SHAPE_TOLERANCE = 0.1;

export interface SpectralTone {
  frequencyHz: number;
  /** Peak amplitude from the kernel's least-squares fit to the lines it occupies (no scalloping loss). */
  peak: number;
  /** The strongest line over the local background, dB. */
  aboveBackgroundDb: number;
  /** The local background density (median of neighbouring lines). */
  backgroundDensity: number;
}

/**
 * Tones a Welch spectrum shows: lines standing far above their neighbours. A line is a candidate when it is
 * the largest within the kernel's reach, at least `minDb` (10 dB) above the median of the 2 x 16 lines beyond
 * that reach, and above that median by more than chance among all lines explains (chi-square at 1 % over all
 * lines, Bonferroni), and when the three lines just past the kernel's reach on each side lie within 3 dB of that median
 * (a tone is as narrow as the kernel; a resonance is wider), and when the lines within reach fit the kernel's shape
 * (chi-square against the lines' own scatter). Its peak amplitude and frequency come from fitting the
 * kernel h(k - delta) to the excess over the background on the lines it occupies (least squares in amplitude, delta on
 * a 1/32-bin grid), so the window's scalloping does not bias it (Percival & Walden 1993, sec. 6.3; the periodic
 * window's kernel sums to 1 over the lines). A resonance narrower than a line or two can also pass: these are
 * candidates.
 */
export function spectralTones(
  sp: { frequencyHz: Float64Array; psd: Float64Array; lineSpacingHz: number; dof: number },
  window: Float64Array,
  kernelHalfWidthBins: number,
  options: { minDb?: number; familyLevel?: number; max?: number } = {},
): SpectralTone[] {
  const n = sp.psd.length;
  const reach = Math.ceil(kernelHalfWidthBins) + 1;
  const side = 16;
  const minRatio = Math.pow(10, (options.minDb ?? 10) / 10);
  const chance =
    sp.dof > 0 ? chiSquareUpperQuantile((options.familyLevel ?? 0.01) / Math.max(1, n), sp.dof) / sp.dof : Infinity;
  const ratio = Math.max(minRatio, chance);
  const out: SpectralTone[] = [];
  const nb: number[] = [];
  for (let i = 2; i < n - 1; i++) {
    const p = sp.psd[i]!;
    let top = true;
    for (let k = Math.max(1, i - reach); k <= Math.min(n - 1, i + reach); k++)
      if (k !== i && sp.psd[k]! > p) top = false;
    if (!top) continue;
    nb.length = 0;
    for (let k = i - reach - side; k < i - reach; k++) if (k >= 1) nb.push(sp.psd[k]!);
    for (let k = i + reach + 1; k <= i + reach + side; k++) if (k < n) nb.push(sp.psd[k]!);
    if (nb.length < side) continue;
    nb.sort((a, b) => a - b);
    const bg = nb[nb.length >> 1]!;
    if (!(p > ratio * bg)) continue;
    // A tone is as narrow as the kernel: the three lines just past its reach on each side lie near the background
    // (mean below 2x, +3 dB). A resonance of random vibration a few lines wide does not (chosen here).
    let near = 0;
    let cnt = 0;
    for (let k = reach + 1; k <= reach + 3; k++) {
      if (i - k >= 1) {
        near += sp.psd[i - k]!;
        cnt++;
      }
      if (i + k < n) {
        near += sp.psd[i + k]!;
        cnt++;
      }
    }
    if (cnt > 0 && near / cnt > 2 * bg) continue;
    // Kernel fit on the lines within reach.
    let bestD = 0;
    let bestA = 0;
    let bestRes = Infinity;
    for (let s = -16; s <= 16; s++) {
      const d = s / 32;
      let num = 0;
      let den = 0;
      const h: number[] = [];
      for (let k = -reach; k <= reach; k++) {
        const hk = kernelDensityAt(window, Math.abs(k - d));
        h.push(hk);
        const e = (i + k >= 0 && i + k < n ? sp.psd[i + k]! : 0) - bg;
        num += e * hk;
        den += hk * hk;
      }
      const a = den > 0 ? num / den : 0;
      let res = 0;
      for (let k = -reach; k <= reach; k++) {
        const e = (i + k >= 0 && i + k < n ? sp.psd[i + k]! : 0) - bg;
        res += (e - a * h[k + reach]!) ** 2;
      }
      if (res < bestRes) {
        bestRes = res;
        bestA = a;
        bestD = d;
      }
    }
    if (!(bestA > 0)) continue;
    // A tone has the kernel's shape: every line within reach must fit bg + a h(k - d) within the estimate's own scatter,
    // a line variance 2 S^2 / dof (the estimate is S chi-square(dof) / dof: common practice), plus SHAPE_TOLERANCE of the tone's part
    // for the 1/32-bin grid and a tone that drifts a little. A resonance of random vibration some lines wide (a rack on
    // its mount, Q 6 at 22 Hz with 1 Hz lines) is wider than the kernel on its flanks: it is not a tone.
    if (sp.dof > 0 && Number.isFinite(sp.dof)) {
      let misfit = 0;
      let used = 0;
      for (let k = -reach; k <= reach; k++) {
        if (i + k < 1 || i + k >= n) continue;
        const tone = bestA * kernelDensityAt(window, Math.abs(k - bestD));
        const model = bg + tone;
        const v = (2 / sp.dof) * model * model + (SHAPE_TOLERANCE * tone) ** 2;
        misfit += (sp.psd[i + k]! - model) ** 2 / v;
        used++;
      }
      if (used > 2 && misfit > chiSquareUpperQuantile(SHAPE_LEVEL, used - 2)) continue;
    }
    out.push({
      frequencyHz: sp.frequencyHz[i]! + bestD * sp.lineSpacingHz,
      peak: Math.sqrt(2 * bestA * sp.lineSpacingHz),
      aboveBackgroundDb: 10 * Math.log10(p / bg),
      backgroundDensity: bg,
    });
    i += reach;
  }
  out.sort((a, b) => b.peak - a.peak);
  return out.slice(0, options.max ?? 20);
}
