/**
 * Forward-difference jacobian ∂f/∂y and time derivative ∂f/∂t for integrators whose problem
 * gives no analytic jacobian: dense (one rhs evaluation per column) or, given a sparsity
 * pattern, coloured (one rhs evaluation per group of structurally orthogonal columns).
 * Nothing allocates after setup.
 */
import { colourColumns, type ColumnColouring } from '../linalg/sparse-colouring.js';
import { transposePattern, type SparsePattern } from '../linalg/sparse-pattern.js';
import type { OdeProblem } from './types.js';

const EPS = 2.220446049250313e-16;
const SQRT_EPS = Math.sqrt(EPS);

/**
 * Difference increment for component j: √eps·max(|y_j|, atol_j/rtol), made exactly
 * representable so that the quotient sees the true step.
 */
function increment(problem: OdeProblem, y: Float64Array, j: number): number {
  const rtol = Math.max(problem.rtol, EPS);
  const scale = Math.max(Math.abs(y[j]), problem.atol[j] / rtol) || 1;
  return (y[j] + SQRT_EPS * scale) - y[j];
}

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
    yp.set(y);
    for (let j = 0; j < n; j++) {
      const h = increment(problem, y, j);
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

/**
 * Coloured forward differences: all columns of one colour are perturbed together and each
 * row's change is credited to the one column of that colour it contains. Same increments and
 * hence, up to round-off in f, the same entries as the dense difference quotient.
 *
 * References: Curtis, Powell & Reid, J. Inst. Maths Applics 13 (1974) 117; Hairer & Wanner,
 * Solving ODEs II, §IV.8 (banded and sparse jacobians in stiff codes).
 */
export class ColouredJacobian {
  readonly colouring: ColumnColouring;
  private readonly colPtr: Int32Array;
  private readonly rowIdx: Int32Array;
  private readonly entry: Int32Array;
  private readonly yp: Float64Array;
  private readonly fp: Float64Array;
  private readonly h: Float64Array;

  constructor(readonly pattern: SparsePattern) {
    this.colouring = colourColumns(pattern);
    const t = transposePattern(pattern);
    this.colPtr = t.colPtr;
    this.rowIdx = t.rowIdx;
    this.entry = t.entry;
    this.yp = new Float64Array(pattern.n);
    this.fp = new Float64Array(pattern.n);
    this.h = new Float64Array(pattern.n);
  }

  /** values (pattern order) ≈ ∂f/∂y at (t, y) from f0 = f(t, y). Returns the rhs evaluations used. */
  jacobian(problem: OdeProblem, t: number, y: Float64Array, f0: Float64Array, values: Float64Array): number {
    const { yp, fp, h, colPtr, rowIdx, entry } = this;
    const { count, colourPtr, columns } = this.colouring;
    yp.set(y);
    for (let c = 0; c < count; c++) {
      for (let a = colourPtr[c]; a < colourPtr[c + 1]; a++) {
        const j = columns[a];
        h[j] = increment(problem, y, j);
        yp[j] = y[j] + h[j];
      }
      problem.rhs(t, yp, fp);
      for (let a = colourPtr[c]; a < colourPtr[c + 1]; a++) {
        const j = columns[a];
        yp[j] = y[j];
        for (let k = colPtr[j]; k < colPtr[j + 1]; k++) {
          const i = rowIdx[k];
          values[entry[k]] = (fp[i] - f0[i]) / h[j];
        }
      }
    }
    return count;
  }
}
