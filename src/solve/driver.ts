/**
 * The one driver: integrates segment by segment between time breakpoints (schedule ramps,
 * table knots), locates state events on the integrator's dense output, applies them and
 * restarts, samples the solution on a grid, and enforces budgets. Integrators only step.
 *
 * References: event location by the Illinois variant of regula falsi on the continuous
 * extension, Hairer, Nørsett & Wanner, Solving ODEs I, 2nd ed., §II.6 ("dense output and
 * event location"); Dahlquist & Björck, Numerical Methods, §6.2 (Illinois).
 */
import type { DenseOutput, Integrator, IntegratorStatus, OdeProblem, WorkCounts } from './types.js';
import { addWork, zeroWork } from './types.js';

export interface EventfulProblem extends OdeProblem {
  /** Ascending times in (t0, tEnd) where the rhs has a kink or jump: the driver restarts there. */
  breakpoints: number[];
  /** Called when a breakpoint is reached (before integration resumes past it). */
  atBreakpoint(t: number, y: Float64Array): void;
  /** Number of state events. */
  nEvents: number;
  /** Writes every event function g_k(t, y) into out (a sign change is an event). */
  eventValues(t: number, y: Float64Array, out: Float64Array): void;
  /** +1: only upward crossings count, −1 only downward, 0 both. */
  eventDirection(k: number): number;
  /** Applies event k at t (state y). Returns true if the rhs changed (the integrator must restart). */
  fireEvent(k: number, t: number, y: Float64Array, rising: boolean): boolean;
  /**
   * Optional: true for an event that only logs (an extremum passed, a limit exceeded): it never
   * changes the rhs, so the driver neither restarts nor shortens the step for it, and may leave
   * out its repetitions when it chatters (see CHATTER_FIRINGS).
   */
  eventLogsOnly?(k: number): boolean;
}

/** A log-only event that chattered: it fired `count` times more than were logged, between `from` and `to`. */
export interface EventChatter { k: number; count: number; from: number; to: number }

export interface DriverOptions {
  integrator: Integrator;
  t0: number;
  tEnd: number;
  y0: Float64Array;
  /** Sample grid spacing (s); samples at t0 + k·sample and at tEnd. */
  sample: number;
  /** Called at every sample time and every accepted step end, in time order, with kind. */
  observe(t: number, y: Float64Array, kind: 'sample' | 'step'): void;
  /**
   * Optional: called once per accepted step, in time order, with the step's dense output valid
   * on [tOld, tNew] (tNew is the event time when an event cuts the step short). It runs before
   * an event at tNew is applied, so values inside the step are those the step was computed with.
   * The pieces tile [t0, t]; `dense` must not be kept after the call.
   */
  onStep?(tOld: number, tNew: number, dense: DenseOutput): void;
  maxSteps?: number;
  maxWallMs?: number;
  /**
   * When the wall-time budget started (ms since the epoch, as Date.now()); default: when
   * `drive` is called. A caller that prepares the run (the system, the choice of method) passes
   * its own start so that the budget covers that work too.
   */
  wallStart?: number;
  /** Polled once a step; a string stops the run with that message (e.g. Ctrl-C). */
  interrupt?: () => string | null;
  hMax?: number;
  /** Called once for each burst of a chattering log-only event, when it ends or at the end of the run. */
  onChatter?(c: EventChatter): void;
  /**
   * Integrator to continue with when the first one fails numerically (step-size collapse,
   * non-finite values, singular matrix): `method: auto` starts explicit and falls back to the
   * stiff method at a kink an explicit extrapolation code cannot pass.
   */
  fallback?: Integrator;
}

export type DriverStatus = 'completed' | 'failed';

export interface DriverResult {
  status: DriverStatus;
  cause: IntegratorStatus | 'budget-steps' | 'budget-wall' | 'interrupted' | 'completed';
  message: string;
  t: number;
  y: Float64Array;
  work: WorkCounts;
  /** Time at which the driver switched to the fallback integrator, if it did. */
  switchedAt?: number;
}

const ILLINOIS_ITER = 100;
/**
 * A log-only event that fires more than this many times within CHATTER_SPAN of the run's
 * duration, counted from the first firing of the burst, chatters: its further firings in the
 * burst are counted, not logged (a thin membrane hovering at its pressure minimum crossed it a
 * million times within 1e-12 s, each a restart of the integrator, before this limit).
 */
const CHATTER_FIRINGS = 20;
const CHATTER_SPAN = 1e-3;
/** Gaps to the next stop below this many doubles (relative to t) are not integrated (the integrators' own floor is 10). */
const ROUND_OFF_GAP = 16 * 2.220446049250313e-16;

