/**
 * Model → System: the state layout, the right-hand side, events and observables.
 *
 * State vector: for each chamber its gas mass m (kg) [+ temperature T (K) when heat is not
 * isothermal] [+ hysteresis blend h for a measured wall with two curves]; then one "boundary
 * store" per reservoir and per feed: the mass that boundary has given to the network, with a
 * minus sign. Every flow enters through `transfer`, which subtracts at one slot and adds the
 * same number at another, so the sum of all mass slots is an exact invariant of the rhs:
 * mass is conserved by construction, and the integrators (linear-invariant preserving)
 * conserve it to round-off.
 *
 * Performance: nothing allocates in `evaluate` or `rhs`; `evaluate` remembers its last (t, y)
 * and the valve modes, so the rhs, event functions and observers at the same point share one
 * set of chamber solves; the jacobian is assembled element by element into a pattern reserved
 * here (jacobian.ts), so the stiff integrator can use sparse LU on large networks.
 */
import type { Gas } from '../physics/gas.js';
import type { EventfulProblem } from '../solve/driver.js';
import type { Model, NodeRef } from '../model/types.js';
import { ChamberState } from '../elements/chamber.js';
import { BranchState, type BranchFlow } from '../elements/branch.js';
import { makeSchedule, type Schedule } from '../model/schedule.js';
import { curveFlow, regulatorPosition } from '../physics/regulator.js';
import { ControllerState } from '../elements/controller.js';
import { patternFromEntries } from '../linalg/sparse-pattern.js';
import type { SparsePattern } from '../linalg/sparse-pattern.js';
import { NetworkJacobian } from './jacobian.js';

export interface SystemEvent {
  kind: 'relief' | 'check' | 'extremum' | 'limit-pressure' | 'limit-stretch' | 'saturation' | 'regulator';
  /** For saturation events: which limit; for regulator events: lock-up (`low`: shut at set) or full opening (`high`). */
  limit?: 'high' | 'low';
  element: string;
  index: number;        // chamber or branch index
  direction: number;    // +1, −1, 0
  /** For extremum events: which extremum. */
  extremum?: { V: number; p: number; kind: 'max' | 'min' };
  /** For check events: +1 after the valve last opened, −1 after it last closed (see CHECK_DEADBAND). */
  side?: number;
}

/**
 * Dead band of a check valve's event, relative to the mean of its end pressures. Its flow is
 * continuous (the cracking pressure acts as a drop while open), so the event only restarts the
 * integrator at the kink; between two chambers at the same pressure the pressure difference is
 * round-off that changes sign from one evaluation to the next, and without a dead band the
 * valve "opened and closed" at every step until a budget stopped the run (found by the fuzzer:
 * a zero-cracking check valve between two chambers starting at ambient). An opening is
 * registered once the difference exceeds the cracking pressure by this band (1e-7 of 100 kPa is
 * 0.01 Pa), a closing when it falls to the cracking pressure: after a closing, round-off cannot
 * reopen the valve.
 */
const CHECK_DEADBAND = 1e-7;

export interface LoggedEvent { t: number; what: string; kind: string; element: string }

export interface Channel { key: string; unit: string }

