/**
 * Chooses the integrator for `method: auto`. An explicit method needs a step of order
 * 1/ρ(J) for stability, where ρ is the spectral radius of the jacobian; when ρ times the
 * duration is large, an explicit integrator crawls and the Rosenbrock method is chosen.
 * ρ is estimated by power iteration on the products J·v: exact sparse products when the
 * problem gives its jacobian (one jacobian, then O(nonzeros) per iteration), else
 * finite-difference products (one rhs each). Either way O(n) per iteration, so the choice
 * stays cheap for large networks.
 *
 * Threshold: an explicit extrapolation code is stable only for steps up to a few times 1/ρ
 * (the stability region of extrapolated midpoint rules reaches a few units along the negative
 * real axis) and spends some 15–25 rhs evaluations a step, i.e. roughly 5·ρ·duration
 * evaluations once stability limits the step; the Rosenbrock method needs some tens of steps
 * of 6–7 evaluations whatever ρ is. They break even near ρ·duration ≈ 100 (measured on the
 * benchmark chain: at ρ·duration ≈ 275 the explicit code used 36 times the evaluations).
 *
 * References: Hairer & Wanner, Solving ODEs II, §IV.2 (stiffness detection); Golub & Van
 * Loan, Matrix Computations, 4th ed., §7.3.1 (power method).
 */
import { patternSize, sparseMultiply } from '../linalg/sparse-pattern.js';
import type { OdeProblem } from '../solve/types.js';

/** ρ(J)·duration above this means stiff (see above). */
export const STIFF_THRESHOLD = 100;

/** Power iteration on the scaled jacobian W⁻¹·J·W with exact sparse products. */
function sparseEstimate(p: OdeProblem, t: number, y: Float64Array, w: Float64Array, v: Float64Array, iterations: number): number {
  const pattern = p.jacobianPattern!;
  const values = new Float64Array(patternSize(pattern));
  p.jacobianSparse!(t, y, values);
  const n = p.n;
  const x = new Float64Array(n);
  const z = new Float64Array(n);
  let rho = 0;
  for (let k = 0; k < iterations; k++) {
    let norm = 0;
    for (let i = 0; i < n; i++) norm += v[i] * v[i];
    norm = Math.sqrt(norm);
    if (!(norm > 0)) return rho;
    for (let i = 0; i < n; i++) x[i] = (w[i] * v[i]) / norm;
    sparseMultiply(pattern, values, x, z);
    let nn = 0;
    for (let i = 0; i < n; i++) {
      v[i] = z[i] / w[i];
      nn += v[i] * v[i];
    }
    const est = Math.sqrt(nn);
    if (!Number.isFinite(est)) return Infinity;
    rho = est;
  }
  return rho;
}

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
  if (p.jacobianPattern && p.jacobianSparse) return sparseEstimate(p, t, y, w, v, iterations);
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
