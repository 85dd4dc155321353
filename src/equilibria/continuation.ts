/**
 * Branches of equilibria as one parameter changes: pseudo-arclength continuation with fold
 * (limit point), branch point and stability-change detection.
 *
 * The parameter is the gas a closed group holds (`mass:<chamber>`, the group of that chamber),
 * or any number in the netlist addressed by its path (`chambers.cell_a.thickness`,
 * `reservoirs.supply.pressure`, `lines.crossover.diameter`, `chambers.cell_a.start.stretch`),
 * set by the netlist override mechanism (netlist/override.ts) so that values are read and
 * checked as a user's own. The two ends are read that way; in between, the SI values of the
 * netlist that differ between the ends are interpolated linearly (unit conversions are affine;
 * this is checked at the midpoint, and when it fails every value is read from the netlist).
 * When only wall parameters or constant reservoir pressures change, the model in between is the
 * one at --from with those wall laws and pressures replaced; otherwise it is built in full.
 * Closed groups keep the gas they hold in the netlist as written, unless the parameter is that
 * gas or a `start` value, in which case the gas follows the netlist.
 *
 * Equations of one group in scaled unknowns x = (v, ℓ), v_i = ln(m_i/M̄) (M̄ the group's gas, or
 * its total mass for open groups; logarithms so that arclength measures relative changes and a
 * chamber swelling on a falling branch does not swamp the step), ℓ = (λ − from)/(to − from):
 *   closed:  F_0 = (Σ m_i − M(ℓ))/M̄,  F_i = (p_i(m_i) − p_0(m_0))/p_a  (i ≥ 1)
 *   open:    F_i = (p_i(m_i) − p_i*(ℓ))/p_a  (p* the steady-flow pressures)
 * In mass coordinates every state is a single point even past a pressure maximum (the mass
 * fixes the volume), so the branches are smooth curves. ∂F/∂u is analytic (dp/dm from the
 * wall law), ∂F/∂ℓ a forward difference. Pseudo-arclength (Keller): predictor x + h·t, corrector
 * Newton on [F(x); tᵀ(x − x_pred)] = 0 with ∂F/∂ℓ kept from the predicted point (chord), next
 * tangent from [F_x; tᵀ] t' = [0; 1] (orientation preserved). Step size adapts to the Newton
 * iteration count and the turning angle. Detected between accepted points and located by
 * bisection along the arc:
 *   fold         sign change of the tangent's ℓ component;
 *   branch point sign change of det[F_x; tᵀ] without a fold (simple bifurcation);
 *   stability    sign change of the growth rate (stability.ts).
 * Starts: every equilibrium (equilibria.ts) at ℓ = 0, 1 and `interior` values between,
 * traced both ways, skipping those already on a traced branch; so branches not connected to
 * the ends, and ones born in folds between them, are found as long as they exist at one of the
 * start values.
 *
 * References: Keller, in Applications of Bifurcation Theory, Academic Press 1977, 359–384
 * (pseudo-arclength); Allgower & Georg, Introduction to Numerical Continuation Methods, SIAM
 * Classics 2003, ch. 2 (predictor–corrector, tangent orientation), §6.1 (step control) and
 * §8.1 (bifurcation detection by the determinant's sign; chapter numbers from memory).
 */
import { buildModel } from '../model/build.js';
import type { Model } from '../model/types.js';
import type { NetlistDoc } from '../netlist/types.js';
import { checkPath, overrideValue, readWithOverrides, splitPath } from '../netlist/override.js';
import { formatDiagnostic } from '../diag/diagnostic.js';
import { parseQuantity } from '../units/quantity.js';
import { DenseLu } from '../linalg/dense-lu.js';
import { makeWall, type WallPoint } from '../physics/wall.js';
import { readScalar, valueText } from '../studies/sweep-spec.js';
import {
  groupEquilibria, groupStability, pressureOfMass, restOf, restSetup, segmentOfVolume, steadyPressures,
  type ChamberRest, type RestGroup, type RestSetup, type ValveState,
} from './equilibria.js';
import type { StabilityVerdict } from './stability.js';

const H_MIN = 1e-7;
const NEWTON_MAX = 8;
const TOL = 1e-10;
const FD_L = 1e-6;
/** Largest turning angle (cosine) between successive tangents. */
const COS_MAX_TURN = 0.95;
/** Bisections locating a special point along the arc (a fold's parameter error is second order in the arc). */
const BISECTIONS = 24;
const FOLD_BISECTIONS = 14;
/** Models kept for recent parameter values. */
const CACHE = 24;
/**
 * A branch is followed no further once a sphere stretches beyond this (rubber bursts long
 * before; on a falling branch the stretch grows without bound as the pressure nears ambient)
 * or a chamber holds this many times the group's gas scale.
 */
