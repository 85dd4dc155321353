/**
 * NDF/BDF, the multistep stiff integrator: variable order 1–5, variable step in the
 * quasi-constant step-size form on backward differences, with the numerical differentiation
 * formulas (NDF) of Klopfenstein and Shampine & Reichelt (κ of their Table 1; κ = 0 gives the
 * plain BDF). The implicit equation of each step is solved by a simplified Newton iteration that
 * keeps its jacobian across steps (and across the driver's restarts at events and breakpoints):
 * J is recomputed only when the iteration converges too slowly or diverges with an LU that was
 * not built from a fresh J; the LU of I − (h/α_k)·J is redone when h or the order changes.
 *
 * The state is the array of scaled backward differences D_j = h^j ∇^j y_n (j = 0…k+2). A step:
 *   predictor  y⁽⁰⁾ = Σ_{j≤k} D_j,   ψ = (1/α_k) Σ_{j=1..k} γ_j D_j,
 *   corrector  (y − y⁽⁰⁾) − (h/α_k) f(t_{n+1}, y) + ψ = 0   (α_k = (1 − κ_k) γ_k, γ_k = Σ 1/j),
 *   error      (κ_k γ_k + 1/(k+1)) ‖y − y⁽⁰⁾‖,
 * then the differences are updated with d = y − y⁽⁰⁾ (D_{k+2} = d − D_{k+1}, D_{k+1} = d, and
 * D_j += D_{j+1} downwards). A change of h by a factor r multiplies D_1..D_k by R(r)·R(1)
 * (Shampine & Reichelt, §2.2: interpolating the backward differences). After k+1 steps at one
 * order and h, the errors estimated at k − 1, k and k + 1 pick the order with the largest
 * step (Hairer & Wanner §III.5 and §IV.8 for the estimates and the order choice).
 *
 * Dense output on [t_n, t_{n+1}]: the polynomial interpolating the last k + 1 values, from the
 * updated differences, y(t) = D_0 + Σ_{j=1..k} D_j Π_{m<j} (t − t_{n+1} + m h)/((m+1) h)
 * (Newton's backward-difference form); valid until the next step.
 *
 * Mass conservation: predictor, corrector and difference updates are linear in y and f, and
 * every Newton correction solves with a J whose mass rows' column sums vanish (any exact
 * jacobian of a conserving rhs), so Σ of the mass slots is kept to round-off (see DEVELOPERS.md,
 * "State and conservation").
 *
 * References: L. F. Shampine & M. W. Reichelt, The MATLAB ODE Suite, SIAM J. Sci. Comput. 18
 * (1997) 1–22 (NDF coefficients, quasi-constant step size, step changes on the differences,
 * the Newton convergence test with the rate kept between steps); L. F. Shampine, Numerical
 * Solution of Ordinary Differential Equations, Chapman & Hall 1994, §6 (BDF in backward
 * differences); Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, §III.5 (variable-order BDF,
 * error estimates) and §IV.8 (implementation of implicit methods: simplified Newton, when to
 * recompute the jacobian).
 */
import { makeIterationMatrix, type IterationMatrix } from './iteration-matrix.js';
import { allFinite, checkArguments, EPS, initialStep, MAX_NON_FINITE, MAX_SINGULAR, minStep, positive, rmsNorm, runBounds } from './step-control.js';
import { zeroWork, type DenseOutput, type IntegrateOptions, type IntegrateResult, type Integrator, type IntegratorStatus, type OdeProblem, type StepCallback, type WorkCounts } from './types.js';

export const MAX_ORDER = 5;
/** κ_k of the NDFs, k = 1…5 (Shampine & Reichelt 1997, Table 1; κ_5 = 0: order 5 is the BDF). */
const KAPPA = [0, -0.1850, -1 / 9, -0.0823, -0.0415, 0];
const GAMMA = KAPPA.map((_, k) => { let s = 0; for (let j = 1; j <= k; j++) s += 1 / j; return s; });
const ALPHA = KAPPA.map((kap, k) => (1 - kap) * GAMMA[k]);
/** Error constants of the NDFs: κ_k γ_k + 1/(k + 1). */
const ERR_CONST = KAPPA.map((kap, k) => kap * GAMMA[k] + 1 / (k + 1));
/**
 * The Newton iteration stops when its remaining error, estimated from the contraction rate, is
 * below this fraction of the error tolerance (ode15s: 0.05·rtol in its relative norm; measured
 * on the bench chain: 1e-3 took 366 rhs and 9 jacobians, 0.03 took 304 and 7, with the same steps).
 */
