import { describe, expect, it } from 'vitest';
import type { ValveRating } from '../../src/netlist/types.js';
import { GASES, makeGas } from '../../src/physics/gas.js';
import { iso6358MassFlow } from '../../src/physics/iso6358.js';
import { orificeMassFlow } from '../../src/physics/orifice.js';
import { R_LIN, valveFlow } from '../../src/physics/valve-flow.js';

const air = makeGas(GASES.air);
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const iso: ValveRating = { kind: 'iso6358', conductance: 1e-8, criticalRatio: 0.3, subsonicIndex: 0.5 };
const ori: ValveRating = { kind: 'orifice', diameter: 1e-3, dischargeCoefficient: 0.7 };

describe('valve flow from a rating (ISO 6358-1:2013; Anderson ch. 5)', () => {
  it('forward flow equals the rated law, scaled by the opening; choked flag', () => {
    const a = valveFlow(iso, 600e3, 400e3, 293.15, 300, air, 1);
    expect(rel(a.mdot, 6.05655e-3)).toBeLessThan(2e-7); // docs/references.md, ISO 6358 worked value
    expect(a.choked).toBe(false);
    expect(rel(valveFlow(iso, 600e3, 400e3, 293.15, 300, air, 0.25).mdot, 0.25 * a.mdot)).toBeLessThan(1e-14);
    expect(valveFlow(iso, 600e3, 100e3, 293.15, 300, air, 1).choked).toBe(true);
    const A = (Math.PI / 4) * 1e-6;
    const b = valveFlow(ori, 600e3, 400e3, 293.15, 300, air, 1);
    expect(rel(b.mdot, orificeMassFlow(600e3, 400e3, 293.15, air.R, 1.4, A, 0.7))).toBeLessThan(1e-14);
    expect(valveFlow(ori, 600e3, 300e3, 293.15, 300, air, 1).choked).toBe(true);
    expect(valveFlow(ori, 600e3, 400e3, 293.15, 300, air, 0)).toEqual({ mdot: 0, choked: false });
  });

  it('reverse flow is negative and uses the upstream (to-side) temperature', () => {
    const r = valveFlow(iso, 400e3, 600e3, 293.15, 330, air, 1);
    expect(rel(r.mdot, -iso6358MassFlow(600e3, 400e3, 330, 1e-8, 0.3))).toBeLessThan(1e-14);
  });

  it('linear patch above r_lin = 0.999: continuous at r_lin, zero at Δp = 0, finite slope, linear in Δp', () => {
    for (const rating of [iso, ori]) {
      const pUp = 300e3;
      const atLin = valveFlow(rating, pUp, R_LIN * pUp, 293.15, 293.15, air, 1).mdot;
      const justAbove = valveFlow(rating, pUp, R_LIN * pUp * (1 + 1e-13), 293.15, 293.15, air, 1).mdot;
      const justBelow = valveFlow(rating, pUp, R_LIN * pUp * (1 - 1e-13), 293.15, 293.15, air, 1).mdot;
      expect(rel(justAbove, atLin)).toBeLessThan(1e-8);
      expect(rel(justBelow, atLin)).toBeLessThan(1e-8);
      expect(valveFlow(rating, pUp, pUp, 293.15, 293.15, air, 1).mdot).toBe(0);
      // linear in Δp at fixed downstream pressure, with the same conductance K for either side up
      const K = atLin / (pUp * (1 - R_LIN));
      for (const dp of [1e-6, 1, 50]) {
        expect(rel(valveFlow(rating, 200e3 + dp, 200e3, 293.15, 293.15, air, 1).mdot / dp, K)).toBeLessThan(1e-6);
        expect(rel(valveFlow(rating, 200e3, 200e3 + dp, 293.15, 293.15, air, 1).mdot / dp, -K)).toBeLessThan(1e-6);
      }
    }
  });

  it('flow increases with p_from at fixed p_to across reverse choking, zero, the patch and forward choking', () => {
    // Strictly, except in reverse choked flow (p_from ≤ b·p_to), where it cannot depend on p_from.
    for (const rating of [iso, ori]) {
      let prev = -Infinity;
      for (let pFrom = 50e3; pFrom <= 700e3; pFrom += 25) {
        const f = valveFlow(rating, pFrom, 200e3, 293.15, 310, air, 1);
        if (f.choked && f.mdot < 0) expect(f.mdot).toBe(prev === -Infinity ? f.mdot : prev);
        else expect(f.mdot).toBeGreaterThan(prev);
        prev = f.mdot;
      }
    }
  });
});
