/**
 * `plenum trace` for a network with controllers or regulators: the rest state and its
 * stability as one parameter changes (a gain, a set point, a size), and the value at which
 * stability changes.
 *
 * A controller with integral action rests where its error is zero whatever its gains, so a
 * sweep over a gain leaves the rest state where it is and changes only its stability; the
 * rest state is therefore followed by natural continuation (Newton at each sampled value, from
 * the previous value's state: closed-loop.ts), not by arclength, and the growth rate (largest
 * real part of the eigenvalues) is watched for a change of sign, located by bisection on the
 * parameter to 1e-9 of its range. At such a point a pair of complex eigenvalues crosses the
 * imaginary axis (a Hopf point: the loop starts to oscillate) or a real one does (the loop
 * runs away); the point is reported as a stability change.
 *
 * References: Allgower & Georg, Introduction to Numerical Continuation Methods, SIAM Classics
 * 2003, ch. 1 (natural continuation); Kuznetsov, Elements of Applied Bifurcation Theory, 3rd
 * ed., Springer 2004, ch. 3 (Hopf bifurcation; from memory).
 */
import type { Model } from '../model/types.js';
import { loopGrowth } from './closed-loop.js';
import type { Parameter } from './trace-parameter.js';
import type { TraceBranch, TracePoint } from './trace-types.js';
import type { ValveState } from './types.js';

const SAMPLES = 40;
const BISECTIONS = 34;

type At = { y: Float64Array; point: TracePoint };

export function traceLoop(param: Parameter, valves: ValveState, notes: string[], budget: { deadline: number; timedOut: boolean } = { deadline: Infinity, timedOut: false }): TraceBranch[] {
  let prev: Float64Array | undefined;
  const at = (l: number, guess?: Float64Array): At | null => {
    const m = param.modelAt(l);
    if (typeof m === 'string') { notes.push(`at ${param.vary} = ${param.value(l)} ${param.unit}: ${m.split('\n')[0]}`); return null; }
    const r = loopGrowth(m as Model, valves, guess);
    if (!r) return null;
    const st = r.stability;
    return {
      y: r.y,
      point: {
        parameter: param.value(l), chambers: r.chambers, stable: st.stability === 'stable', stability: st.stability,
        growth_rate: st.growth_rate,
      },
    };
  };
  const points: TracePoint[] = [];
  let lastL = Number.NaN;
  let last: At | null = null;
  let why = 'end of the range';
  for (let k = 0; k <= SAMPLES; k++) {
    if (performance.now() > budget.deadline) { budget.timedOut = true; why = 'the time budget ran out (--max-wall)'; break; }
    const l = k / SAMPLES;
    const here = at(l, prev);
    if (!here) { why = `no rest state found at ${param.vary} = ${param.value(l)} ${param.unit}`; break; }
    if (last && sign(last.point.growth_rate) !== sign(here.point.growth_rate)) {
      // bisect the change of stability between lastL and l
      let a = lastL, b = l, ya = last.y, ga = sign(last.point.growth_rate);
      let mid: At | null = null;
      for (let i = 0; i < BISECTIONS; i++) {
        const c = 0.5 * (a + b);
        const m = at(c, ya);
        if (!m) break;
        mid = m;
        if (sign(m.point.growth_rate) === ga) { a = c; ya = m.y; } else b = c;
      }
      if (mid) points.push({ ...mid.point, parameter: param.value(0.5 * (a + b)), special: 'stability-change' });
    }
    points.push(here.point);
    prev = here.y;
    last = here;
    lastL = l;
  }
  if (points.length === 0) return [];
  points[0].special ??= 'end';
  points[points.length - 1].special ??= 'end';
  return [{ id: 1, chambers: Object.keys(points[0].chambers), points, ends: ['end of the range', why] }];
}

function sign(g: number | null): number {
  return g === null || !Number.isFinite(g) ? 0 : g > 0 ? 1 : -1;
}
