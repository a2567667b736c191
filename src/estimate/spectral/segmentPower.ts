/**
 * The hot kernel of Welch's method: the power spectrum |X[k]|^2, k = 0..N/2, of one detrended and
 * windowed real segment, added into a running sum. The detrend and window are applied while the
 * samples are loaded, so the segment is read once.
 *
 * The real N-point transform is one complex transform of N/2 points, z[n] = y[2n] + i y[2n+1], then
 * the usual split X[k] = (Z[k] + conj Z[N/2-k]) / 2 - i W^k (Z[k] - conj Z[N/2-k]) / 2 with
 * W = exp(-2 pi i / N) (Brigham 1988, "The Fast Fourier Transform and its Applications", sec. 9-3).
 * The complex transform is radix-2 decimation in time on bit-reversed input: the first level runs
 * inside the load, the others two at a time as radix-4 butterflies with three twiddle products
 * each, and a last radix-2 level when log2(N/2) is even.
 *
 * fft.js (the general transform elsewhere in psdgate) does the same job in 35-45 us per 4096-point
 * segment with the window pass and the power sum around it; this kernel takes about 25 us
 * (npm run bench:kernels). Tests hold it to fft.js and a naive DFT within 1e-13 of the largest bin.
 */
export class SegmentPower {
  readonly size: number;
  private readonly half: number;
  private readonly re: Float64Array;
  private readonly im: Float64Array;
  /** Bit reversal of log2(N/2) bits. */
  private readonly rev: Int32Array;
  /** Per radix-4 stage: quarter length L and twiddles w, w^2, w^3 (w = exp(-2 pi i j / 4L)) for j < L. */
  private readonly stages: { quarter: number; twiddles: Float64Array }[] = [];
  /** Half length of the last radix-2 level, or 0 when there is none. */
  private readonly lastHalf: number;
  private readonly lastCos: Float64Array;
  private readonly lastSin: Float64Array;
  /** Split twiddles W^k, k < N/2. */
  private readonly splitCos: Float64Array;
  private readonly splitSin: Float64Array;

  constructor(size: number) {
    if (!Number.isInteger(size) || size < 2 || (size & (size - 1)) !== 0)
      throw new RangeError(`FFT size must be a power of two >= 2, got ${size}`);
    this.size = size;
    const m = size >> 1;
    this.half = m;
    this.re = new Float64Array(m);
    this.im = new Float64Array(m);
    const bits = Math.round(Math.log2(m));
    this.rev = new Int32Array(m);
    for (let i = 0; i < m; i++) {
      let r = 0;
      for (let b = 0; b < bits; b++) r |= ((i >> b) & 1) << (bits - 1 - b);
      this.rev[i] = r;
    }
    let L = 2;
    for (; 4 * L <= m; L *= 4) {
      const t = new Float64Array(6 * L);
      for (let j = 0; j < L; j++) {
        const a = (-Math.PI * j) / (2 * L);
        t[6 * j] = Math.cos(a);
        t[6 * j + 1] = Math.sin(a);
        t[6 * j + 2] = Math.cos(2 * a);
        t[6 * j + 3] = Math.sin(2 * a);
        t[6 * j + 4] = Math.cos(3 * a);
        t[6 * j + 5] = Math.sin(3 * a);
      }
      this.stages.push({ quarter: L, twiddles: t });
    }
    this.lastHalf = L < m ? L : 0;
    this.lastCos = new Float64Array(this.lastHalf);
    this.lastSin = new Float64Array(this.lastHalf);
    for (let j = 0; j < this.lastHalf; j++) {
      this.lastCos[j] = Math.cos((-Math.PI * j) / L);
      this.lastSin[j] = Math.sin((-Math.PI * j) / L);
    }
    this.splitCos = new Float64Array(m);
    this.splitSin = new Float64Array(m);
    for (let k = 0; k < m; k++) {
      this.splitCos[k] = Math.cos((-2 * Math.PI * k) / size);
      this.splitSin[k] = Math.sin((-2 * Math.PI * k) / size);
    }
  }

  /**
   * Adds |X[k]|^2 of y[i] = (x[i] - offset - slope * i) * window[i] into acc[k] for k = 0..N/2, and
   * returns sum of y[i]^2 (the windowed mean square times N, for the exact Parseval identity).
   */
  add(x: Float64Array, window: Float64Array, offset: number, slope: number, acc: Float64Array): number {
    const m = this.half;
    if (m === 1) {
      const a = (x[0]! - offset) * window[0]!;
      const b = (x[1]! - offset - slope) * window[1]!;
      acc[0]! += (a + b) * (a + b);
      acc[1]! += (a - b) * (a - b);
      return a * a + b * b;
    }
    const ms = this.loadLevel(x, window, offset, slope);
    this.radix4Stages();
    this.lastLevel();
    this.split(acc);
    return ms;
  }

