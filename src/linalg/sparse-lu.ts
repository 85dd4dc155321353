/**
 * Sparse LU factorisation with a fill-reducing order chosen once per pattern and static
 * (diagonal) pivots, for the iteration matrices (1/(hγ))·I − J of the stiff integrator.
 *
 * Analysis, once per pattern: minimum degree order of A + Aᵀ and the symbolic factorisation it
 * implies (sparse-ordering.ts); the factors are stored in one CSR array in pivot order, L (unit,
 * strictly lower) and U (upper, diagonal included) side by side. Numeric factorisation, every
 * step: row-oriented Gaussian elimination (the IKJ variant) inside that fixed structure, which
 * is closed under elimination, so nothing allocates.
 *
 * Why static pivots. The mass rows of a network jacobian have columns summing to zero
 * (mass conservation: every flow leaves one slot and enters another) with a negative diagonal
 * and non-negative off-diagonal entries wherever the chambers have positive capacitance, so
 * c·I − J (c > 0) is strictly column diagonally dominant; Gaussian elimination without row
 * exchanges is then stable (growth factor at most 2; Golub & Van Loan, 4th ed., §3.4.10,
 * Theorem 3.4.3 and the remark on diagonal dominance). Temperature rows and chambers past a
 * pressure maximum (negative capacitance) break that property, so each factorisation is
 * guarded: a pivot below PIVOT_TOL times the largest entry of its row, a row whose entries grow
 * by more than GROWTH_LIMIT, or a non-finite value makes `factor` return false, and the caller
 * falls back (dense partial pivoting for moderate sizes, else a smaller step, which raises c
 * and restores dominance).
 *
 * References: Duff, Erisman & Reid, Direct Methods for Sparse Matrices, 2nd ed., OUP 2017,
 * ch. 10 (analyse/factorise/solve phases, static pivoting) and §7 (minimum degree); Saad,
 * Iterative Methods for Sparse Linear Systems, 2nd ed., 2003, Algorithm 10.1 (IKJ Gaussian
 * elimination in CSR, there for ILU with the full fill pattern giving exact LU); Golub &
 * Van Loan, Matrix Computations, 4th ed., §3.4.10 (diagonal dominance and pivoting).
 */
import { minimumDegreeOrder, naturalOrder, type EliminationOrder } from './sparse-ordering.js';
import { patternSize, type SparsePattern } from './sparse-pattern.js';

/** A pivot at most this fraction of its row's largest entry counts as zero. */
const PIVOT_TOL = 1e-13;
/** Largest accepted ratio of a row of U to the same row of the matrix (element growth). */
const GROWTH_LIMIT = 1e8;

export type SparseOrdering = 'minimum-degree' | 'natural';

/** The analysis of a pattern: order and factor structure, shareable by any number of SparseLu. */
export interface SparseSymbolic {
  pattern: SparsePattern;
  order: EliminationOrder;
  /** Factor rows in pivot order: colIdx[rowPtr[k] .. rowPtr[k+1]−1], L part, diagonal, U part. */
  rowPtr: Int32Array;
  col: Int32Array;
  /** Position of each pivot (diagonal entry) in the factor arrays. */
  diag: Int32Array;
  /** Position in the factor arrays of each entry of A (in A's CSR order). */
  aToF: Int32Array;
}

/** Orders the pattern and computes the structure of its LU factors (no numbers involved). */
export function analyseSparse(pattern: SparsePattern, ordering: SparseOrdering = 'minimum-degree'): SparseSymbolic {
  const n = pattern.n;
  const order = ordering === 'natural' ? naturalOrder(pattern) : minimumDegreeOrder(pattern);
  const { upperPtr, upper, iperm } = order;
  // Row k of the factors: L columns {i < k : k ∈ upper(i)}, then k, then upper(k).
  const lCount = new Int32Array(n);
  for (let i = 0; i < n; i++) for (let q = upperPtr[i]; q < upperPtr[i + 1]; q++) lCount[upper[q]]++;
  const rowPtr = new Int32Array(n + 1);
  for (let k = 0; k < n; k++) rowPtr[k + 1] = rowPtr[k] + lCount[k] + 1 + (upperPtr[k + 1] - upperPtr[k]);
  const col = new Int32Array(rowPtr[n]);
  const diag = new Int32Array(n);
  const next = rowPtr.slice(0, n);
  // L parts in ascending column order: visit pivots i ascending and append i to each row k.
  for (let i = 0; i < n; i++) for (let q = upperPtr[i]; q < upperPtr[i + 1]; q++) col[next[upper[q]]++] = i;
  for (let k = 0; k < n; k++) {
    diag[k] = next[k];
    col[next[k]++] = k;
    for (let q = upperPtr[k]; q < upperPtr[k + 1]; q++) col[next[k]++] = upper[q];
  }
  const aToF = new Int32Array(patternSize(pattern));
  const pos = new Int32Array(n).fill(-1);
  for (let r = 0; r < n; r++) {
    const k = iperm[r];
    for (let q = rowPtr[k]; q < rowPtr[k + 1]; q++) pos[col[q]] = q;
    for (let a = pattern.rowPtr[r]; a < pattern.rowPtr[r + 1]; a++) {
      const at = pos[iperm[pattern.colIdx[a]]];
      if (at < 0) throw new Error('analyseSparse: entry of A missing from the symbolic factors (internal error)');
      aToF[a] = at;
    }
    for (let q = rowPtr[k]; q < rowPtr[k + 1]; q++) pos[col[q]] = -1;
  }
  return { pattern, order, rowPtr, col, diag, aToF };
}

