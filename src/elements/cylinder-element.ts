/**
 * A cylinder on the element contract (contract.ts): two gas nodes, `<name>.cap` and
 * `<name>.rod` (the rod side only when double-acting), and the piston's states. cylinder.ts has
 * the physics and the mode machine (stops, stick–slip); this file lays out its slots, joins
 * its sides to the node table, and declares its jacobian entries, events and observables.
 *
 * Slots: m_cap [T_cap] [m_rod [T_rod]] x v W (W: energy dissipated by friction and impacts).
 * Each side is a node whose pressure depends on its mass, temperature and the position
 * (node columns m, T, x), so the flows through lines and valves carry their dependence on x
 * into the jacobian through the node table's chain rule; the rows of the piston and the
 * temperatures are differenced locally at fixed inflows (settleJacobian), like a chamber's
 * temperature row.
 */
import type { CylinderModel } from '../model/cylinder.js';
import { display } from '../units/display.js';
import type { Assembly, Channel, Element, ElementEvent, ElementSummary, EventSink, JacobianReserve, StateSlot } from './contract.js';
import { CYLINDER_EVENTS, CylinderState } from './cylinder.js';
import { K, type Nodes } from './nodes.js';
import { summarizeCylinder, type CylinderSummary } from './cylinder-summary.js';

const SQRT_EPS = Math.sqrt(2.220446049250313e-16);

/** Local rows of the cylinder: T_cap, T_rod, x, v, W. */
const NR = 5;
/** Local columns: m_cap, T_cap, m_rod, T_rod, x, v. */
const NC = 6;

export class CylinderElement implements Element {
  readonly kind = 'cylinder';
  readonly name: string;
  readonly state: CylinderState;
  /** Node indices of the two sides (rod −1 when single-acting). */
  readonly capNode: number;
  readonly rodNode: number;
  /** Slots (−1 absent). */
  readonly mc: number;
  readonly Tc: number;
  readonly mr: number;
  readonly Tr: number;
  readonly x: number;
  readonly v: number;
  readonly W: number;
  private readonly nodes: Nodes;
  /** The evaluated point: time, position, velocity. */
  private t = 0;
  private xNow = 0;
  private vNow = 0;
  private stuckAtStart = false;
  private readonly own = new Int32Array(NR * NC).fill(-1);
  private readonly base = new Float64Array(NR);
  private readonly trial = new Float64Array(NR);
  private readonly cols = new Float64Array(NC);

  constructor(readonly c: CylinderModel, private readonly asm: Assembly) {
    this.name = c.name;
    this.state = new CylinderState(c, asm.gas, asm.pa);
    const withT = asm.model.heat !== 'isothermal';
    const s = c.geometry.stroke;
    const slots: StateSlot[] = [{ name: 'm_cap', unit: 'kg', scale: 'mass', mass: 'held' }];
    if (withT) slots.push({ name: 'T_cap', unit: 'K', scale: 300 });
    if (c.rod) {
      slots.push({ name: 'm_rod', unit: 'kg', scale: 'mass', mass: 'held' });
      if (withT) slots.push({ name: 'T_rod', unit: 'K', scale: 300 });
    }
    // position to 1e-3 of the stroke per unit rtol; velocity as if a stroke took a second
    slots.push({ name: 'x', unit: 'm', scale: s * 1e-3 }, { name: 'v', unit: 'm/s', scale: s * 1e-3 },
      { name: 'W', unit: 'J', scale: asm.pa * c.geometry.capArea * s * 1e-3 });
    let k = asm.slots(slots);
    this.mc = k++;
    this.Tc = withT ? k++ : -1;
    this.mr = c.rod ? k++ : -1;
    this.Tr = c.rod && withT ? k++ : -1;
    this.x = k++;
    this.v = k++;
    this.W = k++;
    this.nodes = asm.nodes;
    this.capNode = asm.nodes.add(`${c.name}.cap`);
    this.rodNode = c.rod ? asm.nodes.add(`${c.name}.rod`) : -1;
  }

