/**
 * A feed on the element contract (contract.ts): a mass flow (rate × its schedule's opening)
 * into one chamber at a given temperature, drawn from its own store slot (the mass it has given,
 * with a minus sign) through the conserving transfer.
 */
import type { FeedModel } from '../model/types.js';
import { makeSchedule, type Schedule } from '../model/schedule.js';
import { describeSchedule, scheduleStill } from './branch-element.js';
import type { Assembly, Element, EventSink } from './contract.js';
import { K, type Nodes } from './nodes.js';

export class FeedElement implements Element {
  readonly kind = 'feed';
  readonly name: string;
  readonly store: number;
  readonly schedule: Schedule;
  /** The flow at the evaluated point (kg/s). */
  flow = 0;
  private readonly nodes: Nodes;

  constructor(readonly f: FeedModel, asm: Assembly, readonly into: number) {
    this.name = f.name;
    this.schedule = makeSchedule(f.initially, f.steps);
    this.store = asm.slots([{ name: 'store', unit: 'kg', scale: 'mass', mass: 'store' }]);
    this.nodes = asm.nodes;
  }

  evaluate(t: number): void {
    this.flow = this.f.rate * this.schedule.at(t);
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
