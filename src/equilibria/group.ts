/**
 * Equilibria of one group of chambers for the gas it holds (closed) or its boundaries (open):
 * the rest pressures (enumerate.ts, deflation.ts, steady.ts), every volume each chamber can take
 * there, the one-way valves beside the group, and each state's stability.
 */
import type { NodeRef } from '../model/types.js';
import type { WallPoint } from '../physics/wall.js';
import { deflatedClosed } from './deflation.js';
import { branchCombinations, enumerateClosed, type Root } from './enumerate.js';
import { groupStability } from './rest-stability.js';
import { chamberAt, restOf, type AtP, type RestChamber, type RestGroup, type RestSetup } from './rest.js';
import type { StabilityVerdict } from './stability.js';
import { steadyPressures } from './steady.js';
import type { ChamberRest, GroupResult } from './types.js';

// ---- the whole analysis ------------------------------------------------------------------

/** Share of a closed group's time budget the search for rest states may use. */
const SEARCH_SHARE = 0.5;
/** Rest states whose stability is analysed whatever the budget. */
const MIN_ANALYSED = 1;

export function groupMassesOf(g: RestGroup, masses: ArrayLike<number>): number {
  return g.chambers.reduce((a, c) => a + masses[c], 0);
}

/** A one-way valve between a closed group and a side whose pressure is known. */
interface Side { name: string; what: string; inflow: boolean; pStar: number; holds(p: number): boolean }

/** The one-way valves next to a closed group whose other side has a known pressure. */
function sidesOf(setup: RestSetup, g: RestGroup, outside: (n: NodeRef) => number | null): Side[] {
  const { model } = setup;
  const inside = (n: NodeRef): boolean => n.kind === 'chamber' && g.chambers.includes(n.index);
  const sides: Side[] = [];
  model.branches.forEach((b) => {
    const op = b.valve?.operation;
    if (!op || (op.kind !== 'check' && op.kind !== 'relief')) return;
    const fromIn = inside(b.from);
    const toIn = inside(b.to);
    if (fromIn === toIn) return;
    const q = outside(fromIn ? b.to : b.from);
    if (q === null) return;
    if (op.kind === 'check') {
      sides.push(fromIn
        ? { name: b.name, what: `check valve ${b.name} at its cracking pressure`, inflow: false, pStar: q + op.cracking, holds: (p) => p - q <= op.cracking * (1 + 1e-9) + 1e-9 }
        : { name: b.name, what: `check valve ${b.name} at its cracking pressure`, inflow: true, pStar: q - op.cracking, holds: (p) => q - p <= op.cracking * (1 + 1e-9) + 1e-9 });
    } else if (fromIn) {
      sides.push({ name: b.name, what: `relief valve ${b.name} reseated`, inflow: false, pStar: Math.max(model.pa + op.reseatsBelow, q), holds: (p) => p - model.pa <= op.opensAbove * (1 + 1e-9) + 1e-9 });
    } else if (q - model.pa > op.opensAbove) {
      sides.push({ name: b.name, what: `relief valve ${b.name} open`, inflow: true, pStar: q, holds: () => false });
    }
  });
  return sides;
}

/** Every volume each chamber of a group can take at its pressure, and their combinations. */
function statesAt(chs: RestChamber[], p: ArrayLike<number>, pa: number, limit: number, notes: string[]): { list: ChamberRest[][]; total: number } {
  const s: WallPoint = { p: 0, dpdV: 0 };
  const tmp: AtP = { V: 0, m: 0, C: 0 };
  const options: ChamberRest[][] = chs.map((ch, i) => {
    if (ch.wall.rigid) {
      chamberAt(ch, null, p[i], pa, s, tmp);
      return [restOf(ch, p[i], pa, tmp.V, tmp.m, 0)];
    }
    const list: ChamberRest[] = [];
    ch.segments.forEach((seg, k) => {
      if (!chamberAt(ch, seg, p[i], pa, s, tmp)) return;
      if (list.some((x) => Math.abs(x.volume - tmp.V) <= 1e-12 * tmp.V)) return;
      list.push(restOf(ch, p[i], pa, tmp.V, tmp.m, k));
    });
    if (!list.length) notes.push(`${ch.name} cannot hold ${((p[i] - pa) / 1000).toPrecision(4)} kPa gauge on its wall law: no rest state there (it would inflate without bound)`);
    return list;
  });
  let total = 1;
  for (const o of options) total *= o.length;
  const list: ChamberRest[][] = [];
  const pick = new Array<number>(chs.length).fill(0);
  for (let k = 0; k < Math.min(total, limit); k++) {
    list.push(pick.map((j, i) => options[i][j]));
    for (let i = chs.length - 1; i >= 0; i--) {
      if (++pick[i] < options[i].length) break;
      pick[i] = 0;
    }
  }
  return { list, total };
}

export interface GroupOptions {
  maxCombinations: number;
  starts?: number;
  hints?: Float64Array[];
  /** False to skip the stability analysis (continuation's starts). */
  stability?: boolean;
  /** performance.now() after which the search stops and returns what it has (default: none). */
  deadline?: number;
  /** Pressure of a node outside the group (reservoir, open group) when known. */
  outside?: (n: NodeRef) => number | null;
}

