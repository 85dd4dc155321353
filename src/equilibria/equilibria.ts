/**
 * Equilibria of a network and their stability: where the gas can come to rest, which of those
 * rest states are stable, and which one the transient from the start reaches.
 *
 * Setting. Valves stand as chosen (`open`, `closed`, or as they are at the end of their
 * schedules); feeds run at their end-of-schedule rate; time-varying reservoirs are taken at the
 * end of the simulation. Chambers fall into groups joined by lines and open valves. Check and
 * relief valves pass no gas at rest (a check valve holds up to its cracking pressure, a relief
 * valve is shut below its set point), so they separate groups, each keeping its own gas; an
 * equilibrium at which one of them would open is marked inconsistent. Exception: a group that is
 * fed and has no other outlet reaches a steady state only by discharging through its check or
 * relief valves, which then count as passing gas.
 *
 * - closed group (no reservoir, no running feed): every chamber has the same pressure p (no
 *   flow through lines and open valves means no pressure difference across them) and the
 *   masses add up to the gas the group holds, Σ m_i(p) = M. Each elastic wall gives a chamber
 *   several volumes at one pressure, one on each monotone segment of its pressure–volume curve
 *   (rising, falling past a maximum, rising again past a minimum); on each segment m_i(p) is
 *   monotone (increasing on rising, decreasing on falling segments, because the mass grows
 *   with volume, see physics/wall.ts). For every combination of segments, the roots of
 *   Σ m_i(p) − M are bracketed on a grid of pressures that contains each segment's samples
 *   (Chebyshev-clustered towards the extrema, where m(p) has a square-root end) and each
 *   sign change of the derivative Σ dm_i/dp, then refined by Brent's method. Each segment is
 *   cut where the chamber alone would hold all the gas, so the search range is finite and
 *   exhaustive. Combinations are pruned when the chambers chosen so far already hold more than
 *   M. Above `maxCombinations` combinations a group is searched instead by deflated Newton
 *   iteration on the same equations in mass coordinates (Σm = M, p_i = p_1) from many starts:
 *   the start and end states, then segment combinations in order of how many chambers sit off
 *   their first (rising) segment (none, one, two, ...: the states an engineer meets first, and
 *   among them the stable ones), for half the starts, then random combinations; each start is
 *   the combination's masses at the pressure in its common range where they come closest to M.
 *   Deflation keeps Newton from converging again to a state already found. That list may be
 *   incomplete and is marked so.
 * - open group (touching reservoirs, possibly fed): the pressures follow from the steady flow
 *   balance (all equal to the reservoir pressure when there is one reservoir and no feed),
 *   solved by Newton–Levenberg–Marquardt iteration on the chamber pressures; each chamber then
 *   independently takes any volume its wall allows at its pressure.
 * - fed group with no outlet: no steady state.
 * Groups do not interact at rest, so the network's equilibria are all combinations of the
 * groups' ones, and its linearisation is block diagonal: eigenvalues are the union over
 * groups, and a network equilibrium is stable when every group's part is.
 *
 * Heat. Isothermal models rest at each chamber's own temperature. With `heat: exchange` the
 * gas rests at ambient temperature, and stability comes from the full (mass, temperature)
 * linearisation. With `heat: adiabatic` the resting temperatures depend on the path (no heat
 * leaves), so the isothermal equilibria at ambient temperature are computed, and their
 * stability is that of isothermal gas (the state a long-lived system reaches as heat leaks).
 *
 * References: Müller & Strehlow, Rubber and Rubber Balloons, Springer LNP 637, 2004 (rest states
 * of communicating balloons, from memory); Brent 1973, ch. 4 (roots); Farrell, Birkisson &
 * Funke, SIAM J. Sci. Comput. 37 (2015) A2026 (deflation, shifted operator with p = 2, σ = 1);
 * Nocedal & Wright, Numerical Optimization, 2nd ed., §10.3 (Levenberg–Marquardt).
 */
import type { Model, HeatMode, ChamberModel, BranchModel, NodeRef } from '../model/types.js';
import { NetworkSystem } from '../assemble/system.js';
import { emptyBranchFlow } from '../elements/branch.js';
import type { WallLaw, WallPoint } from '../physics/wall.js';
import { brent } from '../physics/roots.js';
import { solveVolume, vacuumVolume } from '../model/volume.js';
import { makeSchedule } from '../model/schedule.js';
import { DenseLu } from '../linalg/dense-lu.js';
import { chamberGroups, everConducts, type ChamberGroup } from '../model/groups.js';
import { stabilityAt, type Stability, type StabilityVerdict } from './stability.js';
import { simulate } from '../transient/transient.js';
import type { GroupOutcome, RunResult } from '../transient/results.js';

/** Samples per wall segment for bracketing roots (Chebyshev–Lobatto in V or ln V). */
const SAMPLES = 128;
/** Branch combinations per closed group searched exhaustively before switching to deflation. */
export const DEFAULT_MAX_COMBINATIONS = 4096;
/** Network equilibria listed at most (the count is always reported). */
export const DEFAULT_MAX_LISTED = 1000;
/** Two rest states are the same when every chamber's mass agrees to this fraction of the group's gas. */
const SAME = 1e-9;
/** The transient reached an equilibrium when its end state is this close (fraction of group gas). */
const REACHED = 1e-2;

export type ValveState = 'open' | 'closed' | 'end';
export type GasSource = 'start' | 'end';

export interface EquilibriaOptions {
  valves?: ValveState;
  gas?: GasSource;
  /** Run the transient to see which equilibrium it reaches (default true; needed for gas: end). */
  transient?: boolean;
  maxCombinations?: number;
  maxListed?: number;
  /** Starts for the deflated Newton search of large groups (default 64 + 16 per chamber). */
  starts?: number;
  /** Per-chamber gas masses (kg) to use instead of the start or end state. */
  masses?: ArrayLike<number>;
}

export interface ChamberRest {
  pressure: number;   // Pa abs
  gauge: number;      // Pa
  volume: number;     // m³
  stretch?: number;   // spheres
  mass: number;       // kg, incl. lumped line volume
  /** Monotone segment of the wall curve, counted from the smallest volume. */
  segment: number;
  branch: 'rising' | 'falling' | 'rigid';
}

export interface GroupEquilibrium {
  chambers: ChamberRest[];
  stability: Stability;
  /** How a one-way valve stands at this state, when it matters. */
  note?: string;
}

export interface GroupResult {
  chambers: string[];
  kind: 'closed' | 'open' | 'fed';
  /** Gas the group holds (closed groups), kg. */
  mass: number | null;
  method: 'enumeration' | 'deflation' | 'steady-flow' | 'none';
  /** Branch combinations examined, or starts of the deflated search. */
  combinations: number;
  /** False when the method cannot promise that every equilibrium is listed. */
  complete: boolean;
  equilibria: GroupEquilibrium[];
  /** Check or relief valves passing gas in this group's steady state. */
  flowing: string[];
  notes: string[];
}

