/**
 * NetlistDoc → Model: resolve names to node references, build gas and wall objects, lump line
 * volumes, and turn each chamber's `start:` into a start volume and mass. Problems that need
 * physics to see (a start pressure above a balloon's maximum, an ambiguous mass–volume
 * relation) are diagnostics with the chamber's position.
 */
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { defaultSegments, fastestValveRamp, soundSpeed } from './wave.js';
import { anrDensity, makeGas, type Gas } from '../physics/gas.js';
import { makeWall, pvMonotone, type WallLaw } from '../physics/wall.js';
import type { ChamberSpec, NetlistDoc, SourcePos, WallSpec } from '../netlist/types.js';
import { display } from '../units/display.js';
import { MAX_GAS_PRESSURE } from '../units/pressure.js';
import type { BranchModel, ChamberModel, ControllerModel, ElementModel, FeedModel, Model, NodeRef, ReservoirModel } from './types.js';
import { ELEMENT_TABLES } from '../netlist/kinds.js';
import { solveVolume, vacuumVolume, type VolumeScratch } from './volume.js';
import { buildCylinder, type CylinderModel } from './cylinder.js';
import { PORT_NAME } from '../netlist/names.js';

const AMBIENT = 'ambient';

function diag(pos: SourcePos, code: string, message: string, hint?: string): Diagnostic {
  return { code, severity: 'error', message, file: pos.file, line: pos.line, column: pos.column, path: pos.path, hint };
}

function kPa(p: number): string {
  return `${(p / 1000).toPrecision(4)} kPa`;
}

function gram(m: number): string {
  return `${Number((m * 1000).toPrecision(4))} g`;
}

/** Bisection for Δp(V) = target on [a, b] where Δp(a) ≤ target ≤ Δp(b) or the reverse. */
function volumeAtGauge(wall: WallLaw, target: number, a: number, b: number): number {
  const s: VolumeScratch = { p: 0, dpdV: 0 };
  wall.eval(a, s);
  const rising = s.p <= target;
  for (let i = 0; i < 200; i++) {
    const m = 0.5 * (a + b);
    wall.eval(m, s);
    if ((s.p <= target) === rising) a = m; else b = m;
    if (b - a <= 1e-15 * b) break;
  }
  return 0.5 * (a + b);
}

/**
 * Start volume for a start pressure: the first crossing going up from vacuum, i.e. on the
 * rising branch below any pressure maximum. A stretch start reaches the falling branch.
 */
function volumeForPressure(wall: WallLaw, pa: number, pAbs: number, pos: SourcePos, errs: Diagnostic[]): number {
  const target = pAbs - pa;
  const s: VolumeScratch = { p: 0, dpdV: 0 };
  const lo = vacuumVolume(wall, pa);
  const ends = [lo, ...wall.extrema.map((e) => e.V)];
  let hi = Number.isFinite(wall.Vmax) ? wall.Vmax * (1 - 1e-12) : Math.max(wall.V0, lo) * 2 + 1e-12;
  if (!Number.isFinite(wall.Vmax)) {
    for (let k = 0; k < 200; k++) {
      wall.eval(hi, s);
      if (s.p >= target) break;
      hi *= 2;
    }
  }
  ends.push(hi);
  for (let i = 0; i + 1 < ends.length; i++) {
    wall.eval(ends[i], s);
    const pa0 = s.p;
    wall.eval(ends[i + 1], s);
    const pb = s.p;
    if (pa0 <= target && target <= pb) {
      const V = volumeAtGauge(wall, target, ends[i], ends[i + 1]);
      // a measured curve with a level stretch at the start pressure: every volume along it has
      // that pressure, so the start volume is undetermined (as at a flat top)
      wall.eval(V, s);
      if (wall.kind === 'measured' && !(Math.abs(s.dpdV) * V > 1e-9 * Math.max(Math.abs(target), 1))) {
        errs.push(diag(pos, 'start-unreachable',
          `start pressure ${kPa(target)} gauge lies on a level part of the measured curve: the start volume would be undetermined`,
          'start the chamber by volume or mass instead'));
        return Number.NaN;
      }
      return V;
    }
    if (pa0 > target) break; // a pressure maximum lies below the target
  }
  const max = wall.extrema.find((e) => e.kind === 'max');
  wall.eval(hi, s);
  const top = s.p;
  const flatTop = !max && wall.kind === 'measured' && top <= target;
  errs.push(diag(pos, 'start-unreachable',
    max
      ? `start pressure ${kPa(target)} gauge lies above this wall's pressure maximum of ${kPa(max.p)} gauge`
      : flatTop
        ? `start pressure ${kPa(target)} gauge is at or above the highest pressure of the measured curve (${kPa(top)} gauge), which ends flat: the start volume would be undetermined`
        : `start pressure ${kPa(target)} gauge is outside this wall's range`,
    max && wall.sphere
      ? `start the chamber by stretch instead (the maximum is at stretch ${wall.stretch(max.V).toFixed(4)}); a stretch beyond it starts on the falling branch`
      : flatTop ? 'start the chamber by volume or mass instead, or give the measured curve points up to a higher pressure' : 'check the start pressure and the wall parameters'));
  return Number.NaN;
}

