import { describe, expect, it } from 'vitest';
import type { ValveRating } from '../../src/netlist/types.js';
import { GASES, makeGas } from '../../src/physics/gas.js';
import { seriesFlow } from '../../src/physics/series.js';
import { tubeFlow } from '../../src/physics/tube.js';
import { valveFlow } from '../../src/physics/valve-flow.js';

const air = makeGas(GASES.air);
const T = 293.15;
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const tube = (D: number, L: number) => (p1: number, p2: number): number => tubeFlow(p1, p2, T, air, D, L, 0).mdot;
const iso: ValveRating = { kind: 'iso6358', conductance: 2e-9, criticalRatio: 0.3, subsonicIndex: 0.5 };
const valve = (opening: number) => (p1: number, p2: number): number => valveFlow(iso, p1, p2, T, T, air, opening).mdot;

describe('two restrictions in series, no volume between (Brent 1973)', () => {
  it('two identical laminar tubes equal one tube of double length; pMid = √((pA² + pB²)/2) (compressible Hagen–Poiseuille)', () => {
    const pA = 300e3;
    const pB = 101.325e3;
    const s = seriesFlow(pA, pB, tube(0.3e-3, 1), tube(0.3e-3, 1));
    expect(rel(s.mdot, tubeFlow(pA, pB, T, air, 0.3e-3, 2, 0).mdot)).toBeLessThan(1e-12);
    expect(rel(s.pMid, Math.sqrt((pA * pA + pB * pB) / 2))).toBeLessThan(1e-13);
    const r = seriesFlow(pB, pA, tube(0.3e-3, 1), tube(0.3e-3, 1));
    expect(rel(r.mdot, -s.mdot)).toBeLessThan(1e-12);
  });

  it('mass balance first(pA, pMid) = second(pMid, pB) to 1e-12 for a valve inside a line, both directions', () => {
    const cases: [number, number][] = [[600e3, 101.325e3], [101.325e3, 600e3], [200e3, 199e3], [150e3, 101.325e3]];
    for (const [pA, pB] of cases) {
      for (const [first, second] of [[tube(4e-3, 2), valve(1)], [valve(0.3), tube(2e-3, 5)]]) {
        const s = seriesFlow(pA, pB, first, second);
        expect(s.pMid).toBeGreaterThanOrEqual(Math.min(pA, pB));
        expect(s.pMid).toBeLessThanOrEqual(Math.max(pA, pB));
        const m1 = first(pA, s.pMid);
        const m2 = second(s.pMid, pB);
        expect(rel(m1, m2)).toBeLessThan(1e-12);
        expect(Math.sign(s.mdot)).toBe(Math.sign(pA - pB));
        expect(Math.abs(s.mdot)).toBeLessThan(Math.abs(first(pA, pB)));
      }
    }
  });

  it('equal end pressures give exactly zero flow; a closed valve blocks the line', () => {
    expect(seriesFlow(2e5, 2e5, tube(4e-3, 2), valve(1))).toEqual({ mdot: 0, pMid: 2e5 });
    const closed = seriesFlow(600e3, 101.325e3, tube(4e-3, 2), valve(0));
    expect(closed.mdot).toBe(0);
    expect(closed.pMid).toBe(600e3);
  });
});