  expose(): void {
    this.nodes.expose(this.capNode, [this.mc, this.Tc, -1], [this.mc, this.Tc, this.x]);
    if (this.rodNode >= 0) this.nodes.expose(this.rodNode, [this.mr, this.Tr, -1], [this.mr, this.Tr, this.x]);
  }

  initial(y: Float64Array): void {
    const c = this.c;
    y[this.mc] = c.cap.m0;
    if (this.Tc >= 0) y[this.Tc] = c.cap.T0;
    if (c.rod) {
      y[this.mr] = c.rod.m0;
      if (this.Tr >= 0) y[this.Tr] = c.rod.T0;
    }
    y[this.x] = c.x0;
  }

  private temps(y: Float64Array): [number, number] {
    const c = this.c;
    return [this.Tc >= 0 ? y[this.Tc] : c.cap.T0, c.rod ? (this.Tr >= 0 ? y[this.Tr] : c.rod.T0) : this.asm.Ta];
  }

  evaluate(t: number, y: Float64Array): void {
    const [Tc, Tr] = this.temps(y);
    const st = this.state;
    this.t = t;
    this.xNow = y[this.x];
    this.vNow = y[this.v];
    st.evaluate(t, y[this.mc], Tc, this.mr >= 0 ? y[this.mr] : 0, Tr, this.xNow, this.vNow);
    const n = this.nodes;
    n.p[this.capNode] = st.pc; n.T[this.capNode] = Tc; n.V[this.capNode] = st.Vc;
    if (this.rodNode >= 0) { n.p[this.rodNode] = st.pr; n.T[this.rodNode] = Tr; n.V[this.rodNode] = st.Vr; }
    if (!(st.pc > 0 && st.pr > 0) && n.fault === null) n.fault = this.name;
  }

  load(dydt: Float64Array): void {
    const st = this.state;
    dydt[this.x] = st.dx;
    dydt[this.v] = st.dv;
    dydt[this.W] = st.dissipation;
  }

  settle(y: Float64Array, dydt: Float64Array): void {
    const n = this.nodes, st = this.state, Ta = this.asm.Ta;
    if (this.Tc >= 0) { const i = this.capNode; dydt[this.Tc] = st.temperatureRate('cap', y[this.mc], n.T[i], n.mIn[i], n.mOut[i], n.hIn[i], Ta); }
    if (this.Tr >= 0) { const i = this.rodNode; dydt[this.Tr] = st.temperatureRate('rod', y[this.mr], n.T[i], n.mIn[i], n.mOut[i], n.hIn[i], Ta); }
  }

  breakpoints(): number[] {
    return this.c.force?.breakpoints ?? [];
  }

  timeInvariant(): boolean {
    return !this.c.force || this.c.force.constant;
  }

  /** The piston's mode as a number, part of the evaluation memo's key. */
  mode(): number {
    return this.state.stop * 3 + this.state.slide;
  }

  // ---- jacobian ---------------------------------------------------------------------------

  private rowSlots(): number[] { return [this.Tc, this.Tr, this.x, this.v, this.W]; }
  private colSlots(): number[] { return [this.mc, this.Tc, this.mr, this.Tr, this.x, this.v]; }

  reserveJacobian(r: JacobianReserve): void {
    const rows = this.rowSlots(), cols = this.colSlots();
    for (let a = 0; a < NR; a++) {
      if (rows[a] < 0) continue;
      for (let b = 0; b < NC; b++) if (cols[b] >= 0) this.own[a * NC + b] = r.entry(rows[a], cols[b]);
    }
  }

  /** Each side's pressure partials (m, T, x) and its energy-row weights, into the node table. */
  prepareJacobian(y: Float64Array): void {
    const n = this.nodes, R = this.asm.gas.R, { cv, cp } = this.asm.gas, g = this.c.geometry;
    const side = (node: number, mSlot: number, V: number, dVdx: number): void => {
      const m = y[mSlot], T = n.T[node], p = n.p[node];
      n.dp[node * K] = (R * T) / V;
      n.dp[node * K + 1] = (m * R) / V;
      n.dp[node * K + 2] = (-p * dVdx) / V;
      const D = m * cv;
      n.cM[node] = 0;
      n.cIn[node] = (-cv * T) / D;
      n.cOut[node] = (-R * T) / D;
      n.cH[node] = cp / D;
    };
    side(this.capNode, this.mc, this.state.Vc, g.capArea);
    if (this.rodNode >= 0) side(this.rodNode, this.mr, this.state.Vr, -g.annulusArea);
  }