export class NetworkSystem implements EventfulProblem {
  readonly n: number;
  rtol: number;
  atol: Float64Array;
  readonly gas: Gas;
  readonly pa: number;
  readonly Ta: number;
  readonly isothermal: boolean;
  readonly nc: number;
  readonly chambers: ChamberState[];
  readonly branches: BranchState[];
  readonly feeds: { schedule: Schedule; rate: number; T: number; into: number; name: string; curve?: { p: Float64Array; q: Float64Array } }[];
  // layout
  readonly mIdx: Int32Array;
  readonly TIdx: Int32Array;
  readonly hIdx: Int32Array;
  readonly resIdx: Int32Array;
  readonly feedIdx: Int32Array;
  /** Controllers (their I and yf slots inside), and each lagged regulator's position slot by branch (−1: none). */
  readonly controllers: ControllerState[];
  readonly zIdx: Int32Array;
  /** Branches a controller drives (evaluated after the controllers). */
  private readonly driven: Uint8Array;
  /** True when controllers or regulator lags hold states (the element jacobian does not cover them yet). */
  readonly controlStates: boolean;
  // per-node scratch (chambers first, then reservoirs)
  readonly p: Float64Array;
  readonly T: Float64Array;
  readonly V: Float64Array;
  readonly kappa: Float64Array;
  readonly mIn: Float64Array;
  readonly mOut: Float64Array;
  readonly hIn: Float64Array;
  readonly flows: BranchFlow[];
  readonly feedFlow: Float64Array;
  readonly breakpoints: number[];
  readonly events: SystemEvent[];
  readonly log: LoggedEvent[] = [];
  /** The first element whose state left its law's range during the last evaluation. */
  fault: string | null = null;
  private readonly solved = { p: 0, V: 0, kappa: 0 };
  /** True when some chamber has a temperature or hysteresis state (rows beyond the mass balance). */
  private readonly energyRows: boolean;
  /** Memo of `evaluate`: the (t, y) and relief-valve modes it last ran for. */
  private memoValid = false;
  private memoT = 0;
  private readonly memoY: Float64Array;
  private readonly reliefIdx: number[] = [];
  private readonly memoOpen: Uint8Array;
  /** Element-wise jacobian, built on first use. */
  private jac: NetworkJacobian | null = null;