/** Equilibria of one group for the gas it holds (closed) or its boundaries (open). */
export function groupEquilibria(setup: RestSetup, g: RestGroup, masses: ArrayLike<number>, opts: GroupOptions): GroupResult {
  const { model, sys } = setup;
  const pa = model.pa;
  const names = g.chambers.map((c) => model.chambers[c].name);
  const chs = g.chambers.map((c) => setup.chambers[c]);
  const flowing = g.flowing.map((k) => model.branches[k].name);
  const result: GroupResult = {
    chambers: names, kind: g.kind, mass: null, method: 'none', combinations: 0, complete: true, equilibria: [], flowing, notes: [],
    branch_combinations: 1, examined: 0, timed_out: false,
  };
  const deadline = opts.deadline ?? Infinity;
  let timedOut = false;
  const withStability = opts.stability !== false;
  // the budget: the first MIN_ANALYSED states whatever it says, then none whose analysis (as long
  // as the longest so far) would overrun it; those found but not analysed are counted
  let analysed = 0;
  let longest = 0;
  let skipped = 0;
  /** Adds a state with its stability; false, adding nothing, when the budget is spent. */
  const add = (at: ChamberRest[], note?: string): boolean => {
    const t0 = performance.now();
    if (withStability && analysed >= MIN_ANALYSED && t0 + longest > deadline) {
      timedOut = true;
      result.complete = false;
      skipped++;
      return false;
    }
    const stability = withStability
      ? groupStability(setup, g, at.map((c) => c.mass), masses)
      : { eigenvalues: [], growth_rate: null, time_constant: null, stability: 'marginal' as const, ok: true };
    result.equilibria.push(note ? { chambers: at, stability, note } : { chambers: at, stability });
    analysed++;
    longest = Math.max(longest, performance.now() - t0);
    return true;
  };
  const budgetNote = (): void => {
    result.timed_out = timedOut;
    if (skipped) result.notes.push(`the time budget ran out: ${skipped} more equilibri${skipped === 1 ? 'um' : 'a'} found but not analysed`);
  };

  if (g.kind === 'fed') {
    result.notes.push(`${names.join(', ')} ${names.length === 1 ? 'is' : 'are'} fed with no outlet: there is no steady state (the pressure keeps rising)`);
    return result;
  }

  if (g.kind === 'closed') {
    const M = groupMassesOf(g, masses);
    result.mass = M;
    result.branch_combinations = branchCombinations(chs, M, pa);
    // the search may use SEARCH_SHARE of the time left; the rest is for the states' stability
    const now = performance.now();
    const searchDeadline = now + SEARCH_SHARE * (deadline - now);
    const en = enumerateClosed(chs, M, pa, opts.maxCombinations, searchDeadline);
    let roots: Root[];
    if (en) {
      roots = en.roots;
      result.method = 'enumeration';
      result.combinations = en.combos;
      result.examined = en.combos;
      if (en.timedOut) {
        result.complete = false;
        timedOut = true;
        result.notes.push(`the time budget ran out after ${en.combos} of ${result.branch_combinations} branch combinations: the list may be incomplete`);
      }
    } else {
      const starts = opts.starts ?? 64 + 16 * chs.length;
      // the transient's end first (the state the run reaches), then the start
      const hints = [...(opts.hints ?? []).map((h) => Float64Array.from(g.chambers.map((c) => h[c]))), Float64Array.from(g.chambers.map((c) => masses[c]))];
      const d = deflatedClosed(chs, M, pa, starts, hints, searchDeadline);
      roots = d.roots;
      result.method = 'deflation';
      result.combinations = starts;
      result.examined = d.tried;
      result.complete = false;
      result.notes.push(`more than ${opts.maxCombinations} branch combinations: searched by deflated Newton iteration from ${d.timedOut ? `${d.tried} of ${d.planned}` : d.planned} starts${d.timedOut ? ' (the time budget ran out)' : ''}; the list may be incomplete`);
      if (d.timedOut) timedOut = true;
    }
    // as long as the budget lasts: the state found from the transient's end first, then those with
    // the fewest chambers off their first segment (where the stable states of spheres lie), each
    // in the order found; the first MIN_ANALYSED whatever the budget
    const first = roots.length && result.method === 'deflation' && (opts.hints ?? []).length ? roots.slice(0, 1) : [];
    const offFirst = (r: Root): number => r.segs.reduce((a, k) => a + (k > 0 ? 1 : 0), 0);
    const rest = roots.slice(first.length).map((r, k) => ({ r, k })).sort((a, b) => offFirst(a.r) - offFirst(b.r) || a.k - b.k).map((x) => x.r);
    if (result.method === 'deflation') roots = [...first, ...rest];
    const kept: Root[] = [];
    for (const r of roots) if (add(r.at.map((a, i) => restOf(chs[i], r.p, pa, a.V, a.m, r.segs[i])))) kept.push(r);
    if (result.method === 'deflation') {
      const order = result.equilibria.map((e, k) => ({ e, p: kept[k].p })).sort((a, b) => a.p - b.p);
      result.equilibria = order.map((x) => x.e);
    }
    // states where a one-way valve to a known pressure has let gas in or out until it holds
    const sides = opts.outside ? sidesOf(setup, g, opts.outside) : [];
    for (const side of sides) {
      if (!(side.pStar > 0) || sides.some((o) => o !== side && !o.holds(side.pStar))) continue;
      const at = statesAt(chs, new Array<number>(chs.length).fill(side.pStar), pa, opts.maxCombinations, []);
      for (const states of at.list) {
        const held = states.reduce((a, c) => a + c.mass, 0);
        if (side.inflow ? held < M * (1 - 1e-12) : held > M * (1 + 1e-12)) continue;
        add(states, `${side.what}: the group ${side.inflow ? 'gained' : 'lost'} ${(Math.abs(held - M) * 1e3).toPrecision(4)} g of gas`);
      }
    }
    budgetNote();
    return result;
  }

  // open group: steady flow, for each way its relief valves can stand
  result.method = 'steady-flow';
  const reliefs = g.flowing.filter((k) => model.branches[k].valve?.operation.kind === 'relief');
  const r = Math.min(reliefs.length, 8);
  let anySolved = false;
  for (let mask = 0; mask < 1 << r; mask++) {
    const openState = reliefs.map((_, i) => i >= r || ((mask >> i) & 1) === 1);
    reliefs.forEach((k, i) => { sys.branches[k].open = openState[i]; });
    const sp = steadyPressures(setup, g);
    if (!sp.ok) continue;
    anySolved = true;
    const pOf = (n: NodeRef): number => (n.kind === 'chamber' ? sp.p[g.chambers.indexOf(n.index)] : model.reservoirs[n.index].pressure.at(setup.t));
    const consistent = reliefs.every((k, i) => {
      const op = model.branches[k].valve!.operation as { opensAbove: number; reseatsBelow: number };
      const gauge = pOf(model.branches[k].from) - pa;
      return openState[i] ? gauge >= op.reseatsBelow : gauge <= op.opensAbove;
    });
    if (!consistent) continue;
    const at = statesAt(chs, sp.p, pa, opts.maxCombinations, result.notes);
    result.combinations += at.total;
    result.branch_combinations = result.combinations;
    result.examined += Math.min(at.total, opts.maxCombinations);
    if (at.total > opts.maxCombinations) {
      result.complete = false;
      result.notes.push(`${at.total} branch combinations: only the first ${opts.maxCombinations} are listed`);
    }
    const note = reliefs.length ? reliefs.map((k, i) => `relief valve ${model.branches[k].name} ${openState[i] ? 'open' : 'shut'}`).join(', ') : undefined;
    for (const states of at.list) add(states, note);
  }
  reliefs.forEach((k) => { sys.branches[k].open = false; });
  budgetNote();
  if (!anySolved) {
    result.complete = false;
    result.notes.push('the steady-flow pressures could not be found (the flow balance did not converge)');
  } else if (result.equilibria.length === 0 && reliefs.length) {
    result.notes.push(`no steady state: relief valve${reliefs.length > 1 ? 's' : ''} ${reliefs.map((k) => model.branches[k].name).join(', ')} can stay neither open nor shut (${reliefs.length > 1 ? 'they cycle' : 'it cycles'}; see the transient's outcome)`);
  }
  return result;
}

