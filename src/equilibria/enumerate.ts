/**
 * Closed groups by enumeration: for every combination of wall segments, the roots of
 * Σ m_i(p) − M bracketed on a Chebyshev-clustered pressure grid and refined by Brent's method
 * (see equilibria.ts for the method and its references).
 */
import { solveVolume } from '../model/volume.js';
import { brent } from '../physics/roots.js';
import type { WallPoint } from '../physics/wall.js';
import { chamberAt, type AtP, type RestChamber, type Segment } from './rest.js';
import { SAME, SAMPLES } from './types.js';

// ---- closed groups: enumeration ----------------------------------------------------------

interface Profile {
  segs: (CappedSegment & { k0: number; k1: number; m: Float64Array; C: Float64Array })[];
}

export interface Root { p: number; segs: number[]; at: AtP[] }

/**
 * The end of a capped segment nearest to pressure p in pressure: used when p lies a rounding
 * error outside the segment's range, where the inversion finds no bracket.
 */
export function endVolume(c: { seg: Segment; pLo: number; pHi: number }, p: number): number {
  const nearLow = Math.abs(p - c.pLo) < Math.abs(p - c.pHi);
  return nearLow === c.seg.rising ? c.seg.Va : c.seg.Vb;
}

/** Chebyshev–Lobatto nodes on [a, b] (in ln V when the segment spans a large ratio). */
function nodes(a: number, b: number, N: number): number[] {
  const out: number[] = [];
  const logScale = a > 0 && b / a > 8;
  const A = logScale ? Math.log(a) : a;
  const B = logScale ? Math.log(b) : b;
  for (let j = 0; j < N; j++) {
    const x = 0.5 * (A + B) - 0.5 * (B - A) * Math.cos((Math.PI * j) / (N - 1));
    out.push(logScale ? Math.exp(x) : x);
  }
  out[0] = a;
  out[N - 1] = b;
  if (a === 0) for (let k = 1; k <= 24; k++) out.push(b * Math.pow(10, -k / 3)); // the slack end, p → 0
  return out;
}

interface CappedSegment { seg: Segment; index: number; pLo: number; pHi: number }

/**
 * A chamber's segments cut where it alone would hold all the gas M (masses are positive, so no
 * equilibrium lies beyond), with their absolute pressure ranges. A rigid chamber has one.
 */
export function cappedSegments(ch: RestChamber, M: number, pa: number, s: WallPoint): CappedSegment[] {
  if (ch.wall.rigid) return [{ seg: { Va: ch.wall.V0, Vb: ch.wall.V0, rising: true }, index: 0, pLo: 0, pHi: (M * (1 + 1e-6) * ch.RT) / (ch.wall.V0 + ch.Vd) }];
  // a little beyond, so that a lone chamber's own state (exactly at the cut) is inside the range
  let Vcap = solveVolume(ch.wall, pa, ch.Vd, M * (1 + 1e-6) * ch.RT, ch.wall.V0, ch.lo, s);
  if (!Number.isFinite(Vcap)) Vcap = ch.segments[ch.segments.length - 1].Vb;
  const list: CappedSegment[] = [];
  ch.segments.forEach((seg, index) => {
    if (seg.Va >= Vcap) return;
    const Vb = Math.min(seg.Vb, Vcap);
    ch.wall.eval(seg.Va, s);
    const p1 = Math.max(0, pa + s.p);
    ch.wall.eval(Vb, s);
    const p2 = pa + s.p;
    list.push({ seg: { Va: seg.Va, Vb, rising: seg.rising }, index, pLo: Math.min(p1, p2), pHi: Math.max(p1, p2) });
  });
  return list;
}

/**
 * How many branch combinations a closed group has for the gas M: the product over its chambers
 * of their segments below the pressure where one chamber alone would hold all the gas (2^N for
 * N spheres that can each be small or large). A number, never a list: 2^200 is about 1.6e60.
 */
export function branchCombinations(chs: RestChamber[], M: number, pa: number): number {
  const s: WallPoint = { p: 0, dpdV: 0 };
  const count = new Map<string, number>();
  let total = 1;
  for (const ch of chs) {
    let k = count.get(ch.key);
    if (k === undefined) { k = Math.max(1, cappedSegments(ch, M, pa, s).length); count.set(ch.key, k); }
    total *= k;
  }
  return total;
}

