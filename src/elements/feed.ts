/**
 * A feed on the element contract (contract.ts): a mass flow (rate × its schedule's opening)
 * into one chamber at a given temperature, drawn from its own store slot (the mass it has given,
 * with a minus sign) through the conserving transfer. With a delivery curve (a compressor or a
 * pump, physics/regulator.ts) the rate follows the chamber's pressure, and the feed adds the
 * transfer's jacobian: ∂q/∂p·∂p/∂y into its store row (−) and the chamber's rows (mass +1,
 * energy ∂Ṫ/∂ṁ + ∂Ṫ/∂ṁin + ∂Ṫ/∂Hin·T_feed, third ∂ḣ/∂ṁ), the node table's weights.
 */
import type { FeedModel } from '../model/types.js';
import { makeSchedule, type Schedule } from '../model/schedule.js';
import { describeSchedule, scheduleStill } from './branch-element.js';
import type { Assembly, Element, EventSink, JacobianReserve } from './contract.js';
import { curveFlow } from '../physics/regulator.js';
import { K, type Nodes } from './nodes.js';

export class FeedElement implements Element {
  readonly kind = 'feed';
  readonly name: string;
  readonly store: number;
  readonly schedule: Schedule;
  /** The flow at the evaluated point (kg/s). */
  flow = 0;
  private readonly nodes: Nodes;
  private readonly slope = new Float64Array(1);
  /** Value positions: rows (store, the chamber's rows 0..2) × the chamber's columns 0..2. */
  private readonly pos = new Int32Array(4 * K).fill(-1);

  constructor(readonly f: FeedModel, asm: Assembly, readonly into: number) {
    this.name = f.name;
    this.schedule = makeSchedule(f.initially, f.steps);
    this.store = asm.slots([{ name: 'store', unit: 'kg', scale: 'mass', mass: 'store' }]);
    this.nodes = asm.nodes;
  }

  evaluate(t: number): void {
    const c = this.f.curve;
    const base = c ? curveFlow(this.nodes.p[this.into], c.p, c.q, this.slope) : this.f.rate;
    this.flow = base * this.schedule.at(t);
  }

  reserveJacobian(r: JacobianReserve): void {
    if (!this.f.curve) return;
    const n = this.nodes, i = this.into;
    const rows = [this.store, n.rows[i * K], n.rows[i * K + 1], n.rows[i * K + 2]];
    rows.forEach((row, a) => {
      if (row < 0) return;
      for (let k = 0; k < K; k++) {
        const col = n.cols[i * K + k];
        if (col >= 0) this.pos[a * K + k] = r.entry(row, col);
      }
    });
  }

  loadJacobian(t: number, values: Float64Array): void {
    if (!this.f.curve) return;
    const n = this.nodes, i = this.into;
    const dq = this.slope[0] * this.schedule.at(t);
    const w = [-1, 1, n.cM[i] + n.cIn[i] + n.cH[i] * this.f.T, n.cThird[i]];
    for (let a = 0; a < 4; a++) {
      for (let k = 0; k < K; k++) {
        const at = this.pos[a * K + k];
        if (at >= 0) values[at] += w[a] * dq * n.dp[i * K + k];
      }
    }
  }

  load(dydt: Float64Array): void {
    this.nodes.transfer(dydt, this.store, -1, this.nodes.rows[this.into * K], this.into, this.flow, this.f.T);
  }

  breakpoints(): number[] {
    return this.schedule.breakpoints;
  }

  atBreakpoint(t: number, log: EventSink): void {
    describeSchedule(t, 'feed', this.name, this.schedule, log);
  }

  timeInvariant(t0: number, t1: number): boolean {
    return scheduleStill(this.schedule, t0, t1);
  }
}
