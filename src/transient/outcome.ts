/**
 * How each group of chambers ends a transient: settled, still moving, diverging from an
 * unstable state, or oscillating, with the evidence.
 *
 * Groups are the chambers joined by branches that pass gas at some time in the run (lines,
 * valves that open, check and relief valves); a group touching no reservoir and no feed is
 * closed. Each chamber contributes its pressure and volume as signals; a signal's band is
 * `band` (2 %) of its largest excursion from its final value, with an absolute floor of 0.1 % of
 * the final value (settle-band.ts: the same definition as a `settles:` expectation). A second
 * floor is the integrator's own resolution,
 * the relative tolerance times the signal's magnitude (0.1 Pa for 1e-6 at 100 kPa). A signal
 * whose whole excursion is under the floor counts as still (it moved by round-off, not by
 * physics), and a swing must exceed the floor, not only the band, to count as a turn: a far
 * chamber of a long chain that wiggles by 5e-6 Pa is not an oscillation.
 *
 * - oscillating: a check or relief valve of the group keeps switching until the end (at least
 *   three openings, the last within the final quarter of the run or two periods of it), or a
 *   signal keeps turning (four or more turning points of more than its band in the second half
 *   of the run, still that large in the last quarter);
 * - settled: every signal's change over the last window w (5 % of the run) is small and
 *   shrinking: the geometric tail Δ₂·r/(1 − r), r = Δ₂/Δ₁ the ratio of the changes over the last
 *   two windows, lies inside the band. The settling time is when the last signal entered its band
 *   for good;
 * - diverging: not settled, and the departure from the start, d(t) = max over signals of
 *   |x(t) − x(0)|/|x(0)|, speeds up (it grows 5 % more in the last window than in the one before);
 *   ln d = σt + c is fitted over the last third of the run and σ > 0 reported as the growth rate;
 * - moving: anything else (a slow approach that the run did not wait for, a steady drift).
 *
 * References: Ogata, Modern Control Engineering, 5th ed., §5-3 (settling time to a 2 % band;
 * from memory); the geometric tail is that of an exponential decay sampled at equal intervals.
 */
import type { Model } from '../model/types.js';
import { display } from '../units/display.js';
import { chamberGroups, everConducts } from '../model/groups.js';
import type { GroupOutcome, Trace } from './results.js';
import { bandScale } from './settle-band.js';

/** Settling band as a fraction of each signal's excursion. */
export const SETTLE_BAND = 0.02;
/** Tail window as a fraction of the run. */
const WINDOW = 0.05;

export interface OutcomeEvent { t: number; kind: string; element: string; what: string }

function valueAt(times: number[], v: number[], t: number): number {
  if (t <= times[0]) return v[0];
  const n = times.length;
  if (t >= times[n - 1]) return v[n - 1];
  let lo = 0, hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (times[mid] <= t) lo = mid; else hi = mid;
  }
  const w = (t - times[lo]) / (times[hi] - times[lo]);
  return v[lo] + w * (v[hi] - v[lo]);
}

interface SignalVerdict {
  key: string;
  band: number;
  /** Least swing that counts as a turn: the band, or the integrator's resolution if larger. */
  swing: number;
  /** The whole excursion is below the integrator's resolution. */
  flat: boolean;
  settleAt: number;
  /** Estimated change still to come (Infinity when not slowing down). */
  remaining: number;
  /** Ratio of the changes over the last two windows. */
  ratio: number;
  change: number;
  turning: number;
  lateSwing: number;
}

