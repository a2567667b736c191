import type { Finding } from "../findings.js";
import { normalQuantile } from "../estimate/statistics/distributions.js";
import type { PsdEstimate } from "../estimate/spectral/psdEstimate.js";
import { RealFft } from "../estimate/spectral/realFft.js";
import type { SampleStatistics } from "../estimate/statistics/runningMoments.js";

/**
 * Is the amplitude distribution that of a Gaussian record with this spectrum and length? A random
 * vibration test drives a Gaussian process; a record whose peaks are cut off (a saturated amplifier or
 * ADC, a clipped drive) has a crest factor and a kurtosis far below a Gaussian's, and its PSD no longer
 * describes the motion. The gates look at the detrended segments (so drift below the first line is not
 * in them) and use what the record's own PSD says a Gaussian record would do:
 *
 * - Crest factor c = max |d| / rms(d). A sampled Gaussian sequence crosses +c sigma upwards between
 *   neighbouring samples with probability P(X0 < c < X1) = Q(c) - P(X0 > c, X1 > c), rho the lag-one
 *   correlation from the PSD (bivariate normal, by Owen's T function); over n samples and both signs it crosses
 *   about N_c = 2 (n - 1) P(X0 < c < X1) times. Crossings of a high level are nearly Poisson (Cramer &
 *   Leadbetter, Stationary and Related Stochastic Processes, Wiley 1967, ch. 12), so the chance the record
 *   never reaches c is about exp(-N_c). Below CREST_GATE_RATE: a doubt. (Checked by simulation here: at
 * exp(-N_c) = 8e-5 the observed rate was about 5e-4, so the gate is set a hundred times lower.) (The continuous-time
 * count
 *   2 nu0 T exp(-c^2/2) of Rice 1944 over-counts when the sampling is coarse against the bandwidth.)
 * - Pearson kurtosis k. For a Gaussian process its spread is sqrt(24 sum_tau rho(tau)^4 / n), rho the
 *   autocorrelation (from the PSD by an inverse FFT): neighbouring samples of a narrow-band record are
 *   not independent (Lomnicki 1961, Biometrika 48:119-124; the form is from memory). k below
 *   3 - z sigma_k with a one-sided rate GATE_RATE: a doubt; above 3 + z sigma_k: a note (peaks more
 *   frequent than Gaussian; the PSD alone then understates the peak and fatigue content).
 * A Gaussian record trips the kurtosis doubt with a chance of about GATE_RATE and the crest doubt far less.
 */
export const GATE_RATE = 1e-4;
export const CREST_GATE_RATE = 1e-6;

export interface AmplitudeGates {
  /** Zero up-crossing rate from the PSD, Hz. */
  upCrossingRateHz: number;
  /** Expected crossings of +-(crest factor) sigma for a Gaussian record like this one. */
  crossingsAtCrest: number;
  /** Spread of the kurtosis of a Gaussian record like this one. */
  kurtosisSpread: number;
  doubts: Finding[];
  notes: Finding[];
}

/** One transform a size (its tables are built once; the records of a batch share one segment length). */
const transforms = new Map<number, RealFft>();

/**
 * The autocorrelation R(tau), tau = 0..N/2, of a one-sided PSD by an inverse FFT (R(0) is the mean square), without
 * its lowest `skip` lines.
 */
function autocorrelation(p: PsdEstimate, skip = 0): Float64Array {
  const n = 2 * (p.psd.length - 1);
  let fft = transforms.get(n);
  if (!fft) transforms.set(n, (fft = new RealFft(n)));
  const half = new Float64Array(n + 2);
  // R(tau) = sum_k P_k df cos(2 pi k tau / N), P one-sided with DC and Nyquist undoubled.
  for (let k = skip; k <= n / 2; k++)
    half[2 * k] = (k === 0 || k === n / 2 ? 1 : 0.5) * n * p.psd[k]! * p.lineSpacingHz;
  const r = new Float64Array(n);
  fft.inverseReal(half, r);
  return r.subarray(0, n / 2 + 1);
}

/** sum over all lags of rho(tau)^4, rho from the one-sided PSD. */
export function autocorrelationFourthSum(p: PsdEstimate): number {
  return p.psd.length < 2 ? 1 : fourthSum(autocorrelation(p));
}

function fourthSum(r: Float64Array): number {
  const r0 = r[0]!;
  if (!(r0 > 0)) return 1;
  let s = 1;
  for (let t = 1; t < r.length - 1; t++) s += 2 * (r[t]! / r0) ** 4;
  s += (r[r.length - 1]! / r0) ** 4;
  return s;
}

/**
 * Owen's T function T(h, a) = (1 / 2 pi) integral_0^a exp(-h^2 (1 + x^2) / 2) / (1 + x^2) dx, written with
 * x = tan(theta) as (1 / 2 pi) integral_0^atan(a) exp(-h^2 / (2 cos^2 theta)) d theta: a smooth integrand on a
 * finite interval (at most [0, pi/2)), by Simpson's rule on OWEN_STEPS intervals. Within 1e-12 relative of
 * scipy.special.owens_t for h up to 12 and every a >= 0 (tests/compare/amplitudeGates.test.ts).
 */
export function owensT(h: number, a: number): number {
  if (!(a > 0)) return 0;
  const end = Math.atan(a);
  const step = end / OWEN_STEPS;
  const k = -0.5 * h * h;
  // exp(k / cos^2) = exp(k) exp(k tan^2): the first factor once, so the sum holds no underflowed terms early.
  let s = 0;
  for (let i = 0; i <= OWEN_STEPS; i++) {
    const t = Math.tan(i * step);
    const w = i === 0 || i === OWEN_STEPS ? 1 : i % 2 ? 4 : 2;
    s += w * Math.exp(k * t * t);
  }
  return (Math.exp(k) * s * step) / 3 / (2 * Math.PI);
}
const OWEN_STEPS = 2048;

