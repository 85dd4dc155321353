/**
 * A line, a valve or a valve inside a line on the element contract (contract.ts): no states of
 * its own; it reads the pressures and temperatures of its two end nodes, moves its flow with the
 * node table's conserving transfer, and adds the transfer's jacobian from its flow partials
 * (branch.ts has the flow laws). A valve's schedule gives breakpoints; a relief valve's open
 * state and a check valve's opening are events.
 *
 * Channels: `<name>.flow` (kg/s, positive from → to) and `<name>.reynolds` for every branch; a
 * valve adds `<name>.opening` (0–1: its schedule's opening, a relief valve's 0/1 state, a
 * check valve 1 while the pressure difference exceeds its cracking pressure), and a relief or
 * check valve `<name>.open` (1 open, 0 closed), so that a valve transient plots from the CSV.
 */
import type { BranchModel } from '../model/types.js';
import type { Schedule } from '../model/schedule.js';
import { BranchState, emptyBranchFlow, type BranchFlow, type BranchPartials } from './branch.js';
import type { Assembly, Channel, Element, ElementEvent, ElementSummary, JacobianReserve, EventSink } from './contract.js';
import type { Nodes } from './nodes.js';

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

/**
 * Laminar lines neglect the gas's acceleration (physics/line-flow.ts); a run warns when the
 * neglected term exceeds this fraction of the friction term (the flow is then high by about half
 * of it).
 */
const ACCEL_WARN = 0.05;

function pct(x: number): string {
  return `${Math.round(x * 1000) / 10} %`;
}

function fmtT(s: number): string {
  return s < 1 ? `${+(s * 1000).toPrecision(4)} ms` : `${+s.toPrecision(4)} s`;
}

/** Logs a schedule's ramps that start or end at t (`valve v1 opens (0 % → 100 %)`). */
export function describeSchedule(t: number, noun: string, name: string, s: Schedule, log: EventSink): void {
  const eps = 1e-12 * Math.max(1, Math.abs(t));
  const note = (what: string): void => { log.push({ t, what, kind: 'schedule', element: '' }); };
  for (const r of s.ramps) {
    if (Math.abs(r.t0 - t) <= eps && r.t1 > r.t0) {
      note(`${noun} ${name} starts ${r.to > r.from ? 'opening' : 'closing'} (${pct(r.from)} → ${pct(r.to)} over ${fmtT(r.t1 - r.t0)})`);
    } else if (Math.abs(r.t1 - t) <= eps) {
      note(r.t1 === r.t0
        ? `${noun} ${name} ${r.to > r.from ? 'opens' : r.to < r.from ? 'closes' : 'stays'} (${pct(r.from)} → ${pct(r.to)})`
        : `${noun} ${name} reaches ${pct(r.to)}`);
    }
  }
}

/** True when a schedule does not change over [t0, t1] (a step at t0 itself is already taken). */
export function scheduleStill(s: Schedule | null, t0: number, t1: number): boolean {
  if (!s) return true;
  for (const r of s.ramps) {
    // a ramp changes the value on [r.t0, r.t1] (a step, r.t0 = r.t1, at that instant)
    if (r.t0 < t1 && r.t1 > t0) return false;
    if (r.t0 === r.t1 && r.t0 > t0 && r.t0 < t1) return false;
  }
  return true;
}

export class BranchElement extends BranchState implements Element {
  readonly kind: string;
  readonly name: string;
  /** The flow at the evaluated point. */
  readonly current: BranchFlow = emptyBranchFlow();
  private readonly nodes: Nodes;
  private readonly withT: boolean;
  private readonly bp: BranchPartials = { q: 0, dp1: 0, dp2: 0, dT1: 0, dT2: 0 };
  private link = -1;
  /** Time of the evaluated point (observe has no t of its own). */
  private t = 0;
  /** A relief valve's open state, the one mode of a branch (others have none: not in the memo key). */
  readonly mode?: () => number;

  constructor(b: BranchModel, private readonly asm: Assembly, readonly from: number, readonly to: number) {
    super(b, asm.gas, asm.pa);
    this.kind = b.kind;
    this.name = b.name;
    this.nodes = asm.nodes;
    this.withT = asm.model.heat !== 'isothermal';
    if (b.valve?.operation.kind === 'relief') this.mode = () => (this.open ? 1 : 0);
  }

  evaluate(t: number): void {
    this.t = t;
    const n = this.nodes, i = this.from, j = this.to;
    this.flow(t, n.p[i], n.p[j], n.T[i], n.T[j], this.current);
  }

  load(dydt: Float64Array): void {
    this.nodes.between(dydt, this.from, this.to, this.current);
  }