const MAX_STRETCH = 20;
const MAX_U = 1000;

export interface TraceOptions {
  /** `mass:<chamber>` or a netlist path. */
  vary: string;
  from: string;
  to: string;
  valves?: ValveState;
  /** Start values strictly between the ends (default 3). */
  interior?: number;
  /** Largest step in scaled arclength (default 0.05). */
  maxStep?: number;
  /** Points per branch at most (default 1000). */
  maxPoints?: number;
}

export interface TracePoint {
  /** Parameter value in the unit of --from/--to. */
  parameter: number;
  chambers: Record<string, ChamberRest>;
  stable: boolean;
  stability: StabilityVerdict;
  growth_rate: number | null;
  /** Set on located special points and on the ends of a branch. */
  special?: 'fold' | 'branch-point' | 'stability-change' | 'end';
}

export interface TraceBranch {
  id: number;
  chambers: string[];
  points: TracePoint[];
  /** Why tracing stopped at each end. */
  ends: [string, string];
}

export interface TraceResult {
  format: 1;
  title: string;
  file: string;
  status: 'ok' | 'failed';
  message: string;
  parameter: { vary: string; from: number; to: number; unit: string };
  valves: ValveState;
  branches: TraceBranch[];
  notes: string[];
}

export type TraceOutcome = { ok: true; value: TraceResult } | { ok: false; message: string; hint: string };

// ---- the parameter -----------------------------------------------------------------------

interface Leaf { path: (string | number)[]; a: number; b: number; series: boolean }

const SKIP = new Set(['pos', 'fieldPos', 'source', 'file', 'defaulted', 'title', 'expect', 'simulate']);

function isSeries(v: unknown): v is { at(t: number): number; constant: boolean; text: string } {
  return typeof v === 'object' && v !== null && !Array.isArray(v) && typeof (v as { at?: unknown }).at === 'function' && 'constant' in v;
}

/** Numeric leaves that differ between two readings of the netlist; null when something else differs. */
function diffDocs(a: unknown, b: unknown, path: (string | number)[], out: Leaf[]): boolean {
  if (typeof a === 'number' && typeof b === 'number') {
    if (a !== b) out.push({ path, a, b, series: false });
    return true;
  }
  if (isSeries(a) && isSeries(b)) {
    if (a.constant && b.constant) {
      const va = a.at(0), vb = b.at(0);
      if (va !== vb) out.push({ path, a: va, b: vb, series: true });
      return true;
    }
    return a.text === b.text;
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) return false;
    return a.every((x, i) => diffDocs(x, b[i], [...path, i], out));
  }
  if (typeof a === 'object' && a !== null && typeof b === 'object' && b !== null) {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys) {
      if (SKIP.has(k)) continue;
      if (!diffDocs((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], [...path, k], out)) return false;
    }
    return true;
  }
  return a === b;
}

function setIn(obj: unknown, path: (string | number)[], value: unknown): unknown {
  if (path.length === 0) return value;
  const [k, ...rest] = path;
  if (Array.isArray(obj)) {
    const copy = obj.slice();
    copy[k as number] = setIn(obj[k as number], rest, value);
    return copy;
  }
  const o = obj as Record<string, unknown>;
  return { ...o, [k]: setIn(o[k as string], rest, value) };
}

function constantSeries(p: number): { at(t: number): number; breakpoints: number[]; constant: boolean; text: string } {
  return { at: () => p, breakpoints: [], constant: true, text: `${p} Pa abs` };
}

interface Parameter {
  vary: string;
  from: number;
  to: number;
  unit: string;
  /** λ in the written unit at scaled value ℓ. */
  value(l: number): number;
  /** The model at ℓ, or an error message. */
  modelAt(l: number): Model | string;
  /** Gas of closed groups follows the netlist (start values), or the parameter is a group's gas. */
  gasFollows: boolean;
  /** For mass:<chamber>: that chamber's index and the SI gas at ℓ. */
  massOf?: { chamber: number; si(l: number): number };
  /** Chambers whose equations depend on the parameter (null: all). */
  touches: Set<string> | null;
}

