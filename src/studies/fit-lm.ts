/**
 * Levenberg–Marquardt for small nonlinear least-squares problems: minimise F(x) = ½‖r(x)‖².
 *
 * Each iteration solves (JᵀJ + μD)h = −Jᵀr, where D is Marquardt's diagonal scaling kept as
 * the running maximum of diag(JᵀJ) (Moré), so the damping does not depend on the units of the
 * parameters. The damping μ follows the gain ratio ρ = (F(x) − F(x + h))/(L(0) − L(h)) with
 * L(0) − L(h) = ½hᵀ(μDh − g) (Nielsen's update: μ·max(1/3, 1 − (2ρ − 1)³) on success, μ·ν
 * with ν doubling on failure). A trial point where r is not finite (a law outside its
 * domain) counts as a failed step. Simple bounds are kept by projecting each trial point.
 * Stops on MINPACK's criteria: the cosine between r and every column of J below gtol, a
 * relative step below xtol, or actual and predicted relative reductions of F below ftol.
 *
 * References: K. Madsen, H. B. Nielsen & O. Tingleff, Methods for Non-Linear Least Squares
 * Problems, 2nd ed., IMM DTU 2004, §3.2, Algorithm 3.16 and eq. 3.14–3.15; J. J. Moré, "The
 * Levenberg–Marquardt algorithm: implementation and theory", in Numerical Analysis (Dundee
 * 1977), Springer LNM 630, 1978, 105–116 (scaling, and the gtol/ftol/xtol
 * tests of MINPACK's lmder).
 */
import { DenseLu } from '../linalg/dense-lu.js';

export interface LmProblem {
  /** Number of residuals m and of parameters n (m ≥ n). */
  m: number;
  n: number;
  /** Fills r (length m) at x; returns false when r cannot be evaluated there. */
  residuals(x: Float64Array, r: Float64Array): boolean;
  /** Fills J (m×n, row-major, J[i*n + j] = ∂r_i/∂x_j); central differences when absent. */
  jacobian?(x: Float64Array, J: Float64Array): boolean;
}

export interface LmOptions {
  maxIterations?: number;
  /** Initial damping relative to the scaling (MNT's τ). */
  tau?: number;
  gtol?: number;
  xtol?: number;
  ftol?: number;
  lower?: ArrayLike<number>;
  upper?: ArrayLike<number>;
}

export type LmStatus = 'gradient' | 'step' | 'reduction' | 'max-iterations' | 'not-evaluable';

export interface LmResult {
  x: Float64Array;
  status: LmStatus;
  /** True for 'gradient', 'step' and 'reduction'. */
  converged: boolean;
  iterations: number;
  /** ½‖r‖² at x. */
  cost: number;
  r: Float64Array;
  /** Jacobian at x (m×n row-major). */
  J: Float64Array;
}

const DEFAULTS = { maxIterations: 500, tau: 1e-3, gtol: 1e-10, xtol: 1e-12, ftol: 1e-14 };
/** Relative step of the central differences: about the cube root of the machine epsilon. */
const FD_STEP = 6e-6;

function sumSquares(r: Float64Array): number {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += r[i] * r[i];
  return s;
}

function norm(x: Float64Array): number {
  return Math.sqrt(sumSquares(x));
}

/** Central-difference Jacobian; false when a perturbed point cannot be evaluated. */
function finiteJacobian(p: LmProblem, x: Float64Array, J: Float64Array): boolean {
  const { m, n } = p;
  const rp = new Float64Array(m);
  const rm = new Float64Array(m);
  const xt = Float64Array.from(x);
  for (let j = 0; j < n; j++) {
    const h = FD_STEP * Math.max(Math.abs(x[j]), 1);
    xt[j] = x[j] + h;
    const okp = p.residuals(xt, rp);
    xt[j] = x[j] - h;
    const okm = p.residuals(xt, rm);
    xt[j] = x[j];
    if (okp && okm) {
      for (let i = 0; i < m; i++) J[i * n + j] = (rp[i] - rm[i]) / (2 * h);
    } else {
      // One-sided at the edge of the domain.
      const r0 = new Float64Array(m);
      if (!p.residuals(x, r0)) return false;
      if (okp) for (let i = 0; i < m; i++) J[i * n + j] = (rp[i] - r0[i]) / h;
      else if (okm) for (let i = 0; i < m; i++) J[i * n + j] = (r0[i] - rm[i]) / h;
      else return false;
    }
  }
  for (let i = 0; i < m * n; i++) if (!Number.isFinite(J[i])) return false;
  return true;
}