/** Illinois root finding of g_k on [a, b] using dense output. Returns the root time. */
function locate(p: EventfulProblem, k: number, a: number, ga: number, b: number, gb: number,
  dense: DenseOutput, yTmp: Float64Array, gTmp: Float64Array): number {
  let side = 0;
  for (let i = 0; i < ILLINOIS_ITER; i++) {
    let c = (a * gb - b * ga) / (gb - ga);
    // the secant can land on an end once one end sits at the root within round-off (g = -1e-15
    // at a, the other end far away): bisect then, so that b still closes in on the root
    if (!(c > a && c < b)) c = 0.5 * (a + b);
    if (!(c > a && c < b)) break;
    dense(c, yTmp);
    p.eventValues(c, yTmp, gTmp);
    const gc = gTmp[k];
    if (gc === 0) return c;
    if (Math.sign(gc) === Math.sign(gb)) {
      b = c; gb = gc;
      if (side === -1) ga /= 2;
      side = -1;
    } else {
      a = c; ga = gc;
      if (side === 1) gb /= 2;
      side = 1;
    }
    if (b - a <= 4e-15 * Math.max(Math.abs(b), 1e-300) + 1e-15) break;
  }
  return b; // report the first time at which the crossing has happened
}

/** Whether event k's function went from ga to gb across zero in a direction that counts. */
function crosses(p: EventfulProblem, k: number, ga: number, gb: number): boolean {
  const dir = p.eventDirection(k);
  return (ga < 0 && gb >= 0 && dir >= 0) || (ga > 0 && gb <= 0 && dir <= 0);
}

/**
 * The first time in (a, b] by which one of the events `cands` (each crossed between a and b)
 * has crossed, and every event of them that has crossed by then: ties fire together. The
 * candidate whose secant estimate comes first is located alone (Illinois on its function, each
 * evaluation giving all of them); if others have crossed by its root too, the search repeats
 * on those before that root. A step where hundreds of events cross costs a few locations, not
 * one each, and events crossing at the same instant (identical valves on a symmetric rig) are
 * all fired, not only the first of them. `gAt` receives the event values at the time returned.
 */
function firstCrossings(p: EventfulProblem, cands: number[], a: number, gA: Float64Array, b: number, gB: Float64Array,
  dense: DenseOutput, yTmp: Float64Array, gTmp: Float64Array, gAt: Float64Array): { t: number; crossed: number[] } {
  let hi = b;
  gAt.set(gB);
  let set = cands;
  for (let iter = 0; iter < ILLINOIS_ITER && set.length > 0; iter++) {
    let kBest = set[0];
    let first = Infinity;
    for (const k of set) {
      const estimate = a + (hi - a) * (gA[k] / (gA[k] - gAt[k]));
      if (estimate < first) { first = estimate; kBest = k; }
    }
    const tc = locate(p, kBest, a, gA[kBest], hi, gAt[kBest], dense, yTmp, gTmp);
    if (!(tc < hi)) {
      // kBest crosses at hi itself (its secant estimate may have been early for a curved g):
      // one evaluation just before hi tells whether any other crossed earlier
      const before = hi - 8e-15 * Math.max(Math.abs(hi), 1e-300) - 2e-15;
      if (!(before > a)) break;
      dense(before, yTmp);
      p.eventValues(before, yTmp, gTmp);
      const earlier = set.filter((k) => crosses(p, k, gA[k], gTmp[k]));
      if (earlier.length === 0) break; // all of `set` cross at hi, within round-off: together
      hi = before;
      gAt.set(gTmp);
      set = earlier;
      continue;
    }
    dense(tc, yTmp);
    p.eventValues(tc, yTmp, gTmp);
    const crossed = set.filter((k) => crosses(p, k, gA[k], gTmp[k]));
    if (crossed.length === 0) {
      // `locate` saw kBest on its crossed side at tc, but the value there is of the order of
      // round-off and a re-evaluation can come out on the other side (a chamber's volume solve
      // is warm-started from the last one, so the same point can differ in the last bits).
      // The crossing is at tc: keeping hi fired it at the step's end instead, up to a whole
      // step late (a relief valve set at 150 kPa gauge opened at 174 kPa, found by calibration).
      hi = tc;
      gAt.set(gTmp);
      return { t: hi, crossed: [kBest] };
    }
    hi = tc;
    gAt.set(gTmp);
    if (crossed.length === 1) return { t: hi, crossed };
    set = crossed;
  }
  return { t: hi, crossed: set };
}

