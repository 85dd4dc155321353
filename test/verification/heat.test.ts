/**
 * The energy equation (Cengel & Boles, Thermodynamics, first law for control volumes):
 * closed forms and exact invariants that any correct implementation must reproduce.
 */
import { describe, expect, it } from 'vitest';
import { channel, modelFromText, runChecked } from '../helpers.js';

const R = 8.314462618 / 0.0289647;
const cv = R / 0.4;

describe('heat exchange with the surroundings (Newton cooling of a closed rigid chamber)', () => {
  it('T relaxes as Ta + (T0 − Ta)·exp(−hA·t/(m·cv)) and p follows m·R·T/V', () => {
    const r = runChecked(modelFromText(`
format: 1
heat: exchange
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 300 kPa abs }, temperature: 350 K, heat-transfer: 0.5 W/K }
valves:
  shut: { from: tank, to: ambient, orifice: 1 mm, discharge-coefficient: 0.6, initially: closed }
simulate: { duration: 10 s, sample: 50 ms, tolerance: 1e-10 }
`));
    const m = (300e3 * 1e-3) / (R * 350);
    const tau = (m * cv) / 0.5;
    const T = channel(r, 'tank.temperature');
    const p = channel(r, 'tank.pressure');
    r.trace.times.forEach((t, k) => {
      const want = 293.15 + (350 - 293.15) * Math.exp(-t / tau);
      expect(Math.abs(T[k] - want)).toBeLessThan(1e-6);
      expect(Math.abs(p[k] - (m * R * T[k]) / 1e-3) / p[k]).toBeLessThan(1e-9);
    });
  });
});

describe('adiabatic exchange between two rigid tanks', () => {
  it('conserves the total internal energy Σ m·cv·T (the throttled enthalpy leaves one tank and enters the other)', () => {
    const r = runChecked(modelFromText(`
format: 1
heat: adiabatic
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  hot: { wall: rigid, volume: 0.5 L, start: { pressure: 500 kPa abs }, temperature: 330 K }
  cold: { wall: rigid, volume: 1.5 L, start: { pressure: 120 kPa abs }, temperature: 280 K }
valves:
  link: { from: hot, to: cold, orifice: 2 mm, discharge-coefficient: 0.7, initially: open }
simulate: { duration: 5 s, sample: 20 ms, tolerance: 1e-10, method: implicit }
`));
    const U = r.trace.times.map((_, k) =>
      ['hot', 'cold'].reduce((s, c) => s + channel(r, `${c}.mass`)[k] * cv * channel(r, `${c}.temperature`)[k], 0));
    for (const u of U) expect(Math.abs(u / U[0] - 1)).toBeLessThan(1e-9);
    // and the pressures meet
    expect(Math.abs(r.chambers.hot.final.pressure - r.chambers.cold.final.pressure)).toBeLessThan(100);
  });
});

describe('adiabatic exchange between two rubber spheres (moving walls)', () => {
  it('conserves Σ (m·cv·T + W_wall(V) + pa·V), with W_wall = ∫Δp dV = 3V0·c·(λ²/2 + λ⁻⁴/4) for the neo-Hookean law', () => {
    // Energy of the gas plus the elastic energy stored in the wall plus the work done on the
    // atmosphere: the flow between the spheres carries enthalpy, the walls exchange p·dV work,
    // so this sum is an exact invariant of the model (Cengel & Boles, first law; Treloar 1975).
    const r = runChecked(modelFromText(`
format: 1
heat: adiabatic
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  a: { wall: neo-hookean, radius: 20 mm, thickness: 1 mm, shear-modulus: 0.3 MPa, start: { stretch: 1.3 } }
  b: { wall: neo-hookean, radius: 20 mm, thickness: 1 mm, shear-modulus: 0.3 MPa, start: { stretch: 1.0 }, temperature: 310 K }
valves:
  link: { from: a, to: b, orifice: 1 mm, discharge-coefficient: 0.7, initially: open }
simulate: { duration: 3 s, sample: 10 ms, tolerance: 1e-10, method: implicit }
`));
    const r0 = 0.02, c = (2 * 0.3e6 * 0.001) / r0, V0 = (4 / 3) * Math.PI * r0 ** 3, pa = 101325;
    const W = (l: number): number => (l >= 1 ? 3 * V0 * c * (l * l / 2 + l ** -4 / 4 - 0.75) : Number.NaN);
    const E = r.trace.times.map((_, k) => ['a', 'b'].reduce((s, n) => {
      const m = channel(r, `${n}.mass`)[k], T = channel(r, `${n}.temperature`)[k];
      const V = channel(r, `${n}.volume`)[k], l = channel(r, `${n}.stretch`)[k];
      return s + m * cv * T + W(l) + pa * V;
    }, 0));
    const spread = Math.max(...E) - Math.min(...E);
    expect(Number.isFinite(spread)).toBe(true);
    expect(spread / E[0]).toBeLessThan(1e-9);
    // a lot of energy did move: the stretches changed visibly
    expect(Math.abs(r.chambers.b.final.stretch! - 1)).toBeGreaterThan(0.05);
  });
});
