// Sparse LU with a minimum degree order and static pivots, against dense LU with partial
// pivoting. Sources: Golub & Van Loan, Matrix Computations, 4th ed., §3.4.10 (Gaussian
// elimination without pivoting is stable for diagonally dominant matrices) and §3.5 (backward
// error: a computed solution's residual is of order eps·‖A‖·‖x‖); George & Liu, SIAM Review 31
// (1989) 1 (minimum degree: no fill on trees).
import { describe, expect, it } from 'vitest';
import { DenseLu } from '../../src/linalg/dense-lu.js';
import { analyseSparse, SparseLu } from '../../src/linalg/sparse-lu.js';
import { minimumDegreeOrder } from '../../src/linalg/sparse-ordering.js';
import { patternFromEntries, patternIndex, patternSize, scatterDense, sparseMultiply, transposePattern, type SparsePattern } from '../../src/linalg/sparse-pattern.js';

/** Deterministic pseudo-random numbers in [-1, 1) (a 32-bit LCG; common practice for tests). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 31 - 1;
  };
}

/** A random sparse pattern: about `perRow` off-diagonal entries a row, not symmetric. */
function randomPattern(n: number, perRow: number, rnd: () => number): SparsePattern {
  const rows: number[] = [];
  const cols: number[] = [];
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < perRow; k++) {
      rows.push(i);
      cols.push(Math.floor(((rnd() + 1) / 2) * n) % n);
    }
  }
  return patternFromEntries(n, rows, cols);
}

/** Values for p; `dominance` > 1 makes every row and column strictly diagonally dominant. */
function randomValues(p: SparsePattern, rnd: () => number, dominance: number): Float64Array {
  const v = new Float64Array(patternSize(p));
  const rowSum = new Float64Array(p.n);
  const colSum = new Float64Array(p.n);
  for (let i = 0; i < p.n; i++) {
    for (let k = p.rowPtr[i]; k < p.rowPtr[i + 1]; k++) {
      const j = p.colIdx[k];
      if (j === i) continue;
      v[k] = rnd();
      rowSum[i] += Math.abs(v[k]);
      colSum[j] += Math.abs(v[k]);
    }
  }
  for (let i = 0; i < p.n; i++) {
    const d = patternIndex(p, i, i);
    const sign = rnd() < 0 ? -1 : 1;
    v[d] = dominance > 0 ? sign * (dominance * Math.max(rowSum[i], colSum[i]) + 0.1) : sign * (0.5 + Math.abs(rnd()));
  }
  return v;
}

function denseSolve(p: SparsePattern, v: Float64Array, b: Float64Array): Float64Array {
  const A = new Float64Array(p.n * p.n);
  scatterDense(p, v, A);
  const lu = new DenseLu(p.n);
  expect(lu.factor(A)).toBe(true);
  const x = Float64Array.from(b);
  lu.solve(x);
  return x;
}

function maxAbs(v: Float64Array): number {
  let m = 0;
  for (const x of v) m = Math.max(m, Math.abs(x));
  return m;
}

describe('sparse patterns (CSR)', () => {
  it('merges duplicates, sorts columns and always holds the diagonal', () => {
    const p = patternFromEntries(4, [2, 0, 2, 2, 3], [1, 3, 1, 0, 3]);
    expect(Array.from(p.rowPtr)).toEqual([0, 2, 3, 6, 7]);
    expect(Array.from(p.colIdx)).toEqual([0, 3, 1, 0, 1, 2, 3]);
    expect(patternIndex(p, 2, 1)).toBe(4);
    expect(patternIndex(p, 1, 0)).toBe(-1);
    const t = transposePattern(p);
    // column 1 holds rows 1 and 2
    expect(Array.from(t.rowIdx.subarray(t.colPtr[1], t.colPtr[2]))).toEqual([1, 2]);
    expect(() => patternFromEntries(2, [0], [2])).toThrow(RangeError);
  });
});

