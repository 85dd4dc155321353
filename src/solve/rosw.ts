/**
 * ROS34PW2, a stiff integrator that keeps its jacobian: a 4-stage Rosenbrock–W method of order 3
 * with an embedded order-2 error estimate, L-stable and stiffly accurate (Rang & Angermann 2005).
 * A W-method keeps its order with any approximation of ∂f/∂y in the stages, so the jacobian
 * (and ∂f/∂t) computed at one step serves the following ones; only the factorisation of
 * (1/(hγ))·I − J is redone when h changes. The jacobian is recomputed after a rejected step
 * that used an old one and after MAX_JACOBIAN_AGE accepted steps. Mass stays conserved with an
 * old jacobian: it is an exact jacobian somewhere, so its columns still sum to zero over the
 * mass rows (see DEVELOPERS.md, "State and conservation").
 *
 * Dense output: the cubic Hermite interpolant through (t0, y0, f0) and (t1, y1, f1) (order 3,
 * like the method); f1 = f(t1, y1) is the next step's first stage, so it costs nothing extra
 * except after the last step. Like the rhs, it is linear in y and f, so it conserves what the
 * steps conserve.
 *
 * Stages in the transformed form of rodas.f (u = Γk, Hairer & Wanner §IV.7):
 *   (1/(hγ) I − J) u_i = f(t + c_i h, y + Σ_j a_ij u_j) + Σ_j (g_ij / h) u_j + h d_i f_t,
 *   y1 = y + Σ m_j u_j, error estimate Σ e_j u_j,
 * with a = αΓ⁻¹, g = −Γ⁻¹ below the diagonal, m = bΓ⁻¹, e = (b − b̂)Γ⁻¹, c_i = Σ_j α_ij,
 * d_i = Σ_j γ_ij, computed below from the published coefficients.
 *
 * References: J. Rang & L. Angermann, New Rosenbrock W-methods of order 3 for partial
 * differential algebraic equations of index 1, BIT Numer. Math. 45 (2005) 761–787 (ROS34PW2;
 * coefficients cross-checked against a public transcription, and the order conditions and
 * stability function are verified in test/solve/rosw.test.ts); Hairer & Wanner, Solving ODEs
 * II, 2nd ed. 1996, §IV.7 (Rosenbrock and W-methods, transformed form, step control);
 * Hairer, Nørsett & Wanner, Solving ODEs I, §II.6 (Hermite interpolation).
 */
import { Linearisation } from './iteration-matrix.js';
import { adaptiveSteps, allFinite, fixedSteps, rmsNorm, rosenbrockStages, type StepMachine, type Tableau } from './step-control.js';
import type { DenseOutput, IntegrateOptions, IntegrateResult, Integrator, OdeProblem, StepCallback, WorkCounts } from './types.js';

// ---- Coefficients (standard form α, γ, b, b̂ of Rang & Angermann 2005, ROS34PW2) ------------
export const ROSW_GAMMA = 4.3586652150845900e-01;
export const ROSW_ALPHA: readonly (readonly number[])[] = [
  [],
  [8.7173304301691801e-01],
  [8.4457060015369423e-01, -1.1299064236484185e-01],
  [0, 0, 1],
];
export const ROSW_GAMMA_IJ: readonly (readonly number[])[] = [
  [],
  [-8.7173304301691801e-01],
  [-9.0338057013044082e-01, 5.4180672388095326e-02],
  [2.4212380706095346e-01, -1.2232505839045147e+00, 5.4526025533510214e-01],
];
export const ROSW_B = [2.4212380706095346e-01, -1.2232505839045147e+00, 1.5452602553351020e+00, 4.3586652150845900e-01];
export const ROSW_BHAT = [3.7810903145819369e-01, -9.6042292212423178e-02, 5.0000000000000000e-01, 2.1793326075422950e-01];

const S = 4;
/** Γ⁻¹ of the lower triangular Γ (γ on the diagonal, γ_ij below). */
const GINV: number[][] = (() => {
  const g = (i: number, j: number): number => (i === j ? ROSW_GAMMA : j < i ? ROSW_GAMMA_IJ[i][j] : 0);
  const inv = Array.from({ length: S }, () => new Array<number>(S).fill(0));
  for (let i = 0; i < S; i++) {
    inv[i][i] = 1 / ROSW_GAMMA;
    for (let j = i - 1; j >= 0; j--) {
      let s = 0;
      for (let k = j; k < i; k++) s += g(i, k) * inv[k][j];
      inv[i][j] = -s / ROSW_GAMMA;
    }
  }
  return inv;
})();
const rowTimesGinv = (v: (i: number) => number): number[] =>
  Array.from({ length: S }, (_, j) => { let s = 0; for (let i = j; i < S; i++) s += v(i) * GINV[i][j]; return s; });
