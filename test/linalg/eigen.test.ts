/**
 * Eigenvalues by balancing, Householder–Hessenberg reduction and Francis double-shift QR
 * (Golub & Van Loan, Matrix Computations, 4th ed., §7.4–7.5), against matrices with known
 * spectra and against mathjs `eigs`, an independent general-purpose routine.
 */
import { eigs } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { eigenvalues, orthonormalComplement, project } from '../../src/linalg/eigen.js';

type Z = { re: number; im: number };

function mine(rows: number[][]): Z[] {
  const n = rows.length;
  const r = eigenvalues(rows.flat(), n);
  expect(r.ok).toBe(true);
  return Array.from({ length: n }, (_, i) => ({ re: r.re[i], im: r.im[i] }));
}

function theirs(rows: number[][]): Z[] {
  const values = eigs(rows, { eigenvectors: false }).values as unknown;
  const list = (Array.isArray(values) ? values : (values as { toArray(): unknown[] }).toArray()) as (number | { re: number; im: number })[];
  return list.map((z) => (typeof z === 'number' ? { re: z, im: 0 } : { re: z.re, im: z.im }));
}

/** Largest distance between two spectra after pairing each value with its nearest partner. */
function mismatch(a: Z[], b: Z[]): number {
  expect(a.length).toBe(b.length);
  const used = new Set<number>();
  let worst = 0;
  for (const z of a) {
    let best = -1;
    let d = Infinity;
    b.forEach((w, j) => {
      if (used.has(j)) return;
      const e = Math.hypot(z.re - w.re, z.im - w.im);
      if (e < d) { d = e; best = j; }
    });
    used.add(best);
    worst = Math.max(worst, d);
  }
  return worst;
}

/** Deterministic numbers in [−1, 1). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2147483648 - 1;
  };
}

describe('eigenvalues (Francis double-shift QR)', () => {
  it('finds the roots of a polynomial from its companion matrix, real and complex', () => {
    // (x − 1)(x − 2)(x − 3)(x² + 2x + 5): roots 1, 2, 3, −1 ± 2i; coefficients multiplied out below
    const roots: Z[] = [{ re: 1, im: 0 }, { re: 2, im: 0 }, { re: 3, im: 0 }, { re: -1, im: 2 }, { re: -1, im: -2 }];
    let c: Z[] = [{ re: 1, im: 0 }];
    for (const r of roots) {
      const next: Z[] = c.map(() => ({ re: 0, im: 0 })).concat([{ re: 0, im: 0 }]);
      c.forEach((a, k) => {
        next[k].re += a.re; next[k].im += a.im;
        next[k + 1].re -= a.re * r.re - a.im * r.im;
        next[k + 1].im -= a.re * r.im + a.im * r.re;
      });
      c = next;
    }
    const n = roots.length;
    const rows = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === 0 ? -c[j + 1].re : i === j + 1 ? 1 : 0)));
    expect(mismatch(mine(rows), roots)).toBeLessThan(1e-12);
  });

  it('handles a rotation (pure imaginary pair), a triangular and a badly scaled matrix', () => {
    expect(mismatch(mine([[0, -3], [3, 0]]), [{ re: 0, im: 3 }, { re: 0, im: -3 }])).toBeLessThan(1e-14);
    expect(mismatch(mine([[4, 1, 7], [0, -2, 5], [0, 0, 0.5]]), [{ re: 4, im: 0 }, { re: -2, im: 0 }, { re: 0.5, im: 0 }])).toBeLessThan(1e-14);
    // D A D⁻¹ with D spanning 12 decades has A's spectrum; balancing undoes the scaling
    const A = [[-2, 1, 0], [1, -3, 1], [0, 1, -1]];
    const d = [1e-6, 1, 1e6];
    const B = A.map((row, i) => row.map((v, j) => (d[i] * v) / d[j]));
    expect(mismatch(mine(B), theirs(A))).toBeLessThan(1e-12);
  });

  it('agrees with mathjs eigs on 40 random nonsymmetric matrices up to 12×12', () => {
    const rnd = lcg(7);
    let compared = 0;
    for (let trial = 0; trial < 40; trial++) {
      const n = 2 + (trial % 11);
      const rows = Array.from({ length: n }, () => Array.from({ length: n }, () => rnd()));
      let ref: Z[];
      try {
        ref = theirs(rows);
      } catch {
        continue; // mathjs' own iteration did not converge for this one
      }
      const scale = Math.max(...ref.map((z) => Math.hypot(z.re, z.im)));
      expect(mismatch(mine(rows), ref) / scale).toBeLessThan(1e-10);
      compared++;
    }
    expect(compared).toBeGreaterThanOrEqual(35);
  });

  it('reports failure on a non-finite matrix instead of throwing', () => {
    expect(eigenvalues([1, Number.NaN, 0, 1], 2).ok).toBe(false);
  });
});

describe('orthonormalComplement and project', () => {
  it('gives an orthonormal basis orthogonal to the given vectors, and QᵀAQ keeps the spectrum on an invariant subspace', () => {
    const n = 4;
    const w = Float64Array.from([1, 1, 1, 1]);
    const { Q, cols } = orthonormalComplement([w], n);
    expect(cols).toBe(3);
    for (let a = 0; a < cols; a++) {
      let dot = 0;
      for (let i = 0; i < n; i++) dot += Q[i * cols + a] * w[i];
      expect(Math.abs(dot)).toBeLessThan(1e-14);
      for (let b = 0; b < cols; b++) {
        let g = 0;
        for (let i = 0; i < n; i++) g += Q[i * cols + a] * Q[i * cols + b];
        expect(Math.abs(g - (a === b ? 1 : 0))).toBeLessThan(1e-14);
      }
    }
    // −L·diag(1/C) with L a Laplacian: wᵀ A = 0, so one zero eigenvalue and the rest survive projection
    const L = [[2, -1, -1, 0], [-1, 2, 0, -1], [-1, 0, 1, 0], [0, -1, 0, 1]];
    const C = [1, 2, -3, 0.5];
    const A = Float64Array.from(L.flatMap((row) => row.map((v, j) => -v / C[j])));
    const full = mine(Array.from({ length: n }, (_, i) => Array.from(A.slice(i * n, i * n + n))));
    const reduced = eigenvalues(project(A, n, Q, cols), cols);
    const kept = full.filter((z) => Math.hypot(z.re, z.im) > 1e-9);
    expect(kept.length).toBe(3);
    expect(mismatch(Array.from({ length: cols }, (_, i) => ({ re: reduced.re[i], im: reduced.im[i] })), kept)).toBeLessThan(1e-12);
  });
});
