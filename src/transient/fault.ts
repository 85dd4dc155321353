/**
 * When a run stops early: which element is most likely at fault, and why, in words an
 * engineer can act on. Called once, after the driver has given up, on the last accepted state.
 *
 * The checks, in order (the first that finds something wins):
 *   1. interrupted by the user: no element.
 *   2. a check or relief valve that switched very often: chattering.
 *   3. a reservoir whose pressure, just after the stop, is not finite, negative or beyond the
 *      highest gas pressure: a singular or runaway expression.
 *   4. for a numerical fault, a chamber at the edge of its wall law's range and moving towards
 *      it: nearly empty (under 0.1 % of its start mass) and losing gas, at a Gent lock and
 *      gaining gas, squeezed to the end of a linear wall, or already outside; or a line or
 *      valve whose flow is not finite. Then the chamber the integrator's last (rejected)
 *      evaluation saw leave its range, if any.
 *   5. otherwise the fastest element: the chamber with the largest |∂ṁ/∂m| (finite
 *      difference on its mass) and the line or valve that makes it so; its time constant
 *      against the duration explains a step-size collapse or a budget used up.
 */
import type { NetworkSystem } from '../assemble/system.js';
import type { Model } from '../model/types.js';
import { vacuumVolume } from '../model/volume.js';
import { MAX_GAS_PRESSURE } from '../units/pressure.js';
import type { RunFault } from './results.js';

/** An element limits the step size when its time constant and the mean step are within this factor. */
const LIMITING = 100;
/** Right-hand sides per attempted step (beyond one per unknown) above which an integrator is stuck. */
const STALLED_RHS_PER_STEP = 1000;
/** A valve that switched at least this often is called chattering. */
const CHATTER_EVENTS = 200;

type Cause = RunFault['cause'];

function fmt(x: number): string {
  if (x === 0) return '0';
  return Math.abs(x) >= 1e-3 && Math.abs(x) < 1e6 ? String(Number(x.toPrecision(4))) : x.toExponential(2);
}

function chatter(sys: NetworkSystem): Omit<RunFault, 't' | 'cause'> | undefined {
  const counts = new Map<string, number>();
  for (const c of sys.log.counts()) {
    if (c.kind === 'relief' || c.kind === 'check') counts.set(c.element, (counts.get(c.element) ?? 0) + c.count);
  }
  let worst: [string, number] | undefined;
  for (const c of counts) if (!worst || c[1] > worst[1]) worst = c;
  if (!worst || worst[1] < CHATTER_EVENTS) return undefined;
  return {
    element: worst[0], kind: 'valve',
    likely: `valve \`${worst[0]}\` opened and closed ${worst[1]} times: it is chattering; a likely cause is a relief band (opens-above − reseats-below) or a cracking pressure too small for the flow it passes, or a valve much larger than the chamber it relieves`,
  };
}

function reservoirFault(model: Model, t: number): Omit<RunFault, 't' | 'cause'> | undefined {
  const scale = Math.max(1, Math.abs(t));
  for (const r of model.reservoirs) {
    if (r.pressure.constant) continue;
    for (const dt of [0, 1e-15, 1e-13, 1e-11, 1e-9, 1e-7, 1e-6]) {
      const p = r.pressure.at(t + dt * scale);
      if (Number.isFinite(p) && p >= 0 && p <= MAX_GAS_PRESSURE) continue;
      const what = Number.isFinite(p) ? `${fmt(p)} Pa absolute` : 'not a finite number';
      return {
        element: r.name, kind: 'reservoir',
        likely: `the pressure of reservoir \`${r.name}\` is ${what} at t = ${fmt(t + dt * scale)} s: its pressure expression has a singularity or grows without bound there; check the expression (\`${r.pressure.text}\`)`,
      };
    }
  }
  return undefined;
}

/** A chamber holding less than this share of its start mass, and losing gas, is "nearly empty". */
const NEARLY_EMPTY = 1e-3;
/** A chamber within this relative distance of its wall law's end of range is "at" that end. */
const AT_END = 1e-3;

/**
 * A chamber at the edge of its wall law's range, moving towards it (or past it), or a branch
 * whose flow is not finite, at the last accepted state.
 */