/**
 * P(X0 < c < X1) for standard normals with correlation rho: the chance that a sampled Gaussian sequence crosses
 * +c sigma upwards between neighbouring samples. By Owen 1956 (Ann. Math. Statist. 27(4):1075-1090; the identity is
 * quoted from memory and checked against scipy in the tests), P(X0 <= c, X1 <= c) = Phi(c) - 2 T(c, a) with
 * a = sqrt((1 - rho) / (1 + rho)), so the chance is 2 T(c, a): no difference of two nearly equal tails, so it
 * stays exact as rho nears 1 (a record sampled far above its bandwidth, where a sum over Q(c) - P(both above)
 * lost every digit and over-counted the crossings up to thirty times).
 */
export function upCrossingChance(c: number, rho: number): number {
  if (!(rho < 1)) return 0;
  const r = Math.max(-1, rho);
  return 2 * owensT(c, Math.sqrt((1 - r) / (1 + r)));
}

/**
 * The lines a constant leaks into through the window: k = 0.. while |W(k)| > 1e-12 W(0), W the window's DFT. A
 * periodic cosine-sum window leaks into as many lines as it has terms (rectangular 1, Hann and Hamming 2, the 4-term
 * Blackman-Harris 4; Harris 1978, Proc. IEEE 66(1):51-83).
 */
export function offsetLines(window: Float64Array): number {
  const n = window.length;
  let w0 = 0;
  for (let i = 0; i < n; i++) w0 += window[i]!;
  let k = 1;
  for (; k < Math.min(16, n / 2); k++) {
    let re = 0;
    let im = 0;
    for (let i = 0; i < n; i++) {
      re += window[i]! * Math.cos((2 * Math.PI * k * i) / n);
      im += window[i]! * Math.sin((2 * Math.PI * k * i) / n);
    }
    if (Math.hypot(re, im) <= 1e-12 * Math.abs(w0)) break;
  }
  return k;
}

/**
 * `skipLines`: lowest lines left out of the autocorrelation, for a PSD whose segments kept their mean (detrend
 * "none"): there they hold the offset (gravity), which is no part of the motion the gates judge, and whose
 * correlation near 1 at every lag made a Gaussian record's crossings look too rare.
 */
export function amplitudeGates(
  s: SampleStatistics,
  p: PsdEstimate,
  durationS: number,
  skipLines = 0,
  tonePowers: readonly number[] = [],
): AmplitudeGates {
  const doubts: Finding[] = [];
  const notes: Finding[] = [];
  let m0 = 0;
  let m2 = 0;
  for (let k = skipLines; k < p.psd.length; k++) {
    const f = p.frequencyHz[k]!;
    m0 += p.psd[k]!;
    m2 += f * f * p.psd[k]!;
  }
  const nu0 = m0 > 0 ? Math.sqrt(m2 / m0) : NaN;
  // The detrended segments' figures where there are any (drift below the first line left out).
  const c = Number.isFinite(p.detrendedCrestFactor) ? p.detrendedCrestFactor : s.crestFactor;
  const kurt = Number.isFinite(p.detrendedKurtosis) ? p.detrendedKurtosis : s.kurtosis;
  const r = p.psd.length > 1 ? autocorrelation(p, skipLines) : new Float64Array([1, 0]);
  const rho1 = r[0]! > 0 ? r[1]! / r[0]! : 0;
  const crossings = 2 * Math.max(0, s.count - 1) * upCrossingChance(c, rho1);
  const kSpread = Math.sqrt((24 * (p.psd.length > 1 ? fourthSum(r) : 1)) / Math.max(1, s.count));
  const z = -normalQuantile(GATE_RATE);
  if (Number.isFinite(crossings) && crossings > -Math.log(CREST_GATE_RATE)) {
    doubts.push({
      code: "CREST_LOW",
      values: { crestFactor: c, crossings },
    });
  }
  // Sine tones the spectrum shows (power s_k = A_k^2 / 2 each) lower a Gaussian record's kurtosis to
  // 3 - 1.5 sum (s_k / V)^2, V the whole variance: the fourth moment of Gaussian plus independent sines, E[cos^4] = 3/8
  // (derived here). A sine-on-random record is not clipped for having them.
  const variance = m0 * p.lineSpacingHz;
  let toneFourth = 0;
  for (const t of tonePowers) toneFourth += variance > 0 ? (t / variance) ** 2 : 0;
  const centre = 3 - 1.5 * Math.min(toneFourth, 1);
  if (Number.isFinite(kurt) && kurt < centre - z * kSpread) {
    doubts.push({
      code: "KURTOSIS_LOW",
      values: { kurtosis: kurt, spread: kSpread, ...(centre < 3 ? { expected: centre } : {}) },
    });
  }
  if (Number.isFinite(kurt) && kurt > centre + z * kSpread) {
    notes.push({
      code: "KURTOSIS_HIGH",
      values: { kurtosis: kurt, spread: kSpread, ...(centre < 3 ? { expected: centre } : {}) },
    });
  }
  if (Number.isFinite(crossings) && crossings < GATE_RATE) {
    notes.push({ code: "CREST_HIGH", values: { crestFactor: c } });
  }
  void durationS;
  return { upCrossingRateHz: nu0, crossingsAtCrest: crossings, kurtosisSpread: kSpread, doubts, notes };
}
