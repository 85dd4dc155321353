import { describe, expect, it } from 'vitest';
import type { WallSpec } from '../../src/netlist/types.js';
import { gentLockStretch } from '../../src/physics/membrane.js';
import { makeWall, pvMonotone, type WallLaw, type WallPoint } from '../../src/physics/wall.js';

const P = 101325;
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const at = (w: WallLaw, V: number): WallPoint => {
  const o = { p: 0, dpdV: 0 };
  w.eval(V, o);
  return o;
};
const fdSlope = (w: WallLaw, V: number): number => {
  const h = 1e-6 * V;
  return (at(w, V + h).p - at(w, V - h).p) / (2 * h);
};

// μ = 0.4 MPa, t0/r0 = 0.02 (docs/references.md worked example), r0 = 5 cm.
const nhSpec: WallSpec = { law: 'neo-hookean', radius: 0.05, thickness: 0.001, shearModulus: 0.4e6 };
const mrSpec = (ratio: number): WallSpec => ({ law: 'mooney-rivlin', radius: 0.05, thickness: 0.001, c1: 0.2e6, c2: 0.2e6 * ratio });
const gentSpec: WallSpec = { law: 'gent', radius: 0.05, thickness: 0.001, shearModulus: 0.4e6, limit: 97.2 };
const balloonPoints: [number, number][] = [[1e-3, 0], [1.5e-3, 6000], [2e-3, 8000], [3e-3, 7000], [5e-3, 6000], [8e-3, 9000]];
const V0 = (4 / 3) * Math.PI * 0.05 ** 3;