function readEnds(vary: string, fromText: string, toText: string): { ok: true; a: number; b: number; unit: string; reference?: 'gauge' | 'abs'; text(x: number): string } | { ok: false; message: string; hint: string } {
  const fa = readScalar(fromText);
  if (!fa.ok) return { ok: false, message: `--from: ${fa.message}`, hint: fa.hint };
  const fb = readScalar(toText);
  if (!fb.ok) return { ok: false, message: `--to: ${fb.message}`, hint: fb.hint };
  const A = fa.value, B = fb.value;
  if (A.unit !== B.unit || (A.reference ?? '') !== (B.reference ?? '')) {
    return { ok: false, message: `--from \`${fromText}\` and --to \`${toText}\` are written in different units`, hint: `write both in the same unit, e.g. --to ${valueText(B.x, A)}` };
  }
  if (A.x === B.x) return { ok: false, message: `--from and --to are the same value for ${vary}`, hint: 'give a range to follow the equilibria across' };
  const label = A.unit === '%' ? '%' : [A.unit, A.reference].filter(Boolean).join(' ');
  return { ok: true, a: A.x, b: B.x, unit: label, reference: A.reference, text: (x: number) => valueText(x, A) };
}

function makeParameter(model: Model, o: TraceOptions): { ok: true; value: Parameter } | { ok: false; message: string; hint: string } {
  const ends = readEnds(o.vary, o.from, o.to);
  if (!ends.ok) return ends;
  const { a, b, unit } = ends;
  const value = (l: number): number => a + l * (b - a);
  const massMatch = /^mass:(.+)$/.exec(o.vary.trim());
  if (massMatch) {
    const name = massMatch[1].trim();
    const chamber = model.chambers.findIndex((c) => c.name === name);
    if (chamber < 0) return { ok: false, message: `no chamber \`${name}\` in ${model.doc.file}`, hint: `chambers: ${model.chambers.map((c) => c.name).join(', ')}` };
    const sa = parseQuantity(o.from, 'mass');
    const sb = parseQuantity(o.to, 'mass');
    if (!sa.ok || !sb.ok) return { ok: false, message: `mass:${name} needs masses for --from and --to (got \`${o.from}\`, \`${o.to}\`)`, hint: 'write e.g. --from "0.5 g" --to "3 g"' };
    if (!(sa.value > 0 && sb.value > 0)) return { ok: false, message: 'the gas of a group must be positive', hint: 'give --from and --to above zero' };
    return {
      ok: true,
      value: {
        vary: o.vary, from: a, to: b, unit, value, modelAt: () => model, gasFollows: true, touches: new Set([name]),
        massOf: { chamber, si: (l) => sa.value + l * (sb.value - sa.value) },
      },
    };
  }
  const source = model.doc.source;
  const file = model.doc.file;
  const check = checkPath(source, o.vary);
  if (!check.ok) return { ok: false, message: check.message, hint: check.hint };
  const path = splitPath(o.vary);
  const read = (x: number): NetlistDoc | string => {
    const text = ends.text(x);
    const r = readWithOverrides(source, file, [{ path, value: overrideValue(text), label: `${o.vary} = ${text}` }]);
    return r.ok ? r.value : r.diagnostics.map(formatDiagnostic).join('\n');
  };
  const docA = read(a);
  if (typeof docA === 'string') return { ok: false, message: `the netlist is not valid at --from:\n${docA}`, hint: 'choose a value inside the parameter\'s range' };
  const docB = read(b);
  if (typeof docB === 'string') return { ok: false, message: `the netlist is not valid at --to:\n${docB}`, hint: 'choose a value inside the parameter\'s range' };
  const leaves: Leaf[] = [];
  let affine = diffDocs(docA, docB, [], leaves);
  if (affine && leaves.length === 0) return { ok: false, message: `${o.vary} changes nothing between ${o.from} and ${o.to}`, hint: 'check the path and the values' };
  const interpolated = (l: number): NetlistDoc => {
    let doc: unknown = docA;
    for (const f of leaves) {
      const v = f.a + l * (f.b - f.a);
      doc = setIn(doc, f.path, f.series ? constantSeries(v) : v);
    }
    return doc as NetlistDoc;
  };
  if (affine) {
    const mid = read(value(0.5));
    if (typeof mid === 'string') affine = false;
    else {
      const check2: Leaf[] = [];
      affine = diffDocs(interpolated(0.5), mid, [], check2) && check2.every((f) => Math.abs(f.a - f.b) <= 1e-9 * Math.max(Math.abs(f.a), Math.abs(f.b)));
    }
  }
  // Fast path: when only wall parameters and constant reservoir pressures change, the model at ℓ
  // is the model at --from with those wall laws and pressures replaced (the ends were built and
  // checked in full); anything else goes through buildModel.
  const builtA = buildModel(docA);
  const wallLeaf = (f: Leaf): boolean => f.path[0] === 'chambers' && f.path[2] === 'wall' && !f.series
    && !(builtA.ok && builtA.value.chambers[f.path[1] as number]?.deflation);
  const pressureLeaf = (f: Leaf): boolean => f.path[0] === 'reservoirs' && f.path[2] === 'pressure' && f.series;
  const fast = affine && builtA.ok && leaves.every((f) => wallLeaf(f) || pressureLeaf(f));
  const quick = (l: number): Model => {
    const base = (builtA as { value: Model }).value;
    const doc = interpolated(l);
    const walls = new Set(leaves.filter(wallLeaf).map((f) => f.path[1] as number));
    const pressures = new Set(leaves.filter(pressureLeaf).map((f) => f.path[1] as number));
    return {
      ...base, doc,
      chambers: base.chambers.map((c, i) => (walls.has(i)
        ? { ...c, wall: makeWall(doc.chambers[i].wall, base.pa), spec: { ...c.spec, wall: doc.chambers[i].wall } }
        : c)),
      reservoirs: base.reservoirs.map((r, i) => (pressures.has(i) ? { ...r, pressure: doc.reservoirs[i].pressure } : r)),
    };
  };
  const cache = new Map<number, Model | string>();
  const modelAt = (l: number): Model | string => {
    const hit = cache.get(l);
    if (hit !== undefined) return hit;
    let m: Model | string;
    if (fast) m = quick(l);
    else {
      const doc = affine ? interpolated(l) : read(value(l));
      if (typeof doc === 'string') m = doc;
      else {
        const built = buildModel(doc);
        m = built.ok ? built.value : built.diagnostics.map(formatDiagnostic).join('\n');
      }
    }
    if (cache.size >= CACHE) cache.delete(cache.keys().next().value as number);
    cache.set(l, m);
    return m;
  };
  // which chambers the changed values belong to
  let touches: Set<string> | null = new Set<string>();
  for (const f of leaves) {
    const [section, index] = f.path;
    if (section === 'chambers') touches.add(docA.chambers[index as number].name);
    else if (section === 'lines') { const l = docA.lines[index as number]; touches.add(l.from).add(l.to); }
    else if (section === 'valves') { const v = docA.valves[index as number]; touches.add(v.from).add(v.to); }
    else if (section === 'feeds') touches.add(docA.feeds[index as number].into);
    else if (section === 'reservoirs') {
      const r = docA.reservoirs[index as number].name;
      for (const l of [...docA.lines, ...docA.valves]) if (l.from === r || l.to === r) touches.add(l.from).add(l.to);
    } else { touches = null; break; }
  }
  if (!affine) touches = null;
  return {
    ok: true,
    value: {
      vary: o.vary, from: a, to: b, unit, value, modelAt, touches,
      gasFollows: path.includes('start'),
    },
  };
}

