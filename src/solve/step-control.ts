/**
 * Small pieces the one-step stiff integrators (RODAS in rosenbrock.ts, ROS34PW2 in rosw.ts)
 * share: the weighted error norm, the starting step, the guards near tEnd and round-off.
 *
 * References: Hairer, Nørsett & Wanner, Solving ODEs I, 2nd ed. 1993, §II.4 (error norm,
 * starting step size); Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, §IV.7.
 */
import { zeroWork, type DenseOutput, type IntegrateOptions, type IntegrateResult, type IntegratorStatus, type OdeProblem, type StepCallback, type WorkCounts } from './types.js';

export const EPS = 2.220446049250313e-16;

/** An option that is given and usable as a step size. */
export function positive(x: number | undefined): x is number {
  return x !== undefined && x > 0 && Number.isFinite(x);
}

export function allFinite(v: Float64Array): boolean {
  for (let i = 0; i < v.length; i++) if (!Number.isFinite(v[i])) return false;
  return true;
}

/** Weighted RMS of v with sc_i = atol_i + rtol·max(|a_i|, |b_i|). */
export function rmsNorm(v: Float64Array, a: Float64Array, b: Float64Array, p: OdeProblem): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) {
    const sc = p.atol[i] + p.rtol * Math.max(Math.abs(a[i]), Math.abs(b[i]));
    s += (v[i] / sc) ** 2;
  }
  return Math.sqrt(s / Math.max(1, v.length));
}

/**
 * The double a round-off or two inside tEnd. Stages that would sample f exactly at tEnd use it,
 * so a schedule switching at tEnd (a breakpoint, where the driver restarts) is never seen
 * from the wrong side, whichever way its comparison is written.
 */
export function justInside(tEnd: number, dir: number): number {
  return tEnd - dir * Math.max(Math.abs(tEnd) * EPS, Number.MIN_VALUE);
}

/** Smallest step the integrator will try near t: below it t + h cannot resolve the step. */
export function minStep(t: number, tEnd: number): number {
  return 10 * EPS * Math.max(Math.abs(t), Math.abs(tEnd));
}

/** Starting step from the scaled sizes of y and f = f(t0, y): h = 0.01·‖y‖/‖f‖ (§II.4, steps a–b). */
export function initialStep(p: OdeProblem, y: Float64Array, f: Float64Array, span: number): number {
  const d0 = rmsNorm(y, y, y, p);
  const d1 = rmsNorm(f, y, y, p);
  return d0 < 1e-5 || d1 < 1e-5 ? 1e-6 * span : 0.01 * (d0 / d1);
}

/**
 * The fixed bounds of one integration call from t0 towards tEnd: direction, span, the largest
 * step (option hMax, at most the span), the step budget, and the last time f may be sampled
 * (justInside). The integrators (RODAS and ROS34PW2 through adaptiveSteps, odex, bdf) share it.
 */
export function runBounds(t0: number, tEnd: number, options: IntegrateOptions):
  { dir: number; span: number; hMax: number; maxSteps: number; tInside: number } {
  const dir = Math.sign(tEnd - t0);
  const span = Math.abs(tEnd - t0);
  return {
    dir, span,
    hMax: positive(options.hMax) ? Math.min(options.hMax, span) : span,
    maxSteps: options.maxSteps ?? DEFAULT_MAX_STEPS,
    tInside: justInside(tEnd, dir),
  };
}

export function checkArguments(name: string, problem: OdeProblem, t0: number, y0: Float64Array, tEnd: number): void {
  if (y0.length !== problem.n || problem.atol.length !== problem.n) {
    throw new RangeError(`${name}: y0 has ${y0.length} and atol ${problem.atol.length} entries, problem.n is ${problem.n}`);
  }
  if (!Number.isFinite(t0) || !Number.isFinite(tEnd)) throw new RangeError(`${name}: t0 and tEnd must be finite`);
}

/** What the shared adaptive loop asks of a one-step linearly implicit method. */
export interface StepMachine {
  /** f(t0, y0) into the machine; false when not finite. */
  start(t: number, y: Float64Array, work: WorkCounts): boolean;
  /** Before an attempt from (t, y) over signed hs: whatever the attempt needs (rhs, jacobian); false when not finite. */
  prepare(t: number, y: Float64Array, hs: number, tInside: number, work: WorkCounts): boolean;
  /** One attempt; tLast is the time of stages at c = 1 (just inside tEnd on the last step). */
  attempt(t: number, y: Float64Array, hs: number, tLast: number, work: WorkCounts): 'ok' | 'singular' | 'non-finite';
  /**
   * A failed or rejected attempt: true to retry at the same h (the machine refreshed something
   * that may cure it, e.g. an old jacobian), false to let the loop shrink h.
   */
  retry(kind: 'singular' | 'non-finite' | 'error'): boolean;
  errorNorm(y: Float64Array): number;
  /** Keeps the dense output of the accepted attempt from (t, y) over hs; `yNew` is the new state. */
  accept(t: number, hs: number, y: Float64Array): void;
  /** After the step callback: the error norm of the step and whether the next h shrinks. */
  accepted(err: number, shrinking: boolean): void;
  readonly yNew: Float64Array;
  readonly f0: Float64Array;
  readonly dense: DenseOutput;
}