export interface NetworkEquilibrium {
  chambers: Record<string, ChamberRest>;
  stable: boolean;
  stability: StabilityVerdict;
  growth_rate: number | null;
  time_constant: number | null;
  eigenvalues: { re: number; im: number }[];
  /** Index into each group's equilibria. */
  members: number[];
  /** False when a check or relief valve would open at this state. */
  consistent: boolean;
  warnings: string[];
  /** How one-way valves stand (cracked, reseated, open) where it matters. */
  notes: string[];
}

export interface TransientMatch {
  status: 'completed' | 'failed';
  end: number;
  outcomes: GroupOutcome[];
  /** Index of the equilibrium the transient settled at, or null. */
  reached: number | null;
  /** Nearest listed equilibrium and its distance (largest chamber mass difference / group gas). */
  nearest: number | null;
  distance: number | null;
  message: string;
}

export interface EquilibriaResult {
  format: 1;
  title: string;
  file: string;
  status: 'ok' | 'failed';
  message: string;
  valves: ValveState;
  gas: GasSource;
  heat: HeatMode;
  ambient: number;
  groups: GroupResult[];
  equilibria: NetworkEquilibrium[];
  /** Number of network equilibria (combinations of the groups'); may exceed the listed ones. */
  count: number;
  transient: TransientMatch | null;
  notes: string[];
}

// ---- rest setting -------------------------------------------------------------------------

interface Segment { Va: number; Vb: number; rising: boolean }

export interface RestChamber {
  index: number;
  name: string;
  wall: WallLaw;
  Vd: number;
  /** Gas temperature at rest (K) and R·T. */
  T: number;
  RT: number;
  lo: number;
  segments: Segment[];
  /** Chambers with equal keys have identical mass–pressure relations. */
  key: string;
}

export interface RestGroup extends ChamberGroup {
  kind: 'closed' | 'open' | 'fed';
  /** One-way valves (branch indices) that pass gas in the steady state. */
  flowing: number[];
}

export interface RestSetup {
  /** The model with valves, feeds and heat fixed at rest. */
  model: Model;
  sys: NetworkSystem;
  /** Time at which boundaries are evaluated (end of the simulation). */
  t: number;
  chambers: RestChamber[];
  groups: RestGroup[];
  notes: string[];
}

function scheduleEnd(initially: number, steps: { at: number; open: number; over: number }[]): number {
  return makeSchedule(initially, steps).at(Infinity);
}

function isOneWay(b: BranchModel): boolean {
  const k = b.valve?.operation.kind;
  return k === 'check' || k === 'relief';
}

/** Monotone segments of a wall's pressure–volume curve over its admissible range. */
function segmentsOf(wall: WallLaw, pa: number): Segment[] {
  if (wall.rigid) return [];
  const lo = vacuumVolume(wall, pa);
  const top = Number.isFinite(wall.Vmax) ? wall.Vmax * (1 - 1e-12) : Infinity;
  const cuts = wall.extrema.map((e) => e.V).filter((V) => V > lo && V < top).sort((a, b) => a - b);
  const ends = [lo, ...cuts, top];
  const s: WallPoint = { p: 0, dpdV: 0 };
  const out: Segment[] = [];
  for (let i = 0; i + 1 < ends.length; i++) {
    const Va = ends[i];
    const Vb = ends[i + 1];
    const probe = Number.isFinite(Vb) ? 0.5 * (Va + Vb) : Math.max(2 * Va, wall.V0, 1e-12);
    wall.eval(probe, s);
    out.push({ Va, Vb, rising: s.dpdV > 0 });
  }
  return out;
}

/** The volume on a segment where the wall's gauge pressure is g, or NaN when it never is. */
function volumeOnSegment(wall: WallLaw, seg: Segment, g: number, s: WallPoint): number {
  const f = (V: number): number => { wall.eval(V, s); return s.p - g; };
  let a = seg.Va;
  let fa = f(a);
  let b = seg.Vb;
  let fb: number;
  if (Number.isFinite(b)) {
    fb = f(b);
  } else {
    b = Math.max(2 * a, wall.V0, 1e-12);
    fb = f(b);
    for (let k = 0; k < 120 && (fb > 0) === (fa > 0) && fb !== 0; k++) {
      a = b; fa = fb;
      b *= 2;
      fb = f(b);
    }
  }
  if (fa === 0) return a;
  if (fb === 0) return b;
  if ((fa > 0) === (fb > 0) || !Number.isFinite(fa) && !Number.isFinite(fb)) return Number.NaN;
  return brent(f, a, b, fa, fb);
}

/**
 * The model at rest: schedule valves fixed open, closed or at their final opening; feeds at their
 * final rate; adiabatic gas replaced by isothermal gas at ambient temperature.
 */