// ---- one group's equations ---------------------------------------------------------------

interface Context { model: Model; setup: RestSetup; group: RestGroup; masses: Float64Array; target: Float64Array | null }

class GroupProblem {
  readonly n: number;
  private readonly contexts = new Map<number, Context | string>();
  private readonly s: WallPoint = { p: 0, dpdV: 0 };
  private readonly guess: number[];

  constructor(
    readonly param: Parameter, readonly groupIndex: number, readonly valves: ValveState,
    readonly baseMasses: Float64Array, readonly scale: number, readonly names: string[],
  ) {
    this.n = names.length;
    this.guess = new Array<number>(this.n).fill(0);
  }

  context(l: number): Context | string {
    const hit = this.contexts.get(l);
    if (hit !== undefined) return hit;
    const model = this.param.modelAt(l);
    let c: Context | string;
    if (typeof model === 'string') c = model;
    else {
      const setup = restSetup(model, this.valves);
      const group = setup.groups[this.groupIndex];
      const masses = this.param.gasFollows ? Float64Array.from(model.chambers.map((ch) => ch.m0)) : Float64Array.from(this.baseMasses);
      if (this.param.massOf) {
        const g = group.chambers;
        const total = g.reduce((acc, i) => acc + masses[i], 0);
        const want = this.param.massOf.si(l);
        if (g.includes(this.param.massOf.chamber)) for (const i of g) masses[i] *= want / total;
      }
      let target: Float64Array | null = null;
      if (group.kind === 'open') {
        const sp = steadyPressures(setup, group);
        target = sp.ok ? sp.p : null;
      }
      c = group.kind === 'open' && !target ? 'the steady-flow pressures could not be found' : { model, setup, group, masses, target };
      if (group.kind === 'fed') c = 'the group is fed with no outlet: no steady state';
    }
    if (this.contexts.size >= CACHE) this.contexts.delete(this.contexts.keys().next().value as number);
    this.contexts.set(l, c);
    return c;
  }