describe('sphere walls (Treloar 1975; Ogden 1984; Gent 1996)', () => {
  const nh = makeWall(nhSpec, P);

  it('neo-Hookean: V0 = (4/3)π r0³, stretch round trip, Δp at λ = 2 is 7875.000 Pa (docs/references.md)', () => {
    expect(nh.sphere).toBe(true);
    expect(nh.rigid).toBe(false);
    expect(rel(nh.V0, V0)).toBeLessThan(1e-15);
    expect(nh.slackBelow).toBe(nh.V0);
    expect(rel(nh.stretch(nh.volumeAtStretch(1.7)), 1.7)).toBeLessThan(1e-15);
    expect(rel(at(nh, nh.volumeAtStretch(2)).p, 7875)).toBeLessThan(1e-12);
  });

  it('neo-Hookean: one maximum, at λ = 7^(1/6) to 1e-12, Δp_max = 9915.703 Pa (docs/references.md)', () => {
    expect(nh.extrema).toHaveLength(1);
    const [e] = nh.extrema;
    expect(e.kind).toBe('max');
    expect(rel(nh.stretch(e.V), 7 ** (1 / 6))).toBeLessThan(1e-12);
    expect(rel(e.p, 9915.703)).toBeLessThan(1e-7);
  });

  it('Mooney–Rivlin: max then min for C2/C1 = 0.1, none for 0.3; threshold ≈ 0.214 (docs/references.md, from memory)', () => {
    const k1 = makeWall(mrSpec(0.1), P).extrema;
    expect(k1.map((e) => e.kind)).toEqual(['max', 'min']);
    expect(k1[0].V).toBeLessThan(k1[1].V);
    expect(k1[0].p).toBeGreaterThan(k1[1].p);
    expect(makeWall(mrSpec(0.3), P).extrema).toHaveLength(0);
    let lo = 0.1;
    let hi = 0.3;
    for (let i = 0; i < 40; i++) {
      const m = 0.5 * (lo + hi);
      if (makeWall(mrSpec(m), P).extrema.length > 0) lo = m; else hi = m;
    }
    // Found numerically: 0.21446 (the quoted "about 0.214" agrees).
    expect(Math.abs(lo - 0.2145)).toBeLessThan(5e-4);
  });

  it('Gent (Jm = 97.2, from memory): max then min, finite lock volume, steep rise before it', () => {
    const g = makeWall(gentSpec, P);
    expect(g.extrema.map((e) => e.kind)).toEqual(['max', 'min']);
    expect(rel(g.Vmax, g.volumeAtStretch(gentLockStretch(97.2)))).toBeLessThan(1e-14);
    expect(at(g, g.Vmax).p).toBe(Infinity);
    expect(at(g, g.volumeAtStretch(0.99 * gentLockStretch(97.2))).p).toBeGreaterThan(5 * g.extrema[0].p);
    // The minimum: dΔp/dV vanishes there.
    expect(Math.abs(at(g, g.extrema[1].V).dpdV * g.extrema[1].V)).toBeLessThan(1e-6 * g.extrema[1].p);
  });

  it('slack regime: C¹ at V0, strictly increasing, reaches vacuum gauge −P exactly at V = 0', () => {
    for (const spec of [nhSpec, mrSpec(0.1), gentSpec]) {
      const w = makeWall(spec, P);
      const below = at(w, w.V0 * (1 - 1e-12));
      const above = at(w, w.V0);
      expect(Math.abs(below.p)).toBeLessThan(1e-6);
      expect(above.p).toBe(0);
      expect(rel(below.dpdV, above.dpdV)).toBeLessThan(1e-9);
      expect(rel(at(w, 0).p, -P)).toBeLessThan(1e-15);
      let prev = -Infinity;
      for (let i = 0; i <= 1000; i++) {
        const q = at(w, (w.V0 * i) / 1000);
        expect(q.p).toBeGreaterThan(prev);
        expect(q.dpdV).toBeGreaterThan(0);
        prev = q.p;
      }
      // linear continuation below 0 (solver overshoot only)
      const neg = at(w, -1e-6 * w.V0);
      expect(rel(neg.dpdV, at(w, 0).dpdV)).toBeLessThan(1e-12);
      expect(neg.p).toBeLessThan(-P);
    }
  });

  it('dΔp/dV matches central differences in the slack, elastic and near-lock ranges', () => {
    for (const spec of [nhSpec, mrSpec(0.1), mrSpec(0.3), gentSpec]) {
      const w = makeWall(spec, P);
      const Vs = [0.01, 0.3, 0.9, 1.05, 1.5, 2.64, 8, 27, 100].map((x) => x * w.V0).filter((V) => V < 0.999 * w.Vmax);
      if (Number.isFinite(w.Vmax)) Vs.push(0.995 * w.Vmax);
      for (const V of Vs) {
        const d = at(w, V).dpdV;
        expect(Math.abs(d - fdSlope(w, V))).toBeLessThan(1e-6 * Math.abs(d) + 1e-6 * P / w.V0);
      }
    }
  });

  it('pvMonotone holds for neo-Hookean, Mooney–Rivlin, Gent (Jm 97.2) and linear, and can fail', () => {
    for (const spec of [nhSpec, mrSpec(0.1), mrSpec(0.3), gentSpec]) expect(pvMonotone(makeWall(spec, P), P)).toEqual({ ok: true });
    expect(pvMonotone(makeWall({ law: 'linear', volume: 1e-3, compliance: 1e-9 }, P), P).ok).toBe(true);
    expect(pvMonotone(makeWall({ law: 'rigid', volume: 1e-3 }, P), P).ok).toBe(true);
    // A large rigid dead volume makes (P + Δp) + (V + Vd) dΔp/dV negative past the maximum.
    const nh = makeWall(nhSpec, P);
    const bad = pvMonotone(nh, P, 1000 * nh.V0);
    expect(bad.ok).toBe(false);
    expect(bad.at as number).toBeGreaterThan(nh.extrema[0].V);
  });
});

describe('rigid and linear walls', () => {
  it('rigid: V0 = volume, eval gives NaN with infinite slope', () => {
    const w = makeWall({ law: 'rigid', volume: 2e-3 }, P);
    expect(w.rigid).toBe(true);
    expect(w.V0).toBe(2e-3);
    expect(w.slackBelow).toBe(0);
    const o = at(w, 2e-3);
    expect(o.p).toBeNaN();
    expect(o.dpdV).toBe(Infinity);
    expect(w.stretch(2e-3)).toBeNaN();
  });
  it('linear: Δp = (V − V0)/C with slope 1/C', () => {
    const w = makeWall({ law: 'linear', volume: 1e-3, compliance: 2e-9 }, P);
    expect(at(w, 1.2e-3).p).toBeCloseTo(0.2e-3 / 2e-9, 6);
    expect(at(w, 1.2e-3).dpdV).toBe(1 / 2e-9);
    expect(w.extrema).toEqual([]);
  });
});

