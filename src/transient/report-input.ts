/**
 * What a report needs beside the run result: the network's topology (names and connections),
 * each chamber's wall law sampled over the range its trajectory covers, and the netlist text.
 * `report/` reads only these plain types and never the model, so it can render a result read
 * back from anywhere.
 */
import type { Model } from '../model/types.js';
import type { WallLaw, WallPoint } from '../physics/wall.js';
import type { ValveOperation, ValveRating, WallSpec } from '../netlist/types.js';
import { display, significant } from '../units/display.js';
import type { RunResult } from './results.js';

/** Points along a wall law curve (uniform in its x), besides the extrema inserted exactly. */
const CURVE_POINTS = 240;
/** How far past the trajectory the curve runs, as a fraction of the trajectory's extent. */
const CURVE_MARGIN = 0.12;
/** A sphere's curve is drawn up to its first pressure maximum when that lies within this factor of the largest stretch reached. */
const MAX_REACH = 2.5;

export type WallAxis = 'stretch' | 'volume';

/** A chamber's wall law as a curve: gauge pressure (Pa) against stretch (spheres) or volume (m³). */
export interface WallCurve {
  chamber: string;
  law: WallSpec['law'];
  axis: WallAxis;
  /** [x, gauge pressure Pa]; inflation branch when the wall has hysteresis. */
  points: [number, number][];
  /** Deflation branch of a measured wall with hysteresis. */
  deflation?: [number, number][];
  /** Local extrema of the law (within the sampled range or just beyond), x as `axis`. */
  extrema: { x: number; gauge: number; kind: 'max' | 'min' }[];
  /** Identical parameters give identical keys, so a chart can draw a shared law once. */
  key: string;
}

export interface TopologyChamber {
  name: string;
  law: WallSpec['law'];
  sphere: boolean;
  rigid: boolean;
  /** One line for people, e.g. "neo-Hookean sphere, r0 40 mm, t0 1.5 mm". */
  describe: string;
  /** Declared limits, gauge Pa and stretch. */
  limits: { gauge?: number; stretch?: number };
}

export interface TopologyReservoir { name: string; ambient: boolean; describe: string }

export interface TopologyLine {
  name: string;
  from: string;
  to: string;
  describe: string;
  /** Valves that sit inside this line (series combination). */
  valves: string[];
}

export interface TopologyValve {
  name: string;
  from: string;
  to: string;
  inLine?: string;
  operation: ValveOperation['kind'];
  describe: string;
  /** Relief set points, gauge Pa. */
  opensAbove?: number;
  reseatsBelow?: number;
}

export interface TopologyFeed { name: string; into: string; describe: string }

export interface TopologyCylinder {
  name: string;
  /** m */
  stroke: number;
  doubleActing: boolean;
  /** One line for people, e.g. "32/12 mm × 80 mm, 2.5 kg". */
  describe: string;
}

export interface ReportTopology {
  chambers: TopologyChamber[];
  reservoirs: TopologyReservoir[];
  lines: TopologyLine[];
  valves: TopologyValve[];
  feeds: TopologyFeed[];
  /** Absent in results read back from before cylinders existed. */
  cylinders?: TopologyCylinder[];
}

/**
 * A steady state to mark on the pressure–volume chart, e.g. from an equilibrium analysis:
 * per chamber its gauge pressure (Pa), wall volume (m³) and, for spheres, stretch.
 */
export interface EquilibriumMark {
  label?: string;
  stable: boolean;
  chambers: Record<string, { gauge: number; volume: number; stretch?: number }>;
}

export interface ReportInput {
  result: RunResult;
  /** The netlist's own text. */
  source: string;
  heat: 'isothermal' | 'adiabatic' | 'exchange';
  gas: string;
  topology: ReportTopology;
  walls: WallCurve[];
  equilibria?: EquilibriumMark[];
  /** Why the equilibria are not marked, when they are not (shown with the pressure–volume figure). */
  equilibriaNote?: string;
  /** Whose gas the marked equilibria hold: the gas at the start, or at the end of the run. */
  equilibriaGas?: 'start' | 'end';
  /** The netlist's warnings (formatted diagnostics). */
  netlistWarnings?: string[];
  /** Per expectation (in order): the probe's quantity, or `fraction` for `settles`, to show `actual` in its unit. */
  expectationUnits?: string[];
  /** plenum's version, for the report's footer. */
  version?: string;
  /** Measured channels to overlay (`plenum report --data`). */
  measured?: MeasuredOverlay[];
}

/** One measured channel of a recording with the simulated values at its times (dense output). SI, as the channel. */
export interface MeasuredOverlay {
  file: string;
  /** Probe key `<element>.<quantity>`. */
  key: string;
  times: number[];
  values: number[];
  simulated: number[];
}

export interface ReportInputOptions {
  measured?: MeasuredOverlay[];
  equilibria?: EquilibriumMark[];
  equilibriaNote?: string;
  equilibriaGas?: 'start' | 'end';
  /** The netlist's warnings (formatted diagnostics), for the report's warnings section. */
  netlistWarnings?: string[];
  version?: string;
}

// ---- helpers --------------------------------------------------------------------------------

