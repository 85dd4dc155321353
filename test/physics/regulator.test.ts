/**
 * The regulator's proportional law, the droop line, and delivery curves
 * (physics/regulator.ts; the droop line is the static characteristic of a proportional
 * pressure-reducing valve, common practice).
 */
import { describe, expect, it } from 'vitest';
import { curveFlow, droopPressure, regulatorOpening, regulatorPosition, ventOpening } from '../../src/physics/regulator.js';

describe('regulator opening law', () => {
  const set = 400e3, band = 50e3;
  it('fully open at set − band, shut at set, linear between', () => {
    expect(regulatorOpening(set - band, set, band)).toBe(1);
    expect(regulatorOpening(set - 2 * band, set, band)).toBe(1);
    expect(regulatorOpening(set, set, band)).toBe(0);
    expect(regulatorOpening(set + 1, set, band)).toBe(0);
    expect(regulatorOpening(set - 0.3 * band, set, band)).toBeCloseTo(0.3, 14);
  });
  it('the vent mirrors it above the set pressure; the lagged position spans both', () => {
    expect(ventOpening(set, set, band)).toBe(0);
    expect(ventOpening(set + 0.25 * band, set, band)).toBeCloseTo(0.25, 14);
    expect(ventOpening(set + 3 * band, set, band)).toBe(1);
    expect(regulatorPosition(set + 0.25 * band, set, band, true)).toBeCloseTo(-0.25, 14);
    expect(regulatorPosition(set + 0.25 * band, set, band, false)).toBe(0);
    expect(regulatorPosition(set - 0.5 * band, set, band, true)).toBeCloseTo(0.5, 14);
  });
  it('the droop line is the inverse of opening × q_max', () => {
    const qMax = 0.01;
    for (const x of [0, 0.2, 0.7, 1]) {
      const p = droopPressure(x * qMax, qMax, set, band);
      expect(regulatorOpening(p, set, band) * qMax).toBeCloseTo(x * qMax, 15);
    }
  });
});

describe('delivery curve', () => {
  const P = [100e3, 500e3, 800e3];
  const Q = [2e-3, 1.5e-3, 0];
  it('linear between rows, held below the first, zero at and beyond the shut-off', () => {
    const s = new Float64Array(1);
    expect(curveFlow(50e3, P, Q, s)).toBe(2e-3);
    expect(s[0]).toBe(0);
    expect(curveFlow(300e3, P, Q, s)).toBeCloseTo(1.75e-3, 15);
    expect(s[0]).toBeCloseTo(-0.5e-3 / 400e3, 20);
    expect(curveFlow(650e3, P, Q)).toBeCloseTo(0.75e-3, 15);
    expect(curveFlow(800e3, P, Q)).toBe(0);
    expect(curveFlow(1e6, P, Q)).toBe(0);
  });
});
