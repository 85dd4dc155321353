/**
 * RODAS, the stiff integrator: a 6-stage Rosenbrock method of order 4 with an embedded order-3
 * error estimate, L-stable and stiffly accurate, with an order-3 continuous extension for dense
 * output. One jacobian and one LU factorisation of (1/(hγ))·I − J per step attempt; no Newton
 * iteration. Nothing allocates per step. The linear algebra (dense, or sparse for large problems
 * that give a jacobian pattern) lives in iteration-matrix.ts.
 *
 * References: Hairer & Wanner, Solving Ordinary Differential Equations II, 2nd ed., Springer
 * 1996, §VI.4 (RODAS) and §IV.7 (Rosenbrock methods, their implementation and step control;
 * rodas.f's own header cites §IV.7 and §VI.3); Hairer's code rodas.f (version of October 28,
 * 1996), subroutines ROSCOR and ROCOE (METH = 1).
 */
import { Linearisation } from './iteration-matrix.js';
import { adaptiveSteps, allFinite, fixedSteps, rmsNorm, rosenbrockStages, type StepMachine, type Tableau } from './step-control.js';
import type { DenseOutput, IntegrateOptions, IntegrateResult, Integrator, OdeProblem, StepCallback, WorkCounts } from './types.js';

// ---- Coefficients -------------------------------------------------------------------------
// Transcribed from rodas.f, subroutine ROCOE, METH = 1 (Hairer & Wanner's own RODAS set; the
// published code accompanying the book above). Cross-checked digit for digit against the
// Rodas4 tableau of SciML OrdinaryDiffEq.jl (src/tableaus/rosenbrock_tableaus.jl), which
// cites the same book. Form: the "transformed" Rosenbrock stages of rodas.f (Hairer & Wanner §IV.7),
//   (1/(hγ) I − J) k_i = f(t + c_i h, y + Σ_j a_ij k_j) + Σ_j (g_ij / h) k_j + h d_i f_t,
// y1 = y + Σ_{j≤4} a_5j k_j + k_5 + k_6 (stiffly accurate), error estimate k_6.

const GAMMA = 0.25;
/** Stage abscissae c_i. */
const C = [0, 0.386, 0.21, 0.63, 1, 1];
/** Weights d_i of h·∂f/∂t (rodas.f D1..D4; zero for the last two stages). */
const D = [0.25, -0.1043, 0.1035, -0.03620000000000023, 0, 0];
/** a_ij: argument of stage i. Row 5 is the embedded (order-3) solution y + … + k_5. */
const A: readonly number[][] = [
  [],
  [1.544],
  [0.9466785280815826, 0.2557011698983284],
  [3.314825187068521, 2.896124015972201, 0.9986419139977817],
  [1.221224509226641, 6.019134481288629, 12.53708332932087, -0.687886036105895],
  [1.221224509226641, 6.019134481288629, 12.53708332932087, -0.687886036105895, 1],
];
/** g_ij (rodas.f C21..C65): coupling of earlier stages into the right-hand side of stage i. */
const G: readonly number[][] = [
  [],
  [-5.6688],
  [-2.430093356833875, -0.2063599157091915],
  [-0.1073529058151375, -9.594562251023355, -20.47028614809616],
  [7.496443313967647, -10.24680431464352, -33.99990352819905, 11.7089089320616],
  [8.083246795921522, -7.981132988064893, -31.52159432874371, 16.31930543123136, -6.058818238834054],
];
const RODAS: Tableau = { a: A, g: G, c: C, d: D };
/** Dense output (rodas.f D21..D35): q_2 = Σ H[0][j] k_j, q_3 = Σ H[1][j] k_j over k_1..k_5. */
const H: readonly number[][] = [
  [10.12623508344586, -7.487995877610167, -34.80091861555747, -7.992771707568823, 1.025137723295662],
  [-0.6762803392801253, 6.087714651680015, 16.43084320892478, 24.76722511418386, -6.594389125716872],
];

/**
 * One RODAS step machine: workspace, the linearisation at (t, y), a step attempt and the dense
 * output of the last accepted step.
 */
class Rodas extends Linearisation {
  readonly yNew: Float64Array;
  /** Dense output of the last accepted step; reads `q`, so valid until the next `accept`. */
  readonly dense: DenseOutput;
  private readonly ys: Float64Array;
  private readonly k: Float64Array[];
  private readonly q: Float64Array[];
  private tOld = 0;
  private hOld = 1;

