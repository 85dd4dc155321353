/**
 * Evaluates `expect:` entries on a recorded solution (every accepted step and every sample).
 */
import type { ExpectSpec } from '../netlist/types.js';
import { display, type DisplayKind } from '../units/display.js';
import type { ExpectationResult } from './results.js';

export interface Recording {
  keys: Map<string, number>;
  times: number[];
  rows: Float64Array[];
}

function valueAt(rec: Recording, c: number, t: number): number {
  const ts = rec.times;
  if (t <= ts[0]) return rec.rows[0][c];
  if (t >= ts[ts.length - 1]) return rec.rows[ts.length - 1][c];
  let lo = 0;
  let hi = ts.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (ts[mid] <= t) lo = mid; else hi = mid;
  }
  const w = ts[hi] === ts[lo] ? 1 : (t - ts[lo]) / (ts[hi] - ts[lo]);
  return rec.rows[lo][c] + w * (rec.rows[hi][c] - rec.rows[lo][c]);
}

function over(rec: Recording, c: number, t0: number, t1: number, stat: 'max' | 'min' | 'mean'): { v: number; at: number } {
  let best = valueAt(rec, c, t0);
  let at = t0;
  const end = valueAt(rec, c, t1);
  if (stat !== 'mean') {
    const better = (x: number): boolean => (stat === 'max' ? x > best : x < best);
    for (let k = 0; k < rec.times.length; k++) {
      const t = rec.times[k];
      if (t < t0 || t > t1) continue;
      const x = rec.rows[k][c];
      if (better(x)) { best = x; at = t; }
    }
    if (better(end)) { best = end; at = t1; }
    return { v: best, at };
  }
  // trapezoid rule over recorded points inside [t0, t1]
  let integral = 0;
  let tp = t0;
  let vp = best;
  for (let k = 0; k < rec.times.length; k++) {
    const t = rec.times[k];
    if (t <= t0 || t >= t1) continue;
    const x = rec.rows[k][c];
    integral += 0.5 * (x + vp) * (t - tp);
    tp = t; vp = x;
  }
  integral += 0.5 * (end + vp) * (t1 - tp);
  return { v: t1 > t0 ? integral / (t1 - t0) : best, at: t0 };
}

export function evaluateExpectations(specs: ExpectSpec[], rec: Recording, pa: number, end: number, chambers: string[]): ExpectationResult[] {
  return specs.map((e) => {
    const where = { file: e.pos.file, line: e.pos.line, column: e.pos.column };
    if (e.kind === 'settles') {
      const worst = { rel: 0, who: '', t: 0 };
      for (const name of chambers) {
        for (const q of ['pressure', 'volume']) {
          const c = rec.keys.get(`${name}.${q}`)!;
          const fin = rec.rows[rec.rows.length - 1][c];
          for (let k = 0; k < rec.times.length; k++) {
            if (rec.times[k] < e.within) continue;
            const rel = Math.abs(rec.rows[k][c] - fin) / Math.abs(fin);
            if (rel > worst.rel) { worst.rel = rel; worst.who = `${name}.${q}`; worst.t = rec.times[k]; }
          }
        }
      }
      const passed = worst.rel <= e.band;
      return {
        name: e.name, passed, actual: worst.rel, ...where,
        message: passed
          ? `every chamber stays within ${display(e.band * 100, 'reynolds')} % of its final pressure and volume after ${display(e.within, 'time')} (largest deviation ${display(worst.rel * 100, 'reynolds')} %)`
          : `${worst.who} is ${display(worst.rel * 100, 'reynolds')} % from its final value at t = ${display(worst.t, 'time')}, expected within ${display(e.band * 100, 'reynolds')} % after ${display(e.within, 'time')}`,
      };
    }
    const q = e.probe.quantity;
    const isGauge = q === 'gauge';
    const key = `${e.probe.element}.${isGauge ? 'pressure' : q}`;
    const c = rec.keys.get(key);
    if (c === undefined) {
      return { name: e.name, passed: false, actual: Number.NaN, ...where, message: `probe ${e.probe.text} has no recorded values` };
    }
    let v: number;
    let when: string;
    if ('at' in e.when) {
      const t = e.when.at === 'end' ? end : e.when.at;
      v = valueAt(rec, c, t);
      when = `at t = ${display(t, 'time')}`;
    } else {
      const [t0, t1] = e.when.over;
      const r = over(rec, c, t0, Math.min(t1, end), e.when.stat);
      v = r.v;
      when = `${e.when.stat} over [${display(t0, 'time')}, ${display(t1, 'time')}]${e.when.stat === 'mean' ? '' : ` (at t = ${display(r.at, 'time')})`}`;
    }
    const kind: DisplayKind = q;
    const shown = (x: number): string => (q === 'gauge' ? display(x - pa, 'gauge') : display(x, kind));
    const cmp = e.compare;
    let passed: boolean;
    let want: string;
    if (cmp.kind === 'below') { passed = v < cmp.value; want = `below ${shown(cmp.value)}`; }
    else if (cmp.kind === 'above') { passed = v > cmp.value; want = `above ${shown(cmp.value)}`; }
    else {
      const target = isGauge ? cmp.value - pa : cmp.value;
      const actual = isGauge ? v - pa : v;
      const tol = 'abs' in cmp.within ? cmp.within.abs : cmp.within.rel * Math.abs(target);
      passed = Math.abs(actual - target) <= tol;
      want = `${shown(cmp.value)} ± ${'abs' in cmp.within ? (isGauge ? display(tol, 'gauge').replace(' gauge', '') : display(tol, kind)) : `${display(cmp.within.rel * 100, 'reynolds')} %`}`;
    }
    const actual = isGauge ? v - pa : v;
    return {
      name: e.name, passed, actual, ...where,
      message: `${e.probe.text} ${when} is ${shown(v)}; expected ${want}`,
    };
  });
}