export function restSetup(model: Model, valves: ValveState): RestSetup {
  const notes: string[] = [];
  const t = model.simulate.duration;
  const branches = model.branches.map((b): BranchModel => {
    const op = b.valve?.operation;
    if (!b.valve || !op || op.kind !== 'schedule') return b;
    const x = valves === 'open' ? 1 : valves === 'closed' ? 0 : scheduleEnd(op.initially, op.steps);
    return { ...b, valve: { rating: b.valve.rating, operation: { kind: 'schedule', initially: x, steps: [] } } };
  });
  const feeds = model.feeds.map((f) => ({ ...f, initially: scheduleEnd(f.initially, f.steps), steps: [] }));
  let chambers: ChamberModel[] = model.chambers;
  let heat = model.heat;
  if (model.heat === 'adiabatic') {
    heat = 'isothermal';
    chambers = model.chambers.map((c) => ({ ...c, T0: model.Ta }));
    notes.push('heat: adiabatic: resting temperatures depend on the path, so the equilibria are the isothermal ones at ambient temperature, and their stability is that of isothermal gas');
  } else if (model.heat === 'exchange') {
    const cold = model.chambers.filter((c) => !(c.heatTransfer > 0)).map((c) => c.name);
    if (cold.length) notes.push(`heat: exchange: ${cold.join(', ')} ${cold.length === 1 ? 'has' : 'have'} no heat transfer; ${cold.length === 1 ? 'its' : 'their'} temperature is held at ambient in the stability analysis`);
  }
  for (const r of model.reservoirs) {
    if (!r.pressure.constant) notes.push(`reservoir ${r.name} varies in time: its pressure at the end of the simulation (t = ${t} s) is used`);
  }
  if (model.chambers.some((c) => c.deflation)) notes.push('measured walls with a deflation curve are taken on their inflation curve');
  const rest: Model = { ...model, heat, chambers, branches, feeds };

  const conducts = (b: BranchModel): boolean => {
    const op = b.valve?.operation;
    if (!op) return true;
    if (op.kind === 'schedule') return op.initially > 0;
    return false;
  };
  const feedActive = (k: number): boolean => feeds[k].initially * feeds[k].rate > 0;
  // A one-way valve passes gas at rest only in steady flow: between two open sides (a reservoir,
  // or a group with a reservoir or a running feed), or as the outlet of a fed group.
  const flowing = new Set<number>();
  let groups: ChamberGroup[] = [];
  for (let pass = 0; pass <= rest.branches.length; pass++) {
    groups = chamberGroups(rest, (b, k) => conducts(b) || flowing.has(k), feedActive);
    const groupOf = new Map<number, ChamberGroup>();
    for (const g of groups) for (const c of g.chambers) groupOf.set(c, g);
    const open = (r: { kind: 'chamber' | 'reservoir'; index: number }): boolean => {
      if (r.kind === 'reservoir') return true;
      const g = groupOf.get(r.index)!;
      return g.reservoirs.length > 0 || g.feeds.length > 0;
    };
    const fedOnly = (r: { kind: 'chamber' | 'reservoir'; index: number }): boolean => {
      if (r.kind === 'reservoir') return false;
      const g = groupOf.get(r.index)!;
      return g.reservoirs.length === 0 && g.feeds.length > 0;
    };
    let grew = false;
    rest.branches.forEach((b, k) => {
      if (!isOneWay(b) || flowing.has(k)) return;
      if ((open(b.from) && open(b.to)) || fedOnly(b.from)) { flowing.add(k); grew = true; }
    });
    if (!grew) break;
  }
  const restGroups: RestGroup[] = groups.map((g) => ({
    ...g,
    kind: g.reservoirs.length > 0 ? 'open' : g.feeds.length > 0 ? 'fed' : 'closed',
    flowing: g.branches.filter((k) => flowing.has(k)),
  }));
  if (rest.branches.some((b, k) => isOneWay(b) && !flowing.has(k))) {
    notes.push('a check or relief valve next to a closed group passes no gas at rest: each side keeps its own gas (see --gas end), or the valve sits exactly at its cracking or reseat pressure');
  }
  // The linearisation sees the one-way valves that pass no gas at rest as shut, so that a state
  // on a valve's switching surface is linearised from the side where it holds.
  const shut: Model = {
    ...rest,
    branches: rest.branches.map((b, k) => (isOneWay(b) && !flowing.has(k)
      ? { ...b, valve: { rating: b.valve!.rating, operation: { kind: 'schedule', initially: 0, steps: [] } } }
      : b)),
  };
  const sys = new NetworkSystem(shut);

  const R = rest.gas.R;
  const restChambers: RestChamber[] = rest.chambers.map((c, i) => {
    const T = c.T0;
    return {
      index: i, name: c.name, wall: c.wall, Vd: c.deadVolume, T, RT: R * T,
      lo: vacuumVolume(c.wall, rest.pa), segments: segmentsOf(c.wall, rest.pa),
      key: `${JSON.stringify(c.spec.wall)}|${c.deadVolume}|${T}`,
    };
  });
  return { model: rest, sys, t, chambers: restChambers, groups: restGroups, notes };
}

// ---- one chamber at a pressure ------------------------------------------------------------

interface AtP { V: number; m: number; C: number }

/** Volume, mass and capacitance dm/dp of a chamber on a segment at absolute pressure p. */
function chamberAt(ch: RestChamber, seg: Segment | null, p: number, pa: number, s: WallPoint, out: AtP, Vknown?: number): boolean {
  if (ch.wall.rigid) {
    out.V = ch.wall.V0;
    out.m = (p * (ch.wall.V0 + ch.Vd)) / ch.RT;
    out.C = (ch.wall.V0 + ch.Vd) / ch.RT;
    return true;
  }
  const V = Vknown ?? volumeOnSegment(ch.wall, seg as Segment, p - pa, s);
  if (!Number.isFinite(V)) return false;
  ch.wall.eval(V, s);
  out.V = V;
  out.m = (p * (V + ch.Vd)) / ch.RT;
  out.C = (V + ch.Vd + p / s.dpdV) / ch.RT;
  return true;
}

export function restOf(ch: RestChamber, p: number, pa: number, V: number, m: number, segment: number): ChamberRest {
  const r: ChamberRest = {
    pressure: p, gauge: p - pa, volume: V, mass: m, segment,
    branch: ch.wall.rigid ? 'rigid' : ch.segments[segment]?.rising === false ? 'falling' : 'rising',
  };
  if (ch.wall.sphere) r.stretch = ch.wall.stretch(V);
  return r;
}

export function segmentOfVolume(ch: RestChamber, V: number): number {
  for (let i = 0; i < ch.segments.length; i++) if (V <= ch.segments[i].Vb) return i;
  return Math.max(0, ch.segments.length - 1);
}

// ---- closed groups: enumeration ----------------------------------------------------------

interface Profile {
  segs: (CappedSegment & { k0: number; k1: number; m: Float64Array; C: Float64Array })[];
}

interface Root { p: number; segs: number[]; at: AtP[] }

/**
 * The end of a capped segment nearest to pressure p in pressure: used when p lies a rounding
 * error outside the segment's range, where the inversion finds no bracket.
 */
function endVolume(c: { seg: Segment; pLo: number; pHi: number }, p: number): number {
  const nearLow = Math.abs(p - c.pLo) < Math.abs(p - c.pHi);
  return nearLow === c.seg.rising ? c.seg.Va : c.seg.Vb;
}

/** Chebyshev–Lobatto nodes on [a, b] (in ln V when the segment spans a large ratio). */
function nodes(a: number, b: number, N: number): number[] {
  const out: number[] = [];
  const logScale = a > 0 && b / a > 8;
  const A = logScale ? Math.log(a) : a;
  const B = logScale ? Math.log(b) : b;
  for (let j = 0; j < N; j++) {
    const x = 0.5 * (A + B) - 0.5 * (B - A) * Math.cos((Math.PI * j) / (N - 1));
    out.push(logScale ? Math.exp(x) : x);
  }
  out[0] = a;
  out[N - 1] = b;
  if (a === 0) for (let k = 1; k <= 24; k++) out.push(b * Math.pow(10, -k / 3)); // the slack end, p → 0
  return out;
}

interface CappedSegment { seg: Segment; index: number; pLo: number; pHi: number }

/**
 * A chamber's segments cut where it alone would hold all the gas M (masses are positive, so no
 * equilibrium lies beyond), with their absolute pressure ranges. A rigid chamber has one.
 */