describe('measured wall (monotone cubic, Fritsch & Carlson 1980)', () => {
  const w = makeWall({ law: 'measured', points: balloonPoints }, P);

  it('reproduces the data points exactly', () => {
    for (const [V, p] of balloonPoints) expect(at(w, V).p).toBe(p);
    expect(w.V0).toBe(1e-3);
    expect(w.slackBelow).toBe(1e-3);
  });

  it('is monotone on every data interval with no overshoot, also on step-like data', () => {
    const step: [number, number][] = [[1, 0], [2, 0], [3, 10], [4, 10], [5, 10], [6, 20], [6.1, 20.5]];
    for (const pts of [balloonPoints, step]) {
      const m = makeWall({ law: 'measured', points: pts }, P);
      for (let k = 0; k + 1 < pts.length; k++) {
        const [Va, pa] = pts[k];
        const [Vb, pb] = pts[k + 1];
        let prev = pa;
        for (let i = 1; i <= 200; i++) {
          const p = at(m, Va + ((Vb - Va) * i) / 200).p;
          expect(p).toBeGreaterThanOrEqual(Math.min(pa, pb) - 1e-12 * Math.abs(pb));
          expect(p).toBeLessThanOrEqual(Math.max(pa, pb) + 1e-12 * Math.abs(pb));
          if (pb >= pa) expect(p).toBeGreaterThanOrEqual(prev - 1e-12); else expect(p).toBeLessThanOrEqual(prev + 1e-12);
          prev = p;
        }
      }
    }
  });

  it('reports the data turning points as extrema', () => {
    expect(w.extrema).toEqual([{ V: 2e-3, p: 8000, kind: 'max' }, { V: 5e-3, p: 6000, kind: 'min' }]);
  });

  it('slack below the first point: C¹ there, increasing, −P at V = 0; linear above the last point', () => {
    const a = at(w, 1e-3);
    const b = at(w, 1e-3 * (1 - 1e-12));
    expect(rel(b.dpdV, a.dpdV)).toBeLessThan(1e-6);
    expect(rel(at(w, 0).p, -P)).toBeLessThan(1e-15);
    for (let i = 1; i <= 100; i++) expect(at(w, (1e-3 * i) / 100).p).toBeGreaterThan(at(w, (1e-3 * (i - 1)) / 100).p);
    const end = at(w, 8e-3);
    expect(at(w, 9e-3).p).toBeCloseTo(9000 + end.dpdV * 1e-3, 6);
  });

  it('data starting flat: the slack cubic still reaches −P monotonically and joins C¹', () => {
    const m = makeWall({ law: 'measured', points: [[1e-3, 0], [2e-3, 0], [3e-3, 500]] }, P);
    expect(rel(at(m, 0).p, -P)).toBeLessThan(1e-15);
    expect(at(m, 1e-3 * (1 - 1e-9)).dpdV).toBeLessThan(1e-3 * P / 1e-3);
    for (let i = 1; i <= 100; i++) expect(at(m, (1e-3 * i) / 100).p).toBeGreaterThan(at(m, (1e-3 * (i - 1)) / 100).p);
  });

  it('dΔp/dV matches central differences in slack, data and extension ranges', () => {
    for (const V of [1e-5, 3e-4, 9e-4, 1.2e-3, 1.7e-3, 2.5e-3, 4e-3, 6.5e-3, 1e-2]) {
      const d = at(w, V).dpdV;
      expect(Math.abs(d - fdSlope(w, V))).toBeLessThan(1e-6 * Math.abs(d) + 1e-3);
    }
  });

  it('pvMonotone holds for the balloon-like data', () => {
    expect(pvMonotone(w, P)).toEqual({ ok: true });
  });

  it('rejects volumes that do not increase strictly (programmer error)', () => {
    expect(() => makeWall({ law: 'measured', points: [[1e-3, 0], [1e-3, 5]] }, P)).toThrow();
    expect(() => makeWall({ law: 'measured', points: [[2e-3, 0], [1e-3, 5]] }, P)).toThrow();
  });
});