  /** F(x) into F and ∂F/∂u into J (n×n); false outside the laws or the netlist's range. */
  eval(x: Float64Array, F: Float64Array, J: Float64Array | null): boolean {
    const n = this.n;
    const l = x[n];
    const c = this.context(l);
    if (typeof c === 'string') return false;
    const { setup, group } = c;
    const pa = setup.model.pa;
    if (J) J.fill(0);
    let p0 = 0, g0 = 0, m0 = 0, sum = 0;
    const ms = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const ch = setup.chambers[group.chambers[i]];
      const m = this.scale * Math.exp(x[i]);
      ms[i] = m;
      if (!(m > 0) || !Number.isFinite(m)) return false;
      const r = pressureOfMass(ch, m, pa, this.s, this.guess[i] || ch.wall.V0);
      if (!Number.isFinite(r.p) || !Number.isFinite(r.dpdm)) return false;
      this.guess[i] = r.V;
      sum += m;
      if (group.kind === 'closed') {
        if (i === 0) { p0 = r.p; g0 = r.dpdm; m0 = m; continue; }
        F[i] = (r.p - p0) / pa;
        if (J) { J[i * n + i] = (m * r.dpdm) / pa; J[i * n] = (-m0 * g0) / pa; }
      } else {
        F[i] = (r.p - (c.target as Float64Array)[i]) / pa;
        if (J) J[i * n + i] = (m * r.dpdm) / pa;
      }
    }
    if (group.kind === 'closed') {
      const M = group.chambers.reduce((acc, i) => acc + c.masses[i], 0);
      F[0] = (sum - M) / this.scale;
      if (J) for (let j = 0; j < n; j++) J[j] = ms[j] / this.scale;
    }
    return true;
  }

  /** ∂F/∂ℓ at x by a forward difference in ℓ (backward near the upper end of the range). */
  dl(x: Float64Array, F0: Float64Array, out: Float64Array): boolean {
    const n = this.n;
    const xp = Float64Array.from(x);
    const h = x[n] + FD_L > 1 + 1e-9 ? -FD_L : FD_L;
    xp[n] = x[n] + h;
    const F1 = new Float64Array(n);
    if (!this.eval(xp, F1, null)) {
      xp[n] = x[n] - h;
      if (!this.eval(xp, F1, null)) return false;
      for (let i = 0; i < n; i++) out[i] = (F0[i] - F1[i]) / h;
      return true;
    }
    for (let i = 0; i < n; i++) out[i] = (F1[i] - F0[i]) / h;
    return true;
  }

  point(x: Float64Array, special?: TracePoint['special']): TracePoint | null {
    const n = this.n;
    const c = this.context(x[n]);
    if (typeof c === 'string') return null;
    const { setup, group } = c;
    const pa = setup.model.pa;
    const chambers: Record<string, ChamberRest> = {};
    const gm: number[] = [];
    for (let i = 0; i < n; i++) {
      const ch = setup.chambers[group.chambers[i]];
      const m = this.scale * Math.exp(x[i]);
      const r = pressureOfMass(ch, m, pa, this.s, this.guess[i] || ch.wall.V0);
      chambers[ch.name] = restOf(ch, r.p, pa, r.V, m, ch.wall.rigid ? 0 : segmentOfVolume(ch, r.V));
      gm.push(m);
    }
    const st = groupStability(setup, group, gm, c.masses);
    return {
      parameter: this.param.value(x[n]), chambers, stable: st.stability === 'stable', stability: st.stability,
      growth_rate: st.growth_rate, ...(special ? { special } : {}),
    };
  }

  growth(x: Float64Array): number {
    const p = this.point(x);
    return p?.growth_rate ?? Number.NaN;
  }
}

// ---- linear algebra of the augmented system ----------------------------------------------

/** Solves [J Fl; tᵀ] z = rhs; returns the sign of the determinant (0 when singular). */
function augmented(n: number, J: Float64Array, Fl: Float64Array, t: Float64Array, rhs: Float64Array, lu: DenseLu): number {
  const N = n + 1;
  const A = new Float64Array(N * N);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) A[i * N + j] = J[i * n + j];
    A[i * N + n] = Fl[i];
  }
  for (let j = 0; j < N; j++) A[n * N + j] = t[j];
  if (!lu.factor(A)) return 0;
  let sign = 1;
  for (let k = 0; k < N; k++) {
    if (lu.pivots[k] !== k) sign = -sign;
    if (A[k * N + k] < 0) sign = -sign;
  }
  lu.solve(rhs);
  return sign;
}

function norm(v: Float64Array): number {
  return Math.sqrt(v.reduce((a, x) => a + x * x, 0));
}

interface Node { x: Float64Array; t: Float64Array; det: number; growth: number }