function rangeFault(sys: NetworkSystem, model: Model, t: number, y: Float64Array): Omit<RunFault, 't' | 'cause'> | undefined {
  const f = new Float64Array(sys.n);
  sys.rhs(t, y, f); // also fills p, V and the flows at (t, y)
  // the first gas nodes with states are the chambers, in order (cylinder sides follow)
  for (let i = 0; i < model.chambers.length; i++) {
    const c = model.chambers[i];
    const m = y[sys.mIdx[i]];
    const mdot = f[sys.mIdx[i]];
    if (m < 0 || (m <= NEARLY_EMPTY * c.m0 && mdot < 0)) {
      return {
        element: c.name, kind: 'chamber',
        likely: `chamber \`${c.name}\` is being emptied to zero mass (near vacuum, ${fmt(m)} kg left of ${fmt(c.m0)} kg at the start) faster than the integrator can follow; a likely cause is a large opening to a vacuum or near-vacuum node (choked outflow until the chamber is empty): use a smaller orifice or a longer line, or end the run before the chamber is empty`,
      };
    }
    const V = sys.V[i];
    const atLock = c.wall.kind === 'gent' && Number.isFinite(c.wall.Vmax) && V >= (1 - AT_END) * c.wall.Vmax && mdot > 0;
    const squeezed = c.wall.kind === 'linear' && V <= (1 + AT_END) * vacuumVolume(c.wall, model.pa) && mdot < 0;
    if (atLock || squeezed || !(sys.p[i] >= 0) || !Number.isFinite(V)) {
      const why = c.wall.kind === 'gent'
        ? 'filled to its Gent lock stretch, where the wall pressure grows without bound'
        : c.wall.kind === 'linear' ? 'squeezed to the end of its linear wall law (the volume where its gas reaches vacuum)' : 'driven outside the range of its wall law';
      return {
        element: c.name, kind: 'chamber',
        likely: `chamber \`${c.name}\` is being ${why}; a likely cause is a supply or a vent far stronger than the chamber can take: check the supply pressure, the opening and the wall parameters`,
      };
    }
  }
  for (let b = 0; b < model.branches.length; b++) {
    if (Number.isFinite(sys.flows[b].mdot)) continue;
    const bm = model.branches[b];
    return {
      element: bm.hostLine ?? bm.name, kind: bm.kind === 'line' || bm.hostLine ? 'line' : 'valve',
      likely: `the flow through ${bm.kind} \`${bm.name}\` is not a finite number: a likely cause is an extreme pressure at one of its ends`,
    };
  }
  return undefined;
}

interface Fastest { element: string; kind: 'chamber' | 'line' | 'valve'; chamber: string; tau: number }

/**
 * Colours of the chambers such that no two of one colour are joined by a branch (greedy, in
 * index order: a chain takes 2, a hub with its leaves 2, at most the largest degree + 1). A
 * chamber's own rate ∂ṁ_i/∂m_i depends only on its branches, whose flows depend only on their
 * two ends, so the masses of all chambers of one colour can be perturbed in one evaluation.
 */
function colourChambers(model: Model): { colour: Int32Array; count: number } {
  const nc = model.chambers.length;
  const adj: number[][] = Array.from({ length: nc }, () => []);
  for (const b of model.branches) {
    if (b.from.kind === 'chamber' && b.to.kind === 'chamber' && b.from.index !== b.to.index) {
      adj[b.from.index].push(b.to.index);
      adj[b.to.index].push(b.from.index);
    }
  }
  const colour = new Int32Array(nc).fill(-1);
  const used = new Int32Array(nc + 1).fill(-1);
  let count = 0;
  for (let i = 0; i < nc; i++) {
    for (const j of adj[i]) if (colour[j] >= 0) used[colour[j]] = i;
    let c = 0;
    while (used[c] === i) c++;
    colour[i] = c;
    count = Math.max(count, c + 1);
  }
  return { colour, count };
}

/**
 * The chamber with the fastest own dynamics, the branch responsible, and its time constant (s).
 * Linear in the network's size: one evaluation per colour of `colourChambers` (2 for a chain),
 * then one to find the branch (a full evaluation per chamber made the diagnosis of a 40 000-
 * chamber run take 9 minutes after its wall-time budget of 2 s).
 */
function fastest(sys: NetworkSystem, model: Model, t: number, y: Float64Array): Fastest | undefined {
  if (model.chambers.length === 0) return undefined;
  const f0 = new Float64Array(sys.n);
  const f1 = new Float64Array(sys.n);
  sys.rhs(t, y, f0);
  const q0 = sys.flows.map((q) => q.mdot);
  const yp = Float64Array.from(y);
  const nc = model.chambers.length; // the first gas nodes with states (cylinder sides follow)
  const dm = (i: number): number => 1e-7 * Math.max(Math.abs(y[sys.mIdx[i]]), model.chambers[i].m0 * 1e-6, 1e-18);
  const { colour, count } = colourChambers(model);
  let best = { rate: 0, chamber: -1 };
  for (let c = 0; c < count; c++) {
    for (let i = 0; i < nc; i++) if (colour[i] === c) yp[sys.mIdx[i]] = y[sys.mIdx[i]] + dm(i);
    sys.rhs(t, yp, f1);
    for (let i = 0; i < nc; i++) {
      if (colour[i] !== c) continue;
      const k = sys.mIdx[i];
      yp[k] = y[k];
      const rate = Math.abs((f1[k] - f0[k]) / dm(i));
      if (rate > best.rate) best = { rate, chamber: i };
    }
  }
  if (best.chamber < 0) return undefined;
  // the branch whose flow changes most when only that chamber's mass changes
  const k = sys.mIdx[best.chamber];
  yp[k] = y[k] + dm(best.chamber);
  sys.rhs(t, yp, f1);
  let branch = -1;
  let most = 0;
  sys.flows.forEach((q, b) => {
    const d = Math.abs(q.mdot - q0[b]);
    if (d > most) { most = d; branch = b; }
  });
  const chamber = model.chambers[best.chamber].name;
  if (branch < 0) return { element: chamber, kind: 'chamber', chamber, tau: 1 / best.rate };
  const bm = model.branches[branch];
  return { element: bm.hostLine ?? bm.name, kind: bm.kind === 'line' || bm.hostLine ? 'line' : 'valve', chamber, tau: 1 / best.rate };
}

