// Dense LU with partial pivoting. Source: Golub & Van Loan, Matrix Computations, 4th ed.,
// §3.4 (Gaussian elimination with partial pivoting solves well-conditioned systems to a
// backward error of order eps; an exactly singular matrix yields a zero pivot).
import { describe, expect, it } from 'vitest';
import { DenseLu } from '../../src/linalg/dense-lu.js';

/** Deterministic pseudo-random numbers in [-1, 1) (a 32-bit LCG; common practice for tests). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 31 - 1;
  };
}

/** A random matrix made diagonally dominant (hence well-conditioned), with its rows shuffled so pivoting is exercised. */
function wellConditioned(n: number, rnd: () => number): Float64Array {
  const a = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) a[i] = rnd();
  for (let i = 0; i < n; i++) a[i * n + i] += n * (rnd() < 0 ? -1 : 1);
  // Reverse the row order: the dominant entries leave the diagonal.
  const b = new Float64Array(n * n);
  for (let i = 0; i < n; i++) b.set(a.subarray(i * n, i * n + n), (n - 1 - i) * n);
  return b;
}

describe('DenseLu (Golub & Van Loan §3.4, partial pivoting)', () => {
  it('solves random well-conditioned systems to 1e-12', () => {
    const rnd = lcg(12345);
    for (const n of [1, 2, 3, 5, 8, 13, 30]) {
      for (let trial = 0; trial < 5; trial++) {
        const a = wellConditioned(n, rnd);
        const x = Float64Array.from({ length: n }, () => rnd() * 10);
        const b = new Float64Array(n);
        for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) b[i] += a[i * n + j] * x[j];
        const lu = new DenseLu(n);
        expect(lu.factor(a)).toBe(true);
        lu.solve(b);
        for (let i = 0; i < n; i++) expect(Math.abs(b[i] - x[i])).toBeLessThan(1e-12 * Math.max(1, Math.abs(x[i])));
      }
    }
  });

  it('pivots: a zero leading entry is no obstacle', () => {
    const a = Float64Array.from([0, 1, 1, 0]);
    const b = Float64Array.from([2, 3]);
    const lu = new DenseLu(2);
    expect(lu.factor(a)).toBe(true);
    lu.solve(b);
    expect(Array.from(b)).toEqual([3, 2]);
  });

  it('reuses one factorisation for several right-hand sides', () => {
    const a = Float64Array.from([4, -2, 1, -2, 4, -2, 1, -2, 4]);
    const lu = new DenseLu(3);
    expect(lu.factor(a)).toBe(true);
    for (const x of [[1, 2, 3], [-1, 0, 5]]) {
      const b = Float64Array.from([4 * x[0] - 2 * x[1] + x[2], -2 * x[0] + 4 * x[1] - 2 * x[2], x[0] - 2 * x[1] + 4 * x[2]]);
      lu.solve(b);
      for (let i = 0; i < 3; i++) expect(b[i]).toBeCloseTo(x[i], 13);
    }
  });

  it('reports a singular matrix by returning false, without throwing', () => {
    // Row 2 is exactly twice row 1: elimination leaves an exact zero pivot.
    const lu = new DenseLu(3);
    expect(lu.factor(Float64Array.from([1, 2, 3, 2, 4, 6, 1, 0, 1]))).toBe(false);
    expect(lu.factor(Float64Array.from([0, 0, 0, 0, 1, 2, 0, 3, 4]))).toBe(false);
    expect(() => lu.solve(new Float64Array(3))).toThrow();
  });

  it('reports non-finite entries by returning false', () => {
    const lu = new DenseLu(2);
    expect(lu.factor(Float64Array.from([1, NaN, 0, 1]))).toBe(false);
    expect(lu.factor(Float64Array.from([Infinity, 0, 0, 1]))).toBe(false);
    expect(lu.factor(Float64Array.from([1, 0, 0, NaN]))).toBe(false);
  });
});