  /** The piston's and the temperatures' rows at fixed inflows, by differences of this element alone. */
  private local(y: Float64Array, out: Float64Array): void {
    const st = this.state, n = this.nodes, Ta = this.asm.Ta;
    const c = this.cols;
    st.evaluate(this.t, c[0], c[1], c[2], c[3], c[4], c[5]);
    out[0] = this.Tc >= 0 ? st.temperatureRate('cap', c[0], c[1], n.mIn[this.capNode], n.mOut[this.capNode], n.hIn[this.capNode], Ta) : 0;
    out[1] = this.Tr >= 0 ? st.temperatureRate('rod', c[2], c[3], n.mIn[this.rodNode], n.mOut[this.rodNode], n.hIn[this.rodNode], Ta) : 0;
    out[2] = st.dx;
    out[3] = st.dv;
    out[4] = st.dissipation;
    void y;
  }

  settleJacobian(y: Float64Array, _f: Float64Array, values: Float64Array): void {
    const c = this.cols, slots = this.colSlots(), tol = this.asm.tolerances;
    const [Tc, Tr] = this.temps(y);
    const at = [y[this.mc], Tc, this.mr >= 0 ? y[this.mr] : 0, Tr, y[this.x], y[this.v]];
    for (let b = 0; b < NC; b++) c[b] = at[b];
    this.local(y, this.base);
    for (let b = 0; b < NC; b++) {
      if (slots[b] < 0) continue;
      const scale = Math.max(Math.abs(at[b]), tol.atol[slots[b]] / tol.rtol);
      const h = (at[b] + SQRT_EPS * scale) - at[b];
      c[b] = at[b] + h;
      this.local(y, this.trial);
      c[b] = at[b];
      for (let a = 0; a < NR; a++) {
        const pos = this.own[a * NC + b];
        if (pos >= 0) values[pos] += (this.trial[a] - this.base[a]) / h;
      }
    }
    // leave the state as evaluated at (t, y): the system's memo still stands for this point
    this.state.evaluate(this.t, at[0], at[1], at[2], at[3], at[4], at[5]);
  }

  // ---- events -----------------------------------------------------------------------------

  events(): ElementEvent[] {
    const st = this.state;
    return CYLINDER_EVENTS.map((kind, i) => ({
      kind: 'cylinder',
      element: this.name,
      value: () => st.eventValue(kind, this.xNow, this.vNow),
      direction: () => CylinderState.direction(kind),
      fire: (t: number, _rising: boolean, log: EventSink, y?: Float64Array): boolean => {
        if (!y) throw new Error('a cylinder event needs the state to change it');
        const s = { x: y[this.x], v: y[this.v], W: y[this.W] };
        const what = st.fire(kind, t, s);
        y[this.x] = s.x; y[this.v] = s.v; y[this.W] = s.W;
        if (what) log.push({ t, what, kind: 'cylinder', element: this.name });
        return true;
      },
      // the first event settles the piston's mode at the start (once per run)
      ...(i === 0 ? {
        settle: (t: number, log: EventSink): void => {
          st.settle(t, this.xNow);
          this.stuckAtStart = st.stop === 0 && !st.moving;
          if (st.moving) log.push({ t, what: `cylinder ${this.name} starts to move at once, ${st.slide > 0 ? 'extending' : 'retracting'}`, kind: 'cylinder', element: this.name });
        },
      } : {}),
    }));
  }

  // ---- observables ------------------------------------------------------------------------

  private sides(): ('cap' | 'rod')[] {
    return this.c.rod ? ['cap', 'rod'] : ['cap'];
  }

