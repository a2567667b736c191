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
 *   correlation from the PSD (bivariate normal, by quadrature); over n samples and both signs it crosses
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

/** The autocorrelation R(tau), tau = 0..N/2, of a one-sided PSD by an inverse FFT (R(0) is the mean square). */
function autocorrelation(p: PsdEstimate): Float64Array {
  const n = 2 * (p.psd.length - 1);
  const fft = new RealFft(n);
  const half = new Float64Array(n + 2);
  // R(tau) = sum_k P_k df cos(2 pi k tau / N), P one-sided with DC and Nyquist undoubled.
  for (let k = 0; k <= n / 2; k++) half[2 * k] = (k === 0 || k === n / 2 ? 1 : 0.5) * n * p.psd[k]! * p.lineSpacingHz;
  const r = new Float64Array(n);
  fft.inverseReal(half, r);
  return r.subarray(0, n / 2 + 1);
}

/** sum over all lags of rho(tau)^4, rho from the one-sided PSD. */
export function autocorrelationFourthSum(p: PsdEstimate): number {
  if (p.psd.length < 2) return 1;
  const r = autocorrelation(p);
  const r0 = r[0]!;
  if (!(r0 > 0)) return 1;
  let s = 1;
  for (let t = 1; t < r.length - 1; t++) s += 2 * (r[t]! / r0) ** 4;
  s += (r[r.length - 1]! / r0) ** 4;
  return s;
}

/**
 * Upper tail of the standard normal, Q(x), by Simpson's rule on the density: within 3e-5 relative of
 * scipy.stats.norm.sf for x from -6 to 9 (measured), enough for a gate. Not distributions.normalSurvival
 * (exact to double precision), because the gate's recorded crossings would then move by about 1e-5 relative
 * and older reports would no longer verify at 1e-9; to be replaced with a recorded-format change.
 */
function normalUpper(x: number): number {
  // Q(x) = integral_x^inf phi(t) dt, by Simpson's rule on [x, x + 12] (phi below 1e-32 beyond).
  const m = 400;
  const h = 12 / m;
  let s = 0;
  for (let i = 0; i <= m; i++) {
    const t = x + i * h;
    const w = i === 0 || i === m ? 1 : i % 2 ? 4 : 2;
    s += w * Math.exp(-0.5 * t * t);
  }
  return (s * h) / 3 / Math.sqrt(2 * Math.PI);
}

/**
 * P(X0 < c < X1) for standard normals with correlation rho: Q(c) - integral_c^inf phi(x) Q((c - rho x) / sqrt(1 -
 * rho^2)) dx.
 */
export function upCrossingChance(c: number, rho: number): number {
  const q = normalUpper(c);
  if (!(rho < 1)) return 0;
  const sd = Math.sqrt(1 - rho * rho);
  const m = 200;
  const h = 10 / m;
  let both = 0;
  for (let i = 0; i <= m; i++) {
    const x = c + i * h;
    const w = i === 0 || i === m ? 1 : i % 2 ? 4 : 2;
    both += w * (Math.exp(-0.5 * x * x) / Math.sqrt(2 * Math.PI)) * normalUpper((c - rho * x) / sd);
  }
  return Math.max(0, q - (both * h) / 3);
}

export function amplitudeGates(s: SampleStatistics, p: PsdEstimate, durationS: number): AmplitudeGates {
  const doubts: Finding[] = [];
  const notes: Finding[] = [];
  let m0 = 0;
  let m2 = 0;
  for (let k = 0; k < p.psd.length; k++) {
    const f = p.frequencyHz[k]!;
    m0 += p.psd[k]!;
    m2 += f * f * p.psd[k]!;
  }
  const nu0 = m0 > 0 ? Math.sqrt(m2 / m0) : NaN;
  // The detrended segments' figures where there are any (drift below the first line left out).
  const c = Number.isFinite(p.detrendedCrestFactor) ? p.detrendedCrestFactor : s.crestFactor;
  const kurt = Number.isFinite(p.detrendedKurtosis) ? p.detrendedKurtosis : s.kurtosis;
  const r = p.psd.length > 1 ? autocorrelation(p) : new Float64Array([1, 0]);
  const rho1 = r[0]! > 0 ? r[1]! / r[0]! : 0;
  const crossings = 2 * Math.max(0, s.count - 1) * upCrossingChance(c, rho1);
  const kSpread = Math.sqrt((24 * autocorrelationFourthSum(p)) / Math.max(1, s.count));
  const z = -normalQuantile(GATE_RATE);
  if (Number.isFinite(crossings) && crossings > -Math.log(CREST_GATE_RATE)) {
    doubts.push({
      code: "CREST_LOW",
      values: { crestFactor: c, crossings },
    });
  }
  if (Number.isFinite(kurt) && kurt < 3 - z * kSpread) {
    doubts.push({ code: "KURTOSIS_LOW", values: { kurtosis: kurt, spread: kSpread } });
  }
  if (Number.isFinite(kurt) && kurt > 3 + z * kSpread) {
    notes.push({ code: "KURTOSIS_HIGH", values: { kurtosis: kurt, spread: kSpread } });
  }
  if (Number.isFinite(crossings) && crossings < GATE_RATE) {
    notes.push({ code: "CREST_HIGH", values: { crestFactor: c } });
  }
  void durationS;
  return { upCrossingRateHz: nu0, crossingsAtCrest: crossings, kurtosisSpread: kSpread, doubts, notes };
}