function cappedSegments(ch: RestChamber, M: number, pa: number, s: WallPoint): CappedSegment[] {
  if (ch.wall.rigid) return [{ seg: { Va: ch.wall.V0, Vb: ch.wall.V0, rising: true }, index: 0, pLo: 0, pHi: (M * (1 + 1e-6) * ch.RT) / (ch.wall.V0 + ch.Vd) }];
  // a little beyond, so that a lone chamber's own state (exactly at the cut) is inside the range
  let Vcap = solveVolume(ch.wall, pa, ch.Vd, M * (1 + 1e-6) * ch.RT, ch.wall.V0, ch.lo, s);
  if (!Number.isFinite(Vcap)) Vcap = ch.segments[ch.segments.length - 1].Vb;
  const list: CappedSegment[] = [];
  ch.segments.forEach((seg, index) => {
    if (seg.Va >= Vcap) return;
    const Vb = Math.min(seg.Vb, Vcap);
    ch.wall.eval(seg.Va, s);
    const p1 = Math.max(0, pa + s.p);
    ch.wall.eval(Vb, s);
    const p2 = pa + s.p;
    list.push({ seg: { Va: seg.Va, Vb, rising: seg.rising }, index, pLo: Math.min(p1, p2), pHi: Math.max(p1, p2) });
  });
  return list;
}

function enumerateClosed(chs: RestChamber[], M: number, pa: number, maxComb: number): { roots: Root[]; combos: number } | null {
  const s: WallPoint = { p: 0, dpdV: 0 };
  const tmp: AtP = { V: 0, m: 0, C: 0 };
  const distinct = new Map<string, RestChamber>();
  for (const ch of chs) if (!distinct.has(ch.key)) distinct.set(ch.key, ch);

  // capped segments and their pressure ranges
  const capped = new Map<string, CappedSegment[]>();
  let bound = 1;
  for (const ch of chs) {
    let list = capped.get(ch.key);
    if (!list) {
      list = cappedSegments(ch, M, pa, s);
      capped.set(ch.key, list);
    }
    bound *= Math.max(1, list.length);
    if (bound > maxComb) return null;
  }

  // the common pressure grid: every segment's samples
  const grid: number[] = [];
  for (const [key, list] of capped) {
    const ch = distinct.get(key)!;
    for (const c of list) {
      if (ch.wall.rigid) {
        for (let j = 0; j <= 8; j++) grid.push((c.pHi * j) / 8);
        continue;
      }
      for (const V of nodes(c.seg.Va, c.seg.Vb, SAMPLES)) {
        ch.wall.eval(V, s);
        const p = pa + s.p;
        if (p >= c.pLo && p <= c.pHi) grid.push(p);
      }
      grid.push(c.pLo, c.pHi);
    }
  }
  grid.sort((a, b) => a - b);
  const P: number[] = [];
  for (const p of grid) if (P.length === 0 || p > P[P.length - 1]) P.push(p);
  const G = P.length;
  const lowerIndex = (x: number): number => { // first k with P[k] >= x
    let lo = 0, hi = G;
    while (lo < hi) { const mid = (lo + hi) >> 1; if (P[mid] < x) lo = mid + 1; else hi = mid; }
    return lo;
  };

  const profiles = new Map<string, Profile>();
  for (const [key, list] of capped) {
    const ch = distinct.get(key)!;
    const prof: Profile = { segs: [] };
    for (const c of list) {
      const k0 = lowerIndex(c.pLo);
      let k1 = lowerIndex(c.pHi);
      if (k1 >= G || P[k1] > c.pHi) k1--;
      const len = Math.max(0, k1 - k0 + 1);
      const m = new Float64Array(len);
      const C = new Float64Array(len);
      for (let k = k0; k <= k1; k++) {
        const p = P[k];
        if (!chamberAt(ch, c.seg, p, pa, s, tmp)) chamberAt(ch, c.seg, p, pa, s, tmp, endVolume(c, p));
        m[k - k0] = tmp.m;
        C[k - k0] = tmp.C;
      }
      prof.segs.push({ ...c, k0, k1, m, C });
    }
    profiles.set(key, prof);
  }

  // depth-first over combinations with running sums of mass and capacitance
  const n = chs.length;
  const sumM = Array.from({ length: n + 1 }, () => new Float64Array(G));
  const sumC = Array.from({ length: n + 1 }, () => new Float64Array(G));
  const choice: Profile['segs'][number][] = new Array(n);
  const roots: Root[] = [];
  let combos = 0;

  const exactAt = (p: number, out: AtP[] | null): { f: number; d: number } => {
    let f = -M;
    let d = 0;
    for (let i = 0; i < n; i++) {
      const c = choice[i];
      if (!chamberAt(chs[i], c.seg, p, pa, s, tmp)) chamberAt(chs[i], c.seg, p, pa, s, tmp, endVolume(c, p));
      f += tmp.m;
      d += tmp.C;
      if (out) out[i] = { ...tmp };
    }
    return { f, d };
  };
  const addRoot = (p: number): void => {
    const at: AtP[] = new Array(n);
    exactAt(p, at);
    roots.push({ p, segs: choice.map((c) => c.index), at });
  };
  const refine = (a: number, b: number, fa: number, fb: number): void => {
    const p = brent((x) => exactAt(x, null).f, a, b, fa, fb);
    if (Number.isFinite(p)) addRoot(p);
  };

  const leaf = (lo: number, hi: number): void => {
    combos++;
    const F = sumM[n];
    const D = sumC[n];
    for (let k = lo; k <= hi; k++) {
      const fa = F[k] - M;
      if (fa === 0) { addRoot(P[k]); continue; }
      if (k === hi) break;
      const fb = F[k + 1] - M;
      if ((fa > 0) !== (fb > 0) && fb !== 0) {
        refine(P[k], P[k + 1], exactAt(P[k], null).f, exactAt(P[k + 1], null).f);
      } else if ((D[k] > 0) !== (D[k + 1] > 0)) {
        // a turning point of Σm between two samples may hide a pair of roots
        const da = exactAt(P[k], null).d;
        const db = exactAt(P[k + 1], null).d;
        const ps = brent((x) => exactAt(x, null).d, P[k], P[k + 1], da, db);
        if (!Number.isFinite(ps)) continue;
        const fs = exactAt(ps, null).f;
        if ((fs > 0) !== (fa > 0)) {
          refine(P[k], ps, exactAt(P[k], null).f, fs);
          refine(ps, P[k + 1], fs, exactAt(P[k + 1], null).f);
        }
      }
    }
  };

  const dfs = (i: number, lo: number, hi: number): void => {
    if (i === n) { leaf(lo, hi); return; }
    const prof = profiles.get(chs[i].key)!;
    for (const c of prof.segs) {
      const a = Math.max(lo, c.k0);
      const b = Math.min(hi, c.k1);
      if (a > b) continue;
      let least = Infinity;
      const pm = sumM[i], pc = sumC[i], nm = sumM[i + 1], nc = sumC[i + 1];
      for (let k = a; k <= b; k++) {
        nm[k] = pm[k] + c.m[k - c.k0];
        nc[k] = pc[k] + c.C[k - c.k0];
        if (nm[k] < least) least = nm[k];
      }
      if (least > M * (1 + 1e-4)) continue; // the gas is used up whatever the others do
      choice[i] = c;
      dfs(i + 1, a, b);
    }
  };
  dfs(0, 0, G - 1);

  // the same state can be found from two neighbouring combinations (at an extremum)
  const unique: Root[] = [];
  for (const r of roots) {
    if (!unique.some((u) => u.at.every((x, i) => Math.abs(x.m - r.at[i].m) <= SAME * M))) unique.push(r);
  }
  unique.sort((a, b) => a.p - b.p || a.segs.join().localeCompare(b.segs.join()));
  return { roots: unique, combos };
}

