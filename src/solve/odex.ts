/**
 * The non-stiff integrator: Hairer & Wanner's extrapolated explicit midpoint rule (ODEX), behind
 * the plenum Integrator contract. The core loop is `odex-core.ts` (the odex 2.0.4 package's
 * code on Float64Arrays, with a dense output that evaluates a whole sample in O(n) and no
 * allocation a call; results identical to the package's). This wrapper counts rhs evaluations
 * itself and turns odex's outcomes (and non-finite values, which odex would happily accept)
 * into statuses.
 *
 * Non-finite rhs values abort the odex run; the wrapper restarts from the last accepted point
 * with the step size capped at a quarter of the failed one (and a quarter again on each repeat),
 * lifting the cap once the solution gets past the trouble spot. odex clamps its first step to
 * [1e-4, min(hMax, half the interval)], so an h0 below 1e-4 has effect only through hMax.
 *
 * A stall: near an equilibrium the rhs is round-off noise (flows of 1e-18 kg/s changing sign
 * from one evaluation to the next: warm-started solves differ in their last bits), and ODEX's
 * stability check (§II.9: the change of f along the first midpoint substeps against f itself)
 * then halves every step until it is below round-off; this port has no "step size too small"
 * exit and, once the step is zero, spins to its step budget. The wrapper counts evaluations that
 * make no progress (at the last accepted t) and watches the accepted steps; past STALL_CALLS,
 * or at a step below round-off, it restarts odex from there with the stability check off (the
 * error test still controls the step), and reports `step-too-small` if that happens again.
 *
 * References: Hairer, Nørsett & Wanner, Solving Ordinary Differential Equations I, 2nd ed.,
 * Springer 1993, §II.9 (extrapolation methods, ODEX) and its dense output (§II.9, "Dense
 * output for the GBS method"; section numbers from memory); odex 2.0.4, a port of Hairer's
 * odex.f.
 */
import { checkArguments, EPS, positive, runBounds } from './step-control.js';
import { odexSolve, type OdexDense, type OdexOutput, type OdexRun } from './odex-core.js';
import {
  zeroWork,
  type DenseOutput,
  type IntegrateOptions,
  type IntegrateResult,
  type Integrator,
  type IntegratorStatus,
} from './types.js';

/** Non-finite aborts without getting past the trouble spot before giving up. */
const MAX_NON_FINITE = 10;
/** Evaluations at the last accepted t, since it was accepted, that mean the step size is zero. */
const STALL_CALLS = 50;
/** odex's unit round-off (Solver.uRound); it ends a run when |tEnd − x| ≤ 10·|x|·U_ROUND. */
const U_ROUND = 2.3e-16;

/** Thrown from inside the rhs adapter to abandon an odex run; never escapes this module. */
class NonFiniteRhs {
  constructor(readonly t: number) {}
}

/** Thrown from inside the rhs adapter when odex's step size has fallen to zero (see the module note). */
class Stalled {}

/**
 * Adaptive ODEX. Options: h0 (first step, see the module note), hMax, maxSteps (odex's step
 * budget: accepted + rejected attempts, default 100 000). `yNew` given to onStep is the
 * wrapper's own state: read it, do not modify it. work.rejected is odex's count plus one per
 * non-finite abort (odex's count for an aborted run is lost).
 */
