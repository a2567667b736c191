/**
 * Count bounds for Monte Carlo checks: of n independent records each failing with probability p, the count
 * lies at or below upper999 and at or above lower999 except with probability 0.001 each (binomial tails,
 * summed term by term; common practice). Terms are carried as logarithms, so (1 - p)^n underflowing to 0 for
 * large n neither stops the sum nor loops it forever.
 */
function binomialQuantile(n: number, p: number, tail: number): number {
  // Smallest c with P(X <= c) >= 1 - tail.
  if (p <= 0) return 0;
  if (p >= 1) return n;
  let logTerm = n * Math.log1p(-p);
  const step = Math.log(p) - Math.log1p(-p);
  let cdf = Math.exp(logTerm);
  let c = 0;
  while (1 - cdf > tail && c < n) {
    logTerm += Math.log((n - c) / (c + 1)) + step;
    c++;
    cdf += Math.exp(logTerm);
  }
  return c;
}

/** Smallest c with P(Binomial(n, p) > c) <= 0.001. */
export function upper999(n: number, p: number): number {
  return binomialQuantile(n, p, 0.001);
}

/** Largest c with P(Binomial(n, p) < c) <= 0.001: a count at or above it is consistent with a rate of at least p. */
export function lower999(n: number, p: number): number {
  return n - binomialQuantile(n, 1 - p, 0.001);
}
