import type { SparsePattern } from '../linalg/sparse-pattern.js';

/**
 * The contract between the driver and the integrators.
 *
 * An integrator advances y' = f(t, y) from t0 towards tEnd and calls `onStep` after every
 * accepted step with a dense-output interpolant valid on [tOld, tNew]. `onStep` returns
 * `false` to stop the integration there (the driver does so at a located event and then
 * restarts). Integrators never throw for numerical trouble: they return a status.
 */
export interface OdeProblem {
  n: number;
  /** Writes f(t, y) into dydt. Must not keep references to y or dydt. */
  rhs(t: number, y: Float64Array, dydt: Float64Array): void;
  /**
   * Optional analytic jacobian ∂f/∂y, written row-major into J (n*n, J[i*n+j] = ∂f_i/∂y_j).
   * When absent the integrator builds it by finite differences.
   */
  jacobian?(t: number, y: Float64Array, J: Float64Array): void;
  /**
   * Optional sparsity of ∂f/∂y: the positions (i, j) where it may be nonzero, diagonal
   * included. With it the stiff integrator factorises with sparse LU when n is large and,
   * without `jacobianSparse`, builds the jacobian by coloured finite differences.
   */
  jacobianPattern?: SparsePattern;
  /** Optional ∂f/∂y at (t, y), written into values in the order of `jacobianPattern`'s entries. */
  jacobianSparse?(t: number, y: Float64Array, values: Float64Array): void;
  /**
   * Optional: true when f does not depend on t explicitly anywhere in [t0, t1] (t0 ≤ t1), so
   * that the stiff integrator may take ∂f/∂t = 0 without differencing.
   */
  timeInvariant?(t0: number, t1: number): boolean;
  /** Relative tolerance (scalar) and absolute tolerance per component. */
  rtol: number;
  atol: Float64Array;
}

export interface WorkCounts {
  steps: number;
  rejected: number;
  rhs: number;
  jacobians: number;
  lu: number;
}

/** Dense output on the last accepted step: writes y(t) for t in [tOld, tNew] into out. */
export type DenseOutput = (t: number, out: Float64Array) => void;

export type StepCallback = (tOld: number, tNew: number, yNew: Float64Array, dense: DenseOutput) => boolean | void;

export type IntegratorStatus =
  | 'completed'       // reached tEnd
  | 'stopped'         // onStep returned false
  | 'max-steps'       // step budget exhausted
  | 'step-too-small'  // step size collapsed below the round-off limit
  | 'non-finite'      // rhs produced NaN or Infinity that step-size reduction could not cure
  | 'singular';       // the iteration matrix could not be factorised

export interface IntegrateOptions {
  /** Initial step size guess (s); the integrator picks one when absent. */
  h0?: number;
  /** Upper bound on the step size (s). */
  hMax?: number;
  /** Budget of accepted + rejected steps for this call. */
  maxSteps?: number;
  /**
   * Linear algebra of the stiff integrator: 'auto' (default) picks sparse LU for problems with
   * a jacobian pattern above a size threshold, dense LU otherwise.
   */
  linearAlgebra?: 'auto' | 'dense' | 'sparse';
}

export interface IntegrateResult {
  status: IntegratorStatus;
  /** Time reached (the last accepted step's end). */
  t: number;
  /** State at t (a fresh array). */
  y: Float64Array;
  /** Work done in this call only. */
  work: WorkCounts;
  /** Last accepted step size, useful to warm-start a restart. */
  hLast: number;
  message: string;
}

export type Integrator = (
  problem: OdeProblem,
  t0: number,
  y0: Float64Array,
  tEnd: number,
  onStep: StepCallback,
  options?: IntegrateOptions,
) => IntegrateResult;

export function zeroWork(): WorkCounts {
  return { steps: 0, rejected: 0, rhs: 0, jacobians: 0, lu: 0 };
}

export function addWork(into: WorkCounts, w: WorkCounts): void {
  into.steps += w.steps;
  into.rejected += w.rejected;
  into.rhs += w.rhs;
  into.jacobians += w.jacobians;
  into.lu += w.lu;
}