// ---- closed groups: deflated Newton ------------------------------------------------------

/** Deterministic pseudo-random numbers in [0, 1) (mulberry32). */
function random(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Pressure (Pa abs), volume and dp/dm of a chamber holding mass m; NaN outside its law. */
export function pressureOfMass(ch: RestChamber, m: number, pa: number, s: WallPoint, guess: number): { p: number; V: number; dpdm: number } {
  if (ch.wall.rigid) {
    const Vt = ch.wall.V0 + ch.Vd;
    return { p: (m * ch.RT) / Vt, V: ch.wall.V0, dpdm: ch.RT / Vt };
  }
  if (!(m > 0)) return { p: Number.NaN, V: Number.NaN, dpdm: Number.NaN };
  const V = solveVolume(ch.wall, pa, ch.Vd, m * ch.RT, guess, ch.lo, s);
  if (!Number.isFinite(V)) return { p: Number.NaN, V, dpdm: Number.NaN };
  ch.wall.eval(V, s);
  const p = pa + s.p;
  return { p, V, dpdm: (s.dpdV * ch.RT) / (p + (V + ch.Vd) * s.dpdV) };
}

function deflatedClosed(chs: RestChamber[], M: number, pa: number, starts: number, hints: Float64Array[]): Root[] {
  const n = chs.length;
  const s: WallPoint = { p: 0, dpdV: 0 };
  const tmp: AtP = { V: 0, m: 0, C: 0 };
  const lu = new DenseLu(n);
  const J = new Float64Array(n * n);
  const F = new Float64Array(n);
  const d = new Float64Array(n);
  const guess = chs.map((c) => c.wall.V0);
  const found: Float64Array[] = [];
  const rng = random(20250601);

  /** Residual at u (masses / M); false outside the laws. */
  const residual = (u: Float64Array, withJ: boolean): boolean => {
    let sum = -1;
    let p0 = 0, g0 = 0;
    for (let i = 0; i < n; i++) {
      const r = pressureOfMass(chs[i], M * u[i], pa, s, guess[i]);
      if (!Number.isFinite(r.p)) return false;
      guess[i] = r.V;
      sum += u[i];
      if (i === 0) { p0 = r.p; g0 = r.dpdm; F[0] = 0; continue; }
      F[i] = (r.p - p0) / pa;
      if (withJ) {
        for (let j = 0; j < n; j++) J[i * n + j] = 0;
        J[i * n + i] = (M * r.dpdm) / pa;
        J[i * n] = (-M * g0) / pa;
      }
    }
    F[0] = sum;
    if (withJ) for (let j = 0; j < n; j++) J[j] = 1;
    return true;
  };
  const norm = (v: Float64Array): number => v.reduce((a, x) => Math.max(a, Math.abs(x)), 0);

  const newton = (start: Float64Array, deflate: boolean): Float64Array | null => {
    const u = Float64Array.from(start);
    for (let it = 0; it < 80; it++) {
      if (!residual(u, true)) return null;
      const r = norm(F);
      for (let i = 0; i < n; i++) d[i] = -F[i];
      if (!lu.factor(Float64Array.from(J))) return null;
      lu.solve(d);
      let tau = 1;
      if (deflate && found.length) {
        let gd = 0;
        for (const z of found) {
          let r2 = 0;
          for (let i = 0; i < n; i++) r2 += (u[i] - z[i]) ** 2;
          if (r2 === 0) return null;
          const c = -2 / (r2 * (1 + r2));
          for (let i = 0; i < n; i++) gd += c * (u[i] - z[i]) * d[i];
        }
        tau = 1 / (1 - gd);
      }
      // keep every mass positive, and stay inside the laws (Gent lock)
      let step = tau;
      for (let i = 0; i < n; i++) if (u[i] + step * d[i] <= 0) step = Math.min(step, (0.9 * u[i]) / -d[i]);
      const trial = new Float64Array(n);
      let ok = false;
      for (let h = 0; h < 40; h++) {
        for (let i = 0; i < n; i++) trial[i] = u[i] + step * d[i];
        if (residual(trial, false)) { ok = true; break; }
        step *= 0.5;
      }
      if (!ok) return null;
      let moved = 0;
      for (let i = 0; i < n; i++) moved = Math.max(moved, Math.abs(trial[i] - u[i]));
      u.set(trial);
      if (r < 1e-13 && moved < 1e-12) return u;
      if (moved < 1e-15) return r < 1e-10 ? u : null;
    }
    residual(u, false);
    return norm(F) < 1e-10 ? u : null;
  };

  const capped = chs.map((ch) => cappedSegments(ch, M, pa, s));
  /** Masses (over M) at the pressure in a combination's common range where they come closest to M. */
  const startAt = (combo: number[]): Float64Array | null => {
    const segs = combo.map((k, i) => capped[i][k]);
    const lo = Math.max(...segs.map((c) => c.pLo));
    const hi = Math.min(...segs.map((c) => c.pHi));
    if (!(hi > lo)) return null;
    let best: Float64Array | null = null;
    let miss = Infinity;
    for (let j = 1; j < 32; j++) {
      const p = lo + ((hi - lo) * j) / 32;
      const u = new Float64Array(n);
      let total = 0;
      let ok = true;
      for (let i = 0; i < n && ok; i++) {
        ok = chamberAt(chs[i], segs[i].seg, p, pa, s, tmp) || chamberAt(chs[i], segs[i].seg, p, pa, s, tmp, endVolume(segs[i], p));
        u[i] = tmp.m;
        total += tmp.m;
      }
      if (!ok || !(total > 0)) continue;
      if (Math.abs(total - M) < miss) {
        miss = Math.abs(total - M);
        best = u.map((x) => x / total);
      }
    }
    return best;
  };
  // combinations in order of how many chambers sit off their first segment (the states an engineer
  // meets first: all on the rising branch, one past its maximum, two, ...), then random ones
  const combos: number[][] = [];
  const budget = Math.max(0, starts - hints.length);
  const ordered = (k: number, from: number, acc: number[]): void => {
    if (combos.length >= budget / 2) return;
    if (k === 0) { combos.push(acc.slice()); return; }
    for (let i = from; i < n; i++) {
      for (let seg = 1; seg < capped[i].length; seg++) {
        acc[i] = seg;
        ordered(k - 1, i + 1, acc);
        acc[i] = 0;
      }
    }
  };
  for (let k = 0; k <= n && combos.length < budget / 2; k++) ordered(k, 0, new Array<number>(n).fill(0));
  while (combos.length < budget) combos.push(capped.map((c) => Math.floor(rng() * Math.max(1, c.length))));

  const tries: Float64Array[] = hints.map((h) => {
    const total = h.reduce((a, x) => a + x, 0);
    return h.map((x) => x / total);
  });
  for (const u0 of [...tries, ...combos.map(startAt)]) {
    if (!u0) continue;
    const u = newton(u0, true);
    if (!u) continue;
    const polished = newton(u, false) ?? u;
    if (found.some((z) => z.every((x, i) => Math.abs(x - polished[i]) <= 1e-7))) continue;
    found.push(polished);
  }
  return found.map((u) => {
    const at: AtP[] = [];
    const segs: number[] = [];
    let p = 0;
    for (let i = 0; i < n; i++) {
      const r = pressureOfMass(chs[i], M * u[i], pa, s, chs[i].wall.V0);
      if (i === 0) p = r.p;
      at.push({ V: r.V, m: M * u[i], C: 1 / r.dpdm });
      segs.push(chs[i].wall.rigid ? 0 : segmentOfVolume(chs[i], r.V));
    }
    return { p, segs, at };
  }).sort((a, b) => a.p - b.p);
}

// ---- open groups: steady flow ------------------------------------------------------------

/**
 * Chamber pressures of an open group in steady flow: Σ flows into each chamber + feeds = 0,
 * by Newton iteration with Levenberg–Marquardt damping (a check valve that is shut gives a
 * zero row until the pressure before it rises).
 */
export function steadyPressures(setup: RestSetup, g: RestGroup): { p: Float64Array; ok: boolean } {
  const { model, sys, t } = setup;
  const n = g.chambers.length;
  const pos = new Map(g.chambers.map((c, i) => [c, i] as const));
  const resP = g.reservoirs.map((r) => model.reservoirs[r].pressure.at(t));
  const p = new Float64Array(n).fill(resP.reduce((a, x) => a + x, 0) / resP.length);
  const flow = emptyBranchFlow();
  const scale = new Float64Array(n);
  const residual = (x: Float64Array, out: Float64Array): void => {
    out.fill(0);
    scale.fill(0);
    const node = (r: { kind: 'chamber' | 'reservoir'; index: number }): [number, number] => (r.kind === 'chamber'
      ? [x[pos.get(r.index)!], setup.chambers[r.index].T]
      : [model.reservoirs[r.index].pressure.at(t), model.reservoirs[r.index].T]);
    for (const k of g.branches) {
      const b = model.branches[k];
      const [p1, T1] = node(b.from);
      const [p2, T2] = node(b.to);
      sys.branches[k].flow(t, p1, p2, T1, T2, flow);
      if (b.from.kind === 'chamber') { out[pos.get(b.from.index)!] -= flow.mdot; scale[pos.get(b.from.index)!] += Math.abs(flow.mdot); }
      if (b.to.kind === 'chamber') { out[pos.get(b.to.index)!] += flow.mdot; scale[pos.get(b.to.index)!] += Math.abs(flow.mdot); }
    }
    for (const f of g.feeds) {
      const fd = model.feeds[f];
      const q = fd.rate * fd.initially;
      out[pos.get(fd.into)!] += q;
      scale[pos.get(fd.into)!] += q;
    }
  };
  const r = new Float64Array(n);
  const rt = new Float64Array(n);
  const J = new Float64Array(n * n);
  const A = new Float64Array(n * n);
  const lu = new DenseLu(n);
  const xp = new Float64Array(n);
  const fp = new Float64Array(n);
  const size = (v: Float64Array): number => Math.sqrt(v.reduce((a, x) => a + x * x, 0));
  let lambda = 1e-6;
  for (let it = 0; it < 200; it++) {
    residual(p, r);
    const converged = r.every((x, i) => Math.abs(x) <= 1e-11 * scale[i] + 1e-16);
    if (converged) return { p, ok: true };
    for (let j = 0; j < n; j++) {
      xp.set(p);
      const h = 1e-7 * p[j];
      xp[j] += h;
      residual(xp, fp);
      for (let i = 0; i < n; i++) J[i * n + j] = (fp[i] - r[i]) / h;
    }
    // (JᵀJ + λ·diag(JᵀJ) + tiny) δ = −Jᵀr
    const base = size(r);
    let improved = false;
    for (let tries = 0; tries < 30 && !improved; tries++) {
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          let sum = 0;
          for (let k = 0; k < n; k++) sum += J[k * n + i] * J[k * n + j];
          A[i * n + j] = sum;
        }
      }
      const g0 = new Float64Array(n);
      let diagMax = 0;
      for (let i = 0; i < n; i++) diagMax = Math.max(diagMax, A[i * n + i]);
      for (let i = 0; i < n; i++) {
        A[i * n + i] += lambda * (A[i * n + i] + 1e-12 * diagMax) + 1e-300;
        let sum = 0;
        for (let k = 0; k < n; k++) sum += J[k * n + i] * r[k];
        g0[i] = -sum;
      }
      if (!lu.factor(A)) { lambda *= 10; continue; }
      lu.solve(g0);
      for (let i = 0; i < n; i++) xp[i] = Math.max(p[i] + g0[i], 0.01 * p[i]);
      residual(xp, rt);
      if (size(rt) < base) {
        p.set(xp);
        lambda = Math.max(lambda / 10, 1e-12);
        improved = true;
      } else {
        lambda *= 10;
      }
    }
    if (!improved) return { p, ok: false };
  }
  return { p, ok: false };
}

