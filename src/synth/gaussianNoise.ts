/**
 * Seeded Gaussian noise: xoshiro128** (Blackman & Vigna, "Scrambled linear pseudorandom number
 * generators", ACM TOMS 47(4), 2021) seeded through SplitMix32, 53-bit uniforms, and Marsaglia's
 * polar method (Marsaglia & Bray, SIAM Review 6(3), 1964). Same seed, same numbers, on every machine.
 */
export class GaussianNoise {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;
  private spare = NaN;

  constructor(seed: number, stream = 0) {
    let z = (Math.trunc(seed) ^ Math.imul(stream + 1, 0x9e3779b9)) >>> 0;
    const next = () => {
      z = (z + 0x9e3779b9) >>> 0;
      let t = z;
      t = Math.imul(t ^ (t >>> 16), 0x85ebca6b);
      t = Math.imul(t ^ (t >>> 13), 0xc2b2ae35);
      return (t ^ (t >>> 16)) >>> 0;
    };
    this.s0 = next();
    this.s1 = next();
    this.s2 = next();
    this.s3 = next() | 1;
  }

  private nextUint32(): number {
    const r = Math.imul(rotl(Math.imul(this.s1, 5), 7), 9) >>> 0;
    const t = this.s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    return r;
  }

  /** Uniform on [0, 1) with 53 random bits. */
  uniform(): number {
    return ((this.nextUint32() >>> 5) * 67108864 + (this.nextUint32() >>> 6)) / 9007199254740992;
  }

  /** Fill `out` with N(0, 1) samples. */
  fill(out: Float64Array): void {
    let i = 0;
    if (!Number.isNaN(this.spare) && out.length > 0) {
      out[i++] = this.spare;
      this.spare = NaN;
    }
    while (i < out.length) {
      let u: number;
      let v: number;
      let s: number;
      do {
        u = 2 * this.uniform() - 1;
        v = 2 * this.uniform() - 1;
        s = u * u + v * v;
      } while (s >= 1 || s === 0);
      const m = Math.sqrt((-2 * Math.log(s)) / s);
      out[i++] = u * m;
      if (i < out.length) out[i++] = v * m;
      else this.spare = v * m;
    }
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}
