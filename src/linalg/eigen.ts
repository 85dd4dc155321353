/**
 * Eigenvalues of a small dense real nonsymmetric matrix (the linearised network around an
 * equilibrium), and an orthonormal basis of the complement of a few vectors (used to remove
 * the zero modes that conservation laws create).
 *
 * Method: balancing (diagonal similarity by powers of 2, so no rounding), reduction to upper
 * Hessenberg form by Householder reflections, then the implicitly double-shifted (Francis) QR
 * iteration with deflation on negligible subdiagonal entries and exceptional shifts after 10
 * and 20 iterations without deflation. Eigenvalues come out of the 1×1 and 2×2 diagonal
 * blocks of the real Schur form. Cost O(n³); meant for n up to a few hundred.
 *
 * References: Golub & Van Loan, Matrix Computations, 4th ed., §7.4.2–7.4.3 (Householder
 * reduction to Hessenberg form), §7.5.5–7.5.6 (Francis double-shift QR step and the practical
 * QR algorithm), §7.5.7 (balancing; algorithm numbers from memory); Parlett & Reinsch, Numer.
 * Math. 13 (1969) 293 (balancing); Press et al., Numerical Recipes, 3rd ed., §11.6–11.7
 * (balanc, hqr: the deflation test and exceptional shift constants 0.75 and −0.4375).
 */

/** Iterations allowed per eigenvalue before the QR iteration is declared failed. */
const MAX_ITS = 60;
const RADIX = 2;

export interface Eigenvalues {
  re: Float64Array;
  im: Float64Array;
  /** False when the QR iteration did not converge or the matrix was not finite. */
  ok: boolean;
}

/** Diagonal similarity D⁻¹AD with D a power of 2 per row/column, so row and column norms match. */
function balance(a: Float64Array, n: number): void {
  const sq = RADIX * RADIX;
  let done = false;
  while (!done) {
    done = true;
    for (let i = 0; i < n; i++) {
      let r = 0;
      let c = 0;
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        c += Math.abs(a[j * n + i]);
        r += Math.abs(a[i * n + j]);
      }
      if (c === 0 || r === 0) continue;
      let g = r / RADIX;
      let f = 1;
      const s = c + r;
      while (c < g) { f *= RADIX; c *= sq; }
      g = r * RADIX;
      while (c > g) { f /= RADIX; c /= sq; }
      if ((c + r) / f < 0.95 * s) {
        done = false;
        const gi = 1 / f;
        for (let j = 0; j < n; j++) a[i * n + j] *= gi;
        for (let j = 0; j < n; j++) a[j * n + i] *= f;
      }
    }
  }
}

/** Householder reduction to upper Hessenberg form, in place (Golub & Van Loan §7.4.3). */
function hessenberg(a: Float64Array, n: number): void {
  const v = new Float64Array(n);
  for (let k = 0; k < n - 2; k++) {
    let scale = 0;
    for (let i = k + 1; i < n; i++) scale += Math.abs(a[i * n + k]);
    if (scale === 0) continue;
    let h = 0;
    for (let i = k + 1; i < n; i++) {
      v[i] = a[i * n + k] / scale;
      h += v[i] * v[i];
    }
    const g = v[k + 1] >= 0 ? -Math.sqrt(h) : Math.sqrt(h);
    h -= v[k + 1] * g;        // = ½‖v − g e1‖², the reflector's normalisation
    v[k + 1] -= g;
    // A ← (I − v vᵀ/h) A on rows k+1..n−1
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let i = k + 1; i < n; i++) s += v[i] * a[i * n + j];
      s /= h;
      for (let i = k + 1; i < n; i++) a[i * n + j] -= s * v[i];
    }
    // A ← A (I − v vᵀ/h) on columns k+1..n−1
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let j = k + 1; j < n; j++) s += a[i * n + j] * v[j];
      s /= h;
      for (let j = k + 1; j < n; j++) a[i * n + j] -= s * v[j];
    }
    for (let i = k + 2; i < n; i++) a[i * n + k] = 0;
  }
}