// ---- stability of a group's rest state ---------------------------------------------------

/** State vector with the given chamber masses (temperatures at rest, hysteresis on inflation). */
export function restState(setup: RestSetup, masses: ArrayLike<number>): Float64Array {
  const { sys } = setup;
  const y = sys.initialState();
  for (let i = 0; i < setup.chambers.length; i++) {
    y[sys.mIdx[i]] = masses[i];
    if (sys.TIdx[i] >= 0) y[sys.TIdx[i]] = setup.model.Ta;
  }
  return y;
}

/** Stability of a group at rest with the given masses for its chambers (others as in `base`). */
export function groupStability(setup: RestSetup, g: RestGroup, groupMasses: ArrayLike<number>, base: ArrayLike<number>): Stability {
  const { sys, model } = setup;
  const all = Float64Array.from(base);
  g.chambers.forEach((c, i) => { all[c] = groupMasses[i]; });
  const y = restState(setup, all);
  const coords: number[] = [];
  const scales: number[] = [];
  const massScale = g.chambers.reduce((a, c) => a + all[c], 0) / g.chambers.length;
  for (const c of g.chambers) { coords.push(sys.mIdx[c]); scales.push(massScale); }
  const massCoords = coords.map((_, i) => i);
  if (model.heat === 'exchange') {
    for (const c of g.chambers) {
      if (sys.TIdx[c] >= 0 && model.chambers[c].heatTransfer > 0) { coords.push(sys.TIdx[c]); scales.push(model.Ta); }
    }
  }
  return stabilityAt(sys, { t: setup.t, y, coords, scales, conserved: g.kind === 'closed' ? [massCoords] : [] });
}

