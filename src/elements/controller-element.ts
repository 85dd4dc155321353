/**
 * A controller on the element contract (contract.ts); controller.ts has its law and states.
 *
 * Slots: the integral part I and, with derivative action, the filtered measure yf (continuous
 * controllers; a sampled one keeps its states between samples, changed at its sample
 * instants, which are breakpoints). In `evaluate` it reads what it measures (a node's pressure,
 * volume, mass, temperature or stretch, or an undriven branch's flow: those are evaluated
 * before it), sets its valve's opening and evaluates that valve again (controllers come after
 * the branches in element order, and the reader refuses a controller measuring a driven valve,
 * so no flow it reads changes). Events: the two saturation limits. Channels `<name>.output`
 * and `<name>.error`; a summary in the result's `controllers` section.
 *
 * Its jacobian is left to differences (`differenced`): the assembler then differences the
 * whole right-hand side, which networks with controllers (a few chambers) afford.
 */
import type { ChamberModel, ControllerModel, Model } from '../model/types.js';
import type { BranchElement } from './branch-element.js';
import type { ChamberElement } from './chamber-element.js';
import { ControllerState } from './controller.js';
import type { Assembly, Channel, Element, ElementEvent, ElementSummary, LoggedEvent } from './contract.js';
import type { Nodes } from './nodes.js';

function pct(x: number): string {
  return `${Math.round(x * 1000) / 10} %`;
}

/** SI unit of a controller's error: that of what it measures. */
export function measureUnit(q: string): string {
  return q === 'pressure' || q === 'gauge' ? 'Pa' : q === 'volume' ? 'm^3' : q === 'mass' ? 'kg' : q === 'temperature' ? 'K' : q === 'flow' ? 'kg/s' : '-';
}

/** A chamber's measured quantity at its start state (the filter's start value). */
function chamberStart(c: ChamberModel, m: Model, quantity: string): number {
  const V = c.V0;
  switch (quantity) {
    case 'volume': return V;
    case 'mass': return c.m0;
    case 'temperature': return c.T0;
    case 'stretch': return c.wall.stretch(V);
    default: return (c.m0 * m.gas.R * c.T0) / (V + c.deadVolume);
  }
}

export class ControllerElement implements Element {
  readonly kind = 'controller';
  readonly name: string;
  readonly state: ControllerState;
  readonly differenced: boolean;
  private readonly nodes: Nodes;

  constructor(readonly c: ControllerModel, private readonly asm: Assembly, private readonly driven: BranchElement, private readonly chamber: ChamberElement | null, private readonly branch: BranchElement | null) {
    this.name = c.name;
    this.state = new ControllerState(c);
    this.nodes = asm.nodes;
    const st = this.state;
    if (st.slots >= 1) {
      const list = [{ name: 'I', unit: '-', scale: 1e-3 }];
      if (st.slots >= 2) list.push({ name: 'yf', unit: measureUnit(c.measure.quantity), scale: 1e-3 * Math.max(Math.abs(c.spec.target.at(0)), 1e-12) });
      const first = asm.slots(list);
      st.iIdx = first;
      if (st.slots >= 2) st.fIdx = first + 1;
    }
    this.differenced = st.continuous;
  }

  /** The measured value at the evaluated point (SI; pressures absolute). */
  private measure(y: Float64Array): number {
    const m = this.c.measure;
    if (this.branch) return m.quantity === 'reynolds' ? this.branch.current.reynolds : this.branch.current.mdot;
    const ch = this.chamber!;
    const i = ch.node;
    switch (m.quantity) {
      case 'volume': return this.nodes.V[i];
      case 'mass': return y[ch.m];
      case 'temperature': return this.nodes.T[i];
      case 'stretch': return ch.c.wall.stretch(this.nodes.V[i]);
      default: return this.nodes.p[i];
    }
  }

  initial(y: Float64Array): void {
    const model = this.asm.model;
    const m = this.c.measure;
    const y0 = m.kind === 'chamber' ? chamberStart(model.chambers[m.index], model, m.quantity) : 0;
    this.state.start(y0, y);
  }

  evaluate(t: number, y: Float64Array): void {
    this.driven.command = this.state.output(t, this.measure(y), y);
    this.driven.evaluate(t);
  }

  /** Its own rows (İ, ẏf), in the settle pass, which gets the state. */
  settle(y: Float64Array, dydt: Float64Array): void {
    this.state.rates(y, dydt);
  }

  mode(): number {
    const s = this.state;
    return s.sampled ? s.sampled.u : s.mode === 'high' ? 1 : s.mode === 'low' ? 2 : 0;
  }

  breakpoints(): number[] {
    return [...this.c.spec.target.breakpoints, ...this.state.sampleTimes(this.asm.model.simulate.duration)];
  }

  atBreakpoint(t: number): void {
    const ts = this.c.spec.sample;
    // the system has evaluated (t, y) before: the measure is the one at the sample instant
    if (ts !== undefined && Math.abs(t / ts - Math.round(t / ts)) < 1e-9) this.state.sample(t, this.state.y);
  }

  timeInvariant(): boolean {
    return this.c.spec.target.constant;
  }

  events(): ElementEvent[] {
    const s = this.state;
    if (!s.continuous) return [];
    const name = this.name;
    const one = (which: 'high' | 'low'): ElementEvent => ({
      kind: 'saturation', element: name,
      value: () => s.eventValue(which),
      direction: () => s.eventDirection(which),
      fire: (t: number, _r: boolean, log: LoggedEvent[]) => {
        const at = which === 'high' ? s.law.umax : s.law.umin;
        log.push({ t, what: `controller ${name} ${s.fire(which) ? 'saturates at' : 'leaves'} ${pct(at)}`, kind: 'saturation', element: name });
        return true;
      },
      settle: (t: number, log: LoggedEvent[]) => {
        if (which !== 'high') return; // one settle for both limits
        s.settle();
        if (s.mode !== 'free') log.push({ t, what: `controller ${name} starts saturated at ${pct(s.mode === 'high' ? s.law.umax : s.law.umin)}`, kind: 'saturation', element: name });
      },
    });
    return [one('high'), one('low')];
  }

  channels(): Channel[] {
    return [{ key: `${this.name}.output`, unit: '-' }, { key: `${this.name}.error`, unit: measureUnit(this.c.measure.quantity) }];
  }

  observe(_y: Float64Array, out: Float64Array, k: number): number {
    out[k++] = this.state.u;
    out[k++] = this.state.e;
    return k;
  }

  summaries(column: (key: string) => number): ElementSummary[] {
    const cu = column(`${this.name}.output`), ce = column(`${this.name}.error`);
    const pk = { output: -Infinity, at: 0, saturated: 0, last: Number.NaN, wasSat: false };
    const L = this.state.law;
    return [{
      section: 'controllers', name: this.name,
      track: (t, row) => {
        const u = row[cu];
        if (u > pk.output) { pk.output = u; pk.at = t; }
        if (Number.isFinite(pk.last) && pk.wasSat) pk.saturated += t - pk.last;
        pk.last = t;
        pk.wasSat = u >= L.umax || u <= L.umin;
      },
      result: (end) => ({ final: { output: end[cu], error: end[ce] }, peak: { output: pk.output, at: pk.at }, saturated_time: pk.saturated }),
    }];
  }
}