  constructor(p: OdeProblem, linearAlgebra?: IntegrateOptions['linearAlgebra']) {
    super(p, linearAlgebra);
    const n = p.n;
    this.yNew = new Float64Array(n);
    this.ys = new Float64Array(n);
    this.k = Array.from({ length: 6 }, () => new Float64Array(n));
    this.q = Array.from({ length: 4 }, () => new Float64Array(n));
    const [q0, q1, q2, q3] = this.q;
    // References: rodas.f, function CONTRO: y(t0 + s h) ≈ (1−s) y0 + s (y1 + (1−s)(q2 + s q3)).
    this.dense = (t, out) => {
      const s = (t - this.tOld) / this.hOld;
      const r = 1 - s;
      for (let i = 0; i < n; i++) out[i] = r * q0[i] + s * (q1[i] + r * (q2[i] + s * q3[i]));
    };
  }

  /**
   * One RODAS step of signed size h from (t, y). tLast is the time of the stages at c = 1:
   * t + h, or for the final step just inside tEnd (see justInside). On 'ok', yNew is the
   * solution and k[5] its error estimate.
   *
   * References: rodas.f, subroutine ROSCOR (stages, embedded solution, error estimate).
   */
  attempt(t: number, y: Float64Array, h: number, tLast: number, work: WorkCounts): 'ok' | 'singular' | 'non-finite' {
    const { n, k, ys, ft, lu, p } = this;
    work.lu++;
    if (!lu.factor(1 / (h * GAMMA))) return 'singular';
    rosenbrockStages(RODAS, p, lu, k, ys, this.f0, ft, t, y, h, tLast, work);
    // After the loop ys holds the embedded solution (the argument of stage 6).
    const yNew = this.yNew, err = k[5];
    for (let i = 0; i < n; i++) yNew[i] = ys[i] + err[i];
    return allFinite(yNew) && allFinite(err) ? 'ok' : 'non-finite';
  }

  /** Weighted RMS norm of the embedded error estimate of the last attempt. */
  errorNorm(y: Float64Array): number {
    return rmsNorm(this.k[5], y, this.yNew, this.p);
  }

  /** Records the dense output of the attempt just made, from t over signed h; y is the old state. */
  keepDense(t: number, h: number, y: Float64Array): void {
    const { n, k, q } = this;
    q[0].set(y);
    q[1].set(this.yNew);
    for (let r = 0; r < 2; r++) {
      const row = H[r], qr = q[r + 2];
      qr.fill(0);
      for (let j = 0; j < 5; j++) {
        const c = row[j], kj = k[j];
        for (let i = 0; i < n; i++) qr[i] += c * kj[i];
      }
    }
    this.tOld = t;
    this.hOld = h;
  }
}


/** RODAS for the shared adaptive loop: a fresh f and jacobian at the start of every step. */
class RodasMachine extends Rodas implements StepMachine {
  private haveRhs = false;
  private needJacobian = true;

  start(t: number, y: Float64Array, work: WorkCounts): boolean {
    this.haveRhs = true;
    return this.evalRhs(t, y, work);
  }

  prepare(t: number, y: Float64Array, hs: number, tInside: number, work: WorkCounts): boolean {
    if (!this.haveRhs && !this.evalRhs(t, y, work)) return false;
    this.haveRhs = true;
    if (this.needJacobian) {
      if (!this.linearise(t, y, hs, tInside, work)) return false;
      this.needJacobian = false;
    }
    return true;
  }

  retry(): boolean {
    return false;
  }

  accept(t: number, hs: number, y: Float64Array): void {
    this.keepDense(t, hs, y);
    this.haveRhs = false;
    this.needJacobian = true;
  }

  accepted(): void {}
}

/**
 * Adaptive RODAS (the loop: step-control.ts, adaptiveSteps). Options: h0 (first step; default
 * from ‖y‖/‖f‖), hMax, maxSteps (accepted + rejected attempts, default 100 000).
 */
export const rosenbrock: Integrator = (problem, t0, y0, tEnd, onStep, options: IntegrateOptions = {}) =>
  adaptiveSteps('rosenbrock', new RodasMachine(problem, options.linearAlgebra), 4, problem, t0, y0, tEnd, onStep, options);

/**
 * RODAS with `steps` equal steps and no error control, for convergence-order studies and
 * tests. onStep (optional) receives the same dense output as in the adaptive integrator.
 * Statuses: 'completed', 'stopped', 'non-finite', 'singular'.
 *
 * References: Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, §VI.4 (RODAS).
 */
export function rosenbrockFixedSteps(
  problem: OdeProblem,
  t0: number,
  y0: Float64Array,
  tEnd: number,
  steps: number,
  onStep?: StepCallback,
  linearAlgebra?: IntegrateOptions['linearAlgebra'],
): IntegrateResult {
  return fixedSteps('rosenbrockFixedSteps', new RodasMachine(problem, linearAlgebra), problem, t0, y0, tEnd, steps, onStep);
}