// ---- the whole analysis ------------------------------------------------------------------

function groupMassesOf(g: RestGroup, masses: ArrayLike<number>): number {
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
  };
  const withStability = opts.stability !== false;
  const add = (at: ChamberRest[], note?: string): void => {
    const stability = withStability
      ? groupStability(setup, g, at.map((c) => c.mass), masses)
      : { eigenvalues: [], growth_rate: null, time_constant: null, stability: 'marginal' as const, ok: true };
    result.equilibria.push(note ? { chambers: at, stability, note } : { chambers: at, stability });
  };

  if (g.kind === 'fed') {
    result.notes.push(`${names.join(', ')} ${names.length === 1 ? 'is' : 'are'} fed with no outlet: there is no steady state (the pressure keeps rising)`);
    return result;
  }

  if (g.kind === 'closed') {
    const M = groupMassesOf(g, masses);
    result.mass = M;
    const en = enumerateClosed(chs, M, pa, opts.maxCombinations);
    let roots: Root[];
    if (en) {
      roots = en.roots;
      result.method = 'enumeration';
      result.combinations = en.combos;
    } else {
      const starts = opts.starts ?? 64 + 16 * chs.length;
      const hints = [Float64Array.from(g.chambers.map((c) => masses[c])), ...(opts.hints ?? []).map((h) => Float64Array.from(g.chambers.map((c) => h[c])))];
      roots = deflatedClosed(chs, M, pa, starts, hints);
      result.method = 'deflation';
      result.combinations = starts;
      result.complete = false;
      result.notes.push(`more than ${opts.maxCombinations} branch combinations: searched by deflated Newton iteration from ${starts} starts; the list may be incomplete`);
    }
    for (const r of roots) add(r.at.map((a, i) => restOf(chs[i], r.p, pa, a.V, a.m, r.segs[i])));
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
    if (at.total > opts.maxCombinations) {
      result.complete = false;
      result.notes.push(`${at.total} branch combinations: only the first ${opts.maxCombinations} are listed`);
    }
    const note = reliefs.length ? reliefs.map((k, i) => `relief valve ${model.branches[k].name} ${openState[i] ? 'open' : 'shut'}`).join(', ') : undefined;
    for (const states of at.list) add(states, note);
  }
  reliefs.forEach((k) => { sys.branches[k].open = false; });
  if (!anySolved) {
    result.complete = false;
    result.notes.push('the steady-flow pressures could not be found (the flow balance did not converge)');
  } else if (result.equilibria.length === 0 && reliefs.length) {
    result.notes.push(`no steady state: relief valve${reliefs.length > 1 ? 's' : ''} ${reliefs.map((k) => model.branches[k].name).join(', ')} can stay neither open nor shut (${reliefs.length > 1 ? 'they cycle' : 'it cycles'}; see the transient's outcome)`);
  }
  return result;
}

