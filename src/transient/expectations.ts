/**
 * Evaluates `expect:` entries on the dense solution of a run, not on its samples.
 *
 * The monitor sees every accepted step with the integrator's dense output (the driver's
 * `onStep` hook) and evaluates the probed channels inside the step:
 * - `at: t` reads the dense output at exactly t. Where a flow jumps at t (a valve switching,
 *   a relief valve lifting) the value just after the jump is taken; `at: end` is the final state.
 * - `over` + `max`/`min`: each step is sampled at its ends and at four Gauss–Legendre nodes; when
 *   the best of these lies inside the step (or a parabola through the three points at the best
 *   end puts a turning point inside the first interval), golden-section search on the dense
 *   output brackets the extremum to 1e-6 of the step, so the value is that of the interpolant
 *   to far below solver accuracy. The time of the extremum is reported.
 * - `over` + `mean`: the integral of the dense output, 4-point Gauss–Legendre on each step
 *   (exact for polynomials of degree 7; the interpolants are of lower degree in the state),
 *   divided by the window length. Steps are cut at events and breakpoints, so jumps in a flow
 *   fall between steps, never inside a quadrature.
 * - `settles: { within, band }`: for every chamber, its absolute pressure and its volume stay
 *   within `band` of their final values for all t in [within, end], the band a fraction of each
 *   quantity's own excursion over the run with a floor (settle-band.ts, the definition the run's
 *   outcome uses): max |q(t) − q(end)| ≤ band·max(E, 0.1 %·|q(end)|), E = max over [0, end] of
 *   |q − q(end)|. With `relative-to: final-value` the band is of the final value itself,
 *   ≤ band·|q(end)| (a loose test for a pressure that moves little against the ambient it sits
 *   on). Computed exactly from the running maximum and minimum of each quantity over
 *   [within, end] and over the whole run (the largest distance from a constant is at one of them).
 *
 * Comparisons: `below` is strict (v < limit), `above` strict (v > limit), `near` inclusive
 * (|v − value| ≤ within; a `%` within is relative to |value|, for a `gauge` probe to the gauge
 * value). Pressure limits are stored absolute; `gauge` probes are shown and reported gauge.
 *
 * References: Gauss–Legendre nodes and weights, Abramowitz & Stegun, Handbook of Mathematical
 * Functions (1964), Table 25.4; golden-section search, Press, Teukolsky, Vetterling & Flannery,
 * Numerical Recipes, 3rd ed. (2007), §10.2; vertex of the interpolating parabola, ibid. §10.3,
 * eq. 10.3.1.
 */
import { bandScale } from './settle-band.js';
import { ELEMENT_TABLES } from '../netlist/kinds.js';
import type { ExpectSpec, ProbeQuantity } from '../netlist/types.js';
import type { DenseOutput } from '../solve/types.js';
import type { DisplayKind } from '../units/display.js';
import type { ExpectationResult } from './results.js';

/** What the monitor needs from the system: channel columns and a way to evaluate a row. */
export interface ChannelSource {
  /** Channel key `<name>.<quantity>` → column in a row. */
  keys: ReadonlyMap<string, number>;
  /** Row length (number of channels). */
  width: number;
  /** State vector length. */
  n: number;
  /** Writes every channel's value at (t, y) into row. */
  observe(t: number, y: Float64Array, row: Float64Array): void;
}

/** 4-point Gauss–Legendre on [−1, 1] (A&S Table 25.4), ascending nodes. */
const GL_X = [-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526];
const GL_W = [0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538];
/** Sample points of a step: both ends and the Gauss–Legendre nodes. */
const NODES = GL_X.length + 2;
/** Golden-section search stops when the bracket is this fraction of the step. */
const GOLDEN_REL = 1e-6;
const GOLDEN_MAX_ITER = 60;
const INV_PHI = 0.6180339887498949;

/** `refined`: located between the nodes by golden section (one network evaluation a probe). */
interface Extremum { c: number; t0: number; t1: number; sign: 1 | -1; best: number; at: number; seen: boolean; refined: boolean }
interface Integral { c: number; t0: number; t1: number; sum: number }
interface Pointwise { c: number; t: number; value: number; seen: boolean }