const NEWTON_TOL = 0.03;
/**
 * Newton iterations a step gets (ode15s: 4). Measured on the bench grid (valves opening on a
 * ramp, lines leaving the laminar range: a fresh jacobian still gives contraction rates of
 * 0.4–0.5): 6 took 30 % fewer rejected steps and 25 % fewer jacobians than 4; the chain and the
 * star were unchanged.
 */
const NEWTON_MAXITER = 6;
/**
 * An accepted step whose Newton iteration contracted more slowly than this with an old jacobian
 * renews it for the next step (Hairer & Wanner §IV.8 renew after every step with a rate above
 * 0.001 in RADAU5, whose jacobian is cheap to compare; ode15s only after a failure). Measured on
 * the bench grid: 0.3 saved a quarter of the rejected steps, neutral on the chain and the star.
 */
const REFRESH_RATE = 0.3;
const MIN_FACTOR = 0.2;
const MAX_FACTOR = 10;
/** An increase of h smaller than this is not worth a new LU (the order unchanged). */
const MIN_GROWTH = 1.2;
/**
 * The local error estimate is held at 1/ERROR_SCALE of the tolerance. A multistep method keeps
 * the solution whose error it estimates (RODAS keeps a solution one order higher than its
 * estimate), and its history carries the error of a kink the driver does not know of (a line
 * starting to choke) over several steps, so at 1 its global error on the example networks was
 * 5–30 times RODAS's at the same tolerance; at 10 it is within 0.3–3 times RODAS's (measured
 * against RODAS at rtol 1e-10: docs/performance.md, "Stiff integrators").
 */
export const ERROR_SCALE = 10;
/** A step within this factor of the rest of the interval is stretched to its end (ode15s: 1.1). */
const LAST_STRETCH = 1.1;

/** R(r)·R(1) of Shampine & Reichelt §2.2 for order k (entries 1…k), row-major (k+1)². */
function changeMatrix(k: number, r: number, out: Float64Array): void {
  const R = (f: number): number[][] => {
    const m: number[][] = [];
    for (let i = 0; i <= k; i++) {
      m.push([]);
      for (let j = 0; j <= k; j++) {
        const mij = i === 0 ? 1 : j === 0 ? 0 : (i - 1 - f * j) / i;
        m[i].push(i === 0 ? mij : m[i - 1][j] * mij);
      }
    }
    return m;
  };
  const a = R(r), b = R(1);
  for (let i = 0; i <= k; i++) for (let j = 0; j <= k; j++) {
    let s = 0;
    for (let l = 0; l <= k; l++) s += a[i][l] * b[l][j];
    out[i * (k + 1) + j] = s;
  }
}

/** What a problem keeps between calls: its iteration matrix, and whether J in it is usable. */
interface Kept { mat: IterationMatrix; kind: IntegrateOptions['linearAlgebra']; hasJ: boolean }
// The driver starts a new integrator call at every event and breakpoint: the jacobian of the
// last call is kept per problem object and reused (flagged as old), so a restart costs no
// jacobian unless the Newton iteration asks for one.
const kept = new WeakMap<OdeProblem, Kept>();

export interface BdfOptions extends IntegrateOptions {
  /** Highest order used (1–5, default 5). */
  maxOrder?: number;
  /** The estimated local error is held at 1/errorScale of the tolerance (default ERROR_SCALE). */
  errorScale?: number;
}

type Newton = 'ok' | 'slow' | 'singular' | 'non-finite';