/** Where a start problem is reported: the start key used (`pressure:`, `mass:`...), else the chamber. */
function startPos(c: ChamberSpec): SourcePos {
  return c.fieldPos[`start.${c.start.by}`] ?? c.fieldPos['start'] ?? c.pos;
}

function startVolume(c: ChamberSpec, wall: WallLaw, gas: Gas, pa: number, Vd: number, T: number, errs: Diagnostic[]): number {
  const pos = startPos(c);
  const st = c.start;
  if (wall.rigid) {
    if (st.by === 'pressure' || st.by === 'mass') return wall.V0;
    errs.push(diag(pos, 'start-rigid', `a rigid chamber starts by pressure or mass, not by ${st.by}`, 'write `start: { pressure: 0 kPa gauge }`'));
    return Number.NaN;
  }
  switch (st.by) {
    case 'pressure':
      return volumeForPressure(wall, pa, st.value, pos, errs);
    case 'stretch':
      if (!wall.sphere) {
        errs.push(diag(pos, 'start-stretch', 'start by stretch applies to spherical walls only', 'start by pressure or volume'));
        return Number.NaN;
      }
      return wall.volumeAtStretch(st.value);
    case 'volume':
      if (st.value >= wall.Vmax || st.value <= vacuumVolume(wall, pa)) {
        errs.push(diag(pos, 'start-range', 'start volume is outside the wall law\'s range', 'check the volume against the wall parameters'));
        return Number.NaN;
      }
      return st.value;
    case 'mass': {
      const V = solveVolume(wall, pa, Vd, st.value * gas.R * T, wall.V0, vacuumVolume(wall, pa), { p: 0, dpdV: 0 });
      if (!Number.isFinite(V)) {
        errs.push(diag(pos, 'start-range', 'start mass is outside the wall law\'s range', 'check the mass against the wall parameters'));
      } else if (wall.sphere && V < wall.V0 * (1 - 1e-12)) {
        // the same rule as a start by stretch, volume or pressure (netlist/chambers.ts)
        const mMin = (pa * (wall.V0 + Vd)) / (gas.R * T);
        errs.push(diag(pos, 'start-range',
          `the start mass ${gram(st.value)} leaves the sphere below its unstretched size (stretch ${wall.stretch(V).toFixed(3)})`,
          `start a sphere at stretch 1 or more: at least ${gram(mMin)} of gas at this temperature; it shrinks below its unstretched size only while it empties`));
        return Number.NaN;
      }
      return V;
    }
  }
}