/** A = JᵀJ (n×n) and g = Jᵀr. */
function normalEquations(J: Float64Array, r: Float64Array, m: number, n: number, A: Float64Array, g: Float64Array): void {
  A.fill(0);
  g.fill(0);
  for (let i = 0; i < m; i++) {
    const row = i * n;
    for (let a = 0; a < n; a++) {
      const ja = J[row + a];
      g[a] += ja * r[i];
      for (let b = 0; b <= a; b++) A[a * n + b] += ja * J[row + b];
    }
  }
  for (let a = 0; a < n; a++) for (let b = 0; b < a; b++) A[b * n + a] = A[a * n + b];
}

function project(x: Float64Array, o: LmOptions): void {
  for (let j = 0; j < x.length; j++) {
    if (o.lower && x[j] < o.lower[j]) x[j] = o.lower[j];
    if (o.upper && x[j] > o.upper[j]) x[j] = o.upper[j];
  }
}

/** What the iteration asks of its caller: the residuals or the Jacobian at a point (filled into `out`). */
export type LmRequest = { kind: 'residuals' | 'jacobian'; x: Float64Array; out: Float64Array };

/**
 * The iteration itself as a generator: it yields each evaluation it needs and receives whether
 * it succeeded, so one algorithm serves a synchronous problem (levenbergMarquardt) and one whose
 * evaluations run elsewhere, e.g. simulations on worker threads (levenbergMarquardtAsync).
 */
export function* lmIterate(m: number, n: number, x0: ArrayLike<number>, options: LmOptions = {}): Generator<LmRequest, LmResult, boolean> {
  const o = { ...DEFAULTS, ...options };
  const x = Float64Array.from(x0);
  project(x, o);
  const r = new Float64Array(m);
  const J = new Float64Array(m * n);
  const done = (status: LmStatus, iterations: number): LmResult => ({
    x, status, converged: status === 'gradient' || status === 'step' || status === 'reduction', iterations, cost: 0.5 * sumSquares(r), r, J,
  });
  if (!(yield { kind: 'residuals', x, out: r }) || !(yield { kind: 'jacobian', x, out: J })) return done('not-evaluable', 0);

  const A = new Float64Array(n * n);
  const g = new Float64Array(n);
  const D = new Float64Array(n);
  const M = new Float64Array(n * n);
  const h = new Float64Array(n);
  const xNew = new Float64Array(n);
  const rNew = new Float64Array(m);
  const lu = new DenseLu(n);
  normalEquations(J, r, m, n, A, g);
  for (let j = 0; j < n; j++) D[j] = Math.max(A[j * n + j], Number.MIN_VALUE);
  let F = 0.5 * sumSquares(r);
  let mu = o.tau;
  let nu = 2;

  const gradientSmall = (): boolean => {
    const rn = norm(r);
    if (rn === 0) return true;
    for (let j = 0; j < n; j++) {
      const cj = Math.sqrt(A[j * n + j]);
      if (cj > 0 && Math.abs(g[j]) / (cj * rn) > o.gtol) return false;
    }
    return true;
  };
  if (gradientSmall()) return done('gradient', 0);

  for (let k = 1; k <= o.maxIterations; k++) {
    for (let i = 0; i < n * n; i++) M[i] = A[i];
    for (let j = 0; j < n; j++) {
      M[j * n + j] += mu * D[j];
      h[j] = -g[j];
    }
    if (!lu.factor(M)) {
      mu *= nu;
      nu *= 2;
      continue;
    }
    lu.solve(h);
    for (let j = 0; j < n; j++) xNew[j] = x[j] + h[j];
    project(xNew, o);
    for (let j = 0; j < n; j++) h[j] = xNew[j] - x[j];
    if (norm(h) <= o.xtol * (norm(x) + o.xtol)) return done('step', k);
    let predicted = 0; // L(0) − L(h) = ½ hᵀ(μDh − g)
    for (let j = 0; j < n; j++) predicted += 0.5 * h[j] * (mu * D[j] * h[j] - g[j]);
    const ok: boolean = yield { kind: 'residuals', x: xNew, out: rNew };
    const FNew = ok ? 0.5 * sumSquares(rNew) : Infinity;
    const rho = ok && predicted > 0 ? (F - FNew) / predicted : -1;
    if (rho > 0) {
      const smallReduction = Math.abs(F - FNew) <= o.ftol * F && predicted <= o.ftol * F;
      x.set(xNew);
      r.set(rNew);
      F = FNew;
      if (!(yield { kind: 'jacobian', x, out: J })) return done('not-evaluable', k);
      normalEquations(J, r, m, n, A, g);
      for (let j = 0; j < n; j++) D[j] = Math.max(D[j], A[j * n + j]);
      mu *= Math.max(1 / 3, 1 - (2 * rho - 1) ** 3);
      nu = 2;
      if (gradientSmall()) return done('gradient', k);
      if (smallReduction) return done('reduction', k);
    } else {
      mu *= nu;
      nu *= 2;
      if (!Number.isFinite(mu)) return done('max-iterations', k);
    }
  }
  return done('max-iterations', o.maxIterations);
}