/**
 * Francis double-shift QR on an upper Hessenberg matrix (1-based indexing through `at`), after
 * the structure of EISPACK hqr. Writes the eigenvalues into wr, wi (0-based).
 */
function hqr(h: Float64Array, n: number, wr: Float64Array, wi: Float64Array): boolean {
  const A = (i: number, j: number): number => h[(i - 1) * n + (j - 1)];
  const S = (i: number, j: number, v: number): void => { h[(i - 1) * n + (j - 1)] = v; };
  let anorm = 0;
  for (let i = 1; i <= n; i++) for (let j = Math.max(i - 1, 1); j <= n; j++) anorm += Math.abs(A(i, j));
  let nn = n;
  let t = 0;
  let p = 0, q = 0, r = 0, s = 0, w = 0, x = 0, y = 0, z = 0;
  while (nn >= 1) {
    let its = 0;
    let l: number;
    do {
      for (l = nn; l >= 2; l--) {
        s = Math.abs(A(l - 1, l - 1)) + Math.abs(A(l, l));
        if (s === 0) s = anorm;
        if (Math.abs(A(l, l - 1)) + s === s) { S(l, l - 1, 0); break; }
      }
      x = A(nn, nn);
      if (l === nn) {                       // one root found
        wr[nn - 1] = x + t;
        wi[nn - 1] = 0;
        nn--;
      } else {
        y = A(nn - 1, nn - 1);
        w = A(nn, nn - 1) * A(nn - 1, nn);
        if (l === nn - 1) {                 // two roots from the trailing 2×2 block
          p = 0.5 * (y - x);
          q = p * p + w;
          z = Math.sqrt(Math.abs(q));
          x += t;
          if (q >= 0) {
            z = p + (p >= 0 ? Math.abs(z) : -Math.abs(z));
            wr[nn - 2] = wr[nn - 1] = x + z;
            if (z !== 0) wr[nn - 1] = x - w / z;
            wi[nn - 2] = wi[nn - 1] = 0;
          } else {
            wr[nn - 2] = wr[nn - 1] = x + p;
            wi[nn - 2] = -z;
            wi[nn - 1] = z;
          }
          nn -= 2;
        } else {
          if (its >= MAX_ITS) return false;
          if (its === 10 || its === 20 || its === 40) { // exceptional shift
            t += x;
            for (let i = 1; i <= nn; i++) S(i, i, A(i, i) - x);
            s = Math.abs(A(nn, nn - 1)) + Math.abs(A(nn - 1, nn - 2));
            y = x = 0.75 * s;
            w = -0.4375 * s * s;
          }
          its++;
          let m: number;
          for (m = nn - 2; m >= l; m--) {   // look for two consecutive small subdiagonals
            z = A(m, m);
            r = x - z;
            s = y - z;
            p = (r * s - w) / A(m + 1, m) + A(m, m + 1);
            q = A(m + 1, m + 1) - z - r - s;
            r = A(m + 2, m + 1);
            s = Math.abs(p) + Math.abs(q) + Math.abs(r);
            p /= s; q /= s; r /= s;
            if (m === l) break;
            const u = Math.abs(A(m, m - 1)) * (Math.abs(q) + Math.abs(r));
            const v = Math.abs(p) * (Math.abs(A(m - 1, m - 1)) + Math.abs(z) + Math.abs(A(m + 1, m + 1)));
            if (u + v === v) break;
          }
          for (let i = m + 2; i <= nn; i++) {
            S(i, i - 2, 0);
            if (i !== m + 2) S(i, i - 3, 0);
          }
          for (let k = m; k <= nn - 1; k++) { // double QR step on rows l..nn, columns m..nn
            if (k !== m) {
              p = A(k, k - 1);
              q = A(k + 1, k - 1);
              r = k !== nn - 1 ? A(k + 2, k - 1) : 0;
              x = Math.abs(p) + Math.abs(q) + Math.abs(r);
              if (x !== 0) { p /= x; q /= x; r /= x; }
            }
            const root = Math.sqrt(p * p + q * q + r * r);
            s = p >= 0 ? root : -root;
            if (s !== 0) {
              if (k === m) {
                if (l !== m) S(k, k - 1, -A(k, k - 1));
              } else {
                S(k, k - 1, -s * x);
              }
              p += s;
              x = p / s;
              y = q / s;
              z = r / s;
              q /= p;
              r /= p;
              for (let j = k; j <= nn; j++) {
                p = A(k, j) + q * A(k + 1, j);
                if (k !== nn - 1) {
                  p += r * A(k + 2, j);
                  S(k + 2, j, A(k + 2, j) - p * z);
                }
                S(k + 1, j, A(k + 1, j) - p * y);
                S(k, j, A(k, j) - p * x);
              }
              const mmin = nn < k + 3 ? nn : k + 3;
              for (let i = l; i <= mmin; i++) {
                p = x * A(i, k) + y * A(i, k + 1);
                if (k !== nn - 1) {
                  p += z * A(i, k + 2);
                  S(i, k + 2, A(i, k + 2) - p * r);
                }
                S(i, k + 1, A(i, k + 1) - p * q);
                S(i, k, A(i, k) - p);
              }
            }
          }
        }
      }
    } while (l < nn - 1);
  }
  return true;
}

