/**
 * Forward-difference jacobian ∂f/∂y and time derivative ∂f/∂t for integrators whose problem
 * gives no analytic jacobian. One rhs evaluation per column; nothing allocates after setup.
 */
import type { OdeProblem } from './types.js';

const EPS = 2.220446049250313e-16;
const SQRT_EPS = Math.sqrt(EPS);

export class FiniteJacobian {
  private readonly yp: Float64Array;
  private readonly fp: Float64Array;

  constructor(readonly n: number) {
    this.yp = new Float64Array(n);
    this.fp = new Float64Array(n);
  }

  /**
   * J[i*n+j] ≈ ∂f_i/∂y_j from f0 = f(t, y). The increment is √eps·max(|y_j|, atol_j/rtol): the
   * second term is the magnitude below which the absolute tolerance governs, a natural unit
   * for a component that is passing through zero. Returns the rhs evaluations used (n).
   *
   * References: Dennis & Schnabel, Numerical Methods for Unconstrained Optimization and
   * Nonlinear Equations, 1983, §5.4 (finite-difference jacobian, increment √eps times a typical
   * size; section from memory); Hairer's rodas.f (full-jacobian difference quotient).
   */
  jacobian(problem: OdeProblem, t: number, y: Float64Array, f0: Float64Array, J: Float64Array): number {
    const { n, yp, fp } = this;
    const rtol = Math.max(problem.rtol, EPS);
    yp.set(y);
    for (let j = 0; j < n; j++) {
      const scale = Math.max(Math.abs(y[j]), problem.atol[j] / rtol) || 1;
      // Make the increment exactly representable so the quotient sees the true step.
      const h = (y[j] + SQRT_EPS * scale) - y[j];
      yp[j] = y[j] + h;
      problem.rhs(t, yp, fp);
      yp[j] = y[j];
      for (let i = 0; i < n; i++) J[i * n + j] = (fp[i] - f0[i]) / h;
    }
    return n;
  }

  /**
   * ft ≈ ∂f/∂t at (t, y) from f0 = f(t, y), stepping towards `tLimit` and never past it, so
   * that a discontinuity at the end of the interval (where the driver restarts) is never
   * sampled. Returns the rhs evaluations used (0 or 1).
   *
   * References: Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, §IV.7 (non-autonomous Rosenbrock
   * methods need f_t; rodas.f differences it numerically).
   */
  timeDerivative(problem: OdeProblem, t: number, y: Float64Array, f0: Float64Array, h: number, tLimit: number, ft: Float64Array): number {
    const room = tLimit - t;
    const want = SQRT_EPS * Math.max(Math.abs(t), Math.abs(h));
    const dt = (t + Math.sign(room) * Math.min(want, Math.abs(room))) - t;
    if (dt === 0) { ft.fill(0); return 0; }
    problem.rhs(t + dt, y, this.fp);
    for (let i = 0; i < this.n; i++) ft[i] = (this.fp[i] - f0[i]) / dt;
    return 1;
  }
}
