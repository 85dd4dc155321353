/**
 * A compressor with a straight delivery curve filling a rigid tank: with q(p) = q0·(ps − p)/(ps − p0)
 * between the tank's start pressure p0 and the shut-off ps, an isothermal ideal gas in a rigid
 * volume gives (V/(R T))·ṗ = q(p), so p(t) = ps − (ps − p0)·exp(−t/τ), τ = V·(ps − p0)/(R T q0)
 * (a linear first-order equation, closed form).
 */
import { describe, expect, it } from 'vitest';
import { at, modelFromText, runChecked } from '../helpers.js';

describe('compressor delivery curve filling a tank (closed form of the linear curve)', () => {
  const R = 8.314462618 / 0.0289647, T = 293.15, pa = 101325;
  const V = 2e-3, q0 = 1e-3, p0 = pa, ps = pa + 600e3;
  const tau = (V * (ps - p0)) / (R * T * q0);
  for (const method of ['implicit', 'explicit']) {
    it(`${method}: p(t) within 1e-7 of the closed form, delivery stops at the shut-off`, () => {
      const r = runChecked(modelFromText(`
format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  tank: { wall: rigid, volume: 2 L, start: { pressure: 0 kPa gauge } }
feeds:
  compressor: { into: tank, curve: [[0 kPa gauge, 1 g/s]], shut-off: 600 kPa gauge }
simulate: { duration: ${5 * tau} s, tolerance: 1e-10, method: ${method} }
`));
      for (const t of [0.2 * tau, tau, 3 * tau, 5 * tau]) {
        const p = ps - (ps - p0) * Math.exp(-t / tau);
        expect(Math.abs(at(r, 'tank.pressure', t) - p) / p).toBeLessThan(1e-7);
      }
      expect(r.chambers.tank.final.pressure).toBeLessThan(ps);
    });
  }
});
