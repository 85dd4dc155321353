/**
 * Shift-and-invert Arnoldi: approximations of the eigenvalues of a large sparse matrix A nearest
 * a shift σ, from a factorisation of A − σI that the caller already has.
 *
 * The Arnoldi process builds an orthonormal basis V of the Krylov space of B = (A − σI)⁻¹
 * (modified Gram–Schmidt, twice: "twice is enough") and the upper Hessenberg matrix
 * H = VᵀBV; the eigenvalues μ of H (Ritz values) approximate B's largest ones, fastest those
 * well separated, and λ = σ + 1/μ those of A nearest σ. An optional projection keeps the
 * vectors in an invariant subspace of A (the states that conserve a group's gas), which takes
 * the conservation laws' zero eigenvalues out of the problem. The caller decides whether a Ritz
 * value is good enough (the rightmost-eigenvalue certificate in equilibria/rightmost.ts).
 *
 * References: Saad, Numerical Methods for Large Eigenvalue Problems, 2nd ed., SIAM 2011,
 * §6.2 (Arnoldi's method, Algorithm 6.2 with modified Gram–Schmidt) and §7.1 (shift-and-invert
 * spectral transformation; section numbers from memory); Golub & Van Loan, Matrix
 * Computations, 4th ed., §5.2.9 (reorthogonalisation).
 */
import { eigenvalues } from './eigen.js';

export interface RitzValues {
  /** Approximate eigenvalues of A (σ + 1/μ), as many as the Krylov space has dimensions. */
  re: Float64Array;
  im: Float64Array;
  /** Dimension of the Krylov space built (less than asked when it became invariant). */
  steps: number;
  /** False when the vectors were not finite or the small eigenvalue problem failed. */
  ok: boolean;
}

/** Deterministic pseudo-random numbers in [0, 1) (mulberry32): start vectors, search starts. */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

/**
 * Ritz values of A nearest σ from `steps` Arnoldi steps on (A − σI)⁻¹.
 * `solve(x)` overwrites x with (A − σI)⁻¹x; `project(x)`, when given, maps x into the invariant
 * subspace in which the eigenvalues are wanted.
 */
export function shiftInvertArnoldi(
  n: number, sigma: number, steps: number, solve: (x: Float64Array) => void,
  project?: (x: Float64Array) => void, seed = 20261205,
): RitzValues {
  const m = Math.max(1, Math.min(steps, n));
  const V: Float64Array[] = [];
  const H = new Float64Array((m + 1) * m); // (m+1)×m, row-major with row length m
  const rnd = seededRandom(seed);
  const v0 = new Float64Array(n);
  for (let i = 0; i < n; i++) v0[i] = 2 * rnd() - 1;
  project?.(v0);
  const n0 = Math.sqrt(dot(v0, v0));
  const fail: RitzValues = { re: new Float64Array(0), im: new Float64Array(0), steps: 0, ok: false };
  if (!(n0 > 0) || !Number.isFinite(n0)) return fail;
  for (let i = 0; i < n; i++) v0[i] /= n0;
  V.push(v0);
  let k = 0; // dimension reached
  for (let j = 0; j < m; j++) {
    const w = Float64Array.from(V[j]);
    solve(w);
    project?.(w);
    let scale = 0;
    for (let pass = 0; pass < 2; pass++) {
      for (let i = 0; i <= j; i++) {
        const h = dot(V[i], w);
        H[i * m + j] += h;
        for (let q = 0; q < n; q++) w[q] -= h * V[i][q];
      }
    }
    for (let i = 0; i <= j; i++) scale += Math.abs(H[i * m + j]);
    const beta = Math.sqrt(dot(w, w));
    if (!Number.isFinite(beta) || !Number.isFinite(scale)) return fail;
    k = j + 1;
    if (j + 1 < m) H[(j + 1) * m + j] = beta;
    if (beta <= 1e-14 * scale) break; // an invariant subspace: its Ritz values are exact
    if (j + 1 === m) break;
    for (let q = 0; q < n; q++) w[q] /= beta;
    V.push(w);
  }
  const Hk = new Float64Array(k * k);
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) Hk[i * k + j] = H[i * m + j];
  const ev = eigenvalues(Hk, k);
  if (!ev.ok) return fail;
  const re = new Float64Array(k);
  const im = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    const a = ev.re[i], b = ev.im[i];
    const r2 = a * a + b * b;
    // μ = 0 is no eigenvalue of an inverse: an unconverged direction, sent far to the left
    re[i] = r2 > 0 ? sigma + a / r2 : Number.NEGATIVE_INFINITY;
    im[i] = r2 > 0 ? -b / r2 : 0;
  }
  return { re, im, steps: k, ok: true };
}