class Tracer {
  readonly n: number;
  private readonly lu: DenseLu;
  private readonly J: Float64Array;
  private readonly F: Float64Array;
  private readonly Fl: Float64Array;

  constructor(readonly prob: GroupProblem, readonly maxStep: number, readonly maxPoints: number) {
    this.n = prob.n;
    this.lu = new DenseLu(this.n + 1);
    this.J = new Float64Array(this.n * this.n);
    this.F = new Float64Array(this.n);
    this.Fl = new Float64Array(this.n);
  }

  /** Tangent at a solution x, oriented along `prev` (or with ℓ increasing × sign); det sign too. */
  tangent(x: Float64Array, prev: Float64Array | null, sign: number): { t: Float64Array; det: number } | null {
    const n = this.n;
    if (!this.prob.eval(x, this.F, this.J) || !this.prob.dl(x, this.F, this.Fl)) return null;
    const c = prev ?? (() => { const e = new Float64Array(n + 1); e[n] = 1; return e; })();
    const z = new Float64Array(n + 1);
    z[n] = 1;
    let det = augmented(n, this.J, this.Fl, c, z, this.lu);
    if (det === 0) {
      // at a fold the ℓ direction is tangent-orthogonal: orient by a fixed generic vector
      const g = new Float64Array(n + 1).map((_, i) => 1 + 0.1 * i);
      z.fill(0); z[n] = 1;
      det = augmented(n, this.J, this.Fl, g, z, this.lu);
      if (det === 0) return null;
    }
    const s = norm(z);
    for (let i = 0; i <= n; i++) z[i] /= s;
    if (!prev && z[n] * sign < 0) for (let i = 0; i <= n; i++) z[i] = -z[i];
    // the determinant with the tangent itself as the last row
    const w = new Float64Array(n + 1);
    const dsign = augmented(n, this.J, this.Fl, z, w, this.lu);
    return { t: z, det: dsign };
  }

  /** Corrector from x + h·t onto F = 0 with tᵀ(x − x_pred) = 0. */
  correct(x: Float64Array, t: Float64Array, h: number): { x: Float64Array; its: number } | null {
    const n = this.n;
    const N = n + 1;
    const y = new Float64Array(N);
    for (let i = 0; i < N; i++) y[i] = x[i] + h * t[i];
    const pred = Float64Array.from(y);
    const Fl = new Float64Array(n);
    const F = new Float64Array(n);
    const J = new Float64Array(n * n);
    if (!this.prob.eval(y, F, J) || !this.prob.dl(y, F, Fl)) return null;
    for (let it = 1; it <= NEWTON_MAX; it++) {
      const rhs = new Float64Array(N);
      for (let i = 0; i < n; i++) rhs[i] = -F[i];
      let c = 0;
      for (let i = 0; i < N; i++) c += t[i] * (y[i] - pred[i]);
      rhs[n] = -c;
      if (augmented(n, J, Fl, t, rhs, this.lu) === 0) return null;
      for (let i = 0; i < N; i++) y[i] += rhs[i];
      if (!this.prob.eval(y, F, J)) return null;
      const r = F.reduce((a, v) => Math.max(a, Math.abs(v)), 0);
      const d = rhs.reduce((a, v) => Math.max(a, Math.abs(v)), 0);
      if (r < TOL && d < 1e-8) return { x: y, its: it };
    }
    return null;
  }

  /** Newton at fixed ℓ from a guess (to land exactly on a value of the parameter). */
  atParameter(guess: Float64Array, l: number): Float64Array | null {
    const n = this.n;
    const y = Float64Array.from(guess);
    y[n] = l;
    const F = new Float64Array(n);
    const J = new Float64Array(n * n);
    const lu = new DenseLu(n);
    for (let it = 0; it < 30; it++) {
      if (!this.prob.eval(y, F, J)) return null;
      const r = F.reduce((a, v) => Math.max(a, Math.abs(v)), 0);
      if (r < TOL) return y;
      if (!lu.factor(J)) return null;
      const d = F.map((v) => -v);
      lu.solve(d);
      for (let i = 0; i < n; i++) y[i] += d[i];
    }
    return null;
  }

  /** Bisection for a sign change of `indicator` along the arc from node a over step h. */
  locate(a: Node, h: number, indicator: (x: Float64Array, t: Float64Array) => number, steps = BISECTIONS): Float64Array | null {
    const s0 = indicator(a.x, a.t);
    let lo = 0, hi = h;
    let best: Float64Array | null = null;
    for (let k = 0; k < steps; k++) {
      const mid = 0.5 * (lo + hi);
      const c = this.correct(a.x, a.t, mid);
      if (!c) break;
      const tt = this.tangent(c.x, a.t, 1);
      if (!tt) break;
      const v = indicator(c.x, tt.t);
      if (!Number.isFinite(v)) break;
      best = c.x;
      if ((v > 0) === (s0 > 0)) lo = mid; else hi = mid;
    }
    return best;
  }