describe('SparseLu against dense LU (Golub & Van Loan §3.4.10, §3.5)', () => {
  it('solves random sparse diagonally dominant systems like dense LU, to 1e-12', () => {
    const rnd = lcg(2024);
    for (const n of [1, 2, 5, 17, 60, 200]) {
      for (let trial = 0; trial < 4; trial++) {
        const p = randomPattern(n, 3, rnd);
        const v = randomValues(p, rnd, 1.2);
        const x = Float64Array.from({ length: n }, () => rnd() * 10);
        const b = new Float64Array(n);
        sparseMultiply(p, v, x, b);
        const lu = new SparseLu(p);
        expect(lu.factor(v)).toBe(true);
        const got = Float64Array.from(b);
        lu.solve(got);
        const ref = denseSolve(p, v, b);
        for (let i = 0; i < n; i++) {
          expect(Math.abs(got[i] - x[i])).toBeLessThan(1e-12 * Math.max(1, maxAbs(x)));
          expect(Math.abs(got[i] - ref[i])).toBeLessThan(1e-12 * Math.max(1, maxAbs(x)));
        }
      }
    }
  });

  it('general (not dominant) sparse systems: when it accepts its static pivots, the residual is at round-off; it never returns garbage', () => {
    const rnd = lcg(77);
    let accepted = 0;
    for (let trial = 0; trial < 40; trial++) {
      const n = 10 + (trial % 7) * 13;
      const p = randomPattern(n, 4, rnd);
      const v = randomValues(p, rnd, 0);
      const b = Float64Array.from({ length: n }, () => rnd());
      const lu = new SparseLu(p);
      if (!lu.factor(v)) continue;
      accepted++;
      const x = Float64Array.from(b);
      lu.solve(x);
      const r = new Float64Array(n);
      sparseMultiply(p, v, x, r);
      for (let i = 0; i < n; i++) r[i] -= b[i];
      expect(maxAbs(r)).toBeLessThan(1e-9 * Math.max(1, maxAbs(v) * maxAbs(x)));
    }
    expect(accepted).toBeGreaterThan(10);
  });

  it('factorises c·I − J through the shift and scale arguments', () => {
    const rnd = lcg(5);
    const n = 30;
    const p = randomPattern(n, 3, rnd);
    const J = randomValues(p, rnd, 0);
    const c = 7.5;
    const E = J.map((x) => -x);
    for (let i = 0; i < n; i++) E[patternIndex(p, i, i)] += c;
    const b = Float64Array.from({ length: n }, () => rnd());
    const a = new SparseLu(p);
    const ok = a.factor(J, c, -1);
    const ref = new SparseLu(p);
    expect(ref.factor(E)).toBe(ok);
    if (ok) {
      const x1 = Float64Array.from(b), x2 = Float64Array.from(b);
      a.solve(x1);
      ref.solve(x2);
      for (let i = 0; i < n; i++) expect(x1[i]).toBeCloseTo(x2[i], 12);
    }
  });

  it('reports singular matrices: a zero row, two equal rows, a non-finite entry', () => {
    const p = patternFromEntries(3, [0, 0, 1, 1, 2, 2], [1, 2, 0, 2, 0, 1]);
    const set = (entries: [number, number, number][]): Float64Array => {
      const v = new Float64Array(patternSize(p));
      for (const [i, j, x] of entries) v[patternIndex(p, i, j)] = x;
      return v;
    };
    const lu = new SparseLu(p);
    expect(lu.factor(set([[0, 0, 1], [0, 1, 2], [2, 2, 3]]))).toBe(false); // row 1 is zero
    expect(lu.factor(set([[0, 0, 1], [0, 1, 2], [0, 2, 3], [1, 0, 1], [1, 1, 2], [1, 2, 3], [2, 2, 1]]))).toBe(false);
    expect(lu.factor(set([[0, 0, 1], [1, 1, Number.NaN], [2, 2, 1]]))).toBe(false);
    expect(() => lu.solve(new Float64Array(3))).toThrow();
    expect(lu.factor(set([[0, 0, 2], [1, 1, 3], [2, 2, 4], [0, 1, 1]]))).toBe(true);
  });
});

describe('minimum degree order (George & Liu 1989)', () => {
  const chain = (n: number): SparsePattern => {
    const r: number[] = [], c: number[] = [];
    for (let i = 0; i + 1 < n; i++) { r.push(i, i + 1); c.push(i + 1, i); }
    return patternFromEntries(n, r, c);
  };
  const star = (n: number): SparsePattern => {
    const r: number[] = [], c: number[] = [];
    for (let i = 1; i < n; i++) { r.push(0, i); c.push(i, 0); }
    return patternFromEntries(n, r, c);
  };

  it('creates no fill on a chain and on a star (trees), and pivots the hub of a star among the last two', () => {
    for (const p of [chain(50), star(50)]) {
      const s = analyseSparse(p);
      expect(s.rowPtr[p.n]).toBe(patternSize(p));
    }
    // after the other leaves the hub and the last leaf both have degree 1
    expect(Array.from(minimumDegreeOrder(star(50)).perm.subarray(48))).toContain(0);
  });

  it('the natural order on a star fills the whole matrix, the minimum degree order does not', () => {
    const p = star(40);
    expect(analyseSparse(p, 'natural').rowPtr[40]).toBe(40 * 40);
    expect(analyseSparse(p).rowPtr[40]).toBe(patternSize(p));
  });

  it('is a permutation with its inverse', () => {
    const p = randomPattern(120, 3, lcg(9));
    const o = minimumDegreeOrder(p);
    const seen = new Set(o.perm);
    expect(seen.size).toBe(120);
    for (let k = 0; k < 120; k++) expect(o.iperm[o.perm[k]]).toBe(k);
  });
});
