/**
 * Sample-and-hold in a record: a logger or phone app that writes a slower sensor at a faster rate repeats
 * each reading until the next one arrives (a 50 Hz sensor logged at 200 Hz: every value four times). The
 * record then holds nothing above the sensor's own Nyquist frequency but the hold's images (the spectrum
 * of a zero-order hold: the baseband repeated at multiples of the update rate, shaped by sinc; Oppenheim &
 * Schafer, Discrete-Time Signal Processing, 3rd ed. 2010, sec. 4.8.3), and the repeated extremes look like
 * clipping to a count of samples at the maximum.
 *
 * One pass, a comparison per sample: the lengths of runs of exactly equal consecutive values go into a
 * histogram (1..MAX_RUN, longer runs in the last bin), and the runs at the running maximum and minimum are
 * counted (a held extreme is one run, not k samples).
 *
 * The decision (common practice, a heuristic; tested on held and unheld records in
 * tests/estimate/statistics/sampleHold.test.ts): held when at least 90 % of the samples lie in runs of two or more, the
 * most common run length m is 2 or more, and at least 100 runs were seen. A quantised quiet channel repeats
 * values too, but its runs are geometric, mostly of length 1, and fail the first rule. The update rate is
 * fs / (mean length of the runs no longer than 2m): a run longer than that is two or more updates that
 * happened to read the same, which would bias the mean.
 */
export const MAX_RUN = 64;

export interface SampleHold {
  /** Runs of equal consecutive values seen. */
  runs: number;
  /** Samples in runs of two or more, as a share of all finite samples. */
  heldShare: number;
  /** Most common run length. */
  modalRun: number;
  /** Mean length of the runs up to twice the modal length (the hold factor). */
  meanRun: number;
  held: boolean;
  /** fs / meanRun when held, else the record's rate. */
  updateRateHz: number;
  /** Runs at the record's maximum and minimum (a held extreme counts once). */
  runsAtMax: number;
  runsAtMin: number;
}

export class SampleHoldAccumulator {
  private readonly hist = new Float64Array(MAX_RUN + 1);
  private prev = NaN;
  private run = 0;
  private max = -Infinity;
  private min = Infinity;
  private runsAtMax = 0;
  private runsAtMin = 0;
  private count = 0;

  push(x: Float64Array, n: number): void {
    const hist = this.hist;
    let prev = this.prev;
    let run = this.run;
    let max = this.max;
    let min = this.min;
    let atMax = this.runsAtMax;
    let atMin = this.runsAtMin;
    let count = this.count;
    // Runs of one (every sample of an unheld record) are counted here, not in hist[1]: an increment of one
    // array element per sample waits on its own store each time.
    let ones = 0;
    for (let i = 0; i < n; i++) {
      const v = x[i]!;
      if (v - v !== 0) continue; // non-finite samples are counted elsewhere and break no run
      count++;
      if (v === prev) {
        run++;
        continue;
      }
      if (run === 1) ones++;
      else if (run > 0) hist[run < MAX_RUN ? run : MAX_RUN]!++;
      run = 1;
      prev = v;
      // A new run: is it at the extreme so far?
      if (v > max) {
        max = v;
        atMax = 1;
      } else if (v === max) atMax++;
      if (v < min) {
        min = v;
        atMin = 1;
      } else if (v === min) atMin++;
    }
    hist[1]! += ones;
    this.prev = prev;
    this.run = run;
    this.max = max;
    this.min = min;
    this.runsAtMax = atMax;
    this.runsAtMin = atMin;
    this.count = count;
  }

  result(sampleRateHz: number): SampleHold {
    const h = Float64Array.from(this.hist);
    if (this.run > 0) h[this.run < MAX_RUN ? this.run : MAX_RUN]!++;
    let runs = 0;
    let inLong = 0;
    let modalRun = 1;
    for (let k = 1; k <= MAX_RUN; k++) {
      runs += h[k]!;
      if (k >= 2) inLong += k * h[k]!; // runs in the last bin count at MAX_RUN: a lower bound
      if (h[k]! > h[modalRun]!) modalRun = k;
    }
    let nr = 0;
    let nl = 0;
    for (let k = 1; k <= Math.min(MAX_RUN, 2 * modalRun); k++) {
      nr += h[k]!;
      nl += k * h[k]!;
    }
    const meanRun = nr > 0 ? nl / nr : 1;
    const heldShare = this.count > 0 ? Math.min(1, inLong / this.count) : 0;
    const held = runs >= 100 && modalRun >= 2 && modalRun < MAX_RUN && heldShare >= 0.9;
    return {
      runs,
      heldShare,
      modalRun,
      meanRun,
      held,
      updateRateHz: held ? sampleRateHz / meanRun : sampleRateHz,
      runsAtMax: this.runsAtMax,
      runsAtMin: this.runsAtMin,
    };
  }
}
