/**
 * Eigenvalues and eigenvectors of a small dense symmetric matrix by the cyclic Jacobi method:
 * plane rotations chosen to annihilate each off-diagonal entry in turn, sweeps repeated until
 * the off-diagonal mass is negligible. Quadratically convergent, accurate for small
 * eigenvalues relative to the matrix norm, and short; meant for n up to a few dozen (the
 * normal matrix of a calibration).
 *
 * References: Golub & Van Loan, Matrix Computations, 4th ed., §8.5 (the symmetric Jacobi
 * method; sym.schur2 rotation); Press et al., Numerical Recipes, 3rd ed., §11.1.
 */

const MAX_SWEEPS = 60;

/** Eigenvalues ascending, and the eigenvectors as columns of V (row-major, V[i*n + k] for value k). */
export function symmetricEigen(a: ArrayLike<number>, n: number): { values: Float64Array; vectors: Float64Array } {
  const A = Float64Array.from(a as ArrayLike<number>);
  const V = new Float64Array(n * n);
  for (let i = 0; i < n; i++) V[i * n + i] = 1;
  for (let sweep = 0; sweep < MAX_SWEEPS; sweep++) {
    let off = 0;
    let total = 0;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) { const x = A[i * n + j] ** 2; total += x; if (i !== j) off += x; }
    if (off <= 1e-30 * total || off === 0) break;
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = A[p * n + q];
        if (apq === 0) continue;
        // sym.schur2: c, s with [c s; −s c]ᵀ [app apq; apq aqq] [c s; −s c] diagonal
        const tau = (A[q * n + q] - A[p * n + p]) / (2 * apq);
        const t = (tau >= 0 ? 1 : -1) / (Math.abs(tau) + Math.sqrt(1 + tau * tau));
        const c = 1 / Math.sqrt(1 + t * t);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const akp = A[k * n + p];
          const akq = A[k * n + q];
          A[k * n + p] = c * akp - s * akq;
          A[k * n + q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const apk = A[p * n + k];
          const aqk = A[q * n + k];
          A[p * n + k] = c * apk - s * aqk;
          A[q * n + k] = s * apk + c * aqk;
        }
        for (let k = 0; k < n; k++) {
          const vkp = V[k * n + p];
          const vkq = V[k * n + q];
          V[k * n + p] = c * vkp - s * vkq;
          V[k * n + q] = s * vkp + c * vkq;
        }
      }
    }
  }
  const order = Array.from({ length: n }, (_, i) => i).sort((i, j) => A[i * n + i] - A[j * n + j]);
  const values = Float64Array.from(order, (i) => A[i * n + i]);
  const vectors = new Float64Array(n * n);
  order.forEach((src, k) => { for (let i = 0; i < n; i++) vectors[i * n + k] = V[i * n + src]; });
  return { values, vectors };
}