export const odex: Integrator = (problem, t0, y0, tEnd, onStep, options: IntegrateOptions = {}) => {
  const n = problem.n;
  checkArguments('odex', problem, t0, y0, tEnd);
  const work = zeroWork();
  const y = Float64Array.from(y0);
  let t = t0;
  let hLast = 0;
  const finish = (status: IntegratorStatus, message: string): IntegrateResult =>
    ({ status, t, y: Float64Array.from(y), work, hLast, message });
  if (t0 === tEnd) return finish('completed', 'empty interval');

  // f is never sampled at or past tEnd (tInside): a schedule switching there belongs to the next run
  const { dir, span, hMax, maxSteps, tInside } = runBounds(t0, tEnd, options);
  const atol = Float64Array.from(problem.atol);
  // the core hands views of its own buffers: the rhs reads y and writes dydt in place
  let stallCalls = 0;
  const f = (x: number, yArr: Float64Array, dydt: Float64Array): void => {
    if (x === t && ++stallCalls > STALL_CALLS) throw new Stalled();
    problem.rhs(dir * (x - tInside) > 0 ? tInside : x, yArr, dydt);
    work.rhs++;
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(dydt[i]) || !Number.isFinite(yArr[i])) throw new NonFiniteRhs(x);
    }
  };

  let odexDense: OdexDense | null = null;
  const dense: DenseOutput = (tq, out) => odexDense!.into(tq, out);

  let ended: { status: IntegratorStatus; message: string } | null = null;
  let cap = Infinity;
  let liftCap = false;
  let tTrouble = t0;
  let nNonFinite = 0;
  let stabilityCheck = true;

  const solOut: OdexOutput = (nr, xOld, x, yArr, d) => {
    if (nr === 1) return; // odex reports the starting point first (xOld == x): not a step
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(yArr[i])) {
        ended = { status: 'non-finite', message: `non-finite solution at t = ${x}` };
        return false;
      }
    }
    const tNew = Math.abs(tEnd - x) <= 10 * U_ROUND * Math.abs(x) ? tEnd : x;
    for (let i = 0; i < n; i++) y[i] = yArr[i];
    t = tNew;
    hLast = Math.abs(tNew - xOld);
    work.steps++;
    stallCalls = 0;
    odexDense = d;
    if (onStep(xOld, tNew, y, dense) === false) {
      ended = { status: 'stopped', message: `stopped by the step callback at t = ${t}` };
      return false;
    }
    if (hLast <= 10 * EPS * Math.max(Math.abs(t), Math.abs(tEnd)) && t !== tEnd) {
      ended = { status: 'step-too-small', message: `step size ${hLast} below round-off limit at t = ${t}` };
      return false;
    }
    if (dir * (t - tTrouble) > 0) {
      nNonFinite = 0;
      if (cap < Infinity) {
        liftCap = true;
        return false;
      }
    }
  };

  for (;;) {
    const budget = maxSteps - work.steps - work.rejected;
    if (budget <= 0) return finish('max-steps', `step budget of ${maxSteps} exhausted at t = ${t}`);
    const maxStepSize = Math.min(hMax, cap);
    const hStart = cap < Infinity ? cap : hLast > 0 ? hLast : options.h0;
    const settings = {
      maxSteps: budget,
      initialStepSize: positive(hStart) ? Math.min(hStart, maxStepSize) : 1e-4,
      maxStepSize,
      stabilityCheckCount: stabilityCheck ? 1 : 0,
      rtol: problem.rtol,
      atol,
    };
    liftCap = false;
    let result: OdexRun;
    try {
      result = odexSolve(n, f, t, y, tEnd, solOut, settings);
    } catch (e) {
      if (e instanceof Stalled) {
        work.rejected++;
        if (!stabilityCheck) return finish('step-too-small', `the step size fell to round-off at t = ${t}`);
        stabilityCheck = false;
        stallCalls = 0;
        continue;
      }
      if (!(e instanceof NonFiniteRhs)) throw e;
      work.rejected++;
      if (e.t === t) return finish('non-finite', `rhs is not finite at t = ${t}`);
      if (dir * (e.t - tTrouble) > 0) tTrouble = e.t;
      if (++nNonFinite > MAX_NON_FINITE) {
        return finish('non-finite', `non-finite rhs values after ${MAX_NON_FINITE} step reductions at t = ${t}`);
      }
      cap = Math.min(cap, Math.max(Math.abs(e.t - t), hLast)) / 4;
      continue;
    }
    work.rejected += result.nReject;
    if (ended !== null) {
      const { status, message } = ended;
      if (status === 'step-too-small' && stabilityCheck) {
        // the step shrank to round-off: once more without the stability check (module note)
        stabilityCheck = false;
        ended = null;
        continue;
      }
      return finish(status, message);
    }
    if (liftCap) {
      cap = Infinity;
      continue;
    }
    if (result.outcome === 'max-steps') return finish('max-steps', `step budget of ${maxSteps} exhausted at t = ${t}`);
    if (result.outcome === 'converged') {
      t = tEnd;
      return finish('completed', 'reached tEnd');
    }
    throw new Error(`odex: unexpected outcome ${result.outcome}`);
  }
};
