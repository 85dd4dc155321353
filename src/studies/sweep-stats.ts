/**
 * Summary statistics of a study: moments of numeric outcomes and probabilities of categorical
 * ones with a confidence interval.
 *
 * References: E. B. Wilson, "Probable inference, the law of succession, and statistical
 * inference", J. Amer. Statist. Assoc. 22 (1927) 209 (score interval); L. D. Brown, T. T. Cai
 * & A. DasGupta, Statist. Sci. 16 (2001) 101 (why the Wilson interval rather than the Wald
 * interval, notably near 0 and 1 and for small n); B. P. Welford, Technometrics 4 (1962) 419
 * (one-pass mean and variance).
 */

/** z for a two-sided 95 % interval: Φ⁻¹(0.975) (Abramowitz & Stegun, Table 26.5). */
export const Z95 = 1.959963984540054;

export interface NumericSummary {
  /** Number of finite values summarised. */
  n: number;
  mean: number;
  /** Sample standard deviation (n − 1 in the denominator); 0 for a single value. */
  sd: number;
  min: number;
  max: number;
}

export interface Proportion {
  /** Cases with the outcome, and cases counted. */
  count: number;
  n: number;
  /** count / n. */
  p: number;
  /** Wilson score 95 % interval. */
  low: number;
  high: number;
}

/**
 * Mean, sample standard deviation, least and largest of the finite values (NaN and ±∞ are
 * skipped: a failed case has no final state). n = 0 gives NaN moments.
 */
export function summarise(values: readonly number[]): NumericSummary {
  let n = 0;
  let mean = 0;
  let m2 = 0;
  let min = Infinity;
  let max = -Infinity;
  for (const x of values) {
    if (!Number.isFinite(x)) continue;
    n++;
    const d = x - mean;
    mean += d / n;
    m2 += d * (x - mean);
    if (x < min) min = x;
    if (x > max) max = x;
  }
  if (n === 0) return { n, mean: NaN, sd: NaN, min: NaN, max: NaN };
  return { n, mean, sd: n > 1 ? Math.sqrt(m2 / (n - 1)) : 0, min, max };
}

/**
 * The Wilson score interval for a binomial proportion count/n at the given z (95 % by
 * default): centre (p̂ + z²/2n)/(1 + z²/n), half-width z/(1 + z²/n)·√(p̂(1 − p̂)/n + z²/4n²).
 * It stays inside [0, 1] and is not degenerate at 0 or n successes. n = 0 gives [0, 1].
 */
export function wilson(count: number, n: number, z = Z95): Proportion {
  if (!(n > 0)) return { count, n, p: NaN, low: 0, high: 1 };
  const p = count / n;
  const z2 = z * z;
  const denom = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / denom;
  const half = (z / denom) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  // Round-off must not push the ends outside [0, 1] or past p̂ at count 0 or n.
  const low = count === 0 ? 0 : Math.max(0, centre - half);
  const high = count === n ? 1 : Math.min(1, centre + half);
  return { count, n, p, low, high };
}
