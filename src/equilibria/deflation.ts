/**
 * Closed groups too large to enumerate: deflated Newton iteration on Σm = M, p_i = p_1 in mass
 * coordinates from many starts (Farrell, Birkisson & Funke, SIAM J. Sci. Comput. 37 (2015)
 * A2026; shifted operator with p = 2, σ = 1). See equilibria.ts for the choice of starts.
 */
import { seededRandom } from '../linalg/arnoldi.js';
import { DenseLu } from '../linalg/dense-lu.js';
import { solveVolume } from '../model/volume.js';
import type { WallPoint } from '../physics/wall.js';
import { cappedSegments, endVolume, type Root } from './enumerate.js';
import { chamberAt, segmentOfVolume, type AtP, type RestChamber } from './rest.js';

// ---- closed groups: deflated Newton ------------------------------------------------------

/** Ordered starts (after the hints) tried whatever the deadline. */
const MIN_STARTS = 8;

/** Pressure (Pa abs), volume and dp/dm of a chamber holding mass m; NaN outside its law. */
export function pressureOfMass(ch: RestChamber, m: number, pa: number, s: WallPoint, guess: number): { p: number; V: number; dpdm: number } {
  if (ch.wall.rigid) {
    const Vt = ch.wall.V0 + ch.Vd;
    return { p: (m * ch.RT) / Vt, V: ch.wall.V0, dpdm: ch.RT / Vt };
  }
  if (!(m > 0)) return { p: Number.NaN, V: Number.NaN, dpdm: Number.NaN };
  const V = solveVolume(ch.wall, pa, ch.Vd, m * ch.RT, guess, ch.lo, s);
  if (!Number.isFinite(V)) return { p: Number.NaN, V, dpdm: Number.NaN };
  ch.wall.eval(V, s);
  const p = pa + s.p;
  return { p, V, dpdm: (s.dpdV * ch.RT) / (p + (V + ch.Vd) * s.dpdV) };
}

/** What the deflated search found, in the order found (the hints' first), and how far it got. */
export interface DeflationResult {
  roots: Root[];
  /** Starts from which Newton was run. */
  tried: number;
  /** Starts planned. */
  planned: number;
  /** True when the deadline stopped the search before every start was tried. */
  timedOut: boolean;
}

/**
 * The Newton step of the rest equations, J d = −F, in O(n). J is an arrowhead: row 0 is all
 * ones (Σu = 1), row i ≥ 1 has a_i on the diagonal and the same b in column 0 (p_i − p_0).
 * From row i, d_i = (−F_i − b·d_0)/a_i; row 0 then gives d_0. Null when some a_i is zero (a
 * chamber at an extremum of its wall curve) or the pivot of d_0 vanishes: the caller then
 * factorises densely.
 */
function arrowheadStep(n: number, J: Float64Array, F: Float64Array, d: Float64Array): boolean {
  const b = n > 1 ? J[n] : 0;
  let sInv = 0;
  let sF = 0;
  for (let i = 1; i < n; i++) {
    const a = J[i * n + i];
    if (!(a !== 0) || !Number.isFinite(a)) return false;
    sInv += 1 / a;
    sF += F[i] / a;
  }
  const piv = 1 - b * sInv;
  if (!(Math.abs(piv) > 1e-12 * (1 + Math.abs(b * sInv))) || !Number.isFinite(piv)) return false;
  d[0] = (-F[0] + sF) / piv;
  for (let i = 1; i < n; i++) d[i] = (-F[i] - b * d[0]) / J[i * n + i];
  return true;
}