/** One NDF integration: the differences, the iteration matrix, a Newton solve, step changes. */
class Ndf {
  readonly n: number;
  readonly D: Float64Array[];
  order = 1;
  h = 0;
  /** Time of D_0. */
  t = 0;
  /** 1/c of the current LU of c·I − J (c = α_k/h), or 0 when there is none. */
  private cLu = 0;
  /** J was computed at the current D_0 (a failure then shrinks h instead of renewing J). */
  private jCurrent = false;
  /** Contraction rate of the last Newton iteration with this LU, or 0 when unknown. */
  private rate = 0;
  private readonly yPred: Float64Array;
  private readonly psi: Float64Array;
  readonly d: Float64Array;
  readonly yNew: Float64Array;
  private readonly dy: Float64Array;
  private readonly f: Float64Array;
  private readonly tmp: Float64Array[];
  private readonly ru = new Float64Array((MAX_ORDER + 1) ** 2);
  private readonly newtonTol: number;
  /** A Newton correction this small (in units of the tolerance) is round-off. */
  private readonly roundOff: number;
  readonly dense: DenseOutput;

  constructor(private readonly p: OdeProblem, private readonly mat: Kept) {
    const n = (this.n = p.n);
    const v = (): Float64Array => new Float64Array(n);
    this.D = Array.from({ length: MAX_ORDER + 3 }, v);
    this.yPred = v(); this.psi = v(); this.d = v(); this.yNew = v(); this.dy = v(); this.f = v();
    this.tmp = Array.from({ length: MAX_ORDER }, v);
    this.newtonTol = Math.max(10 * EPS / p.rtol, NEWTON_TOL);
    this.roundOff = 100 * EPS / p.rtol;
    const { D } = this;
    this.dense = (t, out) => {
      out.set(D[0]);
      let w = 1;
      for (let j = 1; j <= this.order; j++) {
        w *= (t - this.t + (j - 1) * this.h) / (j * this.h);
        const Dj = D[j];
        for (let i = 0; i < n; i++) out[i] += w * Dj[i];
      }
    };
  }

  /** Multiplies the step by r: D_1..D_k ← (R(r)R(1))ᵀ D_1..D_k. The LU is then stale. */
  changeStep(r: number): void {
    this.h *= r;
    this.cLu = 0;
    this.rate = 0;
    if (r === 1) return;
    const k = this.order, { D, tmp, ru, n } = this;
    changeMatrix(k, r, ru);
    for (let j = 1; j <= k; j++) {
      const t = tmp[j - 1];
      t.fill(0);
      for (let i = 1; i <= k; i++) {
        const c = ru[i * (k + 1) + j];
        if (c !== 0) { const Di = D[i]; for (let l = 0; l < n; l++) t[l] += c * Di[l]; }
      }
    }
    for (let j = 1; j <= k; j++) D[j].set(tmp[j - 1]);
  }

  /** A fresh jacobian at (t, D_0); false when not finite. */
  jacobian(work: WorkCounts): boolean {
    const { p, f, D } = this;
    p.rhs(this.t, D[0], f);
    work.rhs++;
    if (!allFinite(f)) return false;
    const used = this.mat.mat.linearise(this.t, D[0], f);
    work.jacobians++;
    this.cLu = 0;
    this.rate = 0;
    this.jCurrent = used >= 0;
    this.mat.hasJ = this.jCurrent;
    if (used < 0) return false;
    work.rhs += used;
    return true;
  }