/**
 * All eigenvalues of the n×n matrix `a` (row-major, a[i*n+j]); `a` is not modified.
 * Complex pairs appear as consecutive entries with im of opposite signs.
 */
export function eigenvalues(a: Float64Array | number[], n: number): Eigenvalues {
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  if (n === 0) return { re, im, ok: true };
  const h = Float64Array.from(a.slice(0, n * n));
  for (let i = 0; i < n * n; i++) if (!Number.isFinite(h[i])) return { re: re.fill(Number.NaN), im: im.fill(Number.NaN), ok: false };
  balance(h, n);
  hessenberg(h, n);
  const ok = hqr(h, n, re, im);
  if (!ok) { re.fill(Number.NaN); im.fill(Number.NaN); }
  return { re, im, ok };
}

/**
 * An orthonormal basis (columns of an n×(n−k) row-major matrix) of the subspace orthogonal to
 * the k given linearly independent vectors. Modified Gram–Schmidt with one reorthogonalisation
 * pass, over the given vectors followed by the unit vectors; a unit vector that is (nearly)
 * dependent on those already taken is skipped.
 *
 * References: Golub & Van Loan, Matrix Computations, 4th ed., §5.2.8 (modified Gram–Schmidt)
 * and §5.2.9 (reorthogonalisation, "twice is enough"; section numbers from memory).
 */
export function orthonormalComplement(vectors: Float64Array[], n: number): { Q: Float64Array; cols: number } {
  const basis: Float64Array[] = [];
  const orth = (v: Float64Array): number => {
    for (let pass = 0; pass < 2; pass++) {
      for (const b of basis) {
        let d = 0;
        for (let i = 0; i < n; i++) d += b[i] * v[i];
        for (let i = 0; i < n; i++) v[i] -= d * b[i];
      }
    }
    let s = 0;
    for (let i = 0; i < n; i++) s += v[i] * v[i];
    return Math.sqrt(s);
  };
  for (const w of vectors) {
    const v = Float64Array.from(w);
    const norm = orth(v);
    if (!(norm > 0)) throw new Error('orthonormalComplement: the given vectors are dependent');
    for (let i = 0; i < n; i++) v[i] /= norm;
    basis.push(v);
  }
  const k = basis.length;
  const out: Float64Array[] = [];
  for (let e = 0; e < n && basis.length < n; e++) {
    const v = new Float64Array(n);
    v[e] = 1;
    const norm = orth(v);
    if (norm < 1e-8) continue;
    for (let i = 0; i < n; i++) v[i] /= norm;
    basis.push(v);
    out.push(v);
  }
  const cols = n - k;
  const Q = new Float64Array(n * cols);
  for (let j = 0; j < cols; j++) for (let i = 0; i < n; i++) Q[i * cols + j] = out[j][i];
  return { Q, cols };
}