  /** Bit-reversed load with the detrend and window, and the first radix-2 level. */
  private loadLevel(x: Float64Array, w: Float64Array, offset: number, slope: number): number {
    const h = this.half >> 1;
    const re = this.re;
    const im = this.im;
    const rev = this.rev;
    let ms0 = 0;
    let ms1 = 0;
    for (let k = 0; k < h; k++) {
      const s = 2 * rev[2 * k]!;
      const t = s + 2 * h;
      const ur = (x[s]! - offset - slope * s) * w[s]!;
      const ui = (x[s + 1]! - offset - slope * (s + 1)) * w[s + 1]!;
      const vr = (x[t]! - offset - slope * t) * w[t]!;
      const vi = (x[t + 1]! - offset - slope * (t + 1)) * w[t + 1]!;
      ms0 += ur * ur + vr * vr;
      ms1 += ui * ui + vi * vi;
      re[2 * k] = ur + vr;
      im[2 * k] = ui + vi;
      re[2 * k + 1] = ur - vr;
      im[2 * k + 1] = ui - vi;
    }
    return ms0 + ms1;
  }

  /**
   * Two radix-2 levels at a time: with w = exp(-2 pi i j / 4L) and inputs a, b, c, d at j, j+L, j+2L,
   * j+3L of a group of 4L, b' = w^2 b, c' = w c, d' = w^3 d, then a + b' +- (c' + d') and
   * a - b' -+ i (c' - d').
   */
  private radix4Stages(): void {
    const m = this.half;
    const re = this.re;
    const im = this.im;
    for (const { quarter: L, twiddles: t } of this.stages) {
      const step = 4 * L;
      for (let j = 0; j < L; j++) {
        const w1r = t[6 * j]!;
        const w1i = t[6 * j + 1]!;
        const w2r = t[6 * j + 2]!;
        const w2i = t[6 * j + 3]!;
        const w3r = t[6 * j + 4]!;
        const w3i = t[6 * j + 5]!;
        for (let a = j; a < m; a += step) {
          const b = a + L;
          const c = b + L;
          const d = c + L;
          const ar = re[a]!;
          const ai = im[a]!;
          let xr = re[b]!;
          let xi = im[b]!;
          const br = xr * w2r - xi * w2i;
          const bi = xr * w2i + xi * w2r;
          xr = re[c]!;
          xi = im[c]!;
          const cr = xr * w1r - xi * w1i;
          const ci = xr * w1i + xi * w1r;
          xr = re[d]!;
          xi = im[d]!;
          const dr = xr * w3r - xi * w3i;
          const di = xr * w3i + xi * w3r;
          const pr = ar + br;
          const pi = ai + bi;
          const qr = ar - br;
          const qi = ai - bi;
          const sr = cr + dr;
          const si = ci + di;
          const tr = cr - dr;
          const ti = ci - di;
          re[a] = pr + sr;
          im[a] = pi + si;
          re[c] = pr - sr;
          im[c] = pi - si;
          re[b] = qr + ti;
          im[b] = qi - tr;
          re[d] = qr - ti;
          im[d] = qi + tr;
        }
      }
    }
  }

  private lastLevel(): void {
    const L = this.lastHalf;
    const re = this.re;
    const im = this.im;
    const wc = this.lastCos;
    const ws = this.lastSin;
    for (let j = 0; j < L; j++) {
      const c = wc[j]!;
      const s = ws[j]!;
      const b = j + L;
      const xr = re[b]!;
      const xi = im[b]!;
      const tr = xr * c - xi * s;
      const ti = xr * s + xi * c;
      const ur = re[j]!;
      const ui = im[j]!;
      re[j] = ur + tr;
      im[j] = ui + ti;
      re[b] = ur - tr;
      im[b] = ui - ti;
    }
  }

  /**
   * The real spectrum from Z, bins k and N/2 - k together: with E = Z[k] + conj Z[N/2-k] and
   * F = -i W^k (Z[k] - conj Z[N/2-k]), |X[k]|^2 = |E + F|^2 / 4 and |X[N/2-k]|^2 = |E - F|^2 / 4.
   */
  private split(acc: Float64Array): void {
    const m = this.half;
    const re = this.re;
    const im = this.im;
    const sc = this.splitCos;
    const ss = this.splitSin;
    const zr = re[0]!;
    const zi = im[0]!;
    acc[0]! += (zr + zi) * (zr + zi);
    acc[m]! += (zr - zi) * (zr - zi);
    const h = m >> 1;
    for (let k = 1; k <= h; k++) {
      const j = m - k;
      const ar = re[k]!;
      const ai = im[k]!;
      const br = re[j]!;
      const bi = -im[j]!;
      const er = ar + br;
      const ei = ai + bi;
      const dr = ar - br;
      const di = ai - bi;
      const c = sc[k]!;
      const s = ss[k]!;
      const fr = c * di + s * dr;
      const fi = s * di - c * dr;
      const xr = er + fr;
      const xi = ei + fi;
      acc[k]! += 0.25 * (xr * xr + xi * xi);
      if (k !== j) {
        const yr = er - fr;
        const yi = ei - fi;
        acc[j]! += 0.25 * (yr * yr + yi * yi);
      }
    }
  }
}