export function drive(p: EventfulProblem, o: DriverOptions): DriverResult {
  const started = o.wallStart ?? Date.now();
  const work = zeroWork();
  const n = p.n;
  let t = o.t0;
  let y: Float64Array = Float64Array.from(o.y0);
  const gPrev = new Float64Array(p.nEvents);
  const gNew = new Float64Array(p.nEvents);
  const gTmp = new Float64Array(p.nEvents);
  const gAt = new Float64Array(p.nEvents);
  const cands: number[] = [];
  const yTmp = new Float64Array(n);
  const yEv = new Float64Array(n);
  let nextSample = 1; // index of the next sample on the grid
  const sampleAt = (k: number): number => Math.min(o.t0 + k * o.sample, o.tEnd);
  const nSamples = Math.ceil((o.tEnd - o.t0) / o.sample - 1e-9);
  o.observe(t, y, 'sample');
  p.eventValues(t, y, gPrev);

  const emitSamples = (upTo: number, dense: DenseOutput, inclusive: boolean): void => {
    while (nextSample <= nSamples) {
      const ts = sampleAt(nextSample);
      if (ts > upTo || (!inclusive && ts === upTo)) break;
      dense(ts, yTmp);
      o.observe(ts, yTmp, 'sample');
      nextSample++;
    }
  };

  const stops = [...p.breakpoints.filter((b) => b > o.t0 && b < o.tEnd), o.tEnd];
  /**
   * The budget or interrupt that stops the run at t, if any: checked at every step's end and
   * after every event restart. `pending`: steps of the integrator call under way, not yet in `work`.
   */
  const budgetAt = (tNow: number, pending = 0): Pick<DriverResult, 'cause' | 'message'> | null => {
    if (o.maxSteps !== undefined && work.steps + pending >= o.maxSteps) {
      return { cause: 'budget-steps', message: `step budget max-steps = ${o.maxSteps} used up at t = ${tNow.toPrecision(6)} s` };
    }
    if (o.maxWallMs !== undefined && Date.now() - started > o.maxWallMs) {
      return { cause: 'budget-wall', message: `wall-time budget max-wall = ${(o.maxWallMs / 1000).toPrecision(3)} s used up at t = ${tNow.toPrecision(6)} s` };
    }
    const why = o.interrupt?.();
    return why ? { cause: 'interrupted', message: `${why} at t = ${tNow.toPrecision(6)} s` } : null;
  };
  // chatter of log-only events: the start of each event's current burst and its firings in it
  const logged: number[] = [];
  const MAX_PASSES = 4 + 2 * p.nEvents;
  const burstFrom = new Float64Array(p.nEvents).fill(-Infinity);
  const burstLast = new Float64Array(p.nEvents);
  const burstCount = new Float64Array(p.nEvents);
  const span = CHATTER_SPAN * (o.tEnd - o.t0);
  const endBurst = (k: number): void => {
    if (burstCount[k] > CHATTER_FIRINGS) o.onChatter?.({ k, count: burstCount[k] - CHATTER_FIRINGS, from: burstFrom[k], to: burstLast[k] });
  };
  /** Counts a firing of log-only event k at t; true when it chatters and is not to be logged. */
  const chattering = (k: number, tk: number): boolean => {
    if (tk - burstFrom[k] > span) {
      endBurst(k);
      burstFrom[k] = tk;
      burstCount[k] = 0;
    }
    burstCount[k]++;
    burstLast[k] = tk;
    return burstCount[k] > CHATTER_FIRINGS;
  };
  let h0: number | undefined;
  let failure: DriverResult | null = null;
  let integrator = o.integrator;
  let switchedAt: number | undefined;
  for (const tb of stops) {
    while (t < tb) {
      if (tb - t <= ROUND_OFF_GAP * Math.max(Math.abs(t), Math.abs(tb))) {
        // a remainder of a few doubles (two breakpoints from different schedules a double
        // apart, an event a double before a breakpoint): no integrator can step it and the
        // state cannot change across it, so the run goes on from tb with the state it has
        while (nextSample <= nSamples && sampleAt(nextSample) <= tb) o.observe(sampleAt(nextSample++), y, 'sample');
        t = tb;
        break;
      }
      let restartAt: number | null = null;
      let budgetStop: Pick<DriverResult, 'cause' | 'message'> | null = null;
      const onStep = (tOld: number, tNew: number, yNew: Float64Array, dense: DenseOutput): boolean => {
        p.eventValues(tNew, yNew, gNew);
        // the crossings in this step, earliest first: log-only events are fired where they
        // cross and the search goes on in the rest of the step; an event that changes the rhs
        // ends the step there (the integrator restarts at it)
        let tA = tOld;
        let reported = tOld; // the dense output is handed to onStep in pieces that tile the step
        for (let pass = 0; ; pass++) {
          cands.length = 0;
          for (let k = 0; k < p.nEvents; k++) if (crosses(p, k, gPrev[k], gNew[k])) cands.push(k);
          if (cands.length === 0) break;
          const first = firstCrossings(p, cands, tA, gPrev, tNew, gNew, dense, yTmp, gTmp, gAt);
          const tFirst = first.t;
          emitSamples(tFirst, dense, false);
          if (tFirst > reported) {
            o.onStep?.(reported, tFirst, dense);
            reported = tFirst;
          }
          dense(tFirst, yEv);
          let restart = false;
          logged.length = 0;
          for (const k of first.crossed) {
            const rising = gAt[k] > gPrev[k];
            if (p.eventLogsOnly?.(k)) {
              logged.push(k, rising ? 1 : -1);
              if (chattering(k, tFirst)) continue;
            }
            if (p.fireEvent(k, tFirst, yEv, rising)) restart = true;
          }
          // every other event function is re-read at the event time, so a crossing later in
          // this step is found on the next pass (or the next step)
          p.eventValues(tFirst, yEv, gPrev);
          // a log-only event's function is unchanged by firing: keep it on the side it crossed
          // to, or round-off at the root (the dense output at the root against the step's end)
          // makes the same crossing count again on the next step
          for (let i = 0; i < logged.length; i += 2) {
            const k = logged[i];
            if (logged[i + 1] > 0 && !(gPrev[k] > 0)) gPrev[k] = Number.MIN_VALUE;
            if (logged[i + 1] < 0 && !(gPrev[k] < 0)) gPrev[k] = -Number.MIN_VALUE;
          }
          if (restart || pass >= MAX_PASSES) {
            o.observe(tFirst, yEv, 'step');
            restartAt = tFirst;
            return false;
          }
          if (tFirst >= tNew) break;
          o.observe(tFirst, yEv, 'step');
          tA = tFirst;
        }
        emitSamples(tNew, dense, true);
        if (tNew > reported) o.onStep?.(reported, tNew, dense);
        o.observe(tNew, yNew, 'step');
        gPrev.set(gNew);
        budgetStop = budgetAt(tNew, stepsThisCall);
        return budgetStop === null;
      };
      let stepsThisCall = 0;
      const counting = (tOld: number, tNew: number, yNew: Float64Array, dense: DenseOutput): boolean => {
        stepsThisCall++;
        return onStep(tOld, tNew, yNew, dense);
      };
      const r = integrator(p, t, y, tb, counting, {
        h0, hMax: o.hMax,
        maxSteps: o.maxSteps !== undefined ? Math.max(1, o.maxSteps - work.steps) : undefined,
      });
      addWork(work, r.work);
      h0 = r.hLast > 0 ? r.hLast : undefined;
      if (restartAt !== null) {
        t = restartAt;
        y = Float64Array.from(yEv);
        // a restart at an event skips the checks at a step's end: make them here, or a valve
        // that switches at every step would run past every budget and past Ctrl-C
        const stop = budgetAt(t);
        if (stop) {
          failure = { status: 'failed', ...stop, t, y, work };
          break;
        }
        continue;
      }
      t = r.t;
      y = r.y;
      // (set inside onStep, which TypeScript's narrowing does not see)
      const stopped = budgetStop as Pick<DriverResult, 'cause' | 'message'> | null;
      if (stopped) {
        failure = { status: 'failed', ...stopped, t, y, work };
        break;
      }
      if (r.status === 'max-steps') {
        failure = { status: 'failed', cause: 'budget-steps', message: `step budget max-steps = ${o.maxSteps} used up at t = ${t.toPrecision(6)} s`, t, y, work };
        break;
      }
      const numerical = r.status === 'step-too-small' || r.status === 'non-finite' || r.status === 'singular';
      if (numerical && o.fallback && integrator !== o.fallback) {
        integrator = o.fallback;
        switchedAt = t;
        h0 = undefined;
        continue;
      }
      if (r.status !== 'completed') {
        failure = { status: 'failed', cause: r.status, message: r.message, t, y, work, switchedAt };
        break;
      }
    }
    if (failure) break;
    if (tb < o.tEnd) {
      p.atBreakpoint(tb, y);
      p.eventValues(tb, y, gPrev);
      h0 = undefined;
    }
  }
  for (let k = 0; k < p.nEvents; k++) endBurst(k);
  if (failure) return { ...failure, switchedAt };
  return { status: 'completed', cause: 'completed', message: `completed at t = ${o.tEnd} s`, t, y, work, switchedAt };
}
