/**
 * Linear stability of a network state: the jacobian of the same right-hand side the
 * integrators use (NetworkSystem.rhs), by central differences in the chosen state slots, and
 * its eigenvalues with the zero modes of the conservation laws removed.
 *
 * Zero modes. A closed group of chambers conserves its gas: with w the indicator of its mass
 * slots, wᵀJ = 0 for every state, so the subspace S = {δy : Wᵀδy = 0} is invariant under J and
 * J's spectrum is that of J restricted to S plus one zero per conservation law. The
 * restriction is QᵀJQ with Q an orthonormal basis of S (Householder reflections of the
 * conservation vectors, eigen.ts `restrictToComplement`; here in coordinates scaled to typical
 * sizes, where the law reads (D w)ᵀ(D⁻¹JD) = 0). The zero modes are thus removed by the
 * conservation vectors themselves, not by looking for small eigenvalues. Boundary-store slots
 * (reservoirs, feeds) are bookkeeping, never coordinates here.
 *
 * References: Hirsch, Smale & Devaney, Differential Equations, Dynamical Systems, and an
 * Introduction to Chaos, 2nd ed. 2004, ch. 8 (linearisation at an equilibrium); Dennis &
 * Schnabel 1983, §5.6 (central-difference derivatives, step ∝ eps^(1/3); from memory);
 * Golub & Van Loan, 4th ed., §7.1.3 (invariant subspaces; from memory).
 */
import type { NetworkSystem } from '../assemble/system.js';
import { eigenvalues, restrictToComplement } from '../linalg/eigen.js';
import { scatterDense } from '../linalg/sparse-pattern.js';
import { SPARSE_STABILITY_MIN, sparseScaledJacobian } from './rightmost.js';

/** Relative central-difference increment: round-off ε/h and truncation h² balance near ε^(1/3). */
const FD_STEP = 1e-6;
/** A growth rate within this fraction of the spectral radius of zero is called marginal. */
const MARGINAL = 1e-7;

export type StabilityVerdict = 'stable' | 'unstable' | 'marginal';

export interface Stability {
  /** Eigenvalues (1/s) of the linearised system, conservation zero modes removed, by decreasing real part. */
  eigenvalues: { re: number; im: number }[];
  /** Largest real part (1/s); null when no dynamics remain (an isolated closed chamber). */
  growth_rate: number | null;
  /** 1/|slowest decay rate| (s) among the decaying modes; null when none decays. */
  time_constant: number | null;
  stability: StabilityVerdict;
  /** False when the jacobian was not finite or the QR iteration failed. */
  ok: boolean;
}

export interface Linearisation {
  t: number;
  /** The full state vector at which to linearise (not modified). */
  y: Float64Array;
  /** State slots to perturb and observe (chamber masses, temperatures). */
  coords: number[];
  /** Typical size of each coordinate, for scaling and difference steps. */
  scales: number[];
  /** Each conservation law as the positions (into coords) of the slots whose sum is conserved. */
  conserved: number[][];
}

/** Scaled jacobian D⁻¹JD (row-major, coords × coords) by central differences. */
export function scaledJacobian(sys: NetworkSystem, L: Linearisation): Float64Array {
  const n = L.coords.length;
  const yp = Float64Array.from(L.y);
  const fp = new Float64Array(sys.n);
  const fm = new Float64Array(sys.n);
  const J = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    const k = L.coords[j];
    const y0 = L.y[k];
    const h = FD_STEP * Math.max(Math.abs(y0), 1e-3 * L.scales[j]);
    yp[k] = y0 + h;
    sys.rhs(L.t, yp, fp);
    yp[k] = y0 - h;
    sys.rhs(L.t, yp, fm);
    yp[k] = y0;
    const hh = (y0 + h) - (y0 - h);
    for (let i = 0; i < n; i++) {
      const r = L.coords[i];
      J[i * n + j] = ((fp[r] - fm[r]) / hh) * (L.scales[j] / L.scales[i]);
    }
  }
  sys.evaluate(L.t, L.y); // leave the system's scratch at the state itself
  return J;
}

/** Eigenvalues of a scaled jacobian with the conservation zero modes projected out. */
export function reducedSpectrum(J: Float64Array, n: number, conserved: number[][]): Stability {
  let A = J;
  let m = n;
  if (conserved.length > 0) {
    const W = conserved.map((pos) => {
      const w = new Float64Array(n);
      for (const i of pos) w[i] = 1;
      return w;
    });
    const r = restrictToComplement(J, n, W);
    A = r.A;
    m = r.m;
  }
  const ev = eigenvalues(A, m);
  const list: { re: number; im: number }[] = [];
  for (let i = 0; i < m; i++) list.push({ re: ev.re[i], im: ev.im[i] });
  list.sort((a, b) => b.re - a.re || b.im - a.im);
  if (!ev.ok) return { eigenvalues: list, growth_rate: Number.NaN, time_constant: null, stability: 'marginal', ok: false };
  if (m === 0) return { eigenvalues: [], growth_rate: null, time_constant: null, stability: 'stable', ok: true };
  const growth = list[0].re;
  const radius = Math.max(...list.map((z) => Math.hypot(z.re, z.im)));
  const decaying = list.filter((z) => z.re < -MARGINAL * radius);
  const slowest = decaying.length ? Math.max(...decaying.map((z) => z.re)) : Number.NaN;
  const stability: StabilityVerdict = Math.abs(growth) <= MARGINAL * radius ? 'marginal' : growth < 0 ? 'stable' : 'unstable';
  return {
    eigenvalues: list,
    growth_rate: growth,
    time_constant: Number.isFinite(slowest) ? 1 / -slowest : null,
    stability,
    ok: true,
  };
}

/**
 * The scaled jacobian, dense. For many coordinates by coloured differences over the reserved
 * pattern (rightmost.ts): the same entries (columns that share no row are perturbed together,
 * so each entry comes from the same two evaluations of its own row) for a handful of rhs
 * evaluations instead of two per coordinate.
 */
function jacobianOf(sys: NetworkSystem, L: Linearisation): Float64Array {
  const n = L.coords.length;
  if (n < SPARSE_STABILITY_MIN) return scaledJacobian(sys, L);
  const sp = sparseScaledJacobian(sys, L);
  if (!sp) return new Float64Array(n * n).fill(Number.NaN);
  const J = new Float64Array(n * n);
  scatterDense(sp.pattern, sp.values, J);
  return J;
}

/** Linearises `sys` at a state and classifies it. */
export function stabilityAt(sys: NetworkSystem, L: Linearisation): Stability {
  const J = jacobianOf(sys, L);
  for (const v of J) {
    if (!Number.isFinite(v)) return { eigenvalues: [], growth_rate: Number.NaN, time_constant: null, stability: 'marginal', ok: false };
  }
  return reducedSpectrum(J, L.coords.length, L.conserved);
}