export class SparseLu {
  readonly n: number;
  /** Entries of A's pattern. */
  readonly nnz: number;
  /** Entries stored for L + U (fill included). */
  readonly nnzFactor: number;
  readonly symbolic: SparseSymbolic;
  private readonly rowPtr: Int32Array;
  private readonly col: Int32Array;
  private readonly diag: Int32Array;
  private readonly aToF: Int32Array;
  private readonly f: Float64Array;
  /** Scatter map of the row being eliminated: column (pivot order) → position in f. */
  private readonly loc: Int32Array;
  /** Largest magnitude in each row of M before elimination (pivot and growth tests). */
  private readonly rowMax: Float64Array;
  /** Work vector of `solve`, in pivot order. */
  private readonly z: Float64Array;
  private ok = false;

  /** From a pattern (analysed here) or from an analysis shared with other factorisations. */
  constructor(from: SparsePattern | SparseSymbolic, ordering: SparseOrdering = 'minimum-degree') {
    const sym = (this.symbolic = 'order' in from ? from : analyseSparse(from, ordering));
    const n = (this.n = sym.pattern.n);
    this.nnz = patternSize(sym.pattern);
    this.rowPtr = sym.rowPtr;
    this.col = sym.col;
    this.diag = sym.diag;
    this.aToF = sym.aToF;
    this.nnzFactor = sym.rowPtr[n];
    this.f = new Float64Array(this.nnzFactor);
    this.loc = new Int32Array(n);
    this.rowMax = new Float64Array(n);
    this.z = new Float64Array(n);
  }

  /**
   * Factorises M = scale·A + shift·I, A given by its values in the pattern's order. Returns
   * false, without throwing, when a pivot is (relatively) zero, a row grows too much, or a value
   * is not finite; `solve` must not be called then.
   */
  factor(values: Float64Array, shift = 0, scale = 1): boolean {
    const { n, rowPtr, col, diag, f, aToF, loc, rowMax } = this;
    this.ok = false;
    f.fill(0);
    for (let a = 0; a < aToF.length; a++) f[aToF[a]] = scale * values[a];
    if (shift !== 0) for (let k = 0; k < n; k++) f[diag[k]] += shift;
    for (let k = 0; k < n; k++) {
      let m = 0;
      for (let q = rowPtr[k]; q < rowPtr[k + 1]; q++) {
        const v = Math.abs(f[q]);
        if (!(v <= m)) m = v; // NaN propagates into m
      }
      rowMax[k] = m;
    }
    for (let i = 0; i < n; i++) {
      const start = rowPtr[i], end = rowPtr[i + 1], di = diag[i];
      for (let q = start; q < end; q++) loc[col[q]] = q;
      for (let q = start; q < di; q++) {
        const k = col[q];
        const l = f[q] / f[diag[k]];
        f[q] = l;
        if (l === 0) continue;
        for (let r = diag[k] + 1; r < rowPtr[k + 1]; r++) f[loc[col[r]]] -= l * f[r];
      }
      const piv = f[di];
      const m = rowMax[i];
      if (!(Math.abs(piv) > PIVOT_TOL * m) || !Number.isFinite(piv) || !Number.isFinite(m)) return false;
      for (let q = di + 1; q < end; q++) {
        const v = Math.abs(f[q]);
        if (!(v <= GROWTH_LIMIT * m)) return false;
      }
      if (!(Math.abs(piv) <= GROWTH_LIMIT * m)) return false;
    }
    for (let q = 0; q < f.length; q++) if (!Number.isFinite(f[q])) return false;
    this.ok = true;
    return true;
  }

  /**
   * Pivots below zero in the last successful `factor`. Without row exchanges the pivots are the
   * ratios of leading principal minors of the symmetrically permuted matrix, so for a matrix
   * diagonally similar to a symmetric one this is the number of its negative eigenvalues
   * (Sylvester's law of inertia; Golub & Van Loan, 4th ed., §8.1.1 and §4.1.2 on LDLᵀ).
   */
  negativePivots(): number {
    if (!this.ok) throw new Error('SparseLu.negativePivots called without a successful factor()');
    let count = 0;
    for (let k = 0; k < this.n; k++) if (this.f[this.diag[k]] < 0) count++;
    return count;
  }

  /** Solves M x = b in place (b becomes x) with the factors of the last successful `factor`. */
  solve(b: Float64Array): void {
    if (!this.ok) throw new Error('SparseLu.solve called without a successful factor()');
    const { n, rowPtr, col, diag, f, z } = this;
    const perm = this.symbolic.order.perm;
    for (let k = 0; k < n; k++) z[k] = b[perm[k]];
    for (let i = 0; i < n; i++) {
      let s = z[i];
      for (let q = rowPtr[i]; q < diag[i]; q++) s -= f[q] * z[col[q]];
      z[i] = s;
    }
    for (let i = n - 1; i >= 0; i--) {
      let s = z[i];
      const di = diag[i];
      for (let q = di + 1; q < rowPtr[i + 1]; q++) s -= f[q] * z[col[q]];
      z[i] = s / f[di];
    }
    for (let k = 0; k < n; k++) b[perm[k]] = z[k];
  }
}