type ProbeSpec = Extract<ExpectSpec, { kind: 'probe' }>;
type SettlesSpec = Extract<ExpectSpec, { kind: 'settles' }>;
/** One tracked quantity of a settles check: extrema after `within` and over the whole run. */
interface SettlePart { key: string; c: number; hi: number; lo: number; hiAll: number; loAll: number }

/** What each spec reads; indices into the monitor's tracker lists. */
type Plan =
  | { kind: 'missing'; spec: ExpectSpec }
  | { kind: 'at-end'; spec: ProbeSpec; c: number }
  | { kind: 'at'; spec: ProbeSpec; c: number; i: number }
  | { kind: 'extremum'; spec: ProbeSpec; c: number; i: number }
  | { kind: 'mean'; spec: ProbeSpec; c: number; i: number }
  | { kind: 'overshoot'; spec: ProbeSpec; c: number; hi: number; lo: number; first: number; last: number }
  | { kind: 'settles'; spec: SettlesSpec; parts: SettlePart[] };

// ---- formatting for people (engineering units, enough digits to tell values apart) ----------

interface Shown { scale: number; offset: number; unit: string }

function unitFor(kind: DisplayKind, magnitude: number): Shown {
  switch (kind) {
    case 'pressure': return { scale: 1e-3, offset: 0, unit: ' kPa abs' };
    case 'gauge': return { scale: 1e-3, offset: 0, unit: ' kPa gauge' };
    case 'volume': return magnitude < 1e-3 ? { scale: 1e6, offset: 0, unit: ' mL' } : { scale: 1e3, offset: 0, unit: ' L' };
    case 'mass': return magnitude < 1 ? { scale: 1e3, offset: 0, unit: ' g' } : { scale: 1, offset: 0, unit: ' kg' };
    case 'temperature': return { scale: 1, offset: -273.15, unit: ' °C' };
    case 'flow': return magnitude < 1 ? { scale: 1e3, offset: 0, unit: ' g/s' } : { scale: 1, offset: 0, unit: ' kg/s' };
    case 'time': return magnitude < 1 && magnitude > 0 ? { scale: 1e3, offset: 0, unit: ' ms' } : { scale: 1, offset: 0, unit: ' s' };
    case 'opening': return { scale: 100, offset: 0, unit: ' %' };
    case 'position': return magnitude < 1 ? { scale: 1e3, offset: 0, unit: ' mm' } : { scale: 1, offset: 0, unit: ' m' };
    case 'velocity': return { scale: 1, offset: 0, unit: ' m/s' };
    case 'energy': return { scale: 1, offset: 0, unit: ' J' };
    case 'stretch':
    case 'reynolds': return { scale: 1, offset: 0, unit: '' };
  }
}

function sig(x: number, digits: number): string {
  if (!Number.isFinite(x)) return Number.isNaN(x) ? 'not a number' : String(x);
  if (x === 0) return '0';
  const s = x.toPrecision(digits);
  return s.includes('e') ? s : String(Number(s));
}

/** A value in engineering units with 4 significant digits (more when needed to differ from `other`). */
function fmt(x: number, kind: DisplayKind, other?: number): string {
  const u = unitFor(kind, Math.abs(x));
  const show = (v: number, d: number): string => sig(v * u.scale + u.offset, d);
  let d = 4;
  if (other !== undefined && x !== other) while (d < 12 && show(x, d) === show(other, d)) d++;
  return `${show(x, d)}${u.unit}`;
}

/** A difference (no gauge/abs qualifier, kelvin for temperatures). */
function fmtDelta(x: number, kind: DisplayKind): string {
  if (kind === 'temperature') return `${sig(x, 4)} K`;
  const k: DisplayKind = kind === 'gauge' || kind === 'pressure' ? 'pressure' : kind;
  const u = unitFor(k, Math.abs(x));
  return `${sig(x * u.scale, 4)}${u.unit.replace(' abs', '')}`;
}

function pct(f: number): string {
  return `${sig(f * 100, 3)} %`;
}