const SAFE = 0.9;
/** h_new/h is kept in [1/SHRINK_MAX, GROW_MAX] = [0.2, 6] (rodas.f defaults). */
const SHRINK_MAX = 5;
const GROW_MAX = 6;
export const DEFAULT_MAX_STEPS = 100_000;
/** Consecutive failed factorisations (each halving h) before giving up. */
export const MAX_SINGULAR = 5;
/** Non-finite attempts (each dividing h by 4) without getting past the trouble spot. */
export const MAX_NON_FINITE = 10;

/**
 * The adaptive loop of RODAS and ROS34PW2: step budget, the last step clipped to tEnd, halving
 * on a singular matrix, quartering on non-finite values, and the error control with the
 * predictive controller of Gustafsson, fac = err^(1/q)/0.9 for an embedded pair of order
 * q − 1 (rodas.f). `yNew` given to onStep is the integrator's own state: read it, do not modify
 * it. hLast is the last accepted step, or for a final step clipped to tEnd the unclipped size
 * the controller had proposed (a better warm start for a restart).
 *
 * References: Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, §IV.7 (error estimate and step
 * size selection incl. the predictive controller of Gustafsson) and rodas.f.
 */
export function adaptiveSteps(
  name: string, st: StepMachine, q: number, problem: OdeProblem, t0: number, y0: Float64Array, tEnd: number,
  onStep: StepCallback, options: IntegrateOptions,
): IntegrateResult {
  checkArguments(name, problem, t0, y0, tEnd);
  const work = zeroWork();
  const y = Float64Array.from(y0);
  let t = t0;
  let hLast = 0;
  const finish = (status: IntegratorStatus, message: string): IntegrateResult =>
    ({ status, t, y: Float64Array.from(y), work, hLast, message });
  if (t0 === tEnd) return finish('completed', 'empty interval');

  const { dir, span, hMax, maxSteps, tInside } = runBounds(t0, tEnd, options);
  const e = 1 / q;

  if (!st.start(t, y, work)) return finish('non-finite', `rhs is not finite at the initial point t = ${t}`);
  let h = Math.min(positive(options.h0) ? options.h0 : initialStep(problem, y, st.f0, span), hMax);
  let reject = false;
  let hAcc = 0;
  let errAcc = 1;
  let nSingular = 0;
  let nNonFinite = 0;
  /** Farthest end of a non-finite attempt; the counter resets once the solution gets past it. */
  let tTrouble = t;

  for (;;) {
    if (work.steps + work.rejected >= maxSteps) return finish('max-steps', `step budget of ${maxSteps} exhausted at t = ${t}`);
    if (!(h > minStep(t, tEnd))) return finish('step-too-small', `step size ${h} below round-off limit at t = ${t}`);
    const hProposed = h;
    const last = Math.abs(tEnd - t) <= 1.0001 * h;
    const tNew = last ? tEnd : t + dir * h;
    const hs = last ? tEnd - t : dir * h;
    if (last) h = Math.abs(hs);

    if (!st.prepare(t, y, hs, tInside, work)) return finish('non-finite', `rhs, jacobian or ∂f/∂t not finite at t = ${t}`);
    const outcome = st.attempt(t, y, hs, last ? tInside : tNew, work);
    if (outcome !== 'ok') {
      work.rejected++;
      reject = true;
      if (st.retry(outcome)) continue;
      if (outcome === 'singular') {
        if (++nSingular >= MAX_SINGULAR) return finish('singular', `iteration matrix singular ${nSingular} times at t = ${t}`);
        h *= 0.5;
      } else {
        if (dir * (tNew - tTrouble) > 0) tTrouble = tNew;
        if (++nNonFinite > MAX_NON_FINITE) return finish('non-finite', `non-finite stage values after ${MAX_NON_FINITE} step reductions at t = ${t}`);
        h *= 0.25;
      }
      continue;
    }

    const err = st.errorNorm(y);
    let fac = Math.max(1 / GROW_MAX, Math.min(SHRINK_MAX, err ** e / SAFE));
    if (err > 1) {
      work.rejected++;
      reject = true;
      h /= fac;
      st.retry('error');
      continue;
    }
    if (work.steps > 0) {
      const facGus = Math.max(1 / GROW_MAX, Math.min(SHRINK_MAX, ((hAcc / h) * (err * err / errAcc) ** e) / SAFE));
      fac = Math.max(fac, facGus);
    }
    hAcc = h;
    errAcc = Math.max(1e-2, err);
    work.steps++;
    st.accept(t, hs, y);
    y.set(st.yNew);
    const tOld = t;
    t = tNew;
    hLast = last ? Math.max(h, hProposed) : h;
    if (dir * (t - tTrouble) > 0) nNonFinite = 0;
    nSingular = 0;
    if (onStep(tOld, t, y, st.dense) === false) return finish('stopped', `stopped by the step callback at t = ${t}`);
    if (last) return finish('completed', 'reached tEnd');
    let hNew = Math.min(h / fac, hMax);
    if (reject) hNew = Math.min(hNew, h);
    st.accepted(err, hNew < h);
    reject = false;
    h = hNew;
  }
}

