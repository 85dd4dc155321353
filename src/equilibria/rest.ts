/**
 * The rest setting of a network (valves, feeds and heat fixed as at rest; chambers in groups)
 * and one chamber at a given pressure: its monotone wall segments, volume, mass and capacitance.
 */
import { NetworkSystem } from '../assemble/system.js';
import { chamberGroups, type ChamberGroup } from '../model/groups.js';
import { makeSchedule } from '../model/schedule.js';
import type { BranchModel, ChamberModel, Model, NodeRef } from '../model/types.js';
import { vacuumVolume } from '../model/volume.js';
import { brent } from '../physics/roots.js';
import type { WallLaw, WallPoint } from '../physics/wall.js';
import type { ChamberRest, ValveState } from './types.js';

// ---- rest setting -------------------------------------------------------------------------

export interface Segment { Va: number; Vb: number; rising: boolean }

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

/**
 * A wall law's vacuum volume and segments, kept per wall object: continuation builds the rest
 * setting again for every parameter value, with the same wall objects for the chambers the
 * parameter does not touch (read-only once made).
 */
const shapes = new WeakMap<WallLaw, { pa: number; lo: number; segments: Segment[] }>();
function wallShape(wall: WallLaw, pa: number): { lo: number; segments: Segment[] } {
  const hit = shapes.get(wall);
  if (hit && hit.pa === pa) return { lo: hit.lo, segments: hit.segments };
  const made = { pa, lo: vacuumVolume(wall, pa), segments: segmentsOf(wall, pa) };
  shapes.set(wall, made);
  return { lo: made.lo, segments: made.segments };
}

/** The wall specification as text (which chambers share a wall law), kept per specification object. */
const specKeys = new WeakMap<object, string>();
function specKey(spec: object): string {
  let k = specKeys.get(spec);
  if (k === undefined) { k = JSON.stringify(spec); specKeys.set(spec, k); }
  return k;
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
  // A branch to a cylinder side carries no gas at rest when that side has no other way out (the
  // common case); the chamber analysis takes it as shut and says so (cylinder-rest.ts analyses
  // the cylinders themselves).
  const toPort = (b: BranchModel): boolean => b.from.kind === 'port' || b.to.kind === 'port';
  const portBranches = model.branches.filter(toPort).map((b) => b.hostLine ?? b.name);
  if (portBranches.length) notes.push(`${portBranches.join(', ')} ${portBranches.length === 1 ? 'joins' : 'join'} a cylinder side and ${portBranches.length === 1 ? 'is' : 'are'} taken as passing no gas at rest (a side with one way in and out passes none in steady state); the chambers' stability leaves out the gas of the cylinder sides`);
  const branches = model.branches.map((b): BranchModel => {
    if (toPort(b)) {
      return { ...b, kind: 'valve', line: undefined, valve: { rating: { kind: 'orifice', diameter: 1e-3, dischargeCoefficient: 1 }, operation: { kind: 'schedule', initially: 0, steps: [] } } };
    }
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
    // a regulator and a controlled valve pass gas at rest as their law sets (closed-loop.ts)
    return op.kind === 'regulator' || op.kind === 'driven';
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
    const open = (r: NodeRef): boolean => {
      if (r.kind === 'reservoir') return true;
      const g = groupOf.get(r.index)!;
      return g.reservoirs.length > 0 || g.boundary || g.feeds.length > 0;
    };
    const fedOnly = (r: NodeRef): boolean => {
      if (r.kind === 'reservoir') return false;
      const g = groupOf.get(r.index)!;
      return g.reservoirs.length === 0 && !g.boundary && g.feeds.length > 0;
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
    kind: g.reservoirs.length > 0 || g.boundary ? 'open' : g.feeds.length > 0 ? 'fed' : 'closed',
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
      ...wallShape(c.wall, rest.pa),
      key: `${specKey(c.spec.wall)}|${c.deadVolume}|${T}`,
    };
  });
  return { model: rest, sys, t, chambers: restChambers, groups: restGroups, notes };
}

// ---- one chamber at a pressure ------------------------------------------------------------

export interface AtP { V: number; m: number; C: number }

/** Volume, mass and capacitance dm/dp of a chamber on a segment at absolute pressure p. */
export function chamberAt(ch: RestChamber, seg: Segment | null, p: number, pa: number, s: WallPoint, out: AtP, Vknown?: number): boolean {
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
