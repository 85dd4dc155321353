import { describe, expect, it } from 'vitest';
import { GASES, makeGas } from '../../src/physics/gas.js';
import { iso6358MassFlow } from '../../src/physics/iso6358.js';
import { criticalPressureRatio, orificeMassFlow } from '../../src/physics/orifice.js';

const air = makeGas(GASES.air);
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

describe('isentropic orifice (Anderson, Modern Compressible Flow, 3rd ed., ch. 5)', () => {
  it('critical pressure ratio 0.528281788 for γ = 1.4 (docs/references.md)', () => {
    expect(rel(criticalPressureRatio(1.4), 0.528281788)).toBeLessThan(1e-9);
  });

  it('A = 1 mm², p0 = 600 kPa, T0 = 293.15 K: choked 1.416263e-3, at p2 = 400 kPa 1.354813e-3 kg/s (docs/references.md)', () => {
    expect(rel(orificeMassFlow(600e3, 100e3, 293.15, air.R, 1.4, 1e-6), 1.416263e-3)).toBeLessThan(5e-7);
    expect(rel(orificeMassFlow(600e3, 400e3, 293.15, air.R, 1.4, 1e-6), 1.354813e-3)).toBeLessThan(5e-7);
  });

  it('choked flow is independent of p2, continuous at r*, Cd multiplies, zero for p2 ≥ p0', () => {
    const choked = orificeMassFlow(600e3, 0, 293.15, air.R, 1.4, 1e-6);
    expect(orificeMassFlow(600e3, 300e3, 293.15, air.R, 1.4, 1e-6)).toBe(choked);
    const rc = criticalPressureRatio(1.4);
    expect(rel(orificeMassFlow(600e3, 600e3 * rc * (1 + 1e-12), 293.15, air.R, 1.4, 1e-6), choked)).toBeLessThan(1e-9);
    expect(rel(orificeMassFlow(600e3, 400e3, 293.15, air.R, 1.4, 1e-6, 0.7), 0.7 * 1.354813e-3)).toBeLessThan(5e-7);
    expect(orificeMassFlow(600e3, 600e3, 293.15, air.R, 1.4, 1e-6)).toBe(0);
    expect(orificeMassFlow(500e3, 600e3, 293.15, air.R, 1.4, 1e-6)).toBe(0);
  });
});

describe('ISO 6358-1:2013 characteristic (Beater, Pneumatic Drives, 2007, eq. 5.1)', () => {
  it('C = 1e-8 m³/(s·Pa), b = 0.3, 600 → 400 kPa, 293.15 K: qm = 6.056550e-3 kg/s (docs/references.md)', () => {
    expect(rel(iso6358MassFlow(600e3, 400e3, 293.15, 1e-8, 0.3), 6.05655e-3)).toBeLessThan(2e-7);
  });

  it('choked qm = C ρ0 p1 √(T0/T1) for r ≤ b, continuous at b, zero at r = 1, m exponent applies', () => {
    const choked = 1e-8 * 1.185 * 600e3 * Math.sqrt(293.15 / 320);
    expect(rel(iso6358MassFlow(600e3, 100e3, 320, 1e-8, 0.3), choked)).toBeLessThan(1e-14);
    expect(rel(iso6358MassFlow(600e3, 180e3 * (1 + 1e-12), 320, 1e-8, 0.3), choked)).toBeLessThan(1e-9);
    expect(iso6358MassFlow(600e3, 600e3, 293.15, 1e-8, 0.3)).toBe(0);
    const z = (400 / 600 - 0.3) / 0.7;
    expect(rel(iso6358MassFlow(600e3, 400e3, 293.15, 1e-8, 0.3, 0.6), 1e-8 * 1.185 * 600e3 * (1 - z * z) ** 0.6)).toBeLessThan(1e-14);
  });
});
