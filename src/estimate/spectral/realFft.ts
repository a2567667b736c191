import FFT from "fft.js";

/**
 * The one wrapper around fft.js. fft.js `realTransform` fills only bins 0..N/2 of its interleaved
 * output; the upper half holds scratch values (fft.js issues #10, #25), so only those bins are read.
 * One instance per size: the twiddle tables are built once.
 */
export class RealFft {
  readonly size: number;
  private readonly fft: FFT;
  private readonly out: Float64Array;
  private readonly inv: Float64Array;

  constructor(size: number) {
    if (!Number.isInteger(size) || size < 2 || (size & (size - 1)) !== 0) {
      throw new RangeError(`FFT size must be a power of two >= 2, got ${size}`);
    }
    this.size = size;
    this.fft = new FFT(size);
    this.out = new Float64Array(2 * size);
    this.inv = new Float64Array(2 * size);
  }

  /** Interleaved spectrum bins 0..N/2 (re, im), valid until the next call. */
  forward(input: Float64Array): Float64Array {
    this.fft.realTransform(this.out, input);
    return this.out;
  }

  /**
   * Inverse of a Hermitian spectrum given by its bins 0..N/2 (interleaved, length >= N+2); writes the
   * real time series (length N) to `target`. Unnormalised forward convention, inverse divides by N.
   */
  inverseReal(halfSpectrum: Float64Array, target: Float64Array): void {
    const n = this.size;
    const full = this.out;
    for (let k = 0; k <= n / 2; k++) {
      full[2 * k] = halfSpectrum[2 * k]!;
      full[2 * k + 1] = halfSpectrum[2 * k + 1]!;
    }
    this.fft.completeSpectrum(full);
    this.fft.inverseTransform(this.inv, full);
    for (let i = 0; i < n; i++) target[i] = this.inv[2 * i]!;
  }
}

export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 2 && (n & (n - 1)) === 0;
}

/**
 * Complex forward transform (fft.js `transform`) of an interleaved (re, im) sequence, unnormalised, e^(-i...)
 * convention.
 */
export class ComplexFft {
  readonly size: number;
  private readonly fft: FFT;
  private readonly out: Float64Array;

  constructor(size: number) {
    if (!isPowerOfTwo(size)) throw new RangeError(`FFT size must be a power of two >= 2, got ${size}`);
    this.size = size;
    this.fft = new FFT(size);
    this.out = new Float64Array(2 * size);
  }

  /** Interleaved bins 0..N-1 (re, im), valid until the next call; `input` interleaved, length 2N. */
  forward(input: Float64Array): Float64Array {
    this.fft.transform(this.out, input);
    return this.out;
  }
}