/** A Rosenbrock method in the transformed form of rodas.f: stage arguments a, couplings g, abscissae c, ∂f/∂t weights d. */
export interface Tableau {
  readonly a: readonly (readonly number[])[];
  readonly g: readonly (readonly number[])[];
  readonly c: readonly number[];
  readonly d: readonly number[];
}

/**
 * The stages of one attempt with the factorised iteration matrix (1/(hγ))·I − J in `lu`:
 *   (1/(hγ) I − J) k_s = f(t + c_s h, y + Σ_j a_sj k_j) + Σ_j (g_sj / h) k_j + h d_s f_t,
 * k_0 from f0 = f(t, y); stages at c = 1 are evaluated at tLast. Afterwards `ys` holds the
 * argument of the last stage.
 *
 * References: Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, §IV.7 (transformed form); rodas.f, ROSCOR.
 */
export function rosenbrockStages(
  tab: Tableau, p: OdeProblem, lu: { solve(b: Float64Array): void }, k: readonly Float64Array[], ys: Float64Array,
  f0: Float64Array, ft: Float64Array, t: number, y: Float64Array, h: number, tLast: number, work: WorkCounts,
): void {
  const n = y.length;
  for (let s = 0; s < k.length; s++) {
    const ks = k[s];
    if (s === 0) {
      ks.set(f0);
    } else {
      const a = tab.a[s];
      ys.set(y);
      for (let j = 0; j < s; j++) {
        const aj = a[j], kj = k[j];
        if (aj !== 0) for (let i = 0; i < n; i++) ys[i] += aj * kj[i];
      }
      p.rhs(tab.c[s] === 1 ? tLast : t + tab.c[s] * h, ys, ks);
      work.rhs++;
      const g = tab.g[s];
      for (let j = 0; j < s; j++) {
        const gj = g[j] / h, kj = k[j];
        for (let i = 0; i < n; i++) ks[i] += gj * kj[i];
      }
    }
    if (tab.d[s] !== 0) {
      const hd = h * tab.d[s];
      for (let i = 0; i < n; i++) ks[i] += hd * ft[i];
    }
    lu.solve(ks);
  }
}

/**
 * `steps` equal steps without error control (order studies and tests), with the same machine as
 * the adaptive loop; onStep (optional) receives the same dense output. Statuses: 'completed',
 * 'stopped', 'non-finite', 'singular'.
 */
export function fixedSteps(
  name: string, st: StepMachine, problem: OdeProblem, t0: number, y0: Float64Array, tEnd: number, steps: number, onStep?: StepCallback,
): IntegrateResult {
  checkArguments(name, problem, t0, y0, tEnd);
  if (!Number.isInteger(steps) || steps < 1) throw new RangeError(`${name}: steps must be a positive integer, got ${steps}`);
  const work = zeroWork();
  const y = Float64Array.from(y0);
  let t = t0;
  const h = (tEnd - t0) / steps;
  const tInside = justInside(tEnd, Math.sign(h));
  const finish = (status: IntegratorStatus, message: string): IntegrateResult =>
    ({ status, t, y: Float64Array.from(y), work, hLast: Math.abs(h), message });
  if (!st.start(t, y, work)) return finish('non-finite', `non-finite rhs at t = ${t}`);
  for (let i = 1; i <= steps; i++) {
    const tNew = i === steps ? tEnd : t0 + i * h;
    const hs = tNew - t;
    if (!st.prepare(t, y, hs, tInside, work)) return finish('non-finite', `non-finite rhs or jacobian at t = ${t}`);
    const outcome = st.attempt(t, y, hs, i === steps ? tInside : tNew, work);
    if (outcome !== 'ok') return finish(outcome, `${outcome} step at t = ${t}`);
    work.steps++;
    st.accept(t, hs, y);
    st.accepted(0, false);
    y.set(st.yNew);
    const tOld = t;
    t = tNew;
    if (onStep?.(tOld, t, y, st.dense) === false) return finish('stopped', `stopped by the step callback at t = ${t}`);
  }
  return finish('completed', `${steps} fixed steps`);
}