const LAW_NAME: Record<WallSpec['law'], string> = {
  rigid: 'rigid', linear: 'linear', 'neo-hookean': 'neo-Hookean sphere', 'mooney-rivlin': 'Mooney–Rivlin sphere',
  gent: 'Gent sphere', measured: 'measured',
};

function mm(x: number): string { return `${significant(x * 1000, 3)} mm`; }

function describeWall(w: WallSpec): string {
  switch (w.law) {
    case 'rigid': return `rigid, ${display(w.volume, 'volume')}`;
    case 'linear': return `linear, ${display(w.volume, 'volume')} at 0 gauge, ${significant(w.compliance * 1e9, 3)} mL/kPa`;
    case 'neo-hookean': return `${LAW_NAME[w.law]}, r0 ${mm(w.radius)}, t0 ${mm(w.thickness)}, μ ${significant(w.shearModulus / 1e6, 3)} MPa`;
    case 'mooney-rivlin': return `${LAW_NAME[w.law]}, r0 ${mm(w.radius)}, t0 ${mm(w.thickness)}, C1 ${significant(w.c1 / 1e6, 3)} MPa, C2 ${significant(w.c2 / 1e6, 3)} MPa`;
    case 'gent': return `${LAW_NAME[w.law]}, r0 ${mm(w.radius)}, t0 ${mm(w.thickness)}, μ ${significant(w.shearModulus / 1e6, 3)} MPa, Jm ${significant(w.limit, 3)}`;
    case 'measured': return `measured, ${w.points.length} points${w.deflation ? ' with a deflation curve' : ''}`;
  }
}

function describeRating(r: ValveRating): string {
  return r.kind === 'iso6358'
    ? `C ${significant(r.conductance * 1e8, 3)} L/(s·bar), b ${significant(r.criticalRatio, 3)}`
    : `orifice ${mm(r.diameter)}, Cd ${significant(r.dischargeCoefficient, 3)}`;
}

function describeOperation(op: ValveOperation): string {
  switch (op.kind) {
    case 'schedule': {
      const parts = [`initially ${Math.round(op.initially * 100)} %`];
      for (const s of op.steps) parts.push(`${Math.round(s.open * 100)} % at ${display(s.at, 'time')}`);
      return `scheduled: ${parts.join(', ')}`;
    }
    case 'check': return `check valve, cracks at ${significant(op.cracking / 1000, 3)} kPa`;
    case 'relief': return op.fullLiftAt !== undefined
      ? `relief, lifts from ${display(op.opensAbove, 'gauge')}, full lift at ${display(op.fullLiftAt, 'gauge')}`
      : `relief, opens above ${display(op.opensAbove, 'gauge')}, reseats below ${display(op.reseatsBelow, 'gauge')}`;
    case 'regulator': return `regulator, shuts at ${display(op.set, 'gauge')}, band ${significant(op.band / 1000, 3)} kPa${op.relieving ? ', relieving' : ''}${op.timeConstant > 0 ? `, lag ${display(op.timeConstant, 'time')}` : ''}`;
    case 'driven': return `driven by controller ${op.controller}`;
  }
}

/** Values of a trace channel by key, or undefined when the run did not record it. */
export function traceChannel(trace: RunResult['trace'], key: string): number[] | undefined {
  let index = channelIndex.get(trace.channels);
  if (!index) {
    index = new Map(trace.channels.map((c, i) => [c.key, i] as const));
    channelIndex.set(trace.channels, index);
  }
  const i = index.get(key);
  return i === undefined ? undefined : trace.values[i];
}

/** Channel positions by key, per trace (a figure of a large network looks up thousands). */
const channelIndex = new WeakMap<readonly { key: string }[], Map<string, number>>();

function finiteRange(v: number[]): [number, number] {
  let lo = Infinity, hi = -Infinity;
  for (const x of v) if (Number.isFinite(x)) { if (x < lo) lo = x; if (x > hi) hi = x; }
  return [lo, hi];
}

/**
 * Samples a wall law over the x range a chamber's trajectory covers, widened a little, from the
 * unstretched size for spheres, and out to the first pressure maximum when it is near.
 */