function judgeSignal(key: string, times: number[], x: number[], end: number, rtol: number): SignalVerdict {
  const n = times.length;
  const xf = x[n - 1];
  let excursion = 0;
  let magnitude = 0;
  for (const v of x) { excursion = Math.max(excursion, Math.abs(v - xf)); magnitude = Math.max(magnitude, Math.abs(v)); }
  // what the integrator resolves: below it a change is round-off and error control, not motion
  const floor = Math.max(rtol, 1e-12) * magnitude;
  const flat = excursion <= floor || excursion <= 1e-300;
  const band = SETTLE_BAND * bandScale(excursion, xf);
  // turning points and late swings must clear both the band and the floor
  const swing = Math.max(band, floor);
  let last = -1;
  if (!flat) for (let k = 0; k < n; k++) if (Math.abs(x[k] - xf) > band) last = k;
  const settleAt = last < 0 ? times[0] : times[Math.min(last + 1, n - 1)];
  const span = end - times[0];
  const w = Math.max(WINDOW * span, 3 * (span / Math.max(n - 1, 1)));
  const d2 = Math.abs(xf - valueAt(times, x, end - w));
  const d1 = Math.abs(valueAt(times, x, end - w) - valueAt(times, x, end - 2 * w));
  const ratio = d1 > 0 ? d2 / d1 : d2 > 0 ? Infinity : 0;
  let remaining: number;
  if (flat || d2 <= 1e-3 * band) remaining = d2;
  else if (ratio < 0.9) remaining = (d2 * ratio) / (1 - ratio);
  else remaining = Infinity;
  // turning points in the second half, with the band as hysteresis so that round-off does not count
  let turning = 0;
  let dir = 0;
  let anchor = valueAt(times, x, times[0] + span / 2);
  let lateLo = Infinity, lateHi = -Infinity;
  for (let k = 0; k < n; k++) {
    if (times[k] < times[0] + span / 2) continue;
    const v = x[k];
    if (times[k] >= times[0] + 0.75 * span) { lateLo = Math.min(lateLo, v); lateHi = Math.max(lateHi, v); }
    if (flat) continue;
    if (dir >= 0 && v < anchor - swing) { if (dir > 0) turning++; dir = -1; anchor = v; }
    else if (dir <= 0 && v > anchor + swing) { if (dir < 0) turning++; dir = 1; anchor = v; }
    else if ((dir > 0 && v > anchor) || (dir < 0 && v < anchor)) anchor = v;
  }
  return { key, band, swing, flat, settleAt, remaining, ratio, change: d2, turning, lateSwing: lateHi - lateLo };
}

/** Least-squares slope of ln d(t) over the samples with d > 0 in [t0, end]. */
function logSlope(times: number[], d: number[], t0: number): number {
  const xs: number[] = [];
  const ys: number[] = [];
  times.forEach((t, k) => { if (t >= t0 && d[k] > 0) { xs.push(t); ys.push(Math.log(d[k])); } });
  if (xs.length < 3) return Number.NaN;
  const mx = xs.reduce((a, b) => a + b, 0) / xs.length;
  const my = ys.reduce((a, b) => a + b, 0) / ys.length;
  let sxy = 0, sxx = 0;
  for (let i = 0; i < xs.length; i++) { sxy += (xs[i] - mx) * (ys[i] - my); sxx += (xs[i] - mx) ** 2; }
  return sxx > 0 ? sxy / sxx : Number.NaN;
}

/** Classifies how each group of chambers ends the recorded transient. */
/** How often an element logged an event with one wording, and when first and last (see EventLog). */
export interface OutcomeEventCount { element: string; kind: string; what: string; count: number; first: number; last: number }

/**
 * `events`: the events of the run; `counts`, when the run kept only some of its events, every
 * event counted (a valve's openings are then taken from the counts).
 */
