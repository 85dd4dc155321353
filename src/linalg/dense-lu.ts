/**
 * Dense LU factorisation with partial (row) pivoting, for the small full iteration matrices of
 * the stiff integrator. Row-major storage, A[i*n+j]. After construction nothing allocates.
 *
 * References: Golub & Van Loan, Matrix Computations, 4th ed., §3.4 (Gaussian elimination with
 * partial pivoting) and §3.1 (forward and back substitution); algorithm numbers below from
 * memory.
 */

export class DenseLu {
  readonly n: number;
  /** pivots[k] = row swapped with row k at elimination step k (LAPACK ipiv convention, 0-based). */
  readonly pivots: Int32Array;
  private lu: Float64Array | null = null;

  constructor(n: number) {
    this.n = n;
    this.pivots = new Int32Array(n);
  }

  /**
   * Overwrites `a` (n×n, row-major) with its factors: unit lower L below the diagonal, U on and
   * above it. Returns false, without throwing, when a pivot is exactly zero or any entry is
   * non-finite; `a` is then left partly eliminated and `solve` must not be called.
   *
   * References: Golub & Van Loan, Matrix Computations, 4th ed., Algorithm 3.4.1.
   */
  factor(a: Float64Array): boolean {
    const n = this.n;
    if (a.length < n * n) throw new RangeError(`DenseLu.factor: need ${n * n} entries, got ${a.length}`);
    this.lu = null;
    for (let k = 0; k < n; k++) {
      let p = k;
      let big = Math.abs(a[k * n + k]);
      for (let i = k + 1; i < n; i++) {
        const v = Math.abs(a[i * n + k]);
        if (v > big) { big = v; p = i; }
      }
      // NaN never compares greater, so a NaN column also ends here with big NaN or 0.
      if (!(big > 0) || !Number.isFinite(big)) return false;
      this.pivots[k] = p;
      if (p !== k) {
        for (let j = 0; j < n; j++) {
          const t = a[k * n + j];
          a[k * n + j] = a[p * n + j];
          a[p * n + j] = t;
        }
      }
      const inv = 1 / a[k * n + k];
      for (let i = k + 1; i < n; i++) {
        const l = a[i * n + k] * inv;
        a[i * n + k] = l;
        if (l === 0) continue;
        for (let j = k + 1; j < n; j++) a[i * n + j] -= l * a[k * n + j];
      }
    }
    // Entries right of the last pivot column are never inspected above; check U and L once.
    for (let i = 0; i < n * n; i++) if (!Number.isFinite(a[i])) return false;
    this.lu = a;
    return true;
  }

  /**
   * Solves A x = b in place (b becomes x) with the factors of the last successful `factor`.
   *
   * References: Golub & Van Loan, Matrix Computations, 4th ed., Algorithms 3.1.1, 3.1.2.
   */
  solve(b: Float64Array): void {
    const a = this.lu;
    if (a === null) throw new Error('DenseLu.solve called without a successful factor()');
    const n = this.n;
    for (let k = 0; k < n; k++) {
      const p = this.pivots[k];
      if (p !== k) { const t = b[k]; b[k] = b[p]; b[p] = t; }
    }
    for (let i = 1; i < n; i++) {
      let s = b[i];
      for (let j = 0; j < i; j++) s -= a[i * n + j] * b[j];
      b[i] = s;
    }
    for (let i = n - 1; i >= 0; i--) {
      let s = b[i];
      for (let j = i + 1; j < n; j++) s -= a[i * n + j] * b[j];
      b[i] = s / a[i * n + i];
    }
  }
}
