/**
 * Sparsity patterns in compressed sparse row form (CSR): the positions of the entries that may
 * be nonzero, with the values kept elsewhere in a Float64Array of the same order. A pattern is
 * built once (at assembly) and shared by the jacobian, the colouring and the sparse LU.
 *
 * References: Saad, Iterative Methods for Sparse Linear Systems, 2nd ed., SIAM 2003, §3.4
 * (storage schemes, CSR).
 */

/** Row i's entries are colIdx[rowPtr[i] .. rowPtr[i+1]−1], columns ascending, no duplicates. */
export interface SparsePattern {
  n: number;
  rowPtr: Int32Array;
  colIdx: Int32Array;
}

/**
 * The pattern of an n×n matrix from coordinate pairs (rows[k], cols[k]), duplicates merged,
 * with every diagonal entry added (the iteration matrix of a stiff solver always has one).
 */
export function patternFromEntries(n: number, rows: ArrayLike<number>, cols: ArrayLike<number>): SparsePattern {
  if (rows.length !== cols.length) throw new RangeError('patternFromEntries: rows and cols differ in length');
  const count = new Int32Array(n + 1);
  for (let k = 0; k < rows.length; k++) {
    const i = rows[k], j = cols[k];
    if (!(i >= 0 && i < n && j >= 0 && j < n) || !Number.isInteger(i) || !Number.isInteger(j)) {
      throw new RangeError(`patternFromEntries: entry (${i}, ${j}) outside a ${n}×${n} matrix`);
    }
    count[i + 1]++;
  }
  for (let i = 0; i < n; i++) count[i + 1]++; // the diagonal
  for (let i = 0; i < n; i++) count[i + 1] += count[i];
  const fill = count.slice(0, n);
  const raw = new Int32Array(count[n]);
  for (let i = 0; i < n; i++) raw[fill[i]++] = i;
  for (let k = 0; k < rows.length; k++) raw[fill[rows[k]]++] = cols[k];
  // sort and deduplicate each row
  const rowPtr = new Int32Array(n + 1);
  let out = 0;
  for (let i = 0; i < n; i++) {
    const lo = count[i], hi = count[i + 1];
    if (hi - lo > 16) raw.subarray(lo, hi).sort();
    else {
      // insertion sort: rows of a network jacobian are short, and a call to sort costs more
      for (let k = lo + 1; k < hi; k++) {
        const x = raw[k];
        let m = k - 1;
        while (m >= lo && raw[m] > x) { raw[m + 1] = raw[m]; m--; }
        raw[m + 1] = x;
      }
    }
    rowPtr[i] = out;
    for (let k = lo; k < hi; k++) {
      if (k === lo || raw[k] !== raw[k - 1]) raw[out++] = raw[k];
    }
  }
  rowPtr[n] = out;
  return { n, rowPtr, colIdx: raw.slice(0, out) };
}

/** Index of entry (i, j) in the value array, or −1 when it is not in the pattern. */
export function patternIndex(p: SparsePattern, i: number, j: number): number {
  let lo = p.rowPtr[i];
  let hi = p.rowPtr[i + 1] - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const c = p.colIdx[mid];
    if (c === j) return mid;
    if (c < j) lo = mid + 1; else hi = mid - 1;
  }
  return -1;
}

/** Number of stored entries. */
export function patternSize(p: SparsePattern): number {
  return p.rowPtr[p.n];
}

/** y = A·x for the matrix with pattern p and values v. */
export function sparseMultiply(p: SparsePattern, v: Float64Array, x: Float64Array, y: Float64Array): void {
  const { n, rowPtr, colIdx } = p;
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) s += v[k] * x[colIdx[k]];
    y[i] = s;
  }
}

/** Writes the matrix (p, v) into a dense row-major n×n array (zeros elsewhere). */
export function scatterDense(p: SparsePattern, v: Float64Array, dense: Float64Array): void {
  const { n, rowPtr, colIdx } = p;
  dense.fill(0, 0, n * n);
  for (let i = 0; i < n; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) dense[i * n + colIdx[k]] = v[k];
  }
}

/**
 * The column view of a pattern (CSC): for column j, colPtr[j] .. colPtr[j+1]−1 index rowIdx
 * (rows ascending) and `entry`, the position of that entry in the CSR value array.
 */
export function transposePattern(p: SparsePattern): { colPtr: Int32Array; rowIdx: Int32Array; entry: Int32Array } {
  const { n, rowPtr, colIdx } = p;
  const nnz = rowPtr[n];
  const colPtr = new Int32Array(n + 1);
  for (let k = 0; k < nnz; k++) colPtr[colIdx[k] + 1]++;
  for (let j = 0; j < n; j++) colPtr[j + 1] += colPtr[j];
  const next = colPtr.slice(0, n);
  const rowIdx = new Int32Array(nnz);
  const entry = new Int32Array(nnz);
  for (let i = 0; i < n; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const at = next[colIdx[k]]++;
      rowIdx[at] = i;
      entry[at] = k;
    }
  }
  return { colPtr, rowIdx, entry };
}
