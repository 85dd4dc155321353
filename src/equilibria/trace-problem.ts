/**
 * One group's equations in scaled mass coordinates for continuation (see continuation.ts):
 * F(x) with its analytic ∂F/∂u and a forward difference for ∂F/∂ℓ.
 */
import type { Model } from '../model/types.js';
import type { WallPoint } from '../physics/wall.js';
import { pressureOfMass } from './deflation.js';
import { groupGrowth, groupStability } from './rest-stability.js';
import { restOf, restSetup, segmentOfVolume, type RestGroup, type RestSetup } from './rest.js';
import { steadyPressures } from './steady.js';
import { CACHE, type Parameter } from './trace-parameter.js';
import type { TracePoint } from './trace-types.js';
import type { ChamberRest, ValveState } from './types.js';

const FD_L = 1e-6;

// ---- one group's equations ---------------------------------------------------------------

interface Context { model: Model; setup: RestSetup; group: RestGroup; masses: Float64Array; target: Float64Array | null }

export class GroupProblem {
  readonly n: number;
  private readonly contexts = new Map<number, Context | string>();
  private readonly s: WallPoint = { p: 0, dpdV: 0 };
  private readonly guess: number[];

  constructor(
    readonly param: Parameter, readonly groupIndex: number, readonly valves: ValveState,
    readonly baseMasses: Float64Array, readonly scale: number, readonly names: string[],
  ) {
    this.n = names.length;
    this.guess = new Array<number>(this.n).fill(0);
  }

  context(l: number): Context | string {
    const hit = this.contexts.get(l);
    if (hit !== undefined) return hit;
    const model = this.param.modelAt(l);
    let c: Context | string;
    if (typeof model === 'string') c = model;
    else {
      const setup = restSetup(model, this.valves);
      const group = setup.groups[this.groupIndex];
      const masses = this.param.gasFollows ? Float64Array.from(model.chambers.map((ch) => ch.m0)) : Float64Array.from(this.baseMasses);
      if (this.param.massOf) {
        const g = group.chambers;
        const total = g.reduce((acc, i) => acc + masses[i], 0);
        const want = this.param.massOf.si(l);
        if (g.includes(this.param.massOf.chamber)) for (const i of g) masses[i] *= want / total;
      }
      let target: Float64Array | null = null;
      if (group.kind === 'open') {
        const sp = steadyPressures(setup, group);
        target = sp.ok ? sp.p : null;
      }
      c = group.kind === 'open' && !target ? 'the steady-flow pressures could not be found' : { model, setup, group, masses, target };
      if (group.kind === 'fed') c = 'the group is fed with no outlet: no steady state';
    }
    if (this.contexts.size >= CACHE) this.contexts.delete(this.contexts.keys().next().value as number);
    this.contexts.set(l, c);
    return c;
  }

  /** F(x) into F and ∂F/∂u into J (n×n); false outside the laws or the netlist's range. */
  eval(x: Float64Array, F: Float64Array, J: Float64Array | null): boolean {
    const n = this.n;
    const l = x[n];
    const c = this.context(l);
    if (typeof c === 'string') return false;
    const { setup, group } = c;
    const pa = setup.model.pa;
    if (J) J.fill(0);
    let p0 = 0, g0 = 0, m0 = 0, sum = 0;
    const ms = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const ch = setup.chambers[group.chambers[i]];
      const m = this.scale * Math.exp(x[i]);
      ms[i] = m;
      if (!(m > 0) || !Number.isFinite(m)) return false;
      const r = pressureOfMass(ch, m, pa, this.s, this.guess[i] || ch.wall.V0);
      if (!Number.isFinite(r.p) || !Number.isFinite(r.dpdm)) return false;
      this.guess[i] = r.V;
      sum += m;
      if (group.kind === 'closed') {
        if (i === 0) { p0 = r.p; g0 = r.dpdm; m0 = m; continue; }
        F[i] = (r.p - p0) / pa;
        if (J) { J[i * n + i] = (m * r.dpdm) / pa; J[i * n] = (-m0 * g0) / pa; }
      } else {
        F[i] = (r.p - (c.target as Float64Array)[i]) / pa;
        if (J) J[i * n + i] = (m * r.dpdm) / pa;
      }
    }
    if (group.kind === 'closed') {
      const M = group.chambers.reduce((acc, i) => acc + c.masses[i], 0);
      F[0] = (sum - M) / this.scale;
      if (J) for (let j = 0; j < n; j++) J[j] = ms[j] / this.scale;
    }
    return true;
  }

  /** ∂F/∂ℓ at x by a forward difference in ℓ (backward near the upper end of the range). */
  dl(x: Float64Array, F0: Float64Array, out: Float64Array): boolean {
    const n = this.n;
    const xp = Float64Array.from(x);
    const h = x[n] + FD_L > 1 + 1e-9 ? -FD_L : FD_L;
    xp[n] = x[n] + h;
    const F1 = new Float64Array(n);
    if (!this.eval(xp, F1, null)) {
      xp[n] = x[n] - h;
      if (!this.eval(xp, F1, null)) return false;
      for (let i = 0; i < n; i++) out[i] = (F0[i] - F1[i]) / h;
      return true;
    }
    for (let i = 0; i < n; i++) out[i] = (F1[i] - F0[i]) / h;
    return true;
  }

  /**
   * The traced point at x. With `hint` (the growth rate at the previous point of the branch, or
   * NaN for none) the growth rate comes from the certified sparse rightmost eigenvalue where it
   * can (rightmost.ts); without it (special points, and while locating them) from the dense
   * eigenvalues. The certificate makes both the same number to 1e-7 of its size.
   */
  point(x: Float64Array, special?: TracePoint['special'], hint?: number): TracePoint | null {
    const n = this.n;
    const c = this.context(x[n]);
    if (typeof c === 'string') return null;
    const { setup, group } = c;
    const pa = setup.model.pa;
    const chambers: Record<string, ChamberRest> = {};
    const gm: number[] = [];
    for (let i = 0; i < n; i++) {
      const ch = setup.chambers[group.chambers[i]];
      const m = this.scale * Math.exp(x[i]);
      const r = pressureOfMass(ch, m, pa, this.s, this.guess[i] || ch.wall.V0);
      chambers[ch.name] = restOf(ch, r.p, pa, r.V, m, ch.wall.rigid ? 0 : segmentOfVolume(ch, r.V));
      gm.push(m);
    }
    const st = hint !== undefined && (!special || special === 'end') ? groupGrowth(setup, group, gm, c.masses, hint) : groupStability(setup, group, gm, c.masses);
    return {
      parameter: this.param.value(x[n]), chambers, stable: st.stability === 'stable', stability: st.stability,
      growth_rate: st.growth_rate, ...(special ? { special } : {}),
    };
  }

  growth(x: Float64Array): number {
    const p = this.point(x);
    return p?.growth_rate ?? Number.NaN;
  }
}