  constructor(readonly model: Model) {
    const nc = model.chambers.length;
    this.nc = nc;
    this.gas = model.gas;
    this.pa = model.pa;
    this.Ta = model.Ta;
    this.isothermal = model.heat === 'isothermal';
    this.chambers = model.chambers.map((c) => new ChamberState(c, model.gas, model.pa));
    this.branches = model.branches.map((b) => new BranchState(b, model.gas, model.pa));
    this.feeds = model.feeds.map((f) => ({ schedule: makeSchedule(f.initially, f.steps), rate: f.rate, T: f.T, into: f.into, name: f.name, curve: f.curve }));
    for (const c of model.controllers) this.branches[c.valve].command = c.spec.initially;
    let k = 0;
    this.mIdx = new Int32Array(nc);
    this.TIdx = new Int32Array(nc).fill(-1);
    this.hIdx = new Int32Array(nc).fill(-1);
    for (let i = 0; i < nc; i++) {
      this.mIdx[i] = k++;
      if (!this.isothermal) this.TIdx[i] = k++;
      if (model.chambers[i].deflation) this.hIdx[i] = k++;
    }
    this.resIdx = new Int32Array(model.reservoirs.length);
    for (let r = 0; r < model.reservoirs.length; r++) this.resIdx[r] = k++;
    this.feedIdx = new Int32Array(model.feeds.length);
    for (let f = 0; f < model.feeds.length; f++) this.feedIdx[f] = k++;
    const plain = k;
    this.controllers = model.controllers.map((c) => new ControllerState(c));
    for (const c of this.controllers) {
      if (c.slots >= 1) c.iIdx = k++;
      if (c.slots >= 2) c.fIdx = k++;
    }
    this.zIdx = new Int32Array(model.branches.length).fill(-1);
    model.branches.forEach((b, i) => {
      const op = b.valve?.operation;
      if (op?.kind === 'regulator' && op.timeConstant > 0 && !b.vent) this.zIdx[i] = k++;
    });
    model.branches.forEach((b, i) => { if (b.vent && this.zIdx[b.vent.of] >= 0) this.zIdx[i] = this.zIdx[b.vent.of]; });
    this.driven = new Uint8Array(model.branches.length);
    for (const c of model.controllers) this.driven[c.valve] = 1;
    this.controlStates = k > plain;
    this.n = k;
    const nn = nc + model.reservoirs.length;
    this.p = new Float64Array(nn);
    this.T = new Float64Array(nn);
    this.V = new Float64Array(nc);
    this.kappa = new Float64Array(nc);
    this.mIn = new Float64Array(nc);
    this.mOut = new Float64Array(nc);
    this.hIn = new Float64Array(nc);
    this.flows = model.branches.map(() => ({ mdot: 0, reynolds: 0, choked: false, regime: 'laminar' as const }));
    this.feedFlow = new Float64Array(model.feeds.length);
    this.energyRows = !this.isothermal || model.chambers.some((c) => c.deflation !== undefined);
    this.memoY = new Float64Array(this.n);
    model.branches.forEach((b, i) => { if (b.valve?.operation.kind === 'relief') this.reliefIdx.push(i); });
    this.memoOpen = new Uint8Array(this.reliefIdx.length);

    // tolerances: masses relative to the largest chamber mass, temperatures in K
    this.rtol = model.simulate.tolerance;
    const mScale = Math.max(...model.chambers.map((c) => c.m0), 1e-12);
    this.atol = new Float64Array(this.n).fill(this.rtol * mScale * 1e-3);
    for (let i = 0; i < nc; i++) {
      if (this.TIdx[i] >= 0) this.atol[this.TIdx[i]] = this.rtol * 300;
      if (this.hIdx[i] >= 0) this.atol[this.hIdx[i]] = this.rtol;
    }
    // openings (I, z) are fractions; a filtered measure is on the scale of its target
    for (const c of this.controllers) {
      if (c.iIdx >= 0) this.atol[c.iIdx] = this.rtol * 1e-3;
      if (c.fIdx >= 0) this.atol[c.fIdx] = this.rtol * 1e-3 * Math.max(Math.abs(c.c.spec.target.at(0)), 1e-12);
    }
    for (const z of this.zIdx) if (z >= 0) this.atol[z] = this.rtol * 1e-3;
    if (this.controlStates) {
      // the element-wise jacobian covers masses and temperatures; with control states the
      // solver differences the whole rhs (these networks are small)
      Object.defineProperty(this, 'jacobianSparse', { value: undefined });
    }

    const bps = new Set<number>();
    for (const b of this.branches) b.schedule?.breakpoints.forEach((t) => bps.add(t));
    for (const f of this.feeds) f.schedule.breakpoints.forEach((t) => bps.add(t));
    for (const r of model.reservoirs) r.pressure.breakpoints.forEach((t) => bps.add(t));
    for (const c of this.controllers) {
      c.c.spec.target.breakpoints.forEach((t) => bps.add(t));
      c.sampleTimes(model.simulate.duration).forEach((t) => bps.add(t));
    }
    this.breakpoints = [...bps].sort((a, b) => a - b);

    this.events = [];
    model.branches.forEach((b, i) => {
      const op = b.valve?.operation;
      if (op?.kind === 'relief') this.events.push({ kind: 'relief', element: b.name, index: i, direction: 0 });
      if (op?.kind === 'check') this.events.push({ kind: 'check', element: b.name, index: i, direction: 0, side: -1 });
    });
    model.chambers.forEach((c, i) => {
      for (const e of c.wall.extrema) this.events.push({ kind: 'extremum', element: c.name, index: i, direction: 0, extremum: e });
      if (c.limits.pressure !== undefined) this.events.push({ kind: 'limit-pressure', element: c.name, index: i, direction: 1 });
      if (c.limits.stretch !== undefined && c.wall.sphere) this.events.push({ kind: 'limit-stretch', element: c.name, index: i, direction: 1 });
    });
    this.controllers.forEach((c, i) => {
      if (!c.continuous) return;
      this.events.push({ kind: 'saturation', element: c.c.name, index: i, direction: 0, limit: 'high' }, { kind: 'saturation', element: c.c.name, index: i, direction: 0, limit: 'low' });
    });
    model.branches.forEach((b, i) => {
      if (b.valve?.operation.kind !== 'regulator' || b.vent) return;
      this.events.push({ kind: 'regulator', element: b.name, index: i, direction: 0, limit: 'low' }, { kind: 'regulator', element: b.name, index: i, direction: 0, limit: 'high' });
    });
  }

  get nEvents(): number { return this.events.length; }

  initialState(): Float64Array {
    const y = new Float64Array(this.n);
    this.model.chambers.forEach((c, i) => {
      y[this.mIdx[i]] = c.m0;
      if (this.TIdx[i] >= 0) y[this.TIdx[i]] = c.T0;
      if (this.hIdx[i] >= 0) y[this.hIdx[i]] = 1;
    });
    if (this.controllers.length || this.zIdx.some((z) => z >= 0)) {
      // start states that depend on the network's start: a regulator's position follows its
      // law, a controller its integral at `initially`
      this.model.branches.forEach((b, i) => {
        const op = b.valve?.operation;
        if (this.zIdx[i] < 0 || b.vent || op?.kind !== 'regulator') return;
        this.evaluate(0, y);
        y[this.zIdx[i]] = regulatorPosition(this.p[this.nodeIndex(b.to)] - this.pa, op.set, op.band, op.relieving);
      });
      this.invalidate();
      this.evaluate(0, y);
      for (const c of this.controllers) c.start(this.measure(c, y), y);
      this.invalidate();
    }
    return y;
  }

