/**
 * Piecewise-linear schedules: from `initially`, each step ramps linearly from the value it
 * finds at `at` to `open` over `over` seconds (a zero `over` is a step). A step that starts
 * while an earlier ramp is under way takes over from the value reached so far.
 */
import type { ScheduleStep } from '../netlist/types.js';

export interface Schedule {
  at(t: number): number;
  /** Times where the value or its slope jumps: each ramp's start and end. */
  breakpoints: number[];
  /** Each ramp, for the event log. */
  ramps: { t0: number; t1: number; from: number; to: number }[];
}

export function makeSchedule(initially: number, steps: ScheduleStep[]): Schedule {
  const ramps: Schedule['ramps'] = [];
  let value = initially;
  for (let i = 0; i < steps.length; i++) {
    const s = steps[i];
    const next = i + 1 < steps.length ? steps[i + 1].at : Infinity;
    const t1 = s.at + s.over;
    const from = value;
    ramps.push({ t0: s.at, t1, from, to: s.open });
    // value reached when the next step takes over
    value = next >= t1 || s.over === 0 ? s.open : from + ((s.open - from) * (next - s.at)) / s.over;
    if (next < t1) ramps[ramps.length - 1] = { t0: s.at, t1: next, from, to: value };
  }
  const breakpoints = [...new Set(ramps.flatMap((r) => [r.t0, r.t1]))].sort((a, b) => a - b);
  const at = (t: number): number => {
    let v = initially;
    for (const r of ramps) {
      if (t < r.t0) break;
      v = t >= r.t1 ? r.to : r.from + ((r.to - r.from) * (t - r.t0)) / (r.t1 - r.t0);
    }
    return v;
  };
  return { at, breakpoints, ramps };
}