const time = (t: number): string => fmt(t, 'time');

// ---- numerics on one step ---------------------------------------------------------------------

/** Index of the best (largest sign·f) of fs, the first one on ties. */
function argBest(fs: number[]): number {
  let k = 0;
  for (let i = 1; i < fs.length; i++) if (fs[i] > fs[k] || (Number.isNaN(fs[i]) && !Number.isNaN(fs[k]))) k = i;
  return k;
}

/** True when the parabola through three points has a maximum strictly between t0 and t1. */
function vertexBetween(t0: number, f0: number, t1: number, f1: number, t2: number, f2: number): boolean {
  const d1 = (f1 - f0) / (t1 - t0);
  const d2 = (f2 - f1) / (t2 - t1);
  const curv = (d2 - d1) / (t2 - t0);
  if (!(curv < 0)) return false;
  const num = (t1 - t0) ** 2 * (f1 - f2) - (t1 - t2) ** 2 * (f1 - f0);
  const den = (t1 - t0) * (f1 - f2) - (t1 - t2) * (f1 - f0);
  if (den === 0) return false;
  const tv = t1 - (0.5 * num) / den;
  return tv > Math.min(t0, t1) && tv < Math.max(t0, t1);
}

/** Maximum of g on [lo, hi] by golden-section search (g unimodal there). */
function golden(g: (t: number) => number, lo: number, hi: number, tol: number): { t: number; f: number } {
  let x1 = hi - INV_PHI * (hi - lo);
  let x2 = lo + INV_PHI * (hi - lo);
  let f1 = g(x1);
  let f2 = g(x2);
  for (let i = 0; i < GOLDEN_MAX_ITER && hi - lo > tol; i++) {
    if (f1 < f2) {
      lo = x1; x1 = x2; f1 = f2;
      x2 = lo + INV_PHI * (hi - lo); f2 = g(x2);
    } else {
      hi = x2; x2 = x1; f2 = f1;
      x1 = hi - INV_PHI * (hi - lo); f1 = g(x1);
    }
  }
  return f1 >= f2 ? { t: x1, f: f1 } : { t: x2, f: f2 };
}

// ---- the monitor ------------------------------------------------------------------------------

/** Sample points of one interval with every channel's row at each. */
class NodeSet {
  readonly ts = new Float64Array(NODES);
  readonly rows: Float64Array[];
  a = 0;
  b = 0;
  constructor(width: number) {
    this.rows = Array.from({ length: NODES }, () => new Float64Array(width));
  }
}

/** How a probe quantity is shown: built-in quantities by name, a kind's own by its dimension (kinds.ts). */
function displayKindOf(q: string): DisplayKind {
  // a controller's output is an opening; its error is shown in SI (the dimension of what it measures)
  if (q === 'output') return 'opening';
  if (q === 'stroke-time') return 'time';
  if (q === 'impact-velocity') return 'velocity';
  if (q === 'dissipated') return 'energy';
  const named: readonly string[] = ['pressure', 'gauge', 'volume', 'mass', 'temperature', 'stretch', 'flow', 'reynolds', 'time', 'position', 'velocity', 'energy'];
  if (named.includes(q)) return q as DisplayKind;
  const dim = ELEMENT_TABLES.find((k) => q in k.probes)?.probes[q];
  return dim === 'mass-flow' ? 'flow' : dim === 'mass' || dim === 'volume' || dim === 'temperature' || dim === 'time' ? dim : dim === 'pressure' ? 'pressure' : 'reynolds';
}

export class ExpectationMonitor {
  private readonly plans: Plan[];
  private readonly points: Pointwise[] = [];
  private readonly extrema: Extremum[] = [];
  private readonly integrals: Integral[] = [];
  private readonly y: Float64Array;
  private readonly row: Float64Array;
  private readonly full: NodeSet;
  private readonly part: NodeSet;
  private dense: DenseOutput | null = null;
  private fullFor = -1;
  private partFor = -1;

