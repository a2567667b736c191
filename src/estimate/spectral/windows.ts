/**
 * Spectral windows, all of the generalised-cosine family w[n] = sum_k (-1)^k a_k cos(2 pi k n / N),
 * in their periodic ("DFT-even") form, which is the right one for spectra (Harris 1978, Proc. IEEE
 * 66(1), sec. III; scipy.signal.get_window(fftbins=True) uses the same form).
 */
export type WindowName = "hann" | "hamming" | "blackman-harris" | "flattop" | "rectangular";

export const WINDOW_NAMES: readonly WindowName[] = ["hann", "hamming", "blackman-harris", "flattop", "rectangular"];

const COEFFICIENTS: Record<WindowName, readonly number[]> = {
  rectangular: [1],
  hann: [0.5, 0.5],
  // Hamming 0.54/0.46 (Harris 1978, eq. 30).
  hamming: [0.54, 0.46],
  // 4-term Blackman-Harris, -92 dB side lobes (Harris 1978, Table 1).
  "blackman-harris": [0.35875, 0.48829, 0.14128, 0.01168],
  // 5-term flat top (D'Antona & Ferrero, Digital Signal Processing for Measurement Systems, Springer 2006, p. 70).
  flattop: [0.21557895, 0.41663158, 0.277263158, 0.083578947, 0.006947368],
};

/** Periodic window of length n. */
export function spectralWindow(name: WindowName, n: number): Float64Array {
  const a = COEFFICIENTS[name];
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let v = 0;
    let sign = 1;
    for (let k = 0; k < a.length; k++) {
      v += sign * a[k]! * Math.cos((2 * Math.PI * k * i) / n);
      sign = -sign;
    }
    w[i] = v;
  }
  return w;
}

export interface WindowFigures {
  /** Coherent gain, mean(w). */
  coherentGain: number;
  /** Equivalent noise bandwidth in bins, N sum(w^2) / (sum w)^2 (Harris 1978, eq. 11). */
  enbwBins: number;
  sumW: number;
  sumW2: number;
}

export function windowFigures(w: Float64Array): WindowFigures {
  let s1 = 0;
  let s2 = 0;
  for (let i = 0; i < w.length; i++) {
    s1 += w[i]!;
    s2 += w[i]! * w[i]!;
  }
  return { coherentGain: s1 / w.length, enbwBins: (w.length * s2) / (s1 * s1), sumW: s1, sumW2: s2 };
}
