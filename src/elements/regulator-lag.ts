/**
 * A regulator's lag on the element contract (contract.ts): the position z ∈ [−1, 1] of a
 * regulator with a `time-constant` (physics/regulator.ts), one state slot,
 * ż = (z*(p_to) − z)/τ. It sets the position its valve (and the valve's vent) open by before
 * the branches evaluate (it comes before them in element order) and adds its rate once the
 * node pressures are known. Its jacobian is left to differences (`differenced`).
 */
import type { BranchModel, Model } from '../model/types.js';
import { regulatorPosition } from '../physics/regulator.js';
import type { BranchElement } from './branch-element.js';
import type { Assembly, Channel, Element } from './contract.js';
import type { Nodes } from './nodes.js';

export class RegulatorLagElement implements Element {
  readonly kind = 'regulator-lag';
  readonly name: string;
  readonly z: number;
  readonly differenced = true;
  private readonly nodes: Nodes;
  private readonly op: { set: number; band: number; relieving: boolean; timeConstant: number };
  private valves: BranchElement[] = [];

  constructor(readonly b: BranchModel, private readonly asm: Assembly, private readonly to: number) {
    this.name = `${b.name}.lag`;
    this.op = b.valve!.operation as RegulatorLagElement['op'];
    this.z = asm.slots([{ name: 'z', unit: '-', scale: 1e-3 }]);
    this.nodes = asm.nodes;
  }

  /** The regulator's branch and its vent (set once the branches exist). */
  attach(valves: BranchElement[]): void {
    this.valves = valves;
  }

  initial(y: Float64Array): void {
    y[this.z] = regulatorPosition(startPressure(this.asm.model, this.b) - this.asm.pa, this.op.set, this.op.band, this.op.relieving);
  }

  evaluate(_t: number, y: Float64Array): void {
    for (const v of this.valves) v.position = y[this.z];
  }

  settle(y: Float64Array, dydt: Float64Array): void {
    const target = regulatorPosition(this.nodes.p[this.to] - this.asm.pa, this.op.set, this.op.band, this.op.relieving);
    dydt[this.z] = (target - y[this.z]) / this.op.timeConstant;
  }

  channels(): Channel[] {
    return [{ key: `${this.b.name}.position`, unit: '-' }];
  }

  observe(y: Float64Array, out: Float64Array, k: number): number {
    out[k++] = y[this.z];
    return k;
  }
}

/** The pressure (Pa abs) at a branch's downstream node at the start. */
function startPressure(m: Model, b: BranchModel): number {
  const n = b.to;
  if (n.kind === 'reservoir') return m.reservoirs[n.index].pressure.at(0);
  const c = m.chambers[n.index];
  return (c.m0 * m.gas.R * c.T0) / (c.V0 + c.deadVolume);
}