  /**
   * One attempt to t + h (f evaluated at tF): predictor and simplified Newton. yNew and d hold
   * the corrected value and y − y⁽⁰⁾ when 'ok'.
   */
  solve(tF: number, work: WorkCounts): Newton {
    const { n, D, yPred, psi, d, yNew, dy, f, p, mat } = this;
    const k = this.order, h = this.h;
    yPred.set(D[0]);
    psi.fill(0);
    for (let j = 1; j <= k; j++) {
      const Dj = D[j], g = GAMMA[j] / ALPHA[k];
      for (let i = 0; i < n; i++) { yPred[i] += Dj[i]; psi[i] += g * Dj[i]; }
    }
    const c = h / ALPHA[k];
    if (this.cLu !== c) {
      work.lu++;
      if (!mat.mat.factor(1 / c)) { this.cLu = 0; return 'singular'; }
      this.cLu = c;
      this.rate = 0;
    }
    yNew.set(yPred);
    d.fill(0);
    let old = 0;
    const tol = this.newtonTol;
    for (let it = 0; it < NEWTON_MAXITER; it++) {
      p.rhs(tF, yNew, f);
      work.rhs++;
      if (!allFinite(f)) return 'non-finite';
      // (I − cJ)Δ = c f − ψ − d, solved as (I/c − J)Δ = f − (ψ + d)/c
      for (let i = 0; i < n; i++) dy[i] = f[i] - (psi[i] + d[i]) / c;
      mat.mat.solve(dy);
      const norm = rmsNorm(dy, yPred, yPred, p);
      if (!Number.isFinite(norm)) return 'non-finite';
      if (norm <= this.roundOff) {
        // a correction at round-off level: done (a rate from two such corrections is noise)
        for (let i = 0; i < n; i++) { yNew[i] += dy[i]; d[i] += dy[i]; }
        return 'ok';
      }
      if (it > 0) {
        this.rate = norm / old;
        if (this.rate >= 1 || (this.rate ** (NEWTON_MAXITER - it)) / (1 - this.rate) * norm > tol) { this.rate = 0; return 'slow'; }
      }
      for (let i = 0; i < n; i++) { yNew[i] += dy[i]; d[i] += dy[i]; }
      // converged: the remaining error, estimated with the rate of this LU, is below tol
      if (norm === 0 || (this.rate > 0 && this.rate < 1 && this.rate / (1 - this.rate) * norm < tol)) return 'ok';
      old = norm;
    }
    this.rate = 0;
    return 'slow';
  }

  /** Whether a failed Newton iteration may be cured by a fresh J at the same h. */
  get jacobianOld(): boolean { return !this.jCurrent; }

  get lastRate(): number { return this.rate; }
  /** The accepted step: t advances, differences updated from d. */
  accept(): void {
    const { D, d, n } = this;
    const k = this.order;
    const a = D[k + 2], b = D[k + 1];
    for (let i = 0; i < n; i++) { a[i] = d[i] - b[i]; b[i] = d[i]; }
    for (let j = k; j >= 0; j--) { const Dj = D[j], Dn = D[j + 1]; for (let i = 0; i < n; i++) Dj[i] += Dn[i]; }
    this.t += this.h;
    this.jCurrent = false;
  }
}

/**
 * Adaptive NDF (orders 1–`maxOrder`). Conventions of the other integrators (types.ts): onStep
 * after every accepted step with this step's dense output, statuses instead of throwing,
 * `maxSteps` counts accepted and rejected steps, `hMax`, `h0` as a first step (capped by the
 * order-1 estimate), `linearAlgebra`. hLast is the last accepted step.
 */