  /**
   * @param specs the netlist's expectations
   * @param src channels of the system
   * @param chambers chamber names (for `settles`)
   * @param pa ambient pressure (Pa), to show and report gauge values
   */
  constructor(specs: ExpectSpec[], private readonly src: ChannelSource, chambers: string[], private readonly pa: number) {
    this.y = new Float64Array(src.n);
    this.row = new Float64Array(src.width);
    this.full = new NodeSet(src.width);
    this.part = new NodeSet(src.width);
    this.plans = specs.map((spec) => this.plan(spec, chambers));
  }

  /** False when there is nothing to evaluate inside steps (the hook can be left off). */
  get needsSteps(): boolean {
    return this.points.length + this.extrema.length + this.integrals.length > 0;
  }

  private plan(spec: ExpectSpec, chambers: string[]): Plan {
    if (spec.kind === 'settles' && spec.probe) {
      const key = `${spec.probe.element}.${spec.probe.quantity}`;
      const c = this.src.keys.get(key);
      if (c === undefined) return { kind: 'missing', spec };
      return {
        kind: 'settles', spec,
        parts: [{ key, c, hi: this.track(c, spec.within, Infinity, 1), lo: this.track(c, spec.within, Infinity, -1), hiAll: this.track(c, 0, Infinity, 1, false), loAll: this.track(c, 0, Infinity, -1, false) }],
      };
    }
    if (spec.kind === 'settles') {
      const parts: SettlePart[] = [];
      for (const name of chambers) {
        for (const q of ['pressure', 'volume']) {
          const key = `${name}.${q}`;
          const c = this.src.keys.get(key);
          if (c === undefined) return { kind: 'missing', spec };
          // the extremes at the seven points of every step, not refined between them: a band is
          // a percentage, and refining cost a network evaluation a probe for each of the 2n
          // channels (a settles check on 1 000 chambers took 9 s instead of 0.8)
          parts.push({
            key, c, hi: this.track(c, spec.within, Infinity, 1, false), lo: this.track(c, spec.within, Infinity, -1, false),
            hiAll: this.track(c, 0, Infinity, 1, false), loAll: this.track(c, 0, Infinity, -1, false),
          });
        }
      }
      return { kind: 'settles', spec, parts };
    }
    const q = spec.probe.quantity;
    const c = this.src.keys.get(`${spec.probe.element}.${q === 'gauge' ? 'pressure' : q}`);
    if (c === undefined) return { kind: 'missing', spec };
    const w = spec.when;
    if ('at' in w) {
      if (w.at === 'end') return { kind: 'at-end', spec, c };
      this.points.push({ c, t: w.at, value: Number.NaN, seen: false });
      return { kind: 'at', spec, c, i: this.points.length - 1 };
    }
    const [t0, t1] = w.over;
    if (w.stat === 'mean') {
      this.integrals.push({ c, t0, t1, sum: 0 });
      return { kind: 'mean', spec, c, i: this.integrals.length - 1 };
    }
    if (w.stat === 'overshoot') {
      this.points.push({ c, t: t0, value: Number.NaN, seen: false }, { c, t: t1, value: Number.NaN, seen: false });
      const last = this.points.length - 1;
      return { kind: 'overshoot', spec, c, hi: this.track(c, t0, t1, 1), lo: this.track(c, t0, t1, -1), first: last - 1, last };
    }
    return { kind: 'extremum', spec, c, i: this.track(c, t0, t1, w.stat === 'max' ? 1 : -1) };
  }

  private track(c: number, t0: number, t1: number, sign: 1 | -1, refined = true): number {
    this.extrema.push({ c, t0, t1, sign, best: Number.NaN, at: Number.NaN, seen: false, refined });
    return this.extrema.length - 1;
  }

  /** Row of every channel at t inside the current step (into `out`, default a scratch row). */
  private rowAt(t: number, out: Float64Array = this.row): Float64Array {
    this.dense!(t, this.y);
    this.src.observe(t, this.y, out);
    return out;
  }