  /** The value a controller measures (SI; pressures absolute), from the last evaluation. */
  private measure(c: ControllerState, y: Float64Array): number {
    const m = c.c.measure;
    if (m.kind === 'branch') return m.quantity === 'reynolds' ? this.flows[m.index].reynolds : this.flows[m.index].mdot;
    const i = m.index;
    switch (m.quantity) {
      case 'volume': return this.V[i];
      case 'mass': return y[this.mIdx[i]];
      case 'temperature': return this.T[i];
      case 'stretch': return this.model.chambers[i].wall.stretch(this.V[i]);
      default: return this.p[i];
    }
  }

  /** Slot of a node's mass: a chamber's m, or a reservoir's boundary store. */
  private slot(n: NodeRef): number {
    return n.kind === 'chamber' ? this.mIdx[n.index] : this.resIdx[n.index];
  }

  private nodeIndex(n: NodeRef): number {
    return n.kind === 'chamber' ? n.index : this.nc + n.index;
  }

  /**
   * Fills node pressures, temperatures, volumes and all flows for (t, y). Shared by the rhs,
   * events and observers so that they all see the same numbers.
   */
  evaluate(t: number, y: Float64Array): void {
    if (this.memoHit(t, y)) return;
    const nc = this.nc;
    this.fault = null;
    for (let i = 0; i < nc; i++) {
      const T = this.TIdx[i] >= 0 ? y[this.TIdx[i]] : this.model.chambers[i].T0;
      const h = this.hIdx[i] >= 0 ? y[this.hIdx[i]] : 1;
      this.chambers[i].solve(y[this.mIdx[i]], T, h, this.solved);
      this.p[i] = this.solved.p;
      this.V[i] = this.solved.V;
      this.kappa[i] = this.solved.kappa;
      this.T[i] = T;
      if (!(this.solved.p >= 0) && this.fault === null) this.fault = this.model.chambers[i].name;
    }
    const res = this.model.reservoirs;
    for (let r = 0; r < res.length; r++) {
      this.p[nc + r] = res[r].pressure.at(t);
      this.T[nc + r] = res[r].T;
    }
    for (let b = 0; b < this.branches.length; b++) {
      if (this.zIdx[b] >= 0) this.branches[b].position = y[this.zIdx[b]];
      if (this.driven[b] === 0) this.branchFlow(t, b);
    }
    if (this.controllers.length) {
      // controllers measure chambers and undriven branches (the reader refuses the loop of a
      // controller measuring a driven valve), then set the openings of their valves
      for (const c of this.controllers) this.branches[c.c.valve].command = c.output(t, this.measure(c, y), y);
      for (const c of this.controllers) this.branchFlow(t, c.c.valve);
    }
    for (let f = 0; f < this.feeds.length; f++) {
      const fd = this.feeds[f];
      const base = fd.curve ? curveFlow(this.p[fd.into], fd.curve.p, fd.curve.q) : fd.rate;
      this.feedFlow[f] = base * fd.schedule.at(t);
    }
    this.memoT = t;
    this.memoY.set(y);
    for (let k = 0; k < this.reliefIdx.length; k++) this.memoOpen[k] = this.branches[this.reliefIdx[k]].open ? 1 : 0;
    this.memoValid = true;
  }

  private branchFlow(t: number, b: number): void {
    const bm = this.model.branches[b];
    const i = this.nodeIndex(bm.from);
    const j = this.nodeIndex(bm.to);
    this.branches[b].flow(t, this.p[i], this.p[j], this.T[i], this.T[j], this.flows[b]);
  }

  /** Whether the scratch already holds `evaluate(t, y)` (same t, same y, same valve modes). */
  private memoHit(t: number, y: Float64Array): boolean {
    if (!this.memoValid || t !== this.memoT) return false;
    const m = this.memoY;
    for (let k = 0; k < m.length; k++) if (y[k] !== m[k]) return false;
    for (let k = 0; k < this.reliefIdx.length; k++) if ((this.branches[this.reliefIdx[k]].open ? 1 : 0) !== this.memoOpen[k]) return false;
    return true;
  }

