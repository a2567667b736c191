import type { Finding } from "../findings.js";
import { normalQuantile } from "../estimate/chiSquare.js";
import type { PsdEstimate } from "../estimate/psdEstimate.js";
import { RealFft } from "../estimate/realFft.js";
import type { SampleStatistics } from "../estimate/runningMoments.js";

/**
 * Is the amplitude distribution that of a Gaussian record with this spectrum and length? A random
 * vibration test drives a Gaussian process; a record whose peaks are cut off (a saturated amplifier or
 * ADC, a clipped drive) has a crest factor and a kurtosis far below a Gaussian's, and its PSD no longer
 * describes the motion. The gates use what the record's own PSD says it should look like:
 *
 * - Crest factor c = max|x - mean| / std. A Gaussian record crosses +-c sigma about
 *   N_c = 2 nu0 T exp(-c^2 / 2) times in T seconds, nu0 = sqrt(m2 / m0) from the PSD's moments (Rice,
 *   "Mathematical analysis of random noise", Bell Syst. Tech. J. 23-24, 1944-45). The chance it never
 *   reaches c is about exp(-N_c) (crossings of a high level are nearly Poisson: Cramer & Leadbetter,
 *   Stationary and Related Stochastic Processes, Wiley 1967, ch. 12). Below GATE_RATE: a doubt.
 * - Pearson kurtosis k. For a Gaussian process its spread is sqrt(24 sum_tau rho(tau)^4 / n), rho the
 *   autocorrelation (from the PSD by an inverse FFT): neighbouring samples of a narrow-band record are
 *   not independent (Lomnicki 1961, Biometrika 48:119-124; the form is from memory). k below
 *   3 - z sigma_k with a one-sided rate GATE_RATE: a doubt; above 3 + z sigma_k: a note (peaks more
 *   frequent than Gaussian; the PSD alone then understates the peak and fatigue content).
 * A Gaussian record trips either doubt with a chance of about GATE_RATE each.
 */
export const GATE_RATE = 1e-4;

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

/** sum over all lags of rho(tau)^4, rho from the one-sided PSD by an inverse FFT. */
export function autocorrelationFourthSum(p: PsdEstimate): number {
  const n = 2 * (p.psd.length - 1);
  if (n < 2) return 1;
  const fft = new RealFft(n);
  const half = new Float64Array(n + 2);
  // R(tau) = sum_k P_k df cos(2 pi k tau / N), P one-sided with DC and Nyquist undoubled.
  for (let k = 0; k <= n / 2; k++) half[2 * k] = (k === 0 || k === n / 2 ? 1 : 0.5) * n * p.psd[k]! * p.lineSpacingHz;
  const r = new Float64Array(n);
  fft.inverseReal(half, r);
  const r0 = r[0]!;
  if (!(r0 > 0)) return 1;
  let s = 1;
  for (let t = 1; t < n / 2; t++) s += 2 * (r[t]! / r0) ** 4;
  s += (r[n / 2]! / r0) ** 4;
  return s;
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
  const c = s.crestFactor;
  const crossings = 2 * nu0 * durationS * Math.exp((-c * c) / 2);
  const kSpread = Math.sqrt((24 * autocorrelationFourthSum(p)) / Math.max(1, s.count));
  const z = -normalQuantile(GATE_RATE);
  if (Number.isFinite(crossings) && crossings > -Math.log(GATE_RATE)) {
    doubts.push({
      code: "CREST_LOW",
      text: `crest factor ${c.toFixed(2)} (max |x - mean| / std) is far below a Gaussian record's: one this long and wide-band would pass ±${c.toFixed(2)} sigma about ${crossings.toPrecision(3)} times (saturated or clipped signal?)`,
    });
  }
  if (Number.isFinite(s.kurtosis) && s.kurtosis < 3 - z * kSpread) {
    doubts.push({ code: "KURTOSIS_LOW", text: `kurtosis ${s.kurtosis.toFixed(3)} is far below a Gaussian record's 3 (±${kSpread.toPrecision(2)} for this record): peaks cut off or a deterministic signal` });
  }
  if (Number.isFinite(s.kurtosis) && s.kurtosis > 3 + z * kSpread) {
    notes.push({ code: "KURTOSIS_HIGH", text: `kurtosis ${s.kurtosis.toFixed(3)} is above a Gaussian record's 3 (±${kSpread.toPrecision(2)}): more large peaks than Gaussian (shocks, impacts); the PSD alone understates them` });
  }
  if (Number.isFinite(crossings) && crossings < GATE_RATE) {
    notes.push({ code: "CREST_HIGH", text: `crest factor ${c.toFixed(2)} is above what a Gaussian record this long reaches (shock or spike?)` });
  }
  return { upCrossingRateHz: nu0, crossingsAtCrest: crossings, kurtosisSpread: kSpread, doubts, notes };
}