  private fill(set: NodeSet, a: number, b: number): NodeSet {
    const mid = 0.5 * (a + b);
    const half = 0.5 * (b - a);
    set.a = a;
    set.b = b;
    set.ts[0] = a;
    for (let i = 0; i < GL_X.length; i++) set.ts[i + 1] = mid + half * GL_X[i];
    set.ts[NODES - 1] = b;
    for (let i = 0; i < NODES; i++) this.rowAt(set.ts[i], set.rows[i]);
    return set;
  }

  private nodes(a: number, b: number, tOld: number, tNew: number, stepNo: number): NodeSet {
    if (a === tOld && b === tNew) {
      if (this.fullFor !== stepNo) {
        this.fill(this.full, a, b);
        this.fullFor = stepNo;
      }
      return this.full;
    }
    // a window that starts or ends inside the step: many extrema share it (a settles check
    // tracks two a chamber from the same time), so the set is kept for the same piece
    if (this.partFor !== stepNo || this.part.a !== a || this.part.b !== b) {
      this.fill(this.part, a, b);
      this.partFor = stepNo;
    }
    return this.part;
  }

  private stepNo = 0;

  /** One accepted step piece [tOld, tNew] with its dense output (the driver's `onStep`). */
  readonly step = (tOld: number, tNew: number, dense: DenseOutput): void => {
    if (!(tNew >= tOld)) return;
    this.dense = dense;
    const no = ++this.stepNo;
    for (const p of this.points) {
      if (p.t >= tOld && p.t <= tNew) {
        p.value = this.rowAt(p.t)[p.c];
        p.seen = true;
      }
    }
    for (const x of this.extrema) {
      const a = Math.max(tOld, x.t0);
      const b = Math.min(tNew, x.t1);
      if (a > b) continue;
      if (a === b) {
        this.offer(x, a, x.sign * this.rowAt(a)[x.c]);
        continue;
      }
      this.refine(x, this.nodes(a, b, tOld, tNew, no));
    }
    for (const m of this.integrals) {
      const a = Math.max(tOld, m.t0);
      const b = Math.min(tNew, m.t1);
      if (!(b > a)) continue;
      const set = this.nodes(a, b, tOld, tNew, no);
      let s = 0;
      for (let i = 0; i < GL_W.length; i++) s += GL_W[i] * set.rows[i + 1][m.c];
      m.sum += 0.5 * (b - a) * s;
    }
    this.dense = null;
  };

  private offer(x: Extremum, t: number, f: number): void {
    if (!x.seen || f > x.best || (Number.isNaN(f) && !Number.isNaN(x.best))) {
      x.best = f;
      x.at = t;
      x.seen = true;
    }
  }

  /** The extremum of one channel on [set.a, set.b], refined on the dense output when inside. */
  private refine(x: Extremum, set: NodeSet): void {
    const fs = Array.from({ length: NODES }, (_, i) => x.sign * set.rows[i][x.c]);
    const ts = set.ts;
    const k = argBest(fs);
    let lo = Number.NaN;
    let hi = Number.NaN;
    if (k > 0 && k < NODES - 1) {
      lo = ts[k - 1]; hi = ts[k + 1];
    } else if (k === 0 && vertexBetween(ts[0], fs[0], ts[1], fs[1], ts[2], fs[2])) {
      lo = ts[0]; hi = ts[1];
    } else if (k === NODES - 1 && vertexBetween(ts[k], fs[k], ts[k - 1], fs[k - 1], ts[k - 2], fs[k - 2])) {
      lo = ts[k - 1]; hi = ts[k];
    }
    let best = fs[k];
    let at = ts[k];
    // the bracket's maximum exceeds its best node by less than the spread of its nodes
    const spread = best - Math.min(fs[Math.max(0, k - 1)], fs[Math.min(NODES - 1, k + 1)]);
    if (x.refined && Number.isFinite(lo) && (!x.seen || best + spread >= x.best) && Number.isFinite(best)) {
      const g = (t: number): number => x.sign * this.rowAt(t)[x.c];
      const r = golden(g, lo, hi, GOLDEN_REL * (set.b - set.a));
      if (r.f > best) { best = r.f; at = r.t; }
    }
    this.offer(x, at, best);
  }