export function enumerateClosed(chs: RestChamber[], M: number, pa: number, maxComb: number, deadline = Infinity): { roots: Root[]; combos: number; timedOut: boolean } | null {
  const s: WallPoint = { p: 0, dpdV: 0 };
  const tmp: AtP = { V: 0, m: 0, C: 0 };
  const distinct = new Map<string, RestChamber>();
  for (const ch of chs) if (!distinct.has(ch.key)) distinct.set(ch.key, ch);

  // capped segments and their pressure ranges
  const capped = new Map<string, CappedSegment[]>();
  let bound = 1;
  for (const ch of chs) {
    let list = capped.get(ch.key);
    if (!list) {
      list = cappedSegments(ch, M, pa, s);
      capped.set(ch.key, list);
    }
    bound *= Math.max(1, list.length);
    if (bound > maxComb) return null;
  }

  // the common pressure grid: every segment's samples
  const grid: number[] = [];
  for (const [key, list] of capped) {
    const ch = distinct.get(key)!;
    for (const c of list) {
      if (ch.wall.rigid) {
        for (let j = 0; j <= 8; j++) grid.push((c.pHi * j) / 8);
        continue;
      }
      for (const V of nodes(c.seg.Va, c.seg.Vb, SAMPLES)) {
        ch.wall.eval(V, s);
        const p = pa + s.p;
        if (p >= c.pLo && p <= c.pHi) grid.push(p);
      }
      grid.push(c.pLo, c.pHi);
    }
  }
  grid.sort((a, b) => a - b);
  const P: number[] = [];
  for (const p of grid) if (P.length === 0 || p > P[P.length - 1]) P.push(p);
  const G = P.length;
  const lowerIndex = (x: number): number => { // first k with P[k] >= x
    let lo = 0, hi = G;
    while (lo < hi) { const mid = (lo + hi) >> 1; if (P[mid] < x) lo = mid + 1; else hi = mid; }
    return lo;
  };

  const profiles = new Map<string, Profile>();
  for (const [key, list] of capped) {
    const ch = distinct.get(key)!;
    const prof: Profile = { segs: [] };
    for (const c of list) {
      const k0 = lowerIndex(c.pLo);
      let k1 = lowerIndex(c.pHi);
      if (k1 >= G || P[k1] > c.pHi) k1--;
      const len = Math.max(0, k1 - k0 + 1);
      const m = new Float64Array(len);
      const C = new Float64Array(len);
      for (let k = k0; k <= k1; k++) {
        const p = P[k];
        if (!chamberAt(ch, c.seg, p, pa, s, tmp)) chamberAt(ch, c.seg, p, pa, s, tmp, endVolume(c, p));
        m[k - k0] = tmp.m;
        C[k - k0] = tmp.C;
      }
      prof.segs.push({ ...c, k0, k1, m, C });
    }
    profiles.set(key, prof);
  }

  // depth-first over combinations with running sums of mass and capacitance
  const n = chs.length;
  const sumM = Array.from({ length: n + 1 }, () => new Float64Array(G));
  const sumC = Array.from({ length: n + 1 }, () => new Float64Array(G));
  const choice: Profile['segs'][number][] = new Array(n);
  const roots: Root[] = [];
  let combos = 0;

  const exactAt = (p: number, out: AtP[] | null): { f: number; d: number } => {
    let f = -M;
    let d = 0;
    for (let i = 0; i < n; i++) {
      const c = choice[i];
      if (!chamberAt(chs[i], c.seg, p, pa, s, tmp)) chamberAt(chs[i], c.seg, p, pa, s, tmp, endVolume(c, p));
      f += tmp.m;
      d += tmp.C;
      if (out) out[i] = { ...tmp };
    }
    return { f, d };
  };
  const addRoot = (p: number): void => {
    const at: AtP[] = new Array(n);
    exactAt(p, at);
    roots.push({ p, segs: choice.map((c) => c.index), at });
  };
  const refine = (a: number, b: number, fa: number, fb: number): void => {
    const p = brent((x) => exactAt(x, null).f, a, b, fa, fb);
    if (Number.isFinite(p)) addRoot(p);
  };

  let timedOut = false;
  const leaf = (lo: number, hi: number): void => {
    combos++;
    if ((combos & 255) === 0 && performance.now() > deadline) timedOut = true;
    const F = sumM[n];
    const D = sumC[n];
    for (let k = lo; k <= hi; k++) {
      const fa = F[k] - M;
      if (fa === 0) { addRoot(P[k]); continue; }
      if (k === hi) break;
      const fb = F[k + 1] - M;
      if ((fa > 0) !== (fb > 0) && fb !== 0) {
        refine(P[k], P[k + 1], exactAt(P[k], null).f, exactAt(P[k + 1], null).f);
      } else if ((D[k] > 0) !== (D[k + 1] > 0)) {
        // a turning point of Σm between two samples may hide a pair of roots
        const da = exactAt(P[k], null).d;
        const db = exactAt(P[k + 1], null).d;
        const ps = brent((x) => exactAt(x, null).d, P[k], P[k + 1], da, db);
        if (!Number.isFinite(ps)) continue;
        const fs = exactAt(ps, null).f;
        if ((fs > 0) !== (fa > 0)) {
          refine(P[k], ps, exactAt(P[k], null).f, fs);
          refine(ps, P[k + 1], fs, exactAt(P[k + 1], null).f);
        }
      }
    }
  };

  const dfs = (i: number, lo: number, hi: number): void => {
    if (i === n) { leaf(lo, hi); return; }
    const prof = profiles.get(chs[i].key)!;
    for (const c of prof.segs) {
      if (timedOut) return;
      const a = Math.max(lo, c.k0);
      const b = Math.min(hi, c.k1);
      if (a > b) continue;
      let least = Infinity;
      const pm = sumM[i], pc = sumC[i], nm = sumM[i + 1], nc = sumC[i + 1];
      for (let k = a; k <= b; k++) {
        nm[k] = pm[k] + c.m[k - c.k0];
        nc[k] = pc[k] + c.C[k - c.k0];
        if (nm[k] < least) least = nm[k];
      }
      if (least > M * (1 + 1e-4)) continue; // the gas is used up whatever the others do
      choice[i] = c;
      dfs(i + 1, a, b);
    }
  };
  dfs(0, 0, G - 1);

  // the same state can be found from two neighbouring combinations (at an extremum)
  const unique: Root[] = [];
  for (const r of roots) {
    if (!unique.some((u) => u.at.every((x, i) => Math.abs(x.m - r.at[i].m) <= SAME * M))) unique.push(r);
  }
  unique.sort((a, b) => a.p - b.p || a.segs.join().localeCompare(b.segs.join()));
  return { roots: unique, combos, timedOut };
}
