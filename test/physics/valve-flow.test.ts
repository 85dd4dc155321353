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

describe('an air-rated ISO 6358 valve passing another gas (equivalent nozzle; docs/references.md, "Compressible flow limits")', () => {
  const rating = { kind: 'iso6358' as const, conductance: 1e-8, criticalRatio: 0.3, subsonicIndex: 0.5 };
  const airGas = makeGas(GASES.air);
  const he = makeGas(GASES.helium);
  const n2 = makeGas(GASES.nitrogen);
  const ratio = (g: typeof he, p2: number): number =>
    valveFlow(rating, 600e3, p2, 293.15, 293.15, g, 1).mdot / valveFlow(rating, 600e3, p2, 293.15, 293.15, airGas, 1).mdot;

  it('helium: choked flow 0.394 of air’s (±5 %), the nozzle ratio √(γ/R)ψ(γ) for γ = 5/3, M = 4.0026 g/mol', () => {
    const psi = (g: number): number => Math.pow(2 / (g + 1), (g + 1) / (2 * (g - 1)));
    const Rhe = 8.314462618 / 4.002602e-3;
    const Rair = 8.314462618 / 28.9647e-3;
    const closed = (Math.sqrt((5 / 3) / Rhe) * psi(5 / 3)) / (Math.sqrt(1.4 / Rair) * psi(1.4));
    expect(Math.abs(closed - 0.394) / 0.394).toBeLessThan(2e-3); // the published 0.394
    const r = ratio(he, 100e3);
    expect(Math.abs(r - 0.394) / 0.394).toBeLessThan(0.05);
    expect(Math.abs(r - closed)).toBeLessThan(1e-12);
    expect(valveFlow(rating, 600e3, 100e3, 293.15, 293.15, he, 1).choked).toBe(true);
  });

  it('air is unchanged (factor exactly 1); nitrogen 1.017 (M 28.01 against 28.96 g/mol, same γ: √(M_N2/M_air))', () => {
    expect(airGas.isoFactor).toBe(1);
    expect(Math.abs(ratio(n2, 100e3) - Math.sqrt(28.0134 / 28.9647))).toBeLessThan(1e-12);
    expect(valveFlow(rating, 600e3, 400e3, 293.15, 293.15, airGas, 1).mdot).toBeCloseTo(6.05655e-3, 7);
  });

  it('the same factor in subsonic flow (the shape b, m stays air’s) and the equivalent orifice agrees when choked', () => {
    expect(Math.abs(ratio(he, 500e3) - he.isoFactor)).toBeLessThan(1e-12);
    // the equivalent nozzle of the rating: A_e = C ρ0 √(R_air T0)/(√γ ψ(γ)) with air's constants
    const Rair = 8.314462618 / 28.9647e-3;
    const psiC = Math.sqrt(1.4) * Math.pow(2 / 2.4, 2.4 / 0.8);
    const Ae = (1e-8 * 1.185 * Math.sqrt(Rair * 293.15)) / psiC;
    const orifice = { kind: 'orifice' as const, diameter: Math.sqrt((4 * Ae) / Math.PI), dischargeCoefficient: 1 };
    for (const g of [airGas, he, n2]) {
      const iso = valveFlow(rating, 600e3, 100e3, 293.15, 293.15, g, 1).mdot;
      const noz = valveFlow(orifice, 600e3, 100e3, 293.15, 293.15, g, 1).mdot;
      expect(Math.abs(iso / noz - 1)).toBeLessThan(1e-12);
    }
  });
});