  /** The results once the run has completed at tEnd with state yEnd. */
  results(tEnd: number, yEnd: Float64Array): ExpectationResult[] {
    const end = new Float64Array(this.src.width);
    this.src.observe(tEnd, yEnd, end);
    return this.plans.map((p) => this.judge(p, tEnd, end));
  }

  private judge(p: Plan, tEnd: number, end: Float64Array): ExpectationResult {
    const spec = p.spec;
    const where = { file: spec.pos.file, line: spec.pos.line, column: spec.pos.column };
    if (p.kind === 'missing') {
      const what = spec.kind === 'settles' ? 'the chambers' : `probe ${spec.probe.text}`;
      return { name: spec.name, passed: false, actual: Number.NaN, ...where, message: `${what} has no recorded values` };
    }
    if (p.kind === 'settles') return { name: spec.name, ...this.settles(p.spec, p.parts, end), ...where };
    const s = p.spec;
    const q = s.probe.quantity;
    let v: number;
    let when: string;
    let atT = '';
    if (p.kind === 'at-end') {
      v = end[p.c];
      when = `at the end (t = ${time(tEnd)})`;
    } else if (p.kind === 'at') {
      const pt = this.points[p.i];
      v = pt.seen ? pt.value : Number.NaN;
      when = `at t = ${time(pt.t)}`;
    } else if (p.kind === 'mean') {
      const m = this.integrals[p.i];
      v = m.sum / (m.t1 - m.t0);
      when = `over [${time(m.t0)}, ${time(m.t1)}]`;
    } else if (p.kind === 'overshoot') {
      return { name: s.name, ...where, ...this.overshoot(p, tEnd, end) };
    } else {
      const x = this.extrema[p.i];
      v = x.sign * x.best;
      when = `over [${time(x.t0)}, ${time(x.t1)}]`;
      if (Number.isFinite(x.at)) atT = ` at t = ${time(x.at)}`;
    }
    const stat = 'over' in s.when ? `${s.when.stat} of ` : '';
    const gauge = q === 'gauge';
    const kind: DisplayKind = q === 'stroke-time' ? 'time' : q === 'impact-velocity' ? 'velocity' : q === 'dissipated' ? 'energy' : displayKindOf(q);
    // pressures are compared absolute and shown (and reported) in the probe's reference
    const ref = (x: number): number => (gauge ? x - this.pa : x);
    const actual = ref(v);
    const cmp = s.compare;
    let passed: boolean;
    let want: string;
    let off = '';
    if (cmp.kind === 'below' || cmp.kind === 'above') {
      passed = cmp.kind === 'below' ? v < cmp.value : v > cmp.value;
      want = `${cmp.kind} ${fmt(ref(cmp.value), kind, actual)}`;
    } else {
      const target = ref(cmp.value);
      const tol = 'abs' in cmp.within ? cmp.within.abs : cmp.within.rel * Math.abs(target);
      passed = Math.abs(actual - target) <= tol;
      want = `${fmt(target, kind, actual)} ± ${'abs' in cmp.within ? fmtDelta(tol, kind) : pct(cmp.within.rel)}`;
      if (!passed && Number.isFinite(actual)) {
        off = ` (off by ${fmtDelta(actual - target, kind)}${target !== 0 ? `, ${pct((actual - target) / Math.abs(target))}` : ''})`;
      }
    }
    if (!Number.isFinite(v)) passed = false;
    return {
      name: s.name, passed, actual, ...where,
      message: `${stat}${s.probe.text} ${when} is ${fmt(actual, kind, ref(cmp.value))}${atT}${off}; expected ${want}`,
    };
  }

