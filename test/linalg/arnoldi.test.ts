/**
 * Shift-and-invert Arnoldi (Saad, Numerical Methods for Large Eigenvalue Problems, 2nd ed.,
 * SIAM 2011, §6.2 and §7.1), counting eigenvalues by the signs of LU pivots (Sylvester's law of
 * inertia, Golub & Van Loan, 4th ed., §8.1), and the restriction to the complement of
 * conservation vectors by Householder reflections (Golub & Van Loan §5.1), against the closed
 * form of the second-difference matrix tridiag(−1, 2, −1): eigenvalues 2 − 2cos(kπ/(n + 1)),
 * k = 1 … n (docs/references.md, "Spectra of graph Laplacians").
 */
import { describe, expect, it } from 'vitest';
import { shiftInvertArnoldi } from '../../src/linalg/arnoldi.js';
import { eigenvalues, orthonormalComplement, project, restrictToComplement } from '../../src/linalg/eigen.js';
import { SparseLu } from '../../src/linalg/sparse-lu.js';
import { patternFromEntries } from '../../src/linalg/sparse-pattern.js';

/** tridiag(−1, 2, −1) of size n with row i scaled by d_i (diagonally similar to symmetric when d > 0). */
function secondDifference(n: number, d: (i: number) => number = () => 1): { pattern: ReturnType<typeof patternFromEntries>; values: Float64Array } {
  const rows: number[] = [];
  const cols: number[] = [];
  for (let i = 0; i < n; i++) for (const j of [i - 1, i, i + 1]) if (j >= 0 && j < n) { rows.push(i); cols.push(j); }
  const pattern = patternFromEntries(n, rows, cols);
  const values = new Float64Array(pattern.rowPtr[n]);
  for (let i = 0; i < n; i++) {
    for (let a = pattern.rowPtr[i]; a < pattern.rowPtr[i + 1]; a++) values[a] = (pattern.colIdx[a] === i ? 2 : -1) * d(i);
  }
  return { pattern, values };
}

const exact = (n: number, k: number): number => 2 - 2 * Math.cos((k * Math.PI) / (n + 1));

describe('shift-and-invert Arnoldi', () => {
  it('finds the eigenvalues of tridiag(−1, 2, −1) nearest the shift: 2 − 2cos(kπ/(n + 1))', () => {
    const n = 300;
    const { pattern, values } = secondDifference(n);
    const lu = new SparseLu(pattern);
    const sigma = -1e-3;
    expect(lu.factor(values, -sigma)).toBe(true);
    const r = shiftInvertArnoldi(n, sigma, 24, (x) => lu.solve(x));
    expect(r.ok).toBe(true);
    const found = Array.from(r.re).sort((a, b) => a - b);
    for (let k = 1; k <= 3; k++) expect(Math.abs(found[k - 1] - exact(n, k)) / exact(n, k)).toBeLessThan(1e-10);
    for (let i = 0; i < r.steps; i++) expect(Math.abs(r.im[i])).toBeLessThan(1e-8);
  });

  it('with fewer dimensions than steps, the Krylov space is invariant and every eigenvalue exact', () => {
    const n = 12;
    const { pattern, values } = secondDifference(n, (i) => 1 + 0.1 * i);
    const lu = new SparseLu(pattern);
    expect(lu.factor(values, 0.5)).toBe(true); // A + 0.5 I: σ = −0.5
    const r = shiftInvertArnoldi(n, -0.5, 40, (x) => lu.solve(x));
    expect(r.steps).toBe(n);
    const dense = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let a = pattern.rowPtr[i]; a < pattern.rowPtr[i + 1]; a++) dense[i * n + pattern.colIdx[a]] = values[a];
    const ev = eigenvalues(dense, n);
    const a = Array.from(ev.re).sort((x, y) => x - y);
    const b = Array.from(r.re).sort((x, y) => x - y);
    for (let i = 0; i < n; i++) expect(Math.abs(a[i] - b[i])).toBeLessThan(1e-10 * a[n - 1]);
  });
});

describe('inertia from the pivots of a sparse LU', () => {
  it('counts the eigenvalues below a shift, also after a diagonal similarity (Sylvester)', () => {
    const n = 200;
    // D·T is similar to D^½ T D^½ (symmetric) for D > 0, with eigenvalues of its own; T itself for D = I
    for (const d of [(): number => 1, (i: number): number => 1 + Math.sin(i)]) {
      const { pattern, values } = secondDifference(n, d);
      const lu = new SparseLu(pattern);
      const dense = new Float64Array(n * n);
      for (let i = 0; i < n; i++) for (let a = pattern.rowPtr[i]; a < pattern.rowPtr[i + 1]; a++) dense[i * n + pattern.colIdx[a]] = values[a];
      const ev = Array.from(eigenvalues(dense, n).re);
      for (const s of [0.01, 0.5, 1.7, 3.2]) {
        expect(lu.factor(values, -s)).toBe(true);
        expect(lu.negativePivots()).toBe(ev.filter((x) => x < s).length);
      }
      if (d(1) === 1) expect(ev.filter((x) => x < 0.5).length).toBe(Array.from({ length: n }, (_, k) => exact(n, k + 1)).filter((x) => x < 0.5).length);
    }
  });
});

describe('restriction to the complement of conservation vectors', () => {
  it('has the eigenvalues of the restriction by an explicit orthonormal basis', () => {
    const n = 30;
    // columns summing to zero: wᵀA = 0 for w = (1, …, 1), so {wᵀx = 0} is invariant
    const A = new Float64Array(n * n);
    let seed = 7;
    const rnd = (): number => { seed = (seed * 16807) % 2147483647; return seed / 2147483647 - 0.5; };
    for (let i = 0; i < n * n; i++) A[i] = rnd();
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += A[i * n + j];
      for (let i = 0; i < n; i++) A[i * n + j] -= s / n;
    }
    const w = [new Float64Array(n).fill(1)];
    const fast = restrictToComplement(A, n, w);
    const { Q, cols } = orthonormalComplement(w, n);
    const slow = project(A, n, Q, cols);
    expect(fast.m).toBe(cols);
    const a = eigenvalues(fast.A, fast.m);
    const b = eigenvalues(slow, cols);
    const za = Array.from(a.re, (re, i) => [re, a.im[i]]).sort((x, y) => x[0] - y[0] || x[1] - y[1]);
    const zb = Array.from(b.re, (re, i) => [re, b.im[i]]).sort((x, y) => x[0] - y[0] || x[1] - y[1]);
    for (let i = 0; i < cols; i++) {
      expect(Math.abs(za[i][0] - zb[i][0])).toBeLessThan(1e-12);
      expect(Math.abs(za[i][1] - zb[i][1])).toBeLessThan(1e-12);
    }
  });
});