export function deflatedClosed(chs: RestChamber[], M: number, pa: number, starts: number, hints: Float64Array[], deadline = Infinity): DeflationResult {
  const n = chs.length;
  const s: WallPoint = { p: 0, dpdV: 0 };
  const tmp: AtP = { V: 0, m: 0, C: 0 };
  const lu = new DenseLu(n);
  const J = new Float64Array(n * n);
  const F = new Float64Array(n);
  const d = new Float64Array(n);
  const guess = chs.map((c) => c.wall.V0);
  const found: Float64Array[] = [];
  const rng = seededRandom(20250601);

  /** Residual at u (masses / M); false outside the laws. */
  const residual = (u: Float64Array, withJ: boolean): boolean => {
    let sum = -1;
    let p0 = 0, g0 = 0;
    for (let i = 0; i < n; i++) {
      const r = pressureOfMass(chs[i], M * u[i], pa, s, guess[i]);
      if (!Number.isFinite(r.p)) return false;
      guess[i] = r.V;
      sum += u[i];
      if (i === 0) { p0 = r.p; g0 = r.dpdm; F[0] = 0; continue; }
      F[i] = (r.p - p0) / pa;
      if (withJ) {
        for (let j = 0; j < n; j++) J[i * n + j] = 0;
        J[i * n + i] = (M * r.dpdm) / pa;
        J[i * n] = (-M * g0) / pa;
      }
    }
    F[0] = sum;
    if (withJ) for (let j = 0; j < n; j++) J[j] = 1;
    return true;
  };
  const norm = (v: Float64Array): number => v.reduce((a, x) => Math.max(a, Math.abs(x)), 0);

  const newton = (start: Float64Array, deflate: boolean): Float64Array | null => {
    const u = Float64Array.from(start);
    for (let it = 0; it < 80; it++) {
      if (!residual(u, true)) return null;
      const r = norm(F);
      if (!arrowheadStep(n, J, F, d)) {
        for (let i = 0; i < n; i++) d[i] = -F[i];
        if (!lu.factor(Float64Array.from(J))) return null;
        lu.solve(d);
      }
      let tau = 1;
      if (deflate && found.length) {
        let gd = 0;
        for (const z of found) {
          let r2 = 0;
          for (let i = 0; i < n; i++) r2 += (u[i] - z[i]) ** 2;
          if (r2 === 0) return null;
          const c = -2 / (r2 * (1 + r2));
          for (let i = 0; i < n; i++) gd += c * (u[i] - z[i]) * d[i];
        }
        tau = 1 / (1 - gd);
      }
      // keep every mass positive, and stay inside the laws (Gent lock)
      let step = tau;
      for (let i = 0; i < n; i++) if (u[i] + step * d[i] <= 0) step = Math.min(step, (0.9 * u[i]) / -d[i]);
      const trial = new Float64Array(n);
      let ok = false;
      for (let h = 0; h < 40; h++) {
        for (let i = 0; i < n; i++) trial[i] = u[i] + step * d[i];
        if (residual(trial, false)) { ok = true; break; }
        step *= 0.5;
      }
      if (!ok) return null;
      let moved = 0;
      for (let i = 0; i < n; i++) moved = Math.max(moved, Math.abs(trial[i] - u[i]));
      u.set(trial);
      if (r < 1e-13 && moved < 1e-12) return u;
      if (moved < 1e-15) return r < 1e-10 ? u : null;
    }
    residual(u, false);
    return norm(F) < 1e-10 ? u : null;
  };

  const capped = chs.map((ch) => cappedSegments(ch, M, pa, s));
  /** Masses (over M) at the pressure in a combination's common range where they come closest to M. */
  const startAt = (combo: number[]): Float64Array | null => {
    const segs = combo.map((k, i) => capped[i][k]);
    const lo = Math.max(...segs.map((c) => c.pLo));
    const hi = Math.min(...segs.map((c) => c.pHi));
    if (!(hi > lo)) return null;
    let best: Float64Array | null = null;
    let miss = Infinity;
    for (let j = 1; j < 32; j++) {
      const p = lo + ((hi - lo) * j) / 32;
      const u = new Float64Array(n);
      let total = 0;
      let ok = true;
      for (let i = 0; i < n && ok; i++) {
        ok = chamberAt(chs[i], segs[i].seg, p, pa, s, tmp) || chamberAt(chs[i], segs[i].seg, p, pa, s, tmp, endVolume(segs[i], p));
        u[i] = tmp.m;
        total += tmp.m;
      }
      if (!ok || !(total > 0)) continue;
      if (Math.abs(total - M) < miss) {
        miss = Math.abs(total - M);
        best = u.map((x) => x / total);
      }
    }
    return best;
  };
  // combinations in order of how many chambers sit off their first segment (the states an engineer
  // meets first: all on the rising branch, one past its maximum, two, ...), then random ones
  const combos: number[][] = [];
  const budget = Math.max(0, starts - hints.length);
  const ordered = (k: number, from: number, acc: number[]): void => {
    if (combos.length >= budget / 2) return;
    if (k === 0) { combos.push(acc.slice()); return; }
    for (let i = from; i < n; i++) {
      for (let seg = 1; seg < capped[i].length; seg++) {
        acc[i] = seg;
        ordered(k - 1, i + 1, acc);
        acc[i] = 0;
      }
    }
  };
  for (let k = 0; k <= n && combos.length < budget / 2; k++) ordered(k, 0, new Array<number>(n).fill(0));
  while (combos.length < budget) combos.push(capped.map((c) => Math.floor(rng() * Math.max(1, c.length))));

  const tries: Float64Array[] = hints.map((h) => {
    const total = h.reduce((a, x) => a + x, 0);
    return h.map((x) => x / total);
  });
  const planned = tries.length + combos.length;
  let tried = 0;
  let timedOut = false;
  for (let k = 0; k < planned; k++) {
    // a few starts past the hints always run, so that a budget spent elsewhere still finds some
    if (k >= tries.length + MIN_STARTS && performance.now() > deadline) { timedOut = true; break; }
    const u0 = k < tries.length ? tries[k] : startAt(combos[k - tries.length]);
    tried++;
    if (!u0) continue;
    const u = newton(u0, true);
    if (!u) continue;
    const polished = newton(u, false) ?? u;
    if (found.some((z) => z.every((x, i) => Math.abs(x - polished[i]) <= 1e-7))) continue;
    found.push(polished);
  }
  const roots = found.map((u) => {
    const at: AtP[] = [];
    const segs: number[] = [];
    let p = 0;
    for (let i = 0; i < n; i++) {
      const r = pressureOfMass(chs[i], M * u[i], pa, s, chs[i].wall.V0);
      if (i === 0) p = r.p;
      at.push({ V: r.V, m: M * u[i], C: 1 / r.dpdm });
      segs.push(chs[i].wall.rigid ? 0 : segmentOfVolume(chs[i], r.V));
    }
    return { p, segs, at };
  });
  return { roots, tried, planned, timedOut };
}
