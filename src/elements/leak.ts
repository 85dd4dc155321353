/**
 * A fixed leak: a sharp orifice from a chamber to the surroundings, the worked example of an
 * element kind (DEVELOPERS.md, "How to add an element kind"). Its parameter table is LEAK in
 * netlist/kinds.ts (section `leaks:`; `from`, `diameter`, `discharge-coefficient`).
 *
 * Flow: compressible nozzle flow through area A = π·d²/4 with discharge coefficient Cd, choked
 * below the critical pressure ratio, in either direction (physics/orifice.ts through
 * physics/valve-flow.ts, which also patches the law linearly near equal pressures). The
 * surroundings are a boundary node of its own at ambient pressure and temperature; the gas
 * that leaves (or enters) is counted in its store slot, so the network's mass slots still sum
 * to a constant, and the `lost` channel is the gas lost so far.
 *
 * Jacobian: ∂q/∂p and ∂q/∂T of the chamber end by one-sided differences of the flow law, chained
 * to the chamber's states by the node table's transfer jacobian.
 */
import type { ElementModel } from '../model/types.js';
import type { ValveRating } from '../netlist/types.js';
import { valveFlowInto, type ValveFlow } from '../physics/valve-flow.js';
import type { Assembly, Channel, Element, ElementSummary, JacobianReserve } from './contract.js';
import type { FlowPartials, Nodes } from './nodes.js';

const SQRT_EPS = Math.sqrt(2.220446049250313e-16);

export class LeakElement implements Element {
  readonly kind = 'leak';
  readonly name: string;
  /** The leaking chamber's node, the surroundings' node, and the store slot. */
  readonly node: number;
  readonly outside: number;
  readonly store: number;
  private readonly rating: ValveRating;
  private readonly nodes: Nodes;
  private readonly withT: boolean;
  /** The flow out of the chamber at the evaluated point (kg/s). */
  private readonly out: ValveFlow = { mdot: Number.NaN, choked: false };
  private readonly probe: ValveFlow = { mdot: Number.NaN, choked: false };
  private readonly fp: FlowPartials = { q: 0, dp1: 0, dp2: 0, dT1: 0, dT2: 0 };
  private link = -1;

  constructor(m: ElementModel, private readonly asm: Assembly, node: number) {
    this.name = m.name;
    this.node = node;
    this.rating = { kind: 'orifice', diameter: m.values.diameter as number, dischargeCoefficient: m.values['discharge-coefficient'] as number };
    this.store = asm.slots([{ name: 'store', unit: 'kg', scale: 'mass', mass: 'store' }]);
    this.nodes = asm.nodes;
    this.outside = asm.nodes.add(`${m.name}:outside`);
    this.withT = asm.model.heat !== 'isothermal';
  }

  expose(): void {
    this.nodes.expose(this.outside, [this.store], []);
  }

  /** Flow out of the chamber at pressure p and temperature T into the surroundings. */
  private flowAt(p: number, T: number, out: ValveFlow): number {
    return valveFlowInto(out, this.rating, p, this.asm.pa, T, this.asm.Ta, this.asm.gas, 1).mdot;
  }

  evaluate(): void {
    const n = this.nodes;
    n.p[this.outside] = this.asm.pa;
    n.T[this.outside] = this.asm.Ta;
    this.flowAt(n.p[this.node], n.T[this.node], this.out);
  }

  load(dydt: Float64Array): void {
    this.nodes.between(dydt, this.node, this.outside, this.out);
  }

  reserveJacobian(r: JacobianReserve): void {
    this.link = r.link(this.node, this.outside);
  }

  loadJacobian(_t: number, values: Float64Array): void {
    const n = this.nodes, fp = this.fp;
    const p = n.p[this.node], T = n.T[this.node];
    const q = this.out.mdot;
    const dp = (p + SQRT_EPS * Math.max(p, this.asm.pa)) - p;
    fp.q = q;
    fp.dp1 = (this.flowAt(p + dp, T, this.probe) - q) / dp;
    fp.dp2 = 0;
    fp.dT2 = 0;
    if (this.withT) {
      const dT = (T + SQRT_EPS * T) - T;
      fp.dT1 = (this.flowAt(p, T + dT, this.probe) - q) / dT;
    } else {
      fp.dT1 = 0;
    }
    n.transferJacobian(this.link, this.node, this.outside, fp, values);
  }

  channels(): Channel[] {
    return [{ key: `${this.name}.flow`, unit: 'kg/s' }, { key: `${this.name}.lost`, unit: 'kg' }];
  }

  observe(y: Float64Array, out: Float64Array, k: number): number {
    out[k++] = this.out.mdot;
    out[k++] = y[this.store];
    return k;
  }

  summaries(column: (key: string) => number): ElementSummary[] {
    const flow = column(`${this.name}.flow`), lost = column(`${this.name}.lost`);
    let peak = 0;
    let choked = false;
    return [{
      section: 'leaks', name: this.name,
      track: (_t, row) => {
        if (Math.abs(row[flow]) > Math.abs(peak)) peak = row[flow];
        if (this.out.choked) choked = true;
      },
      result: (end) => ({ peak_flow: peak, choked, lost: end[lost] }),
    }];
  }
}