  /** Forgets the memo of `evaluate` (after anything that changes the rhs other than t and y). */
  invalidate(): void {
    this.memoValid = false;
  }

  /** The one way flows enter the balance: q (kg/s) leaves slot `a` and enters slot `b`. */
  private transfer(dydt: Float64Array, a: number, ca: number, b: number, cb: number, q: number, Tup: number): void {
    dydt[a] -= q;
    dydt[b] += q;
    // energy bookkeeping for chambers (ca, cb: chamber index or −1)
    if (q >= 0) {
      if (ca >= 0) this.mOut[ca] += q;
      if (cb >= 0) { this.mIn[cb] += q; this.hIn[cb] += q * Tup; }
    } else {
      if (cb >= 0) this.mOut[cb] -= q;
      if (ca >= 0) { this.mIn[ca] -= q; this.hIn[ca] -= q * Tup; }
    }
  }

  rhs(t: number, y: Float64Array, dydt: Float64Array): void {
    this.evaluate(t, y);
    dydt.fill(0);
    this.mIn.fill(0);
    this.mOut.fill(0);
    this.hIn.fill(0);
    const nc = this.nc;
    for (let b = 0; b < this.branches.length; b++) {
      const bm = this.model.branches[b];
      const q = this.flows[b].mdot;
      const i = this.nodeIndex(bm.from);
      const j = this.nodeIndex(bm.to);
      const Tup = q >= 0 ? this.T[i] : this.T[j];
      this.transfer(dydt, this.slot(bm.from), i < nc ? i : -1, this.slot(bm.to), j < nc ? j : -1, q, Tup);
    }
    for (let f = 0; f < this.feeds.length; f++) {
      const fd = this.feeds[f];
      this.transfer(dydt, this.feedIdx[f], -1, this.mIdx[fd.into], fd.into, this.feedFlow[f], fd.T);
    }
    for (const c of this.controllers) c.rates(y, dydt);
    for (let b = 0; b < this.zIdx.length; b++) {
      const z = this.zIdx[b];
      if (z < 0 || this.model.branches[b].vent) continue;
      const op = this.model.branches[b].valve!.operation as { set: number; band: number; relieving: boolean; timeConstant: number };
      const target = regulatorPosition(this.p[this.nodeIndex(this.model.branches[b].to)] - this.pa, op.set, op.band, op.relieving);
      dydt[z] = (target - y[z]) / op.timeConstant;
    }
    if (this.energyRows) {
      for (let i = 0; i < nc; i++) {
        const mdot = dydt[this.mIdx[i]];
        if (this.TIdx[i] >= 0) {
          dydt[this.TIdx[i]] = this.temperatureRate(i, y[this.mIdx[i]], this.T[i], this.p[i], this.kappa[i], mdot);
        }
        if (this.hIdx[i] >= 0) {
          const h = y[this.hIdx[i]];
          const target = mdot > 0 ? 1 : 0;
          dydt[this.hIdx[i]] = (Math.abs(mdot) / this.chambers[i].dmHyst) * (target - h);
        }
      }
    }
  }

  /**
   * Ṫ (K/s) of chamber i at mass m, temperature T, pressure p and κ, given its net inflow mdot
   * and the direction-split inflows of the last rhs (mIn, mOut, hIn): the energy equation of
   * elements/chamber.ts.
   */
  temperatureRate(i: number, m: number, T: number, p: number, kap: number, mdot: number): number {
    const { R, cv, cp } = this.gas;
    const c = this.model.chambers[i];
    const A = cp * this.hIn[i] - cv * T * this.mIn[i] - R * T * this.mOut[i] + c.heatTransfer * (this.Ta - T);
    return (A - p * kap * R * T * mdot) / (m * cv + p * kap * m * R);
  }

  /** ∂q/∂p (kg/(s·Pa)) of feed f at the last evaluation, into out[0] (0 without a curve). */
  feedSlope(f: number, t: number, out: Float64Array): void {
    const fd = this.feeds[f];
    if (!fd.curve) { out[0] = 0; return; }
    curveFlow(this.p[fd.into], fd.curve.p, fd.curve.q, out);
    out[0] *= fd.schedule.at(t);
  }