  /** Follows the branch from x0 in direction `sign` (of ℓ); returns the points and why it stopped. */
  run(x0: Float64Array, sign: number): { points: TracePoint[]; nodes: Float64Array[]; why: string } {
    const n = this.n;
    const points: TracePoint[] = [];
    const nodes: Float64Array[] = [];
    const first = this.tangent(x0, null, sign);
    if (!first) return { points, nodes, why: 'no tangent at the start (singular equations)' };
    const p0 = this.prob.point(x0);
    if (!p0) return { points, nodes, why: 'the start is outside the model' };
    let cur: Node = { x: x0, t: first.t, det: first.det, growth: p0.growth_rate ?? Number.NaN };
    points.push(p0);
    nodes.push(x0);
    let h = Math.min(this.maxStep, 0.01);
    let why = `reached ${this.maxPoints} points`;
    while (points.length < this.maxPoints) {
      const c = this.correct(cur.x, cur.t, h);
      const tn = c ? this.tangent(c.x, cur.t, 1) : null;
      const turn = tn ? tn.t.reduce((a, v, i) => a + v * cur.t[i], 0) : -1;
      if (!c || !tn || turn < COS_MAX_TURN) {
        h *= 0.5;
        if (h < H_MIN) { why = 'the step size collapsed (the branch leaves the range of a wall law, or ends)'; break; }
        continue;
      }
      const l = c.x[n];
      if (l < -1e-9 || l > 1 + 1e-9) {
        // land exactly on the end of the range
        const lb = l < 0 ? 0 : 1;
        const w = (lb - cur.x[n]) / (l - cur.x[n]);
        const guess = cur.x.map((v, i) => v + w * (c.x[i] - v));
        const end = this.atParameter(guess, lb);
        const pt = end ? this.prob.point(end, 'end') : null;
        if (pt && end && Math.abs(cur.x[n] - lb) > 1e-12) { points.push(pt); nodes.push(end); }
        why = `reached ${this.prob.param.vary} = ${this.prob.param.value(lb)}`;
        break;
      }
      const pt = this.prob.point(c.x);
      if (!pt) { h *= 0.5; if (h < H_MIN) { why = 'the netlist is not valid beyond this value'; break; } continue; }
      if (Object.values(pt.chambers).some((ch) => (ch.stretch ?? 0) > MAX_STRETCH) || c.x.some((v, i) => i < n && v > Math.log(MAX_U))) {
        points.push(pt);
        nodes.push(c.x);
        why = `a chamber inflates without bound (stretch above ${MAX_STRETCH} or more than ${MAX_U} times the gas scale)`;
        break;
      }
      const next: Node = { x: c.x, t: tn.t, det: tn.det, growth: pt.growth_rate ?? Number.NaN };
      // special points between cur and next, located along the arc from cur
      const fold = cur.t[n] !== 0 && next.t[n] !== 0 && (cur.t[n] > 0) !== (next.t[n] > 0);
      const specials: { x: Float64Array; kind: TracePoint['special'] }[] = [];
      let singular: Float64Array | null = null;
      if (fold) {
        singular = this.locate(cur, h, (_x, t) => t[n], FOLD_BISECTIONS);
        if (singular) specials.push({ x: singular, kind: 'fold' });
      } else if (cur.det !== next.det) {
        singular = this.locate(cur, h, (x) => {
          const tt = this.tangent(x, cur.t, 1);
          return tt ? tt.det * cur.det : Number.NaN;
        });
        if (singular) specials.push({ x: singular, kind: 'branch-point' });
      }
      if (Number.isFinite(cur.growth) && Number.isFinite(next.growth) && (cur.growth > 0) !== (next.growth > 0)) {
        // at a fold or branch point the equations' jacobian is singular, which for these networks
        // is exactly a zero eigenvalue of the dynamics: the stability changes there
        const at = singular ?? this.locate(cur, h, (x) => this.prob.growth(x));
        if (at) specials.push({ x: at, kind: 'stability-change' });
      }
      specials.sort((a, b) => Math.abs(a.x[n] - cur.x[n]) - Math.abs(b.x[n] - cur.x[n]));
      for (const s of specials) {
        const sp = this.prob.point(s.x, s.kind);
        if (sp) { points.push(sp); nodes.push(s.x); }
      }
      points.push(pt);
      nodes.push(c.x);
      // a closed loop (an isola) ends where it began
      if (nodes.length > 8) {
        let d = 0;
        for (let i = 0; i <= n; i++) d += (c.x[i] - x0[i]) ** 2;
        if (Math.sqrt(d) < 0.5 * h) { why = 'the branch closes on itself'; break; }
      }
      cur = next;
      h = c.its <= 2 ? Math.min(h * 1.6, this.maxStep) : c.its >= 5 ? h * 0.6 : h;
    }
    return { points, nodes, why };
  }
}