function sampleWall(name: string, law: WallLaw, spec: WallSpec, deflation: WallLaw | undefined, traj: number[] | undefined): WallCurve | undefined {
  if (law.rigid) return undefined;
  const axis: WallAxis = law.sphere ? 'stretch' : 'volume';
  const toV = (x: number): number => (law.sphere ? law.volumeAtStretch(x) : x);
  const toX = (V: number): number => (law.sphere ? law.stretch(V) : V);
  let [lo, hi] = traj ? finiteRange(traj) : [Number.NaN, Number.NaN];
  if (!Number.isFinite(lo)) { lo = toX(law.V0); hi = lo; }
  if (law.sphere) lo = Math.min(lo, 1);
  const extremaX = law.extrema.map((e) => ({ x: toX(e.V), gauge: e.p, kind: e.kind }));
  const firstMax = extremaX.find((e) => e.kind === 'max');
  if (firstMax && firstMax.x > hi && firstMax.x <= hi * MAX_REACH) hi = firstMax.x;
  let span = hi - lo;
  if (!(span > 0)) span = law.sphere ? 0.5 : Math.max(Math.abs(hi) * 0.2, 1e-9);
  let x0 = law.sphere ? lo : lo - CURVE_MARGIN * span;
  let x1 = hi + CURVE_MARGIN * span;
  if (!law.sphere) x0 = Math.max(x0, 0);
  if (law.sphere) x0 = Math.max(x0, 0.05);
  if (Number.isFinite(law.Vmax)) x1 = Math.min(x1, toX(law.Vmax) * 0.995);
  if (!(x1 > x0)) x1 = x0 * 1.01 + 1e-12;
  const xs: number[] = [];
  for (let k = 0; k <= CURVE_POINTS; k++) xs.push(x0 + ((x1 - x0) * k) / CURVE_POINTS);
  for (const e of extremaX) if (e.x > x0 && e.x < x1) xs.push(e.x);
  xs.sort((a, b) => a - b);
  const out: WallPoint = { p: 0, dpdV: 0 };
  const curve = (w: WallLaw): [number, number][] => xs.map((x) => {
    w.eval(toV(x), out);
    return [x, out.p] as [number, number];
  }).filter(([, p]) => Number.isFinite(p));
  return {
    chamber: name,
    law: spec.law,
    axis,
    points: curve(law),
    deflation: deflation ? curve(deflation) : undefined,
    extrema: extremaX.filter((e) => e.x <= x1 * 1.5),
    key: JSON.stringify(spec),
  };
}

/** Assembles everything `reportHtml` and `reportFigures` need from a model and its run. */
export function reportInput(model: Model, result: RunResult, options: ReportInputOptions = {}): ReportInput {
  const pa = model.pa;
  const chambers: TopologyChamber[] = model.chambers.map((c) => ({
    name: c.name,
    law: c.spec.wall.law,
    sphere: c.wall.sphere,
    rigid: c.wall.rigid,
    describe: describeWall(c.spec.wall),
    limits: {
      gauge: c.limits.pressure !== undefined ? c.limits.pressure - pa : undefined,
      stretch: c.limits.stretch,
    },
  }));
  const reservoirs: TopologyReservoir[] = model.reservoirs.map((r) => ({
    name: r.name,
    ambient: r.name === 'ambient',
    describe: r.name === 'ambient'
      ? `ambient, ${display(pa, 'pressure')}`
      : r.pressure.constant ? display(r.pressure.at(0) - pa, 'gauge') : r.pressure.text,
  }));
  const doc = model.doc;
  const lines: TopologyLine[] = doc.lines.map((l) => ({
    name: l.name, from: l.from, to: l.to,
    describe: `${mm(l.diameter)} bore, ${l.length >= 1 ? `${significant(l.length, 3)} m` : mm(l.length)} long`,
    valves: doc.valves.filter((v) => v.inLine === l.name).map((v) => v.name),
  }));
  const valves: TopologyValve[] = doc.valves.map((v) => ({
    name: v.name, from: v.from, to: v.to, inLine: v.inLine,
    operation: v.operation.kind,
    describe: `${describeRating(v.rating)}; ${describeOperation(v.operation)}`,
    opensAbove: v.operation.kind === 'relief' ? v.operation.opensAbove : undefined,
    reseatsBelow: v.operation.kind === 'relief' ? v.operation.reseatsBelow : undefined,
  }));
  const feeds: TopologyFeed[] = doc.feeds.map((f) => ({
    name: f.name, into: f.into,
    describe: f.rate.kind === 'mass' ? display(f.rate.value, 'flow') : `${significant(f.rate.value * 60000, 3)} L/min ANR`,
  }));
  const cylinders: TopologyCylinder[] = model.cylinders.map((c) => ({
    name: c.name,
    stroke: c.geometry.stroke,
    doubleActing: c.doubleActing,
    describe: `${c.spec.rod !== undefined ? `${significant(c.spec.bore * 1000, 3)}/${significant(c.spec.rod * 1000, 3)} mm` : `${mm(c.spec.bore)} single-acting`} × ${mm(c.geometry.stroke)}, ${display(c.load.mass, 'mass')}`,
  }));
  const walls: WallCurve[] = [];
  for (const c of model.chambers) {
    const traj = traceChannel(result.trace, `${c.name}.${c.wall.sphere ? 'stretch' : 'volume'}`);
    const w = sampleWall(c.name, c.wall, c.spec.wall, c.deflation, traj);
    if (w) walls.push(w);
  }
  return {
    result,
    source: doc.source,
    heat: model.heat,
    gas: doc.gas.name,
    topology: { chambers, reservoirs, lines, valves, feeds, cylinders },
    walls,
    equilibria: options.equilibria,
    ...(options.measured ? { measured: options.measured } : {}),
    equilibriaNote: options.equilibriaNote,
    ...(options.equilibriaGas ? { equilibriaGas: options.equilibriaGas } : {}),
    netlistWarnings: options.netlistWarnings ?? [],
    expectationUnits: doc.expect.map((e) => (e.kind === 'settles' ? 'fraction' : e.probe.quantity)),
    version: options.version,
  };
}