  reserveJacobian(r: JacobianReserve): void {
    this.link = r.link(this.from, this.to);
  }

  loadJacobian(t: number, values: Float64Array): void {
    const n = this.nodes, a = this.from, c = this.to;
    // this.current is the flow at these end states (from the rhs just evaluated)
    this.partials(t, n.p[a], n.p[c], n.T[a], n.T[c], this.withT, this.bp, this.current);
    n.transferJacobian(this.link, a, c, this.bp, values);
  }

  breakpoints(): number[] {
    return this.schedule?.breakpoints ?? [];
  }

  atBreakpoint(t: number, log: EventSink): void {
    if (this.schedule) describeSchedule(t, 'valve', this.name, this.schedule, log);
  }

  timeInvariant(t0: number, t1: number): boolean {
    return scheduleStill(this.schedule, t0, t1);
  }

  events(): ElementEvent[] {
    const op = this.b.valve?.operation;
    const n = this.nodes, a = this.from, c = this.to, name = this.name, st = this, pa = this.asm.pa;
    if (op?.kind === 'relief' && op.fullLiftAt !== undefined) {
      // proportional lift: the flow is continuous in the pressure; the events only restart the
      // integrator at the two kinks of the lift curve and log them
      const kink = (at: number, up: string, down: string): ElementEvent => ({
        kind: 'lift', element: name,
        value: () => n.p[a] - pa - at,
        direction: () => 0,
        fire: (t, rising, log) => {
          log.push({ t, what: `relief valve ${name} ${rising ? up : down}`, kind: 'lift', element: name });
          return true;
        },
      });
      return [kink(op.opensAbove, 'starts lifting', 'reseats'), kink(op.fullLiftAt, 'reaches full lift', 'leaves full lift')];
    }
    if (op?.kind === 'relief') {
      return [{
        kind: 'relief', element: name,
        value: () => {
          const g = n.p[a] - pa;
          return st.open ? g - op.reseatsBelow : g - op.opensAbove;
        },
        direction: () => (st.open ? -1 : 1),
        fire: (t, _r, log) => {
          st.open = !st.open;
          log.push({ t, what: `relief valve ${name} ${st.open ? 'opens' : 'reseats'}`, kind: 'relief', element: name });
          return true;
        },
        settle: (t, log) => {
          if (n.p[a] - pa > op.opensAbove) {
            st.open = true;
            log.push({ t, what: `relief valve ${name} is open at the start`, kind: 'relief', element: name });
          }
        },
      }];
    }
    if (op?.kind === 'regulator' && !this.b.vent) {
      // the kinks of the regulator's law: lock-up at the set pressure, full opening at set − band
      const at = (limit: number) => (): number => n.p[c] - pa - limit;
      return [
        {
          kind: 'regulator', element: name, value: at(op.set), direction: () => 0,
          fire: (t, rising, log) => {
            log.push({ t, what: `regulator ${name} ${rising ? 'locks up (downstream at its set pressure)' : 'opens'}`, kind: 'regulator', element: name });
            return true;
          },
        },
        {
          kind: 'regulator', element: name, value: at(op.set - op.band), direction: () => 0,
          fire: (t, rising, log) => {
            log.push({ t, what: `regulator ${name} ${rising ? 'throttles' : 'is fully open (downstream below set − band)'}`, kind: 'regulator', element: name });
            return true;
          },
        },
      ];
    }
    if (op?.kind === 'check') {
      /** +1 after the valve last opened, −1 after it last closed (see CHECK_DEADBAND). */
      let side = -1;
      /** How far the pressure difference across the valve exceeds its cracking pressure (Pa). */
      const margin = (): number => n.p[a] - op.cracking - n.p[c];
      return [{
        kind: 'check', element: name,
        value: () => {
          const g = margin();
          const pMean = 0.5 * (Math.abs(n.p[a]) + Math.abs(n.p[c]));
          return side > 0 ? g : g - CHECK_DEADBAND * pMean;
        },
        direction: () => 0,
        fire: (t, rising, log) => {
          side = rising ? 1 : -1;
          log.push({ t, what: `check valve ${name} ${rising ? 'opens' : 'closes'}`, kind: 'check', element: name });
          return true;
        },
        // open at the start when the difference already exceeds the cracking pressure
        settle: () => { side = margin() > 0 ? 1 : -1; },
      }];
    }
    return [];
  }

  /** The valve's operation kind, or undefined for a line. */
  private get operation(): 'schedule' | 'check' | 'relief' | undefined {
    return this.b.valve?.operation.kind as 'schedule' | 'check' | 'relief' | undefined;
  }