/** Whether x lies on a traced branch: the branch's state where it crosses x's parameter value. */
function onBranch(tracer: Tracer, nodes: Float64Array[], x: Float64Array): boolean {
  const n = tracer.n;
  const l = x[n];
  for (let k = 0; k + 1 < nodes.length; k++) {
    const a = nodes[k], b = nodes[k + 1];
    if ((a[n] - l) * (b[n] - l) > 0) continue;
    const w = b[n] === a[n] ? 0 : (l - a[n]) / (b[n] - a[n]);
    const guess = a.map((v, i) => v + w * (b[i] - v));
    const y = tracer.atParameter(guess, l) ?? guess;
    let d = 0;
    for (let i = 0; i < n; i++) d = Math.max(d, Math.abs(y[i] - x[i]));
    if (d < 1e-6) return true;
  }
  return false;
}

/** Follows every branch of equilibria of the groups the parameter touches. */
export function traceEquilibria(model: Model, options: TraceOptions): TraceOutcome {
  const made = makeParameter(model, options);
  if (!made.ok) return made;
  const param = made.value;
  const valves = options.valves ?? 'end';
  const interior = Math.max(0, Math.floor(options.interior ?? 3));
  const maxStep = options.maxStep ?? 0.05;
  const maxPoints = options.maxPoints ?? 1000;
  const notes: string[] = [];
  const base = restSetup(model, valves);
  const baseMasses = Float64Array.from(model.chambers.map((c) => c.m0));
  const branches: TraceBranch[] = [];
  const starts = [0, 1, ...Array.from({ length: interior }, (_, k) => (k + 1) / (interior + 1))];
  let closedTraced = false;

  base.groups.forEach((g, gi) => {
    const names = g.chambers.map((c) => model.chambers[c].name);
    if (param.touches && !names.some((nm) => param.touches!.has(nm))) return;
    if (g.kind === 'fed') { notes.push(`${names.join(', ')}: fed with no outlet, no steady state to follow`); return; }
    if (g.kind === 'closed') closedTraced = true;
    const gas = g.chambers.reduce((a, c) => a + baseMasses[c], 0);
    const scale = param.massOf && g.chambers.includes(param.massOf.chamber)
      ? Math.max(param.massOf.si(0), param.massOf.si(1)) : gas;
    const prob = new GroupProblem(param, gi, valves, baseMasses, scale, names);
    const tracer = new Tracer(prob, maxStep, maxPoints);
    const traced: Float64Array[][] = [];
    for (const l of starts) {
      const c = prob.context(l);
      if (typeof c === 'string') { notes.push(`at ${param.vary} = ${param.value(l)} ${param.unit}: ${c.split('\n')[0]}`); continue; }
      const eq = groupEquilibria(c.setup, c.group, c.masses, { maxCombinations: 4096, stability: false });
      for (const e of eq.equilibria) {
        const x = new Float64Array(names.length + 1);
        e.chambers.forEach((ch, i) => { x[i] = Math.log(ch.mass / scale); });
        x[names.length] = l;
        if (traced.some((nodes) => onBranch(tracer, nodes, x))) continue;
        const fwd = tracer.run(x, 1);
        const bwd = tracer.run(x, -1);
        const points = [...bwd.points.slice(1).reverse(), ...fwd.points];
        const nodes = [...bwd.nodes.slice(1).reverse(), ...fwd.nodes];
        if (points.length === 0) continue;
        traced.push(nodes);
        branches.push({ id: branches.length + 1, chambers: names, points, ends: [bwd.why, fwd.why] });
      }
    }
  });
  if (closedTraced && param.gasFollows && !param.massOf) notes.push('the parameter is a start value: the gas each closed group holds follows it');
  else if (closedTraced && !param.massOf) notes.push('each closed group keeps the gas it holds in the netlist as written');
  if (branches.length === 0) notes.push('no equilibrium found at any start value');
  return {
    ok: true,
    value: {
      format: 1, title: model.doc.title, file: model.doc.file,
      status: 'ok', message: `${branches.length} branch${branches.length === 1 ? '' : 'es'}`,
      parameter: { vary: param.vary, from: param.from, to: param.to, unit: param.unit },
      valves, branches, notes,
    },
  };
}