export const bdf: Integrator = (problem, t0, y0, tEnd, onStep, options: BdfOptions = {}) => {
  checkArguments('bdf', problem, t0, y0, tEnd);
  const work = zeroWork();
  let t = t0;
  let hLast = 0;
  let yOut: Float64Array = y0;
  const finish = (status: IntegratorStatus, message: string): IntegrateResult =>
    ({ status, t, y: Float64Array.from(yOut), work, hLast, message });
  if (t0 === tEnd) return finish('completed', 'empty interval');
  const errorScale = positive(options.errorScale) ? options.errorScale : ERROR_SCALE;
  const maxOrder = Math.max(1, Math.min(MAX_ORDER, Math.floor(options.maxOrder ?? MAX_ORDER)));
  const { dir, span, hMax, maxSteps, tInside } = runBounds(t0, tEnd, options);

  let k = kept.get(problem);
  if (!k || k.kind !== (options.linearAlgebra ?? 'auto')) {
    k = { mat: makeIterationMatrix(problem, options.linearAlgebra), kind: options.linearAlgebra ?? 'auto', hasJ: false };
    kept.set(problem, k);
  }
  const s = new Ndf(problem, k);
  const { D } = s;
  D[0].set(y0);
  yOut = D[0];
  s.t = t0;
  const f0 = s.yNew; // scratch until the first attempt
  problem.rhs(t0, y0, f0);
  work.rhs++;
  if (!allFinite(f0)) return finish('non-finite', `rhs is not finite at the initial point t = ${t0}`);
  let h = Math.min(positive(options.h0) ? options.h0 : initialStep(problem, y0, f0, span), hMax);
  {
    // cap by the order-1 step from a difference estimate of y'' (Hairer, Nørsett & Wanner I, §II.4, step c)
    const y1 = s.d, f1 = s.D[1];
    for (let i = 0; i < problem.n; i++) y1[i] = y0[i] + dir * h * f0[i];
    problem.rhs(t0 + dir * Math.min(h, span * (1 - 1e-12)), y1, f1);
    work.rhs++;
    if (allFinite(f1)) {
      for (let i = 0; i < problem.n; i++) f1[i] -= f0[i];
      const d2 = rmsNorm(f1, y0, y0, problem) / h;
      if (d2 > 0) h = Math.min(h, 0.5 * Math.sqrt(2 / d2), hMax);
    }
  }
  h = Math.max(h, 2 * minStep(t0, tEnd));
  s.h = dir * h;
  for (let i = 0; i < problem.n; i++) D[1][i] = s.h * f0[i];
  if (!k.hasJ && !s.jacobian(work)) return finish('non-finite', `jacobian not finite at t = ${t0}`);

  let nEqual = 0;
  let nSingular = 0;
  let nNonFinite = 0;
  /** Farthest end of a non-finite attempt; the counter resets once the solution gets past it. */
  let tTrouble = t0;
  for (;;) {
    if (work.steps + work.rejected >= maxSteps) return finish('max-steps', `step budget of ${maxSteps} exhausted at t = ${t}`);
    let hAbs = Math.abs(s.h);
    if (hAbs > hMax) { s.changeStep(hMax / hAbs); nEqual = 0; hAbs = hMax; }
    if (hAbs < minStep(t, tEnd)) return finish('step-too-small', `step size ${hAbs} below round-off limit at t = ${t}`);
    let last = false;
    const rest = Math.abs(tEnd - t);
    if (hAbs * LAST_STRETCH >= rest) {
      if (hAbs !== rest) { s.changeStep(rest / hAbs); nEqual = 0; }
      last = true;
    }
    const tNew = last ? tEnd : t + s.h;
    const outcome = s.solve(last ? tInside : tNew, work);
    if (outcome !== 'ok') {
     
      work.rejected++;
      nEqual = 0;
      if ((outcome === 'slow' || outcome === 'non-finite') && s.jacobianOld) {
        if (!s.jacobian(work)) return finish('non-finite', `jacobian not finite at t = ${t}`);
        continue;
      }
      if (outcome === 'singular') {
        if (++nSingular >= MAX_SINGULAR) return finish('singular', `iteration matrix singular ${nSingular} times at t = ${t}`);
        s.changeStep(0.5);
      } else if (outcome === 'non-finite') {
        if (dir * (tNew - tTrouble) > 0) tTrouble = tNew;
        if (++nNonFinite > MAX_NON_FINITE) return finish('non-finite', `non-finite values after ${MAX_NON_FINITE} step reductions at t = ${t}`);
        s.changeStep(0.25);
      } else {
        s.changeStep(0.5);
      }
      continue;
    }
    const order = s.order;
    const err = errorScale * ERR_CONST[order] * rmsNorm(s.d, D[0], s.yNew, problem);
    if (!(err <= 1)) {
     
      work.rejected++;
      nEqual = 0;
      const r = Number.isFinite(err) ? Math.max(MIN_FACTOR, 0.9 * err ** (-1 / (order + 1))) : MIN_FACTOR;
      s.changeStep(r);
      continue;
    }
    work.steps++;
    nSingular = 0;
    if (dir * (tNew - tTrouble) > 0) nNonFinite = 0;
    const stepJOld = s.jacobianOld;
    s.accept();
    const tOld = t;
    t = tNew;
    s.t = t; // exact at tEnd
    hLast = Math.abs(s.h);
    if (onStep(tOld, t, D[0], s.dense) === false) return finish('stopped', `stopped by the step callback at t = ${t}`);
    if (last) return finish('completed', 'reached tEnd');
    // a step that converged slowly with an old J: a fresh one now rather than a failed attempt next
    if (stepJOld && s.lastRate > REFRESH_RATE && !s.jacobian(work)) return finish('non-finite', `jacobian not finite at t = ${t}`);

    // order and step: after order + 1 steps at this h, the largest step among k − 1, k, k + 1
    if (++nEqual < order + 1) continue;
    const rOf = (e: number, q: number): number => (e > 0 ? e ** (-1 / (q + 1)) : MAX_FACTOR / 0.9);
    const rSame = rOf(err, order);
    const rDown = order > 1 ? rOf(errorScale * ERR_CONST[order - 1] * rmsNorm(D[order], D[0], D[0], problem), order - 1) : 0;
    const rUp = order < maxOrder ? rOf(errorScale * ERR_CONST[order + 1] * rmsNorm(D[order + 2], D[0], D[0], problem), order + 1) : 0;
    let best = rSame, newOrder = order;
    if (rDown > best) { best = rDown; newOrder = order - 1; }
    if (rUp > best) { best = rUp; newOrder = order + 1; }
    const r = Math.min(MAX_FACTOR, 0.9 * best);
    if (newOrder === order && r >= 1 && r < MIN_GROWTH) continue;
   
    s.order = newOrder;
    s.changeStep(r);
    nEqual = 0;
  }
};

