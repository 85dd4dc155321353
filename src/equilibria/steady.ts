/**
 * Open groups: chamber pressures in steady flow by Newton–Levenberg–Marquardt iteration
 * (Nocedal & Wright, Numerical Optimization, 2nd ed., §10.3).
 */
import { DenseLu } from '../linalg/dense-lu.js';
import type { RestGroup, RestSetup } from './rest.js';
import { emptyBranchFlow } from '../elements/branch.js';
import type { NodeRef } from '../model/types.js';

// ---- open groups: steady flow ------------------------------------------------------------

/**
 * Chamber pressures of an open group in steady flow: Σ flows into each chamber + feeds = 0,
 * by Newton iteration with Levenberg–Marquardt damping (a check valve that is shut gives a
 * zero row until the pressure before it rises).
 */
export function steadyPressures(setup: RestSetup, g: RestGroup): { p: Float64Array; ok: boolean } {
  const { model, sys, t } = setup;
  const n = g.chambers.length;
  const pos = new Map(g.chambers.map((c, i) => [c, i] as const));
  const resP = g.reservoirs.map((r) => model.reservoirs[r].pressure.at(t));
  // start at the reservoirs' mean pressure (ambient when only boundary elements open the group)
  const p = new Float64Array(n).fill(resP.length ? resP.reduce((a, x) => a + x, 0) / resP.length : model.pa);
  // elements of kinds read from their table: their flows come from the system itself
  const extra = g.elements.map((k) => sys.elements.find((e) => e.name === model.elements![k].name)!);
  const nc = setup.chambers.length;
  const pAll = new Float64Array(nc), TAll = Float64Array.from(setup.chambers, (c) => c.T);
  const inflow = new Float64Array(nc), inScale = new Float64Array(nc);
  const flow = emptyBranchFlow();
  const scale = new Float64Array(n);
  const residual = (x: Float64Array, out: Float64Array): void => {
    out.fill(0);
    scale.fill(0);
    const node = (r: NodeRef): [number, number] => (r.kind === 'chamber'
      ? [x[pos.get(r.index)!], setup.chambers[r.index].T]
      : [model.reservoirs[r.index].pressure.at(t), model.reservoirs[r.index].T]);
    for (const k of g.branches) {
      const b = model.branches[k];
      const [p1, T1] = node(b.from);
      const [p2, T2] = node(b.to);
      sys.branches[k].flow(t, p1, p2, T1, T2, flow);
      if (b.from.kind === 'chamber') { out[pos.get(b.from.index)!] -= flow.mdot; scale[pos.get(b.from.index)!] += Math.abs(flow.mdot); }
      if (b.to.kind === 'chamber') { out[pos.get(b.to.index)!] += flow.mdot; scale[pos.get(b.to.index)!] += Math.abs(flow.mdot); }
    }
    for (const f of g.feeds) {
      const fd = model.feeds[f];
      const q = fd.rate * fd.initially;
      out[pos.get(fd.into)!] += q;
      scale[pos.get(fd.into)!] += q;
    }
    if (extra.length) {
      g.chambers.forEach((c, i) => { pAll[c] = x[i]; });
      sys.restInflow(t, extra, pAll, TAll, inflow, inScale);
      g.chambers.forEach((c, i) => { out[i] += inflow[c]; scale[i] += inScale[c]; });
    }
  };
  const r = new Float64Array(n);
  const rt = new Float64Array(n);
  const J = new Float64Array(n * n);
  const A = new Float64Array(n * n);
  const lu = new DenseLu(n);
  const xp = new Float64Array(n);
  const fp = new Float64Array(n);
  const size = (v: Float64Array): number => Math.sqrt(v.reduce((a, x) => a + x * x, 0));
  let lambda = 1e-6;
  for (let it = 0; it < 200; it++) {
    residual(p, r);
    const converged = r.every((x, i) => Math.abs(x) <= 1e-11 * scale[i] + 1e-16);
    if (converged) return { p, ok: true };
    for (let j = 0; j < n; j++) {
      xp.set(p);
      const h = 1e-7 * p[j];
      xp[j] += h;
      residual(xp, fp);
      for (let i = 0; i < n; i++) J[i * n + j] = (fp[i] - r[i]) / h;
    }
    // (JᵀJ + λ·diag(JᵀJ) + tiny) δ = −Jᵀr
    const base = size(r);
    let improved = false;
    for (let tries = 0; tries < 30 && !improved; tries++) {
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          let sum = 0;
          for (let k = 0; k < n; k++) sum += J[k * n + i] * J[k * n + j];
          A[i * n + j] = sum;
        }
      }
      const g0 = new Float64Array(n);
      let diagMax = 0;
      for (let i = 0; i < n; i++) diagMax = Math.max(diagMax, A[i * n + i]);
      for (let i = 0; i < n; i++) {
        A[i * n + i] += lambda * (A[i * n + i] + 1e-12 * diagMax) + 1e-300;
        let sum = 0;
        for (let k = 0; k < n; k++) sum += J[k * n + i] * r[k];
        g0[i] = -sum;
      }
      if (!lu.factor(A)) { lambda *= 10; continue; }
      lu.solve(g0);
      for (let i = 0; i < n; i++) xp[i] = Math.max(p[i] + g0[i], 0.01 * p[i]);
      residual(xp, rt);
      if (size(rt) < base) {
        p.set(xp);
        lambda = Math.max(lambda / 10, 1e-12);
        improved = true;
      } else {
        lambda *= 10;
      }
    }
    if (!improved) return { p, ok: false };
  }
  return { p, ok: false };
}