  /** Opening 0..1 at the evaluated point (see the file comment). */
  openingNow(): number {
    const op = this.b.valve?.operation;
    if (op?.kind === 'check') return this.nodes.p[this.from] - op.cracking - this.nodes.p[this.to] > 0 ? 1 : 0;
    return this.opening(this.t, this.nodes.p[this.from], this.nodes.p[this.to]);
  }

  channels(): Channel[] {
    const ch: Channel[] = [{ key: `${this.name}.flow`, unit: 'kg/s' }, { key: `${this.name}.reynolds`, unit: '-' }];
    if (this.b.kind === 'valve') ch.push({ key: `${this.name}.opening`, unit: '-' });
    const op = this.operation;
    if (op === 'check' || op === 'relief') ch.push({ key: `${this.name}.open`, unit: '-' });
    const host = this.b.hostLine;
    if (host) ch.push({ key: `${host}.flow`, unit: 'kg/s' }, { key: `${host}.reynolds`, unit: '-' });
    return ch;
  }

  observe(_y: Float64Array, out: Float64Array, k: number): number {
    const f = this.current;
    out[k++] = f.mdot;
    out[k++] = f.reynolds;
    if (this.b.kind === 'valve') out[k++] = this.openingNow();
    const op = this.operation;
    if (op === 'check' || op === 'relief') out[k++] = this.openingNow() > 0 ? 1 : 0;
    if (this.b.hostLine) { out[k++] = f.mdot; out[k++] = f.reynolds; }
    return k;
  }

  summaries(): ElementSummary[] {
    const b = this.b, f = this.current;
    const pk = { flow: 0, re: 0, choked: false, lineChoked: false, mach: 0, accel: 0, tAccel: 0 };
    const lineName = b.kind === 'line' ? b.name : b.hostLine;
    // a line starting or stopping to choke, seen at samples and step ends (so within one step)
    let chokedNow = false;
    const seen: { t: number; what: string }[] = [];
    const track = (t: number): void => {
      if (Math.abs(f.mdot) > Math.abs(pk.flow)) pk.flow = f.mdot;
      if (f.reynolds > pk.re) pk.re = f.reynolds;
      if (f.choked) pk.choked = true;
      if (!lineName) return;
      if (f.lineChoked) pk.lineChoked = true;
      if (f.mach > pk.mach) pk.mach = f.mach;
      if (f.regime === 'laminar' && f.accel > pk.accel) { pk.accel = f.accel; pk.tAccel = t; }
      if (f.lineChoked !== chokedNow) {
        chokedNow = f.lineChoked;
        seen.push({ t, what: `line ${lineName} ${chokedNow ? 'starts' : 'stops'} choking` });
      }
    };
    const out: ElementSummary[] = [];
    if (lineName) {
      out.push({
        section: 'lines', name: lineName, track,
        result: () => ({ peak_flow: pk.flow, peak_reynolds: pk.re, regime: regimeOf(pk.re), choked: pk.lineChoked, peak_mach: pk.mach }),
        warnings: () => (pk.accel > ACCEL_WARN
          ? [`line ${lineName}: laminar flow, where the gas's acceleration is neglected (compressible Hagen–Poiseuille law); the neglected term reached ${(100 * pk.accel).toPrecision(2)} % of the friction term at t = ${+pk.tAccel.toPrecision(4)} s, so the flow there is high by about ${(50 * pk.accel).toPrecision(2)} %`]
          : []),
        seen: () => seen,
      });
    }
    if (b.kind === 'valve') {
      // the opening's range and its value at the end; a relief or check valve's openings counted
      const op = { min: Infinity, max: -Infinity, last: 0, opens: 0, open: false };
      const trackOpening = (): void => {
        const x = this.openingNow();
        op.min = Math.min(op.min, x);
        op.max = Math.max(op.max, x);
        op.last = x;
        if (x > 0 && !op.open) op.opens++;
        op.open = x > 0;
      };
      const self = this.operation === 'check' || this.operation === 'relief';
      out.push({
        section: 'valves', name: b.name,
        track: lineName ? trackOpening : (t: number) => { track(t); trackOpening(); },
        result: () => ({
          peak_flow: pk.flow, choked: pk.choked,
          opening: { final: op.last, min: Number.isFinite(op.min) ? op.min : op.last, max: Number.isFinite(op.max) ? op.max : op.last },
          ...(self ? { open_at_end: op.open, times_opened: op.opens } : {}),
        }),
      });
    }
    return out;
  }
}

/** Flow regime named by a Reynolds number (laminar below 2300, turbulent above 4000). */
function regimeOf(re: number): 'laminar' | 'transitional' | 'turbulent' {
  return re < 2300 ? 'laminar' : re > 4000 ? 'turbulent' : 'transitional';
}