/**
 * `steps` steps of constant size h at a fixed order from an exact history (y at t0, t0 − h, …,
 * t0 − order·h, newest first), no error control: the order study of the formulas. Newton is
 * iterated to convergence with a fresh jacobian whenever it stalls. Statuses: 'completed',
 * 'stopped', 'non-finite', 'singular', 'step-too-small' (Newton did not converge).
 */
export function ndfFixedSteps(
  problem: OdeProblem, history: readonly Float64Array[], t0: number, h: number, steps: number, order: number, onStep?: StepCallback,
): IntegrateResult {
  if (!Number.isInteger(order) || order < 1 || order > MAX_ORDER || history.length !== order + 1) {
    throw new RangeError(`ndfFixedSteps: order must be 1–${MAX_ORDER} with order + 1 history values`);
  }
  checkArguments('ndfFixedSteps', problem, t0, history[0], t0 + steps * h);
  const work = zeroWork();
  const s = new Ndf(problem, { mat: makeIterationMatrix(problem), kind: 'auto', hasJ: false });
  // D_j = ∇^j y_n from the history
  const diffs = history.map((v) => Float64Array.from(v));
  for (let j = 0; j <= order; j++) {
    s.D[j].set(diffs[0]);
    for (let m = 0; m < order - j; m++) for (let i = 0; i < problem.n; i++) diffs[m][i] -= diffs[m + 1][i];
  }
  s.order = order;
  s.h = h;
  s.t = t0;
  const finish = (status: IntegratorStatus, message: string): IntegrateResult =>
    ({ status, t: s.t, y: Float64Array.from(s.D[0]), work, hLast: Math.abs(h), message });
  if (!s.jacobian(work)) return finish('non-finite', `jacobian not finite at t = ${t0}`);
  for (let i = 1; i <= steps; i++) {
    let r = s.solve(t0 + i * h, work);
    if (r === 'slow') {
      if (!s.jacobian(work)) return finish('non-finite', `jacobian not finite at t = ${s.t}`);
      r = s.solve(t0 + i * h, work);
    }
    if (r === 'slow') return finish('step-too-small', `Newton did not converge at t = ${s.t}`);
    if (r !== 'ok') return finish(r, `${r} at t = ${s.t}`);
    work.steps++;
    const tOld = s.t;
    s.accept();
    s.t = t0 + i * h;
    if (onStep?.(tOld, s.t, s.D[0], s.dense) === false) return finish('stopped', `stopped by the step callback at t = ${s.t}`);
  }
  return finish('completed', `${steps} fixed steps of order ${order}`);
}
