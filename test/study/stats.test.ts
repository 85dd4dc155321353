/** Summary statistics, the Wilson interval, and Student's t for fit intervals. */
import { describe, expect, it } from 'vitest';
import { incompleteBeta, logGamma, studentCdf, studentQuantile } from '../../src/studies/fit-stats.js';
import { summarise, wilson, Z95 } from '../../src/studies/sweep-stats.js';

describe('summarise', () => {
  it('gives mean, sample standard deviation, min and max (2,4,4,4,5,5,7,9: mean 5, s = √(32/7))', () => {
    const s = summarise([2, 4, 4, 4, 5, 5, 7, 9]);
    expect(s.n).toBe(8);
    expect(s.mean).toBeCloseTo(5, 14);
    expect(s.sd).toBeCloseTo(Math.sqrt(32 / 7), 14);
    expect([s.min, s.max]).toEqual([2, 9]);
  });

  it('skips non-finite values (failed cases have no final state) and is NaN for none', () => {
    const s = summarise([1, NaN, 3, Infinity]);
    expect(s.n).toBe(2);
    expect(s.mean).toBe(2);
    expect(Number.isNaN(summarise([NaN]).mean)).toBe(true);
  });

  it('keeps its accuracy for values with a large common offset (Welford 1962)', () => {
    const s = summarise([1e9 + 4, 1e9 + 7, 1e9 + 13, 1e9 + 16]);
    expect(s.sd).toBeCloseTo(Math.sqrt(30), 9);
  });
});

describe('Wilson score interval (Wilson, JASA 22 (1927) 209)', () => {
  it('has the closed-form ends at 0 and n successes: [0, z²/(n+z²)] and [n/(n+z²), 1]', () => {
    const z2 = Z95 * Z95;
    const none = wilson(0, 10);
    expect(none.low).toBe(0);
    expect(none.high).toBeCloseTo(z2 / (10 + z2), 14);
    const all = wilson(10, 10);
    expect(all.high).toBe(1);
    expect(all.low).toBeCloseTo(10 / (10 + z2), 14);
  });

  it('reproduces the worked example 81/263 → 0.2553 to 0.3662 (Newcombe, Statist. Med. 17 (1998) 857, Table I, from memory)', () => {
    const w = wilson(81, 263);
    expect(w.low).toBeCloseTo(0.2553, 4);
    expect(w.high).toBeCloseTo(0.3662, 4);
  });

  it('is symmetric: the interval for x/n mirrors that for (n − x)/n', () => {
    const a = wilson(3, 17);
    const b = wilson(14, 17);
    expect(a.low).toBeCloseTo(1 - b.high, 14);
    expect(a.high).toBeCloseTo(1 - b.low, 14);
  });

  it('covers the true proportion about 95 % of the time (binomial enumeration, p = 0.3, n = 40)', () => {
    // Exact coverage: Σ over x of P(X = x) for the x whose interval holds p. Brown, Cai &
    // DasGupta (Statist. Sci. 16 (2001) 101) show Wilson's coverage stays near 0.95.
    const n = 40;
    const p = 0.3;
    let coverage = 0;
    let logC = 0; // log C(n, x)
    for (let x = 0; x <= n; x++) {
      if (x > 0) logC += Math.log((n - x + 1) / x);
      const w = wilson(x, n);
      if (w.low <= p && p <= w.high) coverage += Math.exp(logC + x * Math.log(p) + (n - x) * Math.log(1 - p));
    }
    expect(coverage).toBeGreaterThan(0.93);
    expect(coverage).toBeLessThan(0.97);
  });
});

describe("Student's t (Numerical Recipes 3rd ed. §6.14; Abramowitz & Stegun Table 26.10)", () => {
  it('logGamma: ln Γ(1/2) = ln √π, ln Γ(10) = ln 9!, ln Γ(1) = 0', () => {
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 13);
    expect(logGamma(10)).toBeCloseTo(Math.log(362880), 12);
    expect(Math.abs(logGamma(1))).toBeLessThan(1e-14);
    expect(logGamma(0.1)).toBeCloseTo(Math.log(9.513507698668732), 12); // Γ(0.1), via Γ(1.1)/0.1
  });

  it('incompleteBeta: I_x(1, 1) = x, I_x(a, 1) = x^a, I_x(a, b) = 1 − I_{1−x}(b, a)', () => {
    expect(incompleteBeta(0.3, 1, 1)).toBeCloseTo(0.3, 14);
    expect(incompleteBeta(0.7, 3.5, 1)).toBeCloseTo(0.7 ** 3.5, 13);
    expect(incompleteBeta(0.2, 2.5, 4)).toBeCloseTo(1 - incompleteBeta(0.8, 4, 2.5), 14);
  });

  it('quantiles in closed form: ν = 1 (Cauchy, t = tan(π(p − ½))) and ν = 2 (t = q√(2/(1 − q²)), q = 2p − 1)', () => {
    expect(studentQuantile(0.975, 1)).toBeCloseTo(Math.tan(Math.PI * 0.475), 9);
    const q = 0.95;
    expect(studentQuantile(0.975, 2)).toBeCloseTo(q * Math.sqrt(2 / (1 - q * q)), 11);
  });

  it('quantiles from the table: t(0.975) = 2.571, 2.228, 2.042 for ν = 5, 10, 30, and → 1.960', () => {
    expect(studentQuantile(0.975, 5)).toBeCloseTo(2.570582, 5);
    expect(studentQuantile(0.975, 10)).toBeCloseTo(2.228139, 5);
    expect(studentQuantile(0.975, 30)).toBeCloseTo(2.042272, 5);
    expect(studentQuantile(0.975, 1e7)).toBeCloseTo(Z95, 5);
    expect(studentQuantile(0.025, 10)).toBeCloseTo(-2.228139, 5);
  });

  it('the CDF inverts the quantile', () => {
    for (const nu of [1, 3, 7.5, 58]) for (const p of [0.6, 0.9, 0.995]) expect(studentCdf(studentQuantile(p, nu), nu)).toBeCloseTo(p, 12);
  });
});