  /** Overshoot past the final value as a fraction of the step over the window (see netlist/types.ts). */
  private overshoot(p: Extract<Plan, { kind: 'overshoot' }>, tEnd: number, end: Float64Array): { passed: boolean; actual: number; message: string } {
    const s = p.spec;
    const a = this.points[p.first], b = this.points[p.last];
    const x0 = a.seen ? a.value : Number.NaN;
    const x1 = b.seen ? b.value : b.t >= tEnd ? end[p.c] : Number.NaN;
    const hi = this.extrema[p.hi], lo = this.extrema[p.lo];
    const step = x1 - x0;
    const past = step >= 0 ? hi.best - x1 : x1 - lo.sign * lo.best;
    const at = step >= 0 ? hi.at : lo.at;
    const v = Math.max(0, past) / Math.abs(step);
    const cmp = s.compare;
    let passed = cmp.kind === 'below' ? v < cmp.value : cmp.kind === 'above' ? v > cmp.value
      : Math.abs(v - cmp.value) <= ('abs' in cmp.within ? cmp.within.abs : cmp.within.rel * Math.abs(cmp.value));
    if (!Number.isFinite(v)) passed = false;
    const want = cmp.kind === 'near' ? `${pct(cmp.value)} ± ${'abs' in cmp.within ? pct(cmp.within.abs) : pct(cmp.within.rel * cmp.value)}` : `${cmp.kind} ${pct(cmp.value)}`;
    const kind: DisplayKind = displayKindOf(s.probe.quantity);
    const shown = (x: number): string => fmtDelta(x, kind);
    const w = s.when as { over: [number, number] };
    return {
      passed, actual: v,
      message: `overshoot of ${s.probe.text} over [${time(w.over[0])}, ${time(w.over[1])}] is ${pct(v)} of its step of ${shown(step)}${v > 0 && Number.isFinite(at) ? ` (peak at t = ${time(at)})` : ''}; expected ${want}`,
    };
  }

  private settles(s: SettlesSpec, parts: SettlePart[], end: Float64Array): { passed: boolean; actual: number; message: string } {
    const ofFinal = s.relativeTo === 'final-value';
    let worst = { rel: 0, key: '', t: s.within, fin: Number.NaN, scale: Number.NaN };
    for (const part of parts) {
      const fin = end[part.c];
      // the quantity's excursion over the whole run (the final value is inside its range)
      const hiAll = this.extrema[part.hiAll];
      const loAll = this.extrema[part.loAll];
      const excursion = Math.max(hiAll.seen ? hiAll.best - fin : 0, loAll.seen ? fin + loAll.best : 0, 0);
      const scale = ofFinal ? Math.abs(fin) : bandScale(excursion, fin);
      for (const i of [part.hi, part.lo]) {
        const x = this.extrema[i];
        if (!x.seen) continue;
        const rel = Math.abs(x.sign * x.best - fin) / scale;
        if (rel > worst.rel || Number.isNaN(rel)) worst = { rel, key: part.key, t: x.at, fin, scale };
      }
    }
    const passed = worst.rel <= s.band;
    const after = `for t ≥ ${time(s.within)}`;
    if (s.probe) {
      const q = s.probe.quantity;
      const kind: DisplayKind = displayKindOf(q);
      return {
        passed, actual: worst.rel,
        message: `${s.probe.text} ${passed ? 'stays' : 'does not stay'} within ${pct(s.band)} ${ofFinal ? 'of its final value' : 'of its excursion from its final value'} ${fmt(parts[0] ? end[parts[0].c] : Number.NaN, kind)} ${after} (largest deviation ${pct(worst.rel)}${worst.key ? ` at t = ${time(worst.t)}` : ''})`,
      };
    }
    const of = ofFinal ? 'of their final values' : 'of their excursions from their final values';
    if (passed) {
      return {
        passed, actual: worst.rel,
        message: `every chamber's pressure and volume stay within ${pct(s.band)} ${of} ${after} (largest deviation ${pct(worst.rel)}${worst.key ? `, ${worst.key} at t = ${time(worst.t)}` : ''})`,
      };
    }
    const kind: DisplayKind = worst.key.endsWith('.pressure') ? 'pressure' : 'volume';
    const own = ofFinal ? 'of its final value' : `of its excursion (${fmtDelta(worst.scale, kind)})`;
    return {
      passed, actual: worst.rel,
      message: `${worst.key} is ${pct(worst.rel)} ${own} away from its final value ${fmt(worst.fin, kind)} at t = ${time(worst.t)}; expected within ${pct(s.band)} ${after}`,
    };
  }
}
