/**
 * The rightmost eigenvalue of a rest state's linearisation without the dense eigenvalue
 * problem, for the points of a traced branch (continuation.ts): sparse, certified, or nothing.
 *
 * 1. The scaled jacobian D⁻¹JD of the same right-hand side as stability.ts, by the same central
 *    differences, but only over the reserved sparsity pattern, with structurally orthogonal
 *    columns perturbed together (Curtis, Powell & Reid 1974): a handful of rhs evaluations
 *    instead of two per state.
 * 2. A candidate by shift-and-invert Arnoldi (linalg/arnoldi.ts) with the sparse LU, the shift
 *    placed to the right of the previous point's growth rate, in the subspace of states that
 *    keep the group's gas (the conservation laws' zero eigenvalues taken out as in stability.ts).
 * 3. A certificate by inertia. A network of chambers and lines at rest has a jacobian J = −L·P
 *    (L the symmetric conductance Laplacian, P the diagonal dp/dm), with J_ij·J_ji > 0 on every
 *    line: a diagonal similarity makes it symmetric. Then the LU of J − sI without row exchanges
 *    has as many negative pivots as J has eigenvalues below s (Sylvester's law of inertia), so two
 *    factorisations, at s = λ* ± δ, prove that no eigenvalue lies right of λ* + δ and one lies
 *    within [λ* − δ, λ* + δ]. δ is 1e-7 of |λ*| (and at least four times what the jacobian
 *    misses symmetry by, which bounds how far that moves its eigenvalues).
 * Anything else returns null, and the caller takes the dense eigenvalues (stability.ts): a
 * jacobian that is not diagonally similar to a symmetric one (temperatures as states, steady
 * flow through valves, chambers past a pressure maximum where dp/dm < 0), a failed sparse
 * factorisation, a growth rate within 1e-6 of the jacobian's norm of zero (marginal states, where
 * the verdict needs the spectral radius), or a candidate the counts do not confirm.
 *
 * References: Saad, Numerical Methods for Large Eigenvalue Problems, 2nd ed., SIAM 2011, ch. 4
 * (eigenvalue bounds, Gershgorin) and ch. 7 (shift-and-invert; chapter contents from memory);
 * Golub & Van Loan, Matrix Computations, 4th ed., §8.1 (Sylvester's law of inertia) and §7.2.2
 * (Bauer–Fike: a perturbation E moves the eigenvalues of a symmetric matrix by at most ‖E‖₂);
 * Parlett, The Symmetric Eigenvalue Problem, SIAM 1998, §3.3 (spectrum slicing by counting
 * negative pivots; section from memory); Curtis, Powell & Reid, J. Inst. Maths Applics 13 (1974)
 * 117 (grouped difference columns).
 */
import type { NetworkSystem } from '../assemble/system.js';
import { shiftInvertArnoldi } from '../linalg/arnoldi.js';
import { colourColumns } from '../linalg/sparse-colouring.js';
import { SparseLu } from '../linalg/sparse-lu.js';
import { patternFromEntries, patternIndex, transposePattern, type SparsePattern } from '../linalg/sparse-pattern.js';
import type { Linearisation, StabilityVerdict } from './stability.js';

/** Below this many coordinates the dense eigenvalues are cheap and always used. */
export const SPARSE_STABILITY_MIN = 32;
/** Same relative difference increment as the dense jacobian (stability.ts). */
const FD_STEP = 1e-6;
/** Arnoldi steps: a short run, then a longer one when the short one's candidate is not confirmed. */
const STEPS = [12, 32];
/** Half-width of the certified interval, relative to |λ*|. */
const DELTA = 1e-7;
/** Shift, relative to ‖J‖∞, without a usable hint. */
const SHIFT_NO_HINT = 1e-5;
/** Growth rates within this fraction of ‖J‖∞ of zero go to the dense path. */
const NEAR_ZERO = 1e-6;

export interface Rightmost {
  growth_rate: number;
  stability: StabilityVerdict;
}

/** The scaled jacobian over the pattern of the coordinates, by coloured central differences. */
export function sparseScaledJacobian(sys: NetworkSystem, L: Linearisation): { pattern: SparsePattern; values: Float64Array } | null {
  const n = L.coords.length;
  const full = sys.jacobianPattern;
  const pos = new Int32Array(sys.n).fill(-1);
  L.coords.forEach((k, i) => { pos[k] = i; });
  const rows: number[] = [];
  const cols: number[] = [];
  for (let i = 0; i < n; i++) {
    const r = L.coords[i];
    for (let a = full.rowPtr[r]; a < full.rowPtr[r + 1]; a++) {
      const j = pos[full.colIdx[a]];
      if (j >= 0) { rows.push(i); cols.push(j); }
    }
  }
  const pattern = patternFromEntries(n, rows, cols);
  const values = new Float64Array(pattern.rowPtr[n]);
  const colours = colourColumns(pattern);
  const { colPtr, rowIdx, entry } = transposePattern(pattern);
  const yp = Float64Array.from(L.y);
  const fp = new Float64Array(sys.n);
  const fm = new Float64Array(sys.n);
  const h = new Float64Array(n);
  for (let c = 0; c < colours.count; c++) {
    const from = colours.colourPtr[c], to = colours.colourPtr[c + 1];
    for (let q = from; q < to; q++) {
      const j = colours.columns[q];
      const y0 = L.y[L.coords[j]];
      h[j] = FD_STEP * Math.max(Math.abs(y0), 1e-3 * L.scales[j]);
      yp[L.coords[j]] = y0 + h[j];
    }
    sys.rhs(L.t, yp, fp);
    for (let q = from; q < to; q++) { const j = colours.columns[q]; yp[L.coords[j]] = L.y[L.coords[j]] - h[j]; }
    sys.rhs(L.t, yp, fm);
    for (let q = from; q < to; q++) {
      const j = colours.columns[q];
      const y0 = L.y[L.coords[j]];
      yp[L.coords[j]] = y0;
      const hh = (y0 + h[j]) - (y0 - h[j]);
      for (let a = colPtr[j]; a < colPtr[j + 1]; a++) {
        const i = rowIdx[a];
        const r = L.coords[i];
        const v = ((fp[r] - fm[r]) / hh) * (L.scales[j] / L.scales[i]);
        if (!Number.isFinite(v)) { sys.evaluate(L.t, L.y); return null; }
        values[entry[a]] = v;
      }
    }
  }
  sys.evaluate(L.t, L.y); // leave the system's scratch at the state itself
  return { pattern, values };
}