export function buildModel(doc: NetlistDoc): Result<Model> {
  const errs: Diagnostic[] = [];
  const warnings: Diagnostic[] = [];
  const gas = makeGas(doc.gas);
  const pa = doc.ambient.pressure;
  const Ta = doc.ambient.temperature;

  const chamberIndex = new Map(doc.chambers.map((c, i) => [c.name, i] as const));
  const reservoirs: ReservoirModel[] = doc.reservoirs.map((r) => ({ name: r.name, pressure: r.pressure, T: r.temperature ?? Ta }));
  const reservoirIndex = new Map(reservoirs.map((r, i) => [r.name, i] as const));
  const cylinderIndex = new Map(doc.cylinders.map((c, i) => [c.name, i] as const));
  const node = (name: string): NodeRef => {
    const c = chamberIndex.get(name);
    if (c !== undefined) return { kind: 'chamber', index: c };
    const port = PORT_NAME.exec(name);
    if (port && cylinderIndex.has(port[1])) return { kind: 'port', index: cylinderIndex.get(port[1]) as number, side: port[2] as 'cap' | 'rod' };
    let r = reservoirIndex.get(name);
    if (r === undefined && name === AMBIENT) {
      r = reservoirs.length;
      reservoirs.push({ name: AMBIENT, pressure: { at: () => pa, breakpoints: [], constant: true, text: 'ambient' }, T: Ta });
      reservoirIndex.set(AMBIENT, r);
    }
    if (r === undefined) throw new Error(`unresolved node ${name}: the netlist reader should have caught this`);
    return { kind: 'reservoir', index: r };
  };

  // Lines: half of each line's volume is lumped into the node at each end.
  const dead = new Float64Array(doc.chambers.length);
  const deadPort = doc.cylinders.map(() => ({ cap: 0, rod: 0 }));
  const hostedBy = new Map(doc.valves.filter((v) => v.inLine).map((v) => [v.inLine as string, v] as const));
  const branches: BranchModel[] = [];
  const tRamp = fastestValveRamp(doc);
  const c = soundSpeed(gas, Ta);
  for (const l of doc.lines) {
    const half = (Math.PI * l.diameter * l.diameter * l.length) / 8;
    const from = node(l.from);
    const to = node(l.to);
    const v = hostedBy.get(l.name);
    const line: BranchModel['line'] = { diameter: l.diameter, length: l.length, roughness: l.roughness };
    if (l.model === 'wave') {
      // a wave line holds its own gas in its segments (model/wave.ts, elements/wave-line.ts)
      line.wave = { segments: l.segments ?? defaultSegments(l.length, c, tRamp), given: l.segments !== undefined };
      if (v) errs.push(diag(v.pos, 'unsupported', `valve ${v.name} sits in wave line ${l.name}: a valve inside a wave line is not supported`, 'put the valve between the line and a small chamber, or make the line `model: lumped`'));
      if (from.kind === 'port' || to.kind === 'port') errs.push(diag(l.pos, 'unsupported', `wave line ${l.name} ends at a cylinder port: not supported yet`, 'put a small chamber between the line and the cylinder, or make the line `model: lumped`'));
    } else {
      for (const end of [from, to]) {
        if (end.kind === 'chamber') dead[end.index] += half;
        if (end.kind === 'port') deadPort[end.index][end.side] += half;
      }
      if (l.length / c > 0.1 * tRamp) {
        warnings.push({ ...diag(l.pos, 'wave-travel', `line ${l.name}: a pressure wave needs ${+(1000 * l.length / c).toPrecision(3)} ms to travel it (L/c), more than a tenth of the fastest valve ramp (${+(1000 * tRamp).toPrecision(3)} ms); the lumped line passes pressure changes at once`, v
          ? `to see the delay and the reflections, give the valve ${v.name} its own small chamber and make the line \`model: wave\` (a valve inside a wave line is not supported)`
          : 'add `model: wave` to the line to see the delay and the reflections'), severity: 'warning' });
      }
    }
    branches.push(v
      ? { name: v.name, kind: 'valve', from, to, line, hostLine: l.name, valve: { rating: v.rating, operation: v.operation } }
      : { name: l.name, kind: 'line', from, to, line });
  }
  for (const v of doc.valves) {
    if (v.inLine) continue;
    branches.push({ name: v.name, kind: 'valve', from: node(v.from), to: node(v.to), valve: { rating: v.rating, operation: v.operation } });
  }
  // the vents of relieving regulators: their own branches, downstream node → ambient
  const nb = branches.length;
  for (let k = 0; k < nb; k++) {
    const op = branches[k].valve?.operation;
    if (op?.kind !== 'regulator' || !op.relieving) continue;
    const b = branches[k];
    branches.push({ name: `${b.name}.vent`, kind: 'valve', from: b.to, to: node(AMBIENT), valve: { rating: b.valve!.rating, operation: op }, vent: { of: k, set: op.set, band: op.band } });
  }

  // Kinds read from their table alone: name parameters become nodes (after the lines, so that
  // the order of the reservoirs, `ambient` among them, does not depend on them).
  const elements: ElementModel[] = (doc.elements ?? []).map((e) => {
    const table = ELEMENT_TABLES.find((k) => k.kind === e.kind)!;
    const nodes: Record<string, NodeRef> = {};
    for (const p of table.params) if (p.dimension === 'name' && typeof e.values[p.name] === 'string') nodes[p.name] = node(e.values[p.name] as string);
    return { kind: e.kind, name: e.name, values: e.values, nodes, boundary: table.boundary === true };
  });

  const chambers: ChamberModel[] = [];
  // Large networks repeat a few chamber designs: build each wall law once (its extrema search
  // and monotonicity scan cost thousands of evaluations) and share it, and check each
  // (law, dead volume) pair once. Wall laws are immutable, so sharing is safe.
  const laws = new Map<string, WallLaw>();
  const wallFor = (spec: WallSpec): WallLaw => {
    const key = JSON.stringify(spec);
    let w = laws.get(key);
    if (!w) laws.set(key, (w = makeWall(spec, pa)));
    return w;
  };
  const monotone = new Map<WallLaw, Map<number, ReturnType<typeof pvMonotone>>>();
  const monotoneFor = (w: WallLaw, Vd: number): ReturnType<typeof pvMonotone> => {
    let byVd = monotone.get(w);
    if (!byVd) monotone.set(w, (byVd = new Map()));
    let r = byVd.get(Vd);
    if (!r) byVd.set(Vd, (r = pvMonotone(w, pa, Vd)));
    return r;
  };
  doc.chambers.forEach((c, i) => {
    const wallPos = c.fieldPos['wall'] ?? c.pos;
    let wall: WallLaw;
    let deflation: WallLaw | undefined;
    try {
      if (c.wall.law === 'measured' && c.wall.deflation) {
        wall = wallFor({ law: 'measured', points: c.wall.points });
        deflation = wallFor({ law: 'measured', points: c.wall.deflation });
      } else {
        wall = wallFor(c.wall);
      }
    } catch (e) {
      // The reader checks every parameter; this catches a combination the wall law still
      // cannot use (e.g. a stiffness that underflows), so that input never crashes a run.
      errs.push(diag(wallPos, 'wall-invalid', `the wall parameters cannot be used: ${e instanceof Error ? e.message : String(e)}`, 'check the wall parameters and their units'));
      return;
    }
    if (wall.kind === 'linear' && vacuumVolume(wall, pa) <= 0) {
      errs.push(diag(wallPos, 'wall-range',
        'this linear wall would shrink to zero volume before its gas reached vacuum (compliance × ambient pressure ≥ volume)',
        'use a smaller compliance, or a measured wall that describes the collapse'));
      return;
    }
    const T0 = c.temperature ?? Ta;
    const Vd = dead[i];
    for (const w of deflation ? [wall, deflation] : [wall]) {
      if (w.rigid) continue;
      const mono = monotoneFor(w, Vd);
      if (!mono.ok) {
        errs.push(diag(wallPos, 'wall-ambiguous',
          `the gas mass is not an increasing function of volume for this wall${Vd > 0 ? ' with the tubing volume lumped into it' : ''} (near ${display(mono.at ?? 0, 'volume')}): its state would be ambiguous`,
          Vd > 0 ? 'shorten or narrow the attached lines, or model the tubing as a rigid chamber of its own' : 'check the wall law data'));
        return;
      }
    }
    const V0 = startVolume(c, wall, gas, pa, Vd, T0, errs);
    if (!Number.isFinite(V0)) return;
    let m0: number;
    if (wall.rigid) {
      m0 = c.start.by === 'mass' ? c.start.value : (c.start.value * (wall.V0 + Vd)) / (gas.R * T0);
    } else {
      const s: VolumeScratch = { p: 0, dpdV: 0 };
      wall.eval(V0, s);
      m0 = ((pa + s.p) * (V0 + Vd)) / (gas.R * T0);
    }
    const p0 = (m0 * gas.R * T0) / (V0 + Vd);
    if (!(p0 <= MAX_GAS_PRESSURE)) {
      const lock = wall.kind === 'gent' ? ': the Gent wall is held at its lock stretch, where its pressure grows without bound' : '';
      errs.push(diag(startPos(c), 'start-range',
        `the start state needs a gas pressure of ${(p0 / 1e6).toPrecision(4)} MPa absolute, above ${MAX_GAS_PRESSURE / 1e6} MPa${lock}`,
        'check the start value and its unit'));
      return;
    }
    chambers.push({
      name: c.name, wall, deflation, deadVolume: Vd, V0, T0, m0,
      heatTransfer: doc.heat === 'exchange' ? c.heatTransfer ?? 0 : 0,
      limits: { ...c.limits }, spec: c,
    });
  });

  const rhoAnr = anrDensity(gas);
  const cylinders: CylinderModel[] = [];
  doc.cylinders.forEach((c, i) => {
    const m = buildCylinder(c, deadPort[i], gas, pa, Ta, doc.heat, errs);
    if (m) cylinders.push(m);
  });

  const feeds: FeedModel[] = doc.feeds.map((f) => ({
    name: f.name,
    into: chamberIndex.get(f.into) ?? -1,
    ...(chamberIndex.has(f.into) ? {} : { port: node(f.into) as { index: number; side: 'cap' | 'rod' } }),
    rate: f.rate.kind === 'mass' ? f.rate.value : f.rate.value * rhoAnr,
    T: f.temperature ?? Ta,
    initially: f.initially,
    steps: f.steps,
    ...(f.curve ? {
      curve: {
        p: Float64Array.from([...f.curve.pressure, ...(f.curve.shutOff > f.curve.pressure[f.curve.pressure.length - 1] ? [f.curve.shutOff] : [])]),
        q: Float64Array.from([...f.curve.flow.map((x) => (x.kind === 'mass' ? x.value : x.value * rhoAnr)), ...(f.curve.shutOff > f.curve.pressure[f.curve.pressure.length - 1] ? [0] : [])]),
      },
    } : {}),
  }));

  const branchIndex = new Map(branches.map((b, k) => [b.name, k] as const));
  for (const b of branches) if (b.hostLine) branchIndex.set(b.hostLine, branchIndex.get(b.name) as number);
  const controllers: ControllerModel[] = doc.controllers.map((c) => {
    const m = c.measure;
    const ci = chamberIndex.get(m.element);
    const measure = ci !== undefined
      ? { kind: 'chamber' as const, index: ci, quantity: m.quantity }
      : { kind: 'branch' as const, index: branchIndex.get(m.element) as number, quantity: m.quantity };
    return { name: c.name, spec: c, measure, valve: branchIndex.get(c.drives) as number };
  });

  if (doc.heat === 'exchange') {
    for (const c of doc.chambers) {
      if (c.heatTransfer === undefined) {
        warnings.push({ ...diag(c.pos, 'no-heat-transfer', `chamber ${c.name} has no heat-transfer; with heat: exchange it behaves adiabatically`, 'add `heat-transfer: "2 W/K"` (h·A)'), severity: 'warning' });
      }
    }
  }

  if (errs.length) return { ok: false, diagnostics: errs };
  const model: Model = {
    doc, gas, pa, Ta, heat: doc.heat, chambers, reservoirs, branches, feeds, cylinders, controllers,
    ...(elements.length ? { elements } : {}),
    simulate: doc.simulate, expect: doc.expect,
  };
  return { ok: true, value: model, warnings };
}