/** QᵀAQ for A n×n and Q n×c (row-major): the matrix of A restricted to span(Q) when it is invariant. */
export function project(A: Float64Array, n: number, Q: Float64Array, c: number): Float64Array {
  const AQ = new Float64Array(n * c);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < c; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += A[i * n + k] * Q[k * c + j];
      AQ[i * c + j] = s;
    }
  }
  const R = new Float64Array(c * c);
  for (let i = 0; i < c; i++) {
    for (let j = 0; j < c; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += Q[k * c + i] * AQ[k * c + j];
      R[i * c + j] = s;
    }
  }
  return R;
}

/**
 * The matrix of A (n×n) restricted to the orthogonal complement of k linearly independent
 * vectors, when that complement is invariant under A: with Householder reflections
 * H = H_1 ⋯ H_k taking the vectors into the span of the first k unit vectors (a QR
 * factorisation of the n×k matrix they form), the complement is spanned by the last n − k
 * columns of H, and the restriction is the trailing (n − k)×(n − k) block of HᵀAH. Each
 * reflection is applied to both sides in O(n²), so this costs O(k·n²) instead of the O(n³) of
 * `orthonormalComplement` and `project`; the eigenvalues are the same.
 *
 * References: Golub & Van Loan, Matrix Computations, 4th ed., §5.1.2–5.1.4 (Householder
 * reflections and their application in O(n²)) and §5.2.2 (Householder QR).
 */
export function restrictToComplement(A: Float64Array, n: number, vectors: Float64Array[]): { A: Float64Array; m: number } {
  const k = vectors.length;
  const M = Float64Array.from(A.subarray(0, n * n));
  const W = vectors.map((w) => Float64Array.from(w));
  const v = new Float64Array(n);
  const t = new Float64Array(n);
  for (let r = 0; r < k; r++) {
    // reflection on rows/columns r..n−1 taking W[r][r..] to a multiple of e_r
    const w = W[r];
    let s = 0;
    for (let i = r; i < n; i++) s += w[i] * w[i];
    const alpha = Math.sqrt(s);
    if (!(alpha > 0)) throw new Error('restrictToComplement: the given vectors are dependent');
    v.fill(0);
    for (let i = r; i < n; i++) v[i] = w[i];
    v[r] += w[r] >= 0 ? alpha : -alpha;
    let vv = 0;
    for (let i = r; i < n; i++) vv += v[i] * v[i];
    const beta = 2 / vv;
    // later vectors: w ← (I − β v vᵀ) w
    for (let q = r + 1; q < k; q++) {
      let d = 0;
      for (let i = r; i < n; i++) d += v[i] * W[q][i];
      for (let i = r; i < n; i++) W[q][i] -= beta * d * v[i];
    }
    // M ← (I − β v vᵀ) M (I − β v vᵀ)
    t.fill(0);
    for (let i = r; i < n; i++) {
      const vi = v[i];
      for (let j = 0; j < n; j++) t[j] += vi * M[i * n + j];
    }
    for (let i = r; i < n; i++) {
      const bv = beta * v[i];
      for (let j = 0; j < n; j++) M[i * n + j] -= bv * t[j];
    }
    for (let i = 0; i < n; i++) {
      let d = 0;
      for (let j = r; j < n; j++) d += M[i * n + j] * v[j];
      const bd = beta * d;
      for (let j = r; j < n; j++) M[i * n + j] -= bd * v[j];
    }
  }
  const m = n - k;
  const out = new Float64Array(m * m);
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) out[i * m + j] = M[(i + k) * n + (j + k)];
  return { A: out, m };
}