export function classifyOutcomes(model: Model, trace: Trace, events: OutcomeEvent[], counts?: OutcomeEventCount[]): GroupOutcome[] {
  const times = trace.times;
  const col = new Map(trace.channels.map((c, i) => [c.key, i] as const));
  const groups = chamberGroups(model, everConducts, (k) => model.feeds[k].initially > 0 || model.feeds[k].steps.some((s) => s.open > 0));
  return groups.map((g): GroupOutcome => {
    const names = g.chambers.map((c) => model.chambers[c].name);
    const closed = g.reservoirs.length === 0 && g.feeds.length === 0 && !g.boundary;
    const base = { chambers: names, closed, band: SETTLE_BAND };
    if (times.length < 4) {
      return { ...base, outcome: 'moving', settling_time: null, evidence: 'too few samples to judge' };
    }
    const tEnd = times[times.length - 1];
    const signals = names.flatMap((n) => [`${n}.pressure`, `${n}.volume`])
      .filter((k) => col.has(k))
      .map((k) => judgeSignal(k, times, trace.values[col.get(k)!], tEnd, model.doc.simulate.tolerance));

    // chatter of the group's self-acting valves
    const valves = new Set(g.branches.map((k) => model.branches[k]).filter((b) => {
      const kind = b.valve?.operation.kind;
      return kind === 'relief' || kind === 'check';
    }).map((b) => b.name));
    for (const v of valves) {
      const isOpen = (e: { element: string; kind: string; what: string }): boolean => e.element === v && (e.kind === 'relief' || e.kind === 'check') && / opens/.test(e.what);
      let n = 0;
      let first = Infinity;
      let last = -Infinity;
      if (counts) {
        for (const c of counts) if (isOpen(c)) { n += c.count; first = Math.min(first, c.first); last = Math.max(last, c.last); }
      } else {
        for (const e of events) if (isOpen(e)) { n++; first = Math.min(first, e.t); last = Math.max(last, e.t); }
      }
      if (n < 3) continue;
      const period = (last - first) / (n - 1);
      const recent = last >= tEnd - Math.max(0.25 * (tEnd - times[0]), 2 * period);
      if (recent) {
        return {
          ...base, outcome: 'oscillating', settling_time: null, period,
          evidence: `valve ${v} opened ${n} times, the last at ${display(last, 'time')} (period ≈ ${display(period, 'time')})`,
        };
      }
    }
    const swinging = signals.filter((s) => !s.flat && s.turning >= 4 && s.lateSwing > 2 * s.swing);
    if (swinging.length) {
      const s = swinging.reduce((a, b) => (b.turning > a.turning ? b : a));
      const period = (0.5 * (tEnd - times[0])) / (s.turning / 2);
      return {
        ...base, outcome: 'oscillating', settling_time: null, period,
        evidence: `${s.key} turned ${s.turning} times in the second half of the run and still swings ${((s.lateSwing / (s.band / SETTLE_BAND)) * 100).toPrecision(2)} % of its excursion in the last quarter (period ≈ ${display(period, 'time')})`,
      };
    }

    const unsettled = signals.filter((s) => !s.flat && !(s.remaining <= s.band));
    if (unsettled.length === 0) {
      const slowest = signals.reduce<SignalVerdict | null>((a, b) => (a === null || b.settleAt > a.settleAt ? b : a), null);
      const t = slowest ? slowest.settleAt : times[0];
      return {
        ...base, outcome: 'settled', settling_time: t,
        evidence: slowest && t > times[0]
          ? `every chamber stays within ${SETTLE_BAND * 100} % of its final pressure and volume (relative to its excursion) after ${display(t, 'time')}; the last to settle is ${slowest.key}`
          : 'no chamber moves',
      };
    }
    const lead = unsettled.reduce((a, b) => (b.change / b.band > a.change / a.band ? b : a));
    // departure from the start, and whether it speeds up over the last two windows
    // plain loops: Math.max(...signals) per sample cost seconds for 10 000 chambers (and
    // would overflow the stack past about 100 000); same value, NaN included
    const xs = signals.map((s) => trace.values[col.get(s.key)!]);
    const d = times.map((_, k) => {
      let m = -Infinity;
      for (const x of xs) {
        const v = Math.abs(x[k] - x[0]) / Math.abs(x[0]);
        if (Number.isNaN(v)) return Number.NaN;
        if (v > m) m = v;
      }
      return m;
    });
    const span = tEnd - times[0];
    const w = WINDOW * span;
    const d2 = valueAt(times, d, tEnd) - valueAt(times, d, tEnd - w);
    const d1 = valueAt(times, d, tEnd - w) - valueAt(times, d, tEnd - 2 * w);
    if (d1 > 0 && d2 > 1.05 * d1) {
      const sigma = logSlope(times, d, tEnd - span / 3);
      if (sigma > 0) {
        return {
          ...base, outcome: 'diverging', settling_time: null, growth_rate: sigma,
          evidence: `the departure from the start grows as e^(σt) with σ ≈ ${sigma.toPrecision(3)} 1/s over the last third of the run, ${(d2 / d1).toPrecision(3)} times faster in the last ${display(w, 'time')} than in the ${display(w, 'time')} before`,
        };
      }
    }
    const pct = (lead.change / (lead.band / SETTLE_BAND)) * 100;
    return {
      ...base, outcome: 'moving', settling_time: null,
      evidence: `${lead.key} still changed ${pct.toPrecision(2)} % of its excursion in the last ${display(WINDOW * (tEnd - times[0]), 'time')}${Number.isFinite(lead.remaining) ? ` and is expected to change about ${((lead.remaining / (lead.band / SETTLE_BAND)) * 100).toPrecision(2)} % more` : ', not slowing down'}`,
    };
  });
}