/** Minimises ½‖r(x)‖² from x0. Never throws for a bad problem: the status says what happened. */
export function levenbergMarquardt(p: LmProblem, x0: ArrayLike<number>, options: LmOptions = {}): LmResult {
  const it = lmIterate(p.m, p.n, x0, options);
  let step = it.next(true);
  while (!step.done) {
    const q = step.value;
    const ok = q.kind === 'residuals' ? p.residuals(q.x, q.out) : p.jacobian ? p.jacobian(q.x, q.out) : finiteJacobian(p, q.x, q.out);
    step = it.next(ok);
  }
  return step.value;
}

/** A problem whose evaluations are asynchronous (simulations on worker threads). */
export interface AsyncLmProblem {
  m: number;
  n: number;
  residuals(x: Float64Array, r: Float64Array): Promise<boolean>;
  jacobian(x: Float64Array, J: Float64Array): Promise<boolean>;
}

/** levenbergMarquardt for a problem with asynchronous evaluations: the same iteration. */
export async function levenbergMarquardtAsync(p: AsyncLmProblem, x0: ArrayLike<number>, options: LmOptions = {}): Promise<LmResult> {
  const it = lmIterate(p.m, p.n, x0, options);
  let step = it.next(true);
  while (!step.done) {
    const q = step.value;
    const ok = q.kind === 'residuals' ? await p.residuals(q.x, q.out) : await p.jacobian(q.x, q.out);
    step = it.next(ok);
  }
  return step.value;
}

/**
 * (JᵀJ)⁻¹ for the covariance s²(JᵀJ)⁻¹ of a least-squares estimate (Gauss–Newton
 * linearisation at the solution), or undefined when JᵀJ is singular.
 * References: Seber & Wild, Nonlinear Regression, Wiley 1989, §2.1 (asymptotic covariance).
 */
export function inverseNormalMatrix(J: Float64Array, m: number, n: number): Float64Array | undefined {
  // Columns scaled to unit length first, so parameters of very different size (a modulus in
  // Pa beside a dimensionless limit) do not spoil the elimination.
  const c = new Float64Array(n);
  for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) c[j] += J[i * n + j] ** 2;
  for (let j = 0; j < n; j++) {
    c[j] = Math.sqrt(c[j]);
    if (!(c[j] > 0) || !Number.isFinite(c[j])) return undefined;
  }
  const Js = new Float64Array(m * n);
  for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) Js[i * n + j] = J[i * n + j] / c[j];
  const A = new Float64Array(n * n);
  const g = new Float64Array(n);
  normalEquations(Js, new Float64Array(m), m, n, A, g);
  const lu = new DenseLu(n);
  if (!lu.factor(A)) return undefined;
  const inv = new Float64Array(n * n);
  const e = new Float64Array(n);
  for (let col = 0; col < n; col++) {
    e.fill(0);
    e[col] = 1;
    lu.solve(e);
    for (let i = 0; i < n; i++) inv[i * n + col] = e[i] / (c[i] * c[col]);
  }
  return inv;
}