/** Whether the one-way valves that pass no gas at rest hold at this state. */
export function oneWayChecks(setup: RestSetup, pressures: Float64Array): string[] {
  const { model } = setup;
  const flowing = new Set(setup.groups.flatMap((g) => g.flowing));
  const out: string[] = [];
  const pOf = (r: NodeRef): number => (r.kind === 'chamber' ? pressures[r.index] : model.reservoirs[r.index].pressure.at(setup.t));
  model.branches.forEach((b, k) => {
    const op = b.valve?.operation;
    if (!op || flowing.has(k)) return;
    if (op.kind === 'check') {
      const dp = pOf(b.from) - pOf(b.to);
      if (dp > op.cracking * (1 + 1e-9) + 1e-9) out.push(`check valve ${b.name} would open (pressure difference ${(dp / 1000).toPrecision(4)} kPa above its cracking pressure of ${(op.cracking / 1000).toPrecision(4)} kPa)`);
    } else if (op.kind === 'relief') {
      const g = pOf(b.from) - model.pa;
      if (g > op.opensAbove * (1 + 1e-9) + 1e-9) out.push(`relief valve ${b.name} would open (upstream ${(g / 1000).toPrecision(4)} kPa gauge, set to ${(op.opensAbove / 1000).toPrecision(4)} kPa gauge)`);
    }
  });
  return out;
}

export function worst(a: StabilityVerdict, b: StabilityVerdict): StabilityVerdict {
  if (a === 'unstable' || b === 'unstable') return 'unstable';
  if (a === 'marginal' || b === 'marginal') return 'marginal';
  return 'stable';
}