/** a_ij (j < i): the stage arguments in u. */
const A: number[][] = Array.from({ length: S }, (_, i) => {
  const row = rowTimesGinv((k) => (k < i ? ROSW_ALPHA[i][k] : 0));
  return row.slice(0, i);
});
/** g_ij (j < i): coupling of earlier stages. */
const G: number[][] = Array.from({ length: S }, (_, i) => GINV[i].slice(0, i).map((x) => -x));
const M = rowTimesGinv((i) => ROSW_B[i]);
const E = rowTimesGinv((i) => ROSW_B[i] - ROSW_BHAT[i]);
const C = ROSW_ALPHA.map((r) => r.reduce((a, b) => a + b, 0));
const D = ROSW_GAMMA_IJ.map((r) => r.reduce((a, b) => a + b, ROSW_GAMMA));
const ROS34PW2: Tableau = { a: A, g: G, c: C, d: D };

// ---- Jacobian reuse ------------------------------------------------------------------------
/** Accepted steps one jacobian serves at most. */
export const MAX_JACOBIAN_AGE = 20;
/** An accepted step with an error norm above this asks for a fresh jacobian (measured: bench/integrators.ts). */
export const KEEP_ERROR = 0.1;

class RosW extends Linearisation {
  /** After an accepted step f0 holds f(t1, y1) (see keep). */
  private f1: Float64Array;
  readonly yNew: Float64Array;
  readonly dense: DenseOutput;
  private readonly ys: Float64Array;
  private readonly u: Float64Array[];
  private readonly err: Float64Array;
  private readonly y0: Float64Array;
  private readonly dy: Float64Array;
  private readonly hf0: Float64Array;
  private readonly hf1: Float64Array;
  private tOld = 0;
  private hOld = 1;

  constructor(p: OdeProblem, linearAlgebra?: IntegrateOptions['linearAlgebra']) {
    super(p, linearAlgebra);
    const n = p.n;
    const v = (): Float64Array => new Float64Array(n);
    this.f1 = v(); this.yNew = v(); this.ys = v(); this.err = v();
    this.y0 = v(); this.dy = v(); this.hf0 = v(); this.hf1 = v();
    this.u = Array.from({ length: S }, v);
    const { y0, dy, hf0, hf1 } = this;
    // Hairer, Nørsett & Wanner I, (II.6.7): y(θ) = (1−θ)y0 + θy1 + θ(θ−1)((1−2θ)(y1−y0) + (θ−1)h f0 + θ h f1)
    this.dense = (t, out) => {
      const s = (t - this.tOld) / this.hOld;
      const w = s * (s - 1), a = 1 - 2 * s, b = s - 1;
      for (let i = 0; i < n; i++) out[i] = y0[i] + s * dy[i] + w * (a * dy[i] + b * hf0[i] + s * hf1[i]);
    };
  }

  /** One step of signed size h from (t, y) with the current J; tLast is the time of stages at c = 1. */
  attempt(t: number, y: Float64Array, h: number, tLast: number, work: WorkCounts): 'ok' | 'singular' | 'non-finite' {
    const { n, u, ys, ft, lu, p } = this;
    work.lu++;
    if (!lu.factor(1 / (h * ROSW_GAMMA))) return 'singular';
    rosenbrockStages(ROS34PW2, p, lu, u, ys, this.f0, ft, t, y, h, tLast, work);
    const { yNew, err } = this;
    yNew.set(y);
    err.fill(0);
    for (let j = 0; j < S; j++) {
      const m = M[j], e = E[j], uj = u[j];
      for (let i = 0; i < n; i++) { yNew[i] += m * uj[i]; err[i] += e * uj[i]; }
    }
    return allFinite(yNew) && allFinite(err) ? 'ok' : 'non-finite';
  }

  errorNorm(y: Float64Array): number {
    return rmsNorm(this.err, y, this.yNew, this.p);
  }

