/**
 * Equivalent degrees of freedom of a Welch estimate from K overlapped segments with hop S:
 *   nu = 2K / (1 + 2 sum_{m=1}^{K-1} (1 - m/K) |sum_t h[t] h[t + mS]|^2),  sum h^2 = 1
 * (Percival & Walden, Spectral Analysis for Physical Applications, Cambridge UP 1993, eq. 292b;
 * Welch 1967, IEEE Trans. Audio Electroacoust. 15:70-73). Computed from the actual window and hop.
 * This is the DOF of lines 0 < k < N/2; at DC and Nyquist each segment gives a real value, so half.
 */
export function welchDof(window: Float64Array, hop: number, segments: number): number {
  if (segments < 1) return 0;
  const n = window.length;
  let sumW2 = 0;
  for (let i = 0; i < n; i++) sumW2 += window[i]! * window[i]!;
  let denom = 1;
  for (let m = 1; m < segments && m * hop < n; m++) {
    const lag = m * hop;
    let r = 0;
    for (let t = 0; t + lag < n; t++) r += window[t]! * window[t + lag]!;
    r /= sumW2;
    denom += 2 * (1 - m / segments) * r * r;
  }
  return (2 * segments) / denom;
}

/**
 * welchDof for any number of segments of one window and hop: the lag correlations are computed once (O(N) per lag
 * that overlaps), so each call after is O(lags). Same formula and order of sums as welchDof, so the same value.
 */
export function welchDofBySegments(window: Float64Array, hop: number): (segments: number) => number {
  const n = window.length;
  let sumW2 = 0;
  for (let i = 0; i < n; i++) sumW2 += window[i]! * window[i]!;
  const r2: number[] = [];
  for (let m = 1; m * hop < n; m++) {
    const lag = m * hop;
    let r = 0;
    for (let t = 0; t + lag < n; t++) r += window[t]! * window[t + lag]!;
    r /= sumW2;
    r2.push(r * r);
  }
  return (segments) => {
    if (segments < 1) return 0;
    let denom = 1;
    for (let m = 1; m < segments && m <= r2.length; m++) denom += 2 * (1 - m / segments) * r2[m - 1]!;
    return (2 * segments) / denom;
  };
}
