import { describe, expect, it } from 'vitest';
import { ANR, GASES, R_UNIVERSAL, anrDensity, makeGas, sutherland } from '../../src/physics/gas.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

describe('gas constants', () => {
  it('dry air R, cp, cv from R = 8.314462618 (CODATA 2018) and M = 28.9647 g/mol (docs/references.md)', () => {
    const air = makeGas(GASES.air);
    expect(R_UNIVERSAL).toBe(8.314462618);
    expect(rel(air.R, 287.055)).toBeLessThan(2e-6);
    expect(rel(air.cp, 1004.69)).toBeLessThan(5e-6);
    expect(rel(air.cv, 717.64)).toBeLessThan(1e-5);
    expect(rel(air.cp - air.cv, air.R)).toBeLessThan(1e-14);
    expect(rel(air.cp / air.cv, 1.4)).toBeLessThan(1e-14);
  });

  it('cp and cv of air within 0.2 % of Cengel & Boles Table A-2 at 300 K (1.005 / 0.718 kJ/(kg·K), from memory)', () => {
    const air = makeGas(GASES.air);
    expect(rel(air.cp, 1005)).toBeLessThan(2e-3);
    expect(rel(air.cv, 718)).toBeLessThan(2e-3);
  });
});

describe('Sutherland viscosity', () => {
  const air = makeGas(GASES.air);

  it('reproduces the worked values μ(300 K) = 1.84592e-5 and μ(293.15 K) = 1.81332e-5 Pa·s (docs/references.md)', () => {
    expect(rel(air.viscosity(300), 1.84592e-5)).toBeLessThan(3e-6);
    expect(rel(air.viscosity(293.15), 1.81332e-5)).toBeLessThan(3e-6);
    expect(air.viscosity(273.15)).toBe(1.716e-5);
  });

  it('air within 0.5 % of Incropera & DeWitt Table A.4 at 250, 300, 350 K (from memory)', () => {
    const table: [number, number][] = [[250, 1.596e-5], [300, 1.846e-5], [350, 2.082e-5]];
    for (const [T, mu] of table) expect(rel(air.viscosity(T), mu)).toBeLessThan(5e-3);
  });

  it('N2, CO2, He within 1 % of Incropera & DeWitt Table A.4 at 300 K (178.2, 149, 199 ×1e-7 Pa·s, from memory)', () => {
    expect(rel(makeGas(GASES.nitrogen).viscosity(300), 178.2e-7)).toBeLessThan(1e-2);
    expect(rel(makeGas(GASES['carbon-dioxide']).viscosity(300), 149e-7)).toBeLessThan(1e-2);
    expect(rel(makeGas(GASES.helium).viscosity(300), 199e-7)).toBeLessThan(1e-2);
  });

  it('is the closed form μref (T/Tref)^1.5 (Tref + S)/(T + S)', () => {
    expect(rel(sutherland(400, 2e-5, 300, 100), 2e-5 * (4 / 3) ** 1.5 * (400 / 500))).toBeLessThan(1e-14);
  });
});

describe('ANR density (ISO 8778, ISO 6358-1)', () => {
  it('air uses the defined ρ0 = 1.185 kg/m³ (from memory)', () => {
    expect(anrDensity(makeGas(GASES.air))).toBe(1.185);
    expect(ANR).toEqual({ pressure: 100e3, temperature: 293.15 });
  });
  it('other gases: ideal gas at 100 kPa, 293.15 K', () => {
    const n2 = makeGas(GASES.nitrogen);
    expect(rel(anrDensity(n2), (100e3 * 28.0134e-3) / (R_UNIVERSAL * 293.15))).toBeLessThan(1e-14);
  });
});