  // ---- jacobian -----------------------------------------------------------------------

  /** Where ∂f/∂y may be nonzero (see jacobian.ts); reserved on first use. */
  get jacobianPattern(): SparsePattern {
    if (this.controlStates) return (this.densePattern ??= denseEntries(this.n));
    this.jac ??= new NetworkJacobian(this);
    return this.jac.pattern;
  }

  private densePattern: SparsePattern | null = null;

  /** ∂f/∂y at (t, y) in the order of `jacobianPattern`. */
  jacobianSparse(t: number, y: Float64Array, values: Float64Array): void {
    this.jac ??= new NetworkJacobian(this);
    this.jac.compute(t, y, values);
  }

  /**
   * True when nothing in the rhs depends on t explicitly over [t0, t1]: no valve or feed ramp
   * under way and every reservoir pressure constant. Then ∂f/∂t = 0 needs no differencing.
   */
  timeInvariant(t0: number, t1: number): boolean {
    for (const r of this.model.reservoirs) if (!r.pressure.constant) return false;
    const still = (s: Schedule | null): boolean => {
      if (!s) return true;
      for (const r of s.ramps) {
        // a ramp changes the value on [r.t0, r.t1] (a step, r.t0 = r.t1, at that instant)
        if (r.t0 < t1 && r.t1 > t0) return false;
        if (r.t0 === r.t1 && r.t0 > t0 && r.t0 < t1) return false;
      }
      return true;
    };
    for (const b of this.branches) if (!still(b.schedule)) return false;
    for (const f of this.feeds) if (!still(f.schedule)) return false;
    return true;
  }

  // ---- events -------------------------------------------------------------------------

  eventValues(t: number, y: Float64Array, out: Float64Array): void {
    this.evaluate(t, y);
    for (let k = 0; k < this.events.length; k++) {
      const e = this.events[k];
      switch (e.kind) {
        case 'relief': {
          const bm = this.model.branches[e.index];
          const op = bm.valve!.operation as { opensAbove: number; reseatsBelow: number };
          const g = this.p[this.nodeIndex(bm.from)] - this.pa;
          out[k] = this.branches[e.index].open ? g - op.reseatsBelow : g - op.opensAbove;
          break;
        }
        case 'check': {
          const bm = this.model.branches[e.index];
          const g = this.checkMargin(e.index);
          const pMean = 0.5 * (Math.abs(this.p[this.nodeIndex(bm.from)]) + Math.abs(this.p[this.nodeIndex(bm.to)]));
          out[k] = (e.side ?? -1) > 0 ? g : g - CHECK_DEADBAND * pMean;
          break;
        }
        case 'extremum':
          out[k] = this.V[e.index] - e.extremum!.V;
          break;
        case 'limit-pressure':
          out[k] = this.p[e.index] - (this.model.chambers[e.index].limits.pressure as number);
          break;
        case 'limit-stretch':
          out[k] = this.chambers[e.index].c.wall.stretch(this.V[e.index]) - (this.model.chambers[e.index].limits.stretch as number);
          break;
        case 'saturation':
          out[k] = this.controllers[e.index].eventValue(e.limit as 'high' | 'low');
          break;
        case 'regulator': {
          const bm = this.model.branches[e.index];
          const op = bm.valve!.operation as { set: number; band: number };
          const pg = this.p[this.nodeIndex(bm.to)] - this.pa;
          out[k] = e.limit === 'low' ? pg - op.set : pg - (op.set - op.band);
          break;
        }
      }
    }
  }

  eventDirection(k: number): number {
    const e = this.events[k];
    if (e.kind === 'relief') return this.branches[e.index].open ? -1 : 1;
    if (e.kind === 'saturation') return this.controllers[e.index].eventDirection(e.limit as 'high' | 'low');
    return e.direction;
  }

