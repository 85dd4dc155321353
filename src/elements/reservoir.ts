/**
 * A reservoir on the element contract (contract.ts): a boundary node at a given pressure (a
 * time series) and temperature, with one state slot, its store: the mass it has given to the
 * network, with a minus sign, so that the mass slots of the network still sum to a constant.
 */
import type { ReservoirModel } from '../model/types.js';
import type { Assembly, Element } from './contract.js';
import type { Nodes } from './nodes.js';

export class ReservoirElement implements Element {
  readonly kind = 'reservoir';
  readonly name: string;
  readonly node: number;
  readonly store: number;
  private readonly nodes: Nodes;

  constructor(readonly r: ReservoirModel, asm: Assembly) {
    this.name = r.name;
    this.store = asm.slots([{ name: 'store', unit: 'kg', scale: 'mass', mass: 'store' }]);
    this.nodes = asm.nodes;
    this.node = asm.nodes.add(r.name);
  }

  expose(): void {
    this.nodes.expose(this.node, [this.store], []);
  }

  evaluate(t: number): void {
    this.nodes.p[this.node] = this.r.pressure.at(t);
    this.nodes.T[this.node] = this.r.T;
  }

  breakpoints(): number[] {
    return this.r.pressure.breakpoints;
  }

  timeInvariant(): boolean {
    return this.r.pressure.constant;
  }
}