/** Whether the one-way valves that pass no gas at rest hold at this state. */
function oneWayChecks(setup: RestSetup, pressures: Float64Array): string[] {
  const { model } = setup;
  const flowing = new Set(setup.groups.flatMap((g) => g.flowing));
  const out: string[] = [];
  const pOf = (r: { kind: 'chamber' | 'reservoir'; index: number }): number => (r.kind === 'chamber' ? pressures[r.index] : model.reservoirs[r.index].pressure.at(setup.t));
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

function worst(a: StabilityVerdict, b: StabilityVerdict): StabilityVerdict {
  if (a === 'unstable' || b === 'unstable') return 'unstable';
  if (a === 'marginal' || b === 'marginal') return 'marginal';
  return 'stable';
}

/** Combines one equilibrium per group into a network equilibrium. */
function combine(setup: RestSetup, groups: GroupResult[], members: number[]): NetworkEquilibrium {
  const chambers: Record<string, ChamberRest> = {};
  const pressures = new Float64Array(setup.chambers.length).fill(Number.NaN);
  let verdict: StabilityVerdict = 'stable';
  let growth: number | null = null;
  let tau: number | null = null;
  const eig: { re: number; im: number }[] = [];
  groups.forEach((g, gi) => {
    const e = g.equilibria[members[gi]];
    const rg = setup.groups[gi];
    e.chambers.forEach((c, i) => {
      chambers[g.chambers[i]] = c;
      pressures[rg.chambers[i]] = c.pressure;
    });
    const st = e.stability;
    verdict = worst(verdict, st.ok ? st.stability : 'marginal');
    if (st.growth_rate !== null) growth = growth === null ? st.growth_rate : Math.max(growth, st.growth_rate);
    if (st.time_constant !== null) tau = tau === null ? st.time_constant : Math.max(tau, st.time_constant);
    eig.push(...st.eigenvalues);
  });
  eig.sort((a, b) => b.re - a.re || b.im - a.im);
  const warnings = oneWayChecks(setup, pressures);
  const notes = groups.map((g, gi) => g.equilibria[members[gi]].note).filter((x): x is string => Boolean(x));
  // order chambers as in the netlist
  const ordered: Record<string, ChamberRest> = {};
  for (const c of setup.model.chambers) if (chambers[c.name]) ordered[c.name] = chambers[c.name];
  return {
    chambers: ordered, stable: verdict === 'stable', stability: verdict, growth_rate: growth, time_constant: tau,
    eigenvalues: eig, members: [...members], consistent: warnings.length === 0, warnings, notes,
  };
}

/** Largest chamber mass difference between a state and a group equilibrium, as a fraction of the group's gas. */
function distanceTo(g: RestGroup, e: GroupEquilibrium, masses: ArrayLike<number>): number {
  const total = g.chambers.reduce((a, c) => a + Math.abs(masses[c]), 0) || 1;
  let d = 0;
  g.chambers.forEach((c, i) => { d = Math.max(d, Math.abs(masses[c] - e.chambers[i].mass) / total); });
  return d;
}

/**
 * Every equilibrium of the network (up to the stated limits), its stability, and which one the
 * transient from the start state reaches.
 */
export function findEquilibria(model: Model, options: EquilibriaOptions = {}): EquilibriaResult {
  const valves = options.valves ?? 'end';
  const gas = options.gas ?? 'start';
  const maxCombinations = options.maxCombinations ?? DEFAULT_MAX_COMBINATIONS;
  const maxListed = options.maxListed ?? DEFAULT_MAX_LISTED;
  const setup = restSetup(model, valves);
  const notes = [...setup.notes];

  let run: RunResult | null = null;
  if (options.transient !== false || gas === 'end') run = simulate(model);
  const endMasses = run ? Float64Array.from(model.chambers.map((c) => run!.chambers[c.name].final.mass)) : null;
  let masses: Float64Array;
  if (options.masses) masses = Float64Array.from(options.masses);
  else if (gas === 'end' && endMasses) masses = endMasses;
  else masses = Float64Array.from(model.chambers.map((c) => c.m0));
  if (gas === 'start' && !options.masses) {
    const closing = model.branches.filter((b, k) => b.valve?.operation.kind === 'schedule' && everConducts(b)
      && (setup.model.branches[k].valve!.operation as { initially: number }).initially === 0);
    if (closing.length) notes.push(`${closing.map((b) => b.name).join(', ')} ${closing.length === 1 ? 'is' : 'are'} shut at rest but open during the run: each side is given the gas it holds at the start (use --gas end for the split the transient leaves)`);
    const fedAtStart = model.feeds.some((f) => f.initially > 0 || f.steps.length > 0);
    if (fedAtStart) notes.push('feeds add gas during the run; the equilibria use the gas held at the start (use --gas end to include what the feeds delivered)');
  }

  // open groups first: their pressures are the known side of one-way valves next to closed groups
  const groups: GroupResult[] = new Array(setup.groups.length);
  const known = new Float64Array(model.chambers.length).fill(Number.NaN);
  setup.groups.forEach((g, gi) => {
    if (g.kind !== 'open') return;
    groups[gi] = groupEquilibria(setup, g, masses, { maxCombinations });
    const first = groups[gi].equilibria[0];
    const unique = groups[gi].equilibria.every((e) => e.chambers.every((c, i) => c.pressure === first.chambers[i].pressure));
    if (first && unique) g.chambers.forEach((c, i) => { known[c] = first.chambers[i].pressure; });
  });
  const outside = (n: NodeRef): number | null => {
    if (n.kind === 'reservoir') return setup.model.reservoirs[n.index].pressure.at(setup.t);
    return Number.isNaN(known[n.index]) ? null : known[n.index];
  };
  setup.groups.forEach((g, gi) => {
    if (g.kind === 'open') return;
    groups[gi] = groupEquilibria(setup, g, masses, {
      maxCombinations, starts: options.starts, hints: endMasses ? [endMasses] : [], outside,
    });
  });

  let count = 1;
  for (const g of groups) count *= g.equilibria.length;
  const equilibria: NetworkEquilibrium[] = [];
  if (count > 0) {
    const members = new Array<number>(groups.length).fill(0);
    for (let k = 0; k < Math.min(count, maxListed); k++) {
      equilibria.push(combine(setup, groups, members));
      for (let i = groups.length - 1; i >= 0; i--) {
        if (++members[i] < groups[i].equilibria.length) break;
        members[i] = 0;
      }
    }
  }
  if (count > maxListed) notes.push(`${count} equilibria: only the first ${maxListed} are listed`);

  let transient: TransientMatch | null = null;
  if (run && endMasses) {
    const outcomes = run.outcomes ?? [];
    const settled = outcomes.every((o) => o.outcome === 'settled');
    // per group: the nearest of its equilibria
    const nearestPerGroup = setup.groups.map((g, gi) => {
      let best = -1;
      let dist = Infinity;
      groups[gi].equilibria.forEach((e, k) => {
        const d = distanceTo(g, e, endMasses);
        if (d < dist) { dist = d; best = k; }
      });
      return { best, dist };
    });
    const have = nearestPerGroup.every((x) => x.best >= 0);
    const distance = have ? Math.max(...nearestPerGroup.map((x) => x.dist)) : null;
    let nearest: number | null = null;
    if (have) {
      nearest = equilibria.findIndex((e) => e.members.every((m, gi) => m === nearestPerGroup[gi].best));
      if (nearest < 0) nearest = null;
    }
    const reached = settled && distance !== null && distance <= REACHED && nearest !== null ? nearest : null;
    const near = nearest !== null ? `nearest #${nearest + 1}, ${((distance ?? 0) * 100).toPrecision(2)} % of the group's gas away` : '';
    // closed groups whose gas the transient changed (valves that shut, feeds, one-way valves)
    const moved = setup.groups.filter((g) => g.kind === 'closed').filter((g) => {
      const a = groupMassesOf(g, masses);
      return Math.abs(groupMassesOf(g, endMasses) - a) > 1e-6 * a;
    }).map((g) => g.chambers.map((c) => model.chambers[c].name).join('+'));
    let message: string;
    if (run.status === 'failed') message = `the transient did not complete: ${run.message}`;
    else if (reached !== null) message = `the transient settles at equilibrium #${reached + 1}`;
    else if (!settled) message = `the transient has not settled by the end of the simulation${near ? ` (${near})` : ''}`;
    else message = `the transient settles at a state not in the list${near ? ` (${near})` : ''}`;
    if (moved.length) message += `; it ends with a different amount of gas in ${moved.join(', ')} than analysed (use --gas end)`;
    if (valves !== 'end') message += ` (the transient runs the valve schedules; the equilibria are for valves ${valves})`;
    if (model.heat === 'adiabatic') message += ' (adiabatic transient: its end temperatures differ from ambient)';
    transient = { status: run.status, end: run.end, outcomes, reached, nearest, distance, message };
  }

  const failed = groups.some((g) => g.equilibria.some((e) => !e.stability.ok)) || groups.some((g) => g.kind === 'open' && !g.complete && g.equilibria.length === 0);
  return {
    format: 1, title: model.doc.title, file: model.doc.file,
    status: failed ? 'failed' : 'ok',
    message: failed ? 'part of the analysis failed numerically (see the group notes)' : `${count} equilibri${count === 1 ? 'um' : 'a'}`,
    valves, gas, heat: model.heat, ambient: model.pa, groups, equilibria, count, transient, notes,
  };
}