/**
 * A diagonal similarity making the matrix symmetric, and by how much it misses (an upper bound
 * on ‖K‖₂ for the skew part K of the similar matrix); null when some off-diagonal pair has
 * opposite signs or only one member (no real diagonal similarity can make it symmetric).
 */
function symmetriser(p: SparsePattern, v: Float64Array): { skew: number } | null {
  const n = p.n;
  const d = new Float64Array(n);
  const seen = new Uint8Array(n);
  const stack: number[] = [];
  for (let root = 0; root < n; root++) {
    if (seen[root]) continue;
    seen[root] = 1;
    d[root] = 1;
    stack.push(root);
    while (stack.length) {
      const i = stack.pop()!;
      for (let a = p.rowPtr[i]; a < p.rowPtr[i + 1]; a++) {
        const j = p.colIdx[a];
        if (j === i) continue;
        const b = patternIndex(p, j, i);
        const aij = v[a], aji = b >= 0 ? v[b] : 0;
        if (aij === 0 && aji === 0) continue;
        if (!(aij * aji > 0)) return null;
        if (seen[j]) continue;
        seen[j] = 1;
        d[j] = d[i] * Math.sqrt(aji / aij);
        stack.push(j);
      }
    }
  }
  // ‖K‖₂ ≤ ‖K‖∞ for the skew-symmetric K = (Â − Âᵀ)/2, Â = D⁻¹AD
  let skew = 0;
  for (let i = 0; i < n; i++) {
    let row = 0;
    for (let a = p.rowPtr[i]; a < p.rowPtr[i + 1]; a++) {
      const j = p.colIdx[a];
      if (j === i) continue;
      const b = patternIndex(p, j, i);
      const hij = (v[a] * d[j]) / d[i];
      const hji = b >= 0 ? (v[b] * d[i]) / d[j] : 0;
      row += Math.abs(hij - hji) / 2;
    }
    skew = Math.max(skew, row);
  }
  return { skew };
}

/**
 * The growth rate (largest real part of the eigenvalues with the conservation zero modes
 * removed) and verdict, certified as described above; null when the dense path must decide.
 * `hint`: the growth rate at a nearby state (the previous point of the branch), or NaN.
 */
export function rightmostStability(sys: NetworkSystem, L: Linearisation, hint: number): Rightmost | null {
  const n = L.coords.length;
  const zeros = L.conserved.length;
  if (n < SPARSE_STABILITY_MIN) return null;
  const J = sparseScaledJacobian(sys, L);
  if (!J) return null;
  const { pattern, values } = J;
  const sym = symmetriser(pattern, values);
  if (!sym) return null;
  let norm = 0; // ‖J‖∞ ≥ spectral radius
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let a = pattern.rowPtr[i]; a < pattern.rowPtr[i + 1]; a++) s += Math.abs(values[a]);
    norm = Math.max(norm, s);
  }
  if (!(norm > 0)) return null;
  const lu = new SparseLu(pattern);
  // candidate: Arnoldi on (J − σI)⁻¹ with σ right of the hint (without one, or with one too near
  // zero, just right of zero: the slow modes), in the gas-conserving subspace
  const sigma = Number.isFinite(hint) && Math.abs(hint) > NEAR_ZERO * norm ? hint + 1.5 * Math.abs(hint) : SHIFT_NO_HINT * norm;
  const laws = L.conserved.map((posList) => Int32Array.from(posList));
  const project = (x: Float64Array): void => {
    for (const w of laws) {
      let s = 0;
      for (const i of w) s += x[i];
      s /= w.length;
      for (const i of w) x[i] -= s;
    }
  };
  // eigenvalues above s of the gas-conserving part: n − (negative pivots of J − sI), less the zero modes above s
  const above = (s: number): number | null => {
    if (!lu.factor(values, -s)) return null;
    return n - lu.negativePivots() - (s < 0 ? zeros : 0);
  };
  // a short Krylov space first (enough when the previous point's rate is near), a longer one if
  // the counts do not confirm its candidate
  for (const steps of STEPS) {
    if (!lu.factor(values, -sigma)) return null;
    const ritz = shiftInvertArnoldi(n, sigma, steps, (x) => lu.solve(x), project);
    if (!ritz.ok) return null;
    let best = -1;
    for (let i = 0; i < ritz.steps; i++) if (best < 0 || ritz.re[i] > ritz.re[best]) best = i;
    if (best < 0) return null;
    const lambda = ritz.re[best];
    if (!Number.isFinite(lambda) || Math.abs(lambda) <= NEAR_ZERO * norm) return null;
    const delta = DELTA * Math.abs(lambda);
    if (4 * sym.skew > delta) return null;
    if (Math.abs(ritz.im[best]) > delta) continue;
    if (above(lambda + delta) !== 0) continue;
    const below = above(lambda - delta);
    if (below === null || below < 1) continue;
    return { growth_rate: lambda, stability: lambda < 0 ? 'stable' : 'unstable' };
  }
  return null;
}