  /** f1 = f(t1, yNew) for the dense output and the next step; false when not finite. */
  evalEnd(t1: number, work: WorkCounts): boolean {
    this.p.rhs(t1, this.yNew, this.f1);
    work.rhs++;
    return allFinite(this.f1);
  }

  /** Keeps the attempt from (t, y) over signed h: dense output, then f0 ← f1. */
  keep(t: number, h: number, y: Float64Array): void {
    const { n, y0, dy, hf0, hf1, f0, f1, yNew } = this;
    for (let i = 0; i < n; i++) {
      y0[i] = y[i];
      dy[i] = yNew[i] - y[i];
      hf0[i] = h * f0[i];
      hf1[i] = h * f1[i];
    }
    this.tOld = t;
    this.hOld = h;
    this.f0 = f1;
    this.f1 = f0;
  }
}

export interface RosWOptions extends IntegrateOptions {
  /** Accepted steps one jacobian serves at most (default MAX_JACOBIAN_AGE; 1 = a fresh one every step). */
  jacobianAge?: number;
  /** Error norm of an accepted step above which the next step gets a fresh jacobian (default KEEP_ERROR). */
  keepError?: number;
}

/** ROS34PW2 for the shared adaptive loop, with the jacobian kept while steps succeed with room. */
class RosWMachine extends RosW implements StepMachine {
  /** Accepted steps since the jacobian was computed; −1: compute one before the next attempt. */
  private age = -1;
  private tEnd = 0;

  constructor(p: OdeProblem, options: RosWOptions) {
    super(p, options.linearAlgebra);
    this.maxAge = Math.max(1, options.jacobianAge ?? MAX_JACOBIAN_AGE);
    this.keepError = options.keepError ?? KEEP_ERROR;
  }
  private readonly maxAge: number;
  private readonly keepError: number;

  start(t: number, y: Float64Array, work: WorkCounts): boolean {
    return this.evalRhs(t, y, work);
  }

  prepare(t: number, y: Float64Array, hs: number, tInside: number, work: WorkCounts): boolean {
    this.tEnd = tInside;
    if (this.age >= 0 && this.age < this.maxAge) return true;
    this.age = 0;
    return this.linearise(t, y, hs, tInside, work);
  }

  override attempt(t: number, y: Float64Array, hs: number, tLast: number, work: WorkCounts): 'ok' | 'singular' | 'non-finite' {
    const r = super.attempt(t, y, hs, tLast, work);
    // f at the step end: the dense output's and the next step's first stage
    return r === 'ok' && !this.evalEnd(tLast, work) ? 'non-finite' : r;
  }

  retry(kind: 'singular' | 'non-finite' | 'error'): boolean {
    if (this.age <= 0) return false;
    this.age = -1; // an old jacobian may be the trouble: a fresh one, and for a failure the same h
    return kind !== 'error';
  }

  accept(t: number, hs: number, y: Float64Array): void {
    this.keep(t, hs, y);
    this.age++;
  }

  accepted(err: number, shrinking: boolean): void {
    if (err > this.keepError || shrinking) this.age = this.maxAge;
  }
}

/**
 * Adaptive ROS34PW2 with jacobian reuse (the loop: step-control.ts, adaptiveSteps). Same
 * options, statuses and conventions as `rosenbrock`, plus `jacobianAge` and `keepError`;
 * work.jacobians counts the jacobians actually computed.
 */
export const rosw: Integrator = (problem, t0, y0, tEnd, onStep, options: RosWOptions = {}) =>
  adaptiveSteps('rosw', new RosWMachine(problem, options), 3, problem, t0, y0, tEnd, onStep, options);

/**
 * ROS34PW2 with `steps` equal steps and no error control, for order studies: a fresh jacobian
 * every step, or with `freezeJacobian` the one of the starting point for every step (the
 * W-method's order must survive that).
 */
export function roswFixedSteps(
  problem: OdeProblem, t0: number, y0: Float64Array, tEnd: number, steps: number,
  onStep?: StepCallback, freezeJacobian = false,
): IntegrateResult {
  const st = new RosWMachine(problem, freezeJacobian ? { jacobianAge: Infinity, keepError: Infinity } : { jacobianAge: 1 });
  return fixedSteps('rosw', st, problem, t0, y0, tEnd, steps, onStep);
}
