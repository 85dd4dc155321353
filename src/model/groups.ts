/**
 * Groups of chambers that exchange gas: the connected components of the network through the
 * branches a caller says conduct. Reservoirs are boundaries, not links: two chambers that
 * each vent to ambient are separate groups. A group that touches no reservoir and no feed is
 * closed, and conserves its gas.
 */
import type { BranchModel, Model } from './types.js';

export interface ChamberGroup {
  /** Chamber indices, ascending. */
  chambers: number[];
  /** Reservoir indices it touches through conducting branches. */
  reservoirs: number[];
  /** Feed indices that feed into it. */
  feeds: number[];
  /** Branch indices inside it or joining it to a reservoir. */
  branches: number[];
  /** Indices of the elements of kinds read from their table (model.elements) that touch it. */
  elements: number[];
  /** One of those is a boundary (it exchanges gas with the surroundings): the group is open. */
  boundary: boolean;
}

function find(parent: Int32Array, i: number): number {
  while (parent[i] !== i) {
    parent[i] = parent[parent[i]];
    i = parent[i];
  }
  return i;
}

/**
 * Connected components of the chambers through the branches for which `conducts` is true,
 * in order of their first chamber. `feedActive` says which feeds count as boundaries.
 */
export function chamberGroups(
  model: Model, conducts: (b: BranchModel, index: number) => boolean, feedActive: (index: number) => boolean = () => true,
): ChamberGroup[] {
  const nc = model.chambers.length;
  const parent = new Int32Array(nc).map((_, i) => i);
  model.branches.forEach((b, k) => {
    if (!conducts(b, k) || b.from.kind !== 'chamber' || b.to.kind !== 'chamber') return;
    const a = find(parent, b.from.index);
    const c = find(parent, b.to.index);
    if (a !== c) parent[Math.max(a, c)] = Math.min(a, c);
  });
  const chambersOf = (e: { nodes: Record<string, { kind: string; index: number }> }): number[] =>
    Object.values(e.nodes).filter((n) => n.kind === 'chamber').map((n) => n.index);
  for (const e of model.elements ?? []) {
    const cs = chambersOf(e);
    for (let k = 1; k < cs.length; k++) {
      const a = find(parent, cs[0]);
      const c = find(parent, cs[k]);
      if (a !== c) parent[Math.max(a, c)] = Math.min(a, c);
    }
  }
  const byRoot = new Map<number, ChamberGroup>();
  const groups: ChamberGroup[] = [];
  for (let i = 0; i < nc; i++) {
    const r = find(parent, i);
    let g = byRoot.get(r);
    if (!g) {
      g = { chambers: [], reservoirs: [], feeds: [], branches: [], elements: [], boundary: false };
      byRoot.set(r, g);
      groups.push(g);
    }
    g.chambers.push(i);
  }
  model.branches.forEach((b, k) => {
    if (!conducts(b, k)) return;
    const end = b.from.kind === 'chamber' ? b.from.index : b.to.kind === 'chamber' ? b.to.index : -1;
    if (end < 0) return;
    const g = byRoot.get(find(parent, end))!;
    g.branches.push(k);
    for (const n of [b.from, b.to]) if (n.kind === 'reservoir' && !g.reservoirs.includes(n.index)) g.reservoirs.push(n.index);
  });
  (model.elements ?? []).forEach((e, k) => {
    const cs = chambersOf(e);
    if (!cs.length) return;
    const g = byRoot.get(find(parent, cs[0]))!;
    g.elements.push(k);
    if (e.boundary) g.boundary = true;
    for (const n of Object.values(e.nodes)) if (n.kind === 'reservoir' && !g.reservoirs.includes(n.index)) g.reservoirs.push(n.index);
  });
  model.feeds.forEach((f, k) => {
    if (feedActive(k)) byRoot.get(find(parent, f.into))!.feeds.push(k);
  });
  return groups;
}

/** Whether a branch can pass gas at some time during a run (for grouping a transient's chambers). */
export function everConducts(b: BranchModel): boolean {
  const op = b.valve?.operation;
  if (!op || op.kind !== 'schedule') return true;
  return op.initially > 0 || op.steps.some((s) => s.open > 0);
}
