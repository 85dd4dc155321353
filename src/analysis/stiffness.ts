/**
 * Chooses the integrator for `method: auto`. An explicit method needs a step of order
 * 1/ρ(J) for stability, where ρ is the spectral radius of the jacobian; when ρ times the
 * duration is large, an explicit integrator crawls and the Rosenbrock method is chosen.
 * ρ is estimated by power iteration on finite-difference products J·v (one rhs each), which
 * costs O(n) per iteration, so the choice stays cheap for large networks.
 *
 * References: Hairer & Wanner, Solving ODEs II, §IV.2 (stiffness detection); Golub & Van
 * Loan, Matrix Computations, 4th ed., §7.3.1 (power method).
 */
import type { OdeProblem } from '../solve/types.js';

/** ρ(J)·duration above this means stiff. An explicit extrapolation code then needs thousands of steps. */
export const STIFF_THRESHOLD = 500;

export function spectralRadiusEstimate(p: OdeProblem, t: number, y: Float64Array, iterations = 30): number {
  const n = p.n;
  const f0 = new Float64Array(n);
  const f1 = new Float64Array(n);
  const yp = new Float64Array(n);
  const v = new Float64Array(n);
  p.rhs(t, y, f0);
  // scale each component by its tolerance so that masses and temperatures mix sensibly
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) w[i] = p.atol[i] + p.rtol * Math.abs(y[i]);
  for (let i = 0; i < n; i++) v[i] = 1 + ((i * 7919) % 13) / 13;
  let rho = 0;
  for (let k = 0; k < iterations; k++) {
    let norm = 0;
    for (let i = 0; i < n; i++) norm += v[i] * v[i];
    norm = Math.sqrt(norm);
    if (!(norm > 0)) return rho;
    const eps = 1e-7;
    for (let i = 0; i < n; i++) yp[i] = y[i] + (eps * w[i] * v[i]) / norm;
    p.rhs(t, yp, f1);
    let nn = 0;
    for (let i = 0; i < n; i++) {
      v[i] = (f1[i] - f0[i]) / (eps * w[i]);
      nn += v[i] * v[i];
    }
    const est = Math.sqrt(nn);
    if (!Number.isFinite(est)) return Infinity;
    rho = est;
  }
  return rho;
}
