/**
 * The element kinds a model holds, made into elements (contract.ts) in the order the assembler
 * keeps: gas nodes first (chambers, then reservoirs, then cylinders, whose two sides are nodes),
 * so that they evaluate before the elements between them, then lines and valves, then feeds,
 * then the kinds read from their table alone (netlist/kinds.ts: ELEMENT_TABLES), each made by
 * its line in MAKERS. The one place that names the kinds: a new kind adds its line here (and its
 * parameter table; kinds with reading code of their own also their netlist reading and model
 * entry).
 */
import type { ElementModel, Model, NodeRef } from '../model/types.js';
import { BranchElement } from './branch-element.js';
import { ChamberElement } from './chamber-element.js';
import { CylinderElement } from './cylinder-element.js';
import type { Assembly, Element } from './contract.js';
import { ControllerElement } from './controller-element.js';
import { FeedElement } from './feed.js';
import { RegulatorLagElement } from './regulator-lag.js';
import { LeakElement } from './leak.js';
import { ReservoirElement } from './reservoir.js';
import { WaveLineElement } from './wave-line.js';

/** Kinds read from their table alone (netlist/kinds.ts: ELEMENT_TABLES): how each makes its element. */
const MAKERS: Record<string, (m: ElementModel, asm: Assembly, node: (n: NodeRef) => number) => Element> = {
  leak: (m, asm, node) => new LeakElement(m, asm, node(m.nodes.from)),
};

export function createElements(model: Model, asm: Assembly): Element[] {
  const chambers = model.chambers.map((c) => new ChamberElement(c, asm));
  const reservoirs = model.reservoirs.map((r) => new ReservoirElement(r, asm));
  const cylinders = model.cylinders.map((c) => new CylinderElement(c, asm));
  const node = (n: NodeRef): number => {
    if (n.kind === 'port') return n.side === 'cap' ? cylinders[n.index].capNode : cylinders[n.index].rodNode;
    return n.kind === 'chamber' ? chambers[n.index].node : reservoirs[n.index].node;
  };
  // a regulator's lag sets its valve's position before the branches evaluate
  const lags = model.branches.flatMap((b) => {
    const op = b.valve?.operation;
    return op?.kind === 'regulator' && op.timeConstant > 0 && !b.vent ? [new RegulatorLagElement(b, asm, node(b.to))] : [];
  });
  const branches = model.branches.map((b) => (b.line?.wave
    ? new WaveLineElement(b, asm, node(b.from), node(b.to))
    : new BranchElement(b, asm, node(b.from), node(b.to))));
  for (const lag of lags) {
    const k = model.branches.indexOf(lag.b);
    lag.attach(branches.filter((e, i): e is BranchElement => e instanceof BranchElement && (i === k || model.branches[i].vent?.of === k)));
  }
  const feeds = model.feeds.map((f) => new FeedElement(f, asm, f.port ? node({ kind: 'port', ...f.port }) : chambers[f.into].node));
  // controllers after the branches: they read undriven branches and chambers, then set their valve
  const controllers = model.controllers.map((c) => new ControllerElement(c, asm, branches[c.valve] as BranchElement,
    c.measure.kind === 'chamber' ? chambers[c.measure.index] : null, c.measure.kind === 'branch' ? branches[c.measure.index] as BranchElement : null));
  const more = (model.elements ?? []).map((m) => {
    const make = MAKERS[m.kind];
    if (!make) throw new Error(`element kind ${m.kind} has a table but no element (elements/registry.ts)`);
    return make(m, asm, node);
  });
  return [...chambers, ...reservoirs, ...cylinders, ...lags, ...branches, ...feeds, ...more, ...controllers];
}