function describeFastest(f: Fastest, duration: number): string {
  const what = f.kind === 'chamber' ? `chamber \`${f.element}\`` : `${f.kind} \`${f.element}\` at chamber \`${f.chamber}\``;
  return `the fastest part of the network is ${what}, with a time constant of about ${fmt(f.tau)} s against a duration of ${fmt(duration)} s`;
}

/** The integrators' work up to the stop. */
export interface FaultWork { steps: number; rejected: number; rhs: number }

/**
 * Explains why a run stopped at (t, y). `trialFault` is the chamber the system flagged during
 * the integrator's last (rejected) evaluation, if any; `work` what the integrators did so far.
 */
export function diagnoseFault(sys: NetworkSystem, model: Model, cause: Cause, t: number, y: Float64Array,
  trialFault: string | null, work: FaultWork, method: string): RunFault {
  const steps = work.steps;
  const at = (found: Omit<RunFault, 't' | 'cause'>): RunFault => ({ ...found, t, cause });
  if (cause === 'interrupted') return at({ element: null, kind: null, likely: 'stopped by the user' });
  const numerical = cause === 'non-finite' || cause === 'step-too-small' || cause === 'singular';
  const found = chatter(sys) ?? reservoirFault(model, t)
    ?? (numerical ? rangeFault(sys, model, t, y) : undefined);
  if (found) return at(found);
  if (numerical && trialFault && model.cylinders.some((c) => c.name === trialFault)) {
    return at({ element: trialFault, kind: null, likely: `cylinder \`${trialFault}\` had a side emptied to vacuum during a step; a likely cause is a side vented or pumped out much faster than the piston can follow` });
  }
  if (numerical && trialFault) {
    return at({ element: trialFault, kind: 'chamber', likely: `chamber \`${trialFault}\` left the range of its wall law during a step; a likely cause is a chamber emptied to vacuum or filled to a Gent lock` });
  }
  const odexUsed = method.startsWith('odex');
  const fast = fastest(sys, model, t, y);
  const duration = model.simulate.duration;
  // the budget went on right-hand sides, not on steps: the integrator is stuck at t
  const stalled = work.rhs > (work.steps + work.rejected + 1) * (STALLED_RHS_PER_STEP + sys.n);
  if ((cause === 'budget-steps' || cause === 'budget-wall') && stalled) {
    return at({
      element: null, kind: null,
      likely: `the integrator (${method}) spent its budget on ${work.rhs} right-hand-side evaluations but accepted only ${work.steps} steps: it cannot get past something near t = ${fmt(t)} s; a likely cause is a switching element (a check or relief valve, a valve schedule) or a kink it cannot step across${odexUsed ? ': use `method: implicit` or `auto`' : ''}`,
    });
  }
  if (cause === 'budget-steps' || cause === 'budget-wall') {
    const raise = cause === 'budget-steps' ? 'raise `max-steps`' : 'raise `max-wall`';
    const share = t > 0 ? `; it reached ${fmt((100 * t) / duration)} % of the duration, so the whole run needs about ${fmt(duration / t)} times the budget` : '';
    // name the fastest element only when it is what keeps the steps short: an explicit method
    // must step within a small multiple of it (stability), an implicit one only takes steps
    // that short while that element is busy
    const hMean = t / Math.max(steps, 1);
    const limits = fast !== undefined && fast.tau <= LIMITING * hMean && (odexUsed || hMean <= LIMITING * fast.tau);
    const why = limits
      ? `; the steps are short because ${describeFastest(fast, duration)}${odexUsed ? ': the network is stiff, use `method: implicit`' : ''}`
      : '';
    return at({
      element: limits ? fast.element : null, kind: limits ? fast.kind : null,
      likely: `the budget was too small for this run${share}: ${raise}${why}`,
    });
  }
  if (!fast) return at({ element: null, kind: null, likely: 'the integrator could not continue' });
  const advice = odexUsed
    ? 'use `method: implicit`, or merge the chambers it joins into one'
    : 'merge the chambers it joins into one, or check its size';
  return at({
    element: fast.element, kind: fast.kind,
    likely: `${describeFastest(fast, duration)}; a likely cause is an element far faster than the rest (a very short or very wide line or valve, a tiny chamber): ${advice}`,
  });
}