  fireEvent(k: number, t: number, _y: Float64Array, rising: boolean): boolean {
    const e = this.events[k];
    this.invalidate();
    const note = (what: string): void => { this.log.push({ t, what, kind: e.kind, element: e.element }); };
    switch (e.kind) {
      case 'relief': {
        const b = this.branches[e.index];
        b.open = !b.open;
        note(`relief valve ${e.element} ${b.open ? 'opens' : 'reseats'}`);
        return true;
      }
      case 'check':
        e.side = rising ? 1 : -1;
        note(`check valve ${e.element} ${rising ? 'opens' : 'closes'}`);
        return true;
      case 'extremum': {
        const x = e.extremum!;
        const word = x.kind === 'max' ? 'maximum' : 'minimum';
        const where = `${(x.p / 1000).toPrecision(4)} kPa gauge`;
        note(rising
          ? `${e.element} passes its pressure ${word} (${where})${x.kind === 'max' ? ': past it the chamber gets easier to inflate' : ''}`
          : `${e.element} shrinks back through its pressure ${word} (${where})`);
        return false;
      }
      case 'limit-pressure':
        note(`${e.element} exceeds its pressure limit of ${((this.model.chambers[e.index].limits.pressure! - this.pa) / 1000).toPrecision(4)} kPa gauge`);
        return false;
      case 'limit-stretch':
        note(`${e.element} exceeds its stretch limit of ${this.model.chambers[e.index].limits.stretch}`);
        return false;
      case 'saturation': {
        const c = this.controllers[e.index];
        const at = e.limit === 'high' ? c.law.umax : c.law.umin;
        note(`controller ${e.element} ${c.fire(e.limit as 'high' | 'low') ? 'saturates at' : 'leaves'} ${pct(at)}`);
        return true;
      }
      case 'regulator':
        note(e.limit === 'low'
          ? `regulator ${e.element} ${rising ? 'locks up (downstream at its set pressure)' : 'opens'}`
          : `regulator ${e.element} ${rising ? 'throttles' : 'is fully open (downstream below set − band)'}`);
        return true;
    }
  }

  atBreakpoint(t: number, _y: Float64Array): void {
    const eps = 1e-12 * Math.max(1, Math.abs(t));
    const describe = (name: string, noun: string, s: Schedule): void => {
      for (const r of s.ramps) {
        if (Math.abs(r.t0 - t) <= eps && r.t1 > r.t0) {
          note(`${noun} ${name} starts ${r.to > r.from ? 'opening' : 'closing'} (${pct(r.from)} → ${pct(r.to)} over ${fmtT(r.t1 - r.t0)})`);
        } else if (Math.abs(r.t1 - t) <= eps) {
          note(r.t1 === r.t0
            ? `${noun} ${name} ${r.to > r.from ? 'opens' : r.to < r.from ? 'closes' : 'stays'} (${pct(r.from)} → ${pct(r.to)})`
            : `${noun} ${name} reaches ${pct(r.to)}`);
        }
      }
    };
    const note = (what: string): void => { this.log.push({ t, what, kind: 'schedule', element: '' }); };
    this.branches.forEach((b) => { if (b.schedule) describe(b.b.name, 'valve', b.schedule); });
    this.feeds.forEach((f) => describe(f.name, 'feed', f.schedule));
    if (this.controllers.some((c) => !c.continuous)) {
      this.evaluate(t, _y);
      for (const c of this.controllers) {
        const ts = c.c.spec.sample;
        if (ts !== undefined && Math.abs(t / ts - Math.round(t / ts)) < 1e-9) c.sample(t, this.measure(c, _y));
      }
      this.invalidate();
    }
  }

  /** Events that hold at the start (a relief valve already above its set point). */
  /** How far the pressure difference across check valve `b` exceeds its cracking pressure (Pa). */
  private checkMargin(b: number): number {
    const bm = this.model.branches[b];
    const op = bm.valve!.operation as { cracking: number };
    return this.p[this.nodeIndex(bm.from)] - op.cracking - this.p[this.nodeIndex(bm.to)];
  }