  channels(): Channel[] {
    const n = this.name;
    const ch: Channel[] = [{ key: `${n}.position`, unit: 'm' }, { key: `${n}.velocity`, unit: 'm/s' },
      { key: `${n}.stroke-time`, unit: 's' }, { key: `${n}.impact-velocity`, unit: 'm/s' }, { key: `${n}.dissipated`, unit: 'J' }];
    for (const side of this.sides()) {
      ch.push({ key: `${n}.${side}.pressure`, unit: 'Pa' }, { key: `${n}.${side}.gauge`, unit: 'Pa' },
        { key: `${n}.${side}.volume`, unit: 'm^3' }, { key: `${n}.${side}.mass`, unit: 'kg' }, { key: `${n}.${side}.temperature`, unit: 'K' });
    }
    return ch;
  }

  observe(y: Float64Array, out: Float64Array, k: number): number {
    const last = this.state.lastStroke();
    out[k++] = y[this.x];
    out[k++] = y[this.v];
    out[k++] = last.time;
    out[k++] = last.impact;
    out[k++] = y[this.W];
    const n = this.nodes, pa = this.asm.pa;
    for (const [node, m] of [[this.capNode, this.mc], [this.rodNode, this.mr]]) {
      if (node < 0) continue;
      out[k++] = n.p[node]; out[k++] = n.p[node] - pa; out[k++] = n.V[node]; out[k++] = y[m]; out[k++] = n.T[node];
    }
    return k;
  }

  summaries(column: (key: string) => number): ElementSummary[] {
    const name = this.name, pa = this.asm.pa;
    const vel = column(`${name}.velocity`);
    const peak = { velocity: 0, at: 0 };
    const out: ElementSummary[] = [{
      section: 'cylinders', name,
      track: (t, row) => {
        const v = row[vel];
        if (Math.abs(v) > Math.abs(peak.velocity)) { peak.velocity = v; peak.at = t; }
      },
      result: (end) => summarizeCylinder(this.state, {
        stuckAtStart: this.stuckAtStart, tEnd: this.t,
        final: { position: end[column(`${name}.position`)], velocity: end[vel], dissipated: end[column(`${name}.dissipated`)] },
        peak: { ...peak },
      }) as unknown as Record<string, unknown>,
      row: (r) => {
        const s = r as unknown as CylinderSummary;
        const speed = (v: number): string => display(Math.abs(v), 'velocity');
        return [
          ['start', display(s.start.position, 'position')], ['end', display(s.final.position, 'position')],
          ['peak speed', speed(s.peak.velocity)], ['at', display(s.peak.at, 'time')],
          ['stroke time', s.stroke_time === null ? '-' : display(s.stroke_time, 'time')],
          ['impacts', s.impacts.length ? s.impacts.map((i) => `${speed(i.velocity)} ${i.stop === 'full' ? 'out' : 'in'}`).join(', ') : '-'],
          ['time stuck', display(s.time_stuck, 'time')],
        ];
      },
    }];
    // each side is summarised like a chamber (JSON `chambers.<name>.cap`)
    for (const side of this.sides()) {
      const key = `${name}.${side}`;
      const col = (q: string): number => column(`${key}.${q}`);
      const gauge = col('gauge');
      const pk = { max: -Infinity, tMax: 0, min: Infinity, tMin: 0 };
      out.push({
        section: 'chambers', name: key,
        track: (t, row) => {
          const g = row[gauge];
          if (g > pk.max) { pk.max = g; pk.tMax = t; }
          if (g < pk.min) { pk.min = g; pk.tMin = t; }
        },
        result: (end) => ({
          final: { pressure: end[col('pressure')], gauge: end[gauge], volume: end[col('volume')], mass: end[col('mass')], temperature: end[col('temperature')] },
          peak: { gauge: pk.max, at: pk.tMax }, least: { gauge: pk.min, at: pk.tMin },
        }),
        warnings: () => (pk.min + pa < 0.05 * pa ? [`${key} fell to ${display(pk.min + pa, 'pressure')}, near vacuum`] : []),
      });
    }
    return out;
  }

}
