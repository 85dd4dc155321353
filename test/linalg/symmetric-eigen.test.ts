/** Cyclic Jacobi (Golub & Van Loan, Matrix Computations, 4th ed., §8.5): A v = λ v, orthonormal V, known spectra. */
import { describe, expect, test } from 'vitest';
import { symmetricEigen } from '../../src/linalg/symmetric-eigen.js';

describe('symmetricEigen', () => {
  test('eigenpairs of a 3×3 symmetric matrix satisfy A v = λ v with orthonormal vectors, ascending', () => {
    const a = [4, 1, 2, 1, 3, 0, 2, 0, 5];
    const { values, vectors } = symmetricEigen(a, 3);
    for (let k = 0; k < 3; k++) {
      for (let i = 0; i < 3; i++) {
        let s = 0;
        for (let j = 0; j < 3; j++) s += a[i * 3 + j] * vectors[j * 3 + k];
        expect(s).toBeCloseTo(values[k] * vectors[i * 3 + k], 12);
      }
      for (let l = 0; l < 3; l++) {
        let d = 0;
        for (let i = 0; i < 3; i++) d += vectors[i * 3 + k] * vectors[i * 3 + l];
        expect(d).toBeCloseTo(k === l ? 1 : 0, 12);
      }
    }
    expect(values[0]).toBeLessThan(values[1]);
    expect(values[1]).toBeLessThan(values[2]);
    // trace and determinant are invariants: 12 and 4·15 − 1·5 + 2·(−6) = 43
    expect(values[0] + values[1] + values[2]).toBeCloseTo(12, 12);
    expect(values[0] * values[1] * values[2]).toBeCloseTo(43, 10);
  });

  test('a nearly singular normal matrix: the small eigenvalue and its eigenvector (1, −1)/√2 are resolved', () => {
    // columns (1, 1) and (1, 1 + ε) of a sensitivity matrix: JᵀJ has eigenvalues ≈ 4 and ε²/4... (closed form of a 2×2)
    const e = 1e-5;
    const a = [2, 2 + e, 2 + e, 1 + (1 + e) ** 2];
    const { values, vectors } = symmetricEigen(a, 2);
    const tr = a[0] + a[3];
    const det = a[0] * a[3] - a[1] * a[2];
    const small = det / (0.5 * (tr + Math.sqrt(tr * tr - 4 * det)));
    expect(values[0] / small).toBeCloseTo(1, 5);
    expect(Math.abs(vectors[0]) / Math.abs(vectors[2])).toBeCloseTo(1, 4);
    expect(Math.sign(vectors[0])).toBe(-Math.sign(vectors[2]));
  });
});