  settleInitialModes(t: number, y: Float64Array): void {
    this.evaluate(t, y);
    for (const c of this.controllers) {
      if (!c.continuous) continue;
      c.settle();
      if (c.mode !== 'free') this.log.push({ t, what: `controller ${c.c.name} starts saturated at ${pct(c.mode === 'high' ? c.law.umax : c.law.umin)}`, kind: 'saturation', element: c.c.name });
    }
    for (const e of this.events) {
      if (e.kind === 'check') {
        // open at the start when the difference already exceeds the cracking pressure
        e.side = this.checkMargin(e.index) > 0 ? 1 : -1;
        continue;
      }
      if (e.kind !== 'relief') continue;
      const bm = this.model.branches[e.index];
      const op = bm.valve!.operation as { opensAbove: number };
      if (this.p[this.nodeIndex(bm.from)] - this.pa > op.opensAbove) {
        this.branches[e.index].open = true;
        this.log.push({ t, what: `relief valve ${e.element} is open at the start`, kind: 'relief', element: e.element });
      }
    }
  }

  // ---- observables ----------------------------------------------------------------------

  channels(): Channel[] {
    const ch: Channel[] = [];
    this.model.chambers.forEach((c) => {
      ch.push({ key: `${c.name}.pressure`, unit: 'Pa' }, { key: `${c.name}.gauge`, unit: 'Pa' },
        { key: `${c.name}.volume`, unit: 'm^3' }, { key: `${c.name}.mass`, unit: 'kg' },
        { key: `${c.name}.temperature`, unit: 'K' });
      if (c.wall.sphere) ch.push({ key: `${c.name}.stretch`, unit: '-' });
    });
    this.model.branches.forEach((b) => {
      ch.push({ key: `${b.name}.flow`, unit: 'kg/s' }, { key: `${b.name}.reynolds`, unit: '-' });
      if (b.hostLine) ch.push({ key: `${b.hostLine}.flow`, unit: 'kg/s' }, { key: `${b.hostLine}.reynolds`, unit: '-' });
    });
    for (const c of this.model.controllers) {
      ch.push({ key: `${c.name}.output`, unit: '-' }, { key: `${c.name}.error`, unit: measureUnit(c.spec.measure.quantity) });
    }
    ch.push({ key: 'total.mass', unit: 'kg' });
    return ch;
  }

  /** Values of `channels()` for (t, y), in the same order. */
  observe(t: number, y: Float64Array, out: Float64Array): void {
    this.evaluate(t, y);
    let k = 0;
    let total = 0;
    const { chambers, branches } = this.model;
    for (let i = 0; i < chambers.length; i++) {
      const m = y[this.mIdx[i]];
      total += m;
      out[k++] = this.p[i];
      out[k++] = this.p[i] - this.pa;
      out[k++] = this.V[i];
      out[k++] = m;
      out[k++] = this.T[i];
      const wall = chambers[i].wall;
      if (wall.sphere) out[k++] = wall.stretch(this.V[i]);
    }
    for (let i = 0; i < branches.length; i++) {
      const f = this.flows[i];
      out[k++] = f.mdot;
      out[k++] = f.reynolds;
      if (branches[i].hostLine) { out[k++] = f.mdot; out[k++] = f.reynolds; }
    }
    for (const c of this.controllers) { out[k++] = c.u; out[k++] = c.e; }
    out[k++] = total;
  }

  /** Mass the boundaries have given to the network so far (kg). */
  boundaryInflow(y: Float64Array): number {
    let s = 0;
    for (const k of this.resIdx) s -= y[k];
    for (const k of this.feedIdx) s -= y[k];
    return s;
  }

  totalMass(y: Float64Array): number {
    let s = 0;
    for (const k of this.mIdx) s += y[k];
    return s;
  }
}

/** SI unit of a controller's error: that of what it measures. */
function measureUnit(q: string): string {
  return q === 'pressure' || q === 'gauge' ? 'Pa' : q === 'volume' ? 'm^3' : q === 'mass' ? 'kg' : q === 'temperature' ? 'K' : q === 'flow' ? 'kg/s' : '-';
}

/** Every entry of an n×n matrix, as a sparsity pattern. */
function denseEntries(n: number): SparsePattern {
  const ri = new Int32Array(n * n);
  const ci = new Int32Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) { ri[i * n + j] = i; ci[i * n + j] = j; }
  return patternFromEntries(n, ri, ci);
}

function pct(x: number): string {
  return `${Math.round(x * 1000) / 10} %`;
}

function fmtT(s: number): string {
  return s < 1 ? `${+(s * 1000).toPrecision(4)} ms` : `${+s.toPrecision(4)} s`;
}
