/**
 * Small pieces the one-step stiff integrators (RODAS in rosenbrock.ts, ROS34PW2 in rosw.ts)
 * share: the weighted error norm, the starting step, the guards near tEnd and round-off.
 *
 * References: Hairer, Nørsett & Wanner, Solving ODEs I, 2nd ed. 1993, §II.4 (error norm,
 * starting step size); Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, §IV.7.
 */
import type { OdeProblem } from './types.js';

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

export function checkArguments(name: string, problem: OdeProblem, t0: number, y0: Float64Array, tEnd: number): void {
  if (y0.length !== problem.n || problem.atol.length !== problem.n) {
    throw new RangeError(`${name}: y0 has ${y0.length} and atol ${problem.atol.length} entries, problem.n is ${problem.n}`);
  }
  if (!Number.isFinite(t0) || !Number.isFinite(tEnd)) throw new RangeError(`${name}: t0 and tEnd must be finite`);
}
