/**
 * A receiver vented through a line that chokes: flow magnitudes against independent values
 * (test/reference/choked_lines.py: isothermal flow with friction, Shapiro 1953, ch. 6, and Fanno
 * flow, Anderson, Modern Compressible Flow, ch. 3, both entered isentropically;
 * docs/references.md, "Compressible flow limits").
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { at, modelFromText, runChecked } from '../helpers.js';

const ref = JSON.parse(readFileSync('test/reference/choked-lines.json', 'utf8')) as {
  blowdown: { times: number[]; isothermal: number[]; fanno: number[] };
};

const netlist = (method: string): string => `
format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  receiver: { wall: rigid, volume: 1 L, start: { pressure: 600 kPa gauge } }
lines:
  hose: { from: receiver, to: ambient, diameter: 4 mm, length: 1 m }
simulate: { duration: 1.5 s, sample: 5 ms, tolerance: 1e-10, method: ${method} }
`;

describe('1 L receiver at 6 bar gauge vented through a 4 mm × 1 m hose (isothermal)', () => {
  for (const method of ['implicit', 'explicit']) {
    it(`${method}: pressure history within 1e-6 of the independent isothermal-friction solution, within 3 % of Fanno`, () => {
      const r = runChecked(modelFromText(netlist(method)));
      ref.blowdown.times.forEach((t, k) => {
        const p = at(r, 'receiver.pressure', t);
        expect(Math.abs(p / ref.blowdown.isothermal[k] - 1)).toBeLessThan(1e-6);
        expect(Math.abs(p / ref.blowdown.fanno[k] - 1)).toBeLessThan(0.03);
      });
      expect(r.lines.hose.choked).toBe(true);
      expect(Math.abs(r.lines.hose.peak_mach - 1 / Math.sqrt(1.4))).toBeLessThan(1e-9);
      // the peak flow is the choked flow at the start: 10.93 g/s (Fanno 11.26 g/s; the ideal nozzle 20.80 g/s)
      expect(Math.abs(r.lines.hose.peak_flow / 10.926344e-3 - 1)).toBeLessThan(1e-5);
      // the line stops choking once the receiver has fallen far enough: one event, in time
      const stops = r.events.filter((e) => e.what === 'line hose stops choking');
      expect(stops.length).toBe(1);
      expect(r.events.filter((e) => e.what === 'line hose starts choking').length).toBe(1);
      expect(stops[0].t).toBeGreaterThan(0.4);
      expect(stops[0].t).toBeLessThan(1.5);
    });
  }
});

/** A rigid cell vented through one line into a reservoir at 0.1 kPa abs. */
const toVacuum = (V: string, p0: string, line: string, duration: string): ReturnType<typeof runChecked> => runChecked(modelFromText(`
format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  cell: { wall: rigid, volume: ${V}, start: { pressure: ${p0} } }
reservoirs:
  vacuum: { pressure: 0.1 kPa abs }
lines:
  ${line}
simulate: { duration: ${duration}, sample: 5 ms, tolerance: 1e-10, method: implicit }
`));

describe('a capillary whose laminar law would pass more than a nozzle: the ideal nozzle of its bore bounds it (Anderson, Modern Compressible Flow, ch. 5)', () => {
  it('0.02 mm × 0.1 mm from 400 kPa abs into near vacuum: p = p0·exp(−t/τ), τ = V/(A ψ √(γ R T)) (Cd = 1)', () => {
    // the laminar law (acceleration neglected, choking at the exit kept) passes more than the
    // nozzle down to about 110 kPa abs, reached at t ≈ 21 s
    const r = toVacuum('1 mL', '400 kPa abs', 'pinhole: { from: cell, to: vacuum, diameter: 0.02 mm, length: 0.1 mm }', '18 s');
    const R = 8.314462618 / 0.0289647;
    const D = 0.02e-3;
    const A = (Math.PI / 4) * D * D;
    const psi = Math.pow(2 / 2.4, 2.4 / 0.8);
    const V = 1e-6 + (A * 0.1e-3) / 2;
    const tau = V / (A * psi * Math.sqrt(1.4 * R * 293.15));
    for (const t of [5, 15]) expect(Math.abs(at(r, 'cell.pressure', t) / (400e3 * Math.exp(-t / tau)) - 1)).toBeLessThan(1e-6);
    expect(r.lines.pinhole.choked).toBe(true);
    expect(r.lines.pinhole.peak_mach).toBe(1);
  });
});

describe('a laminar capillary into near vacuum chokes at its exit (isothermal flow, Shapiro 1953, ch. 6)', () => {
  it('0.1 mm × 3 mm from 1 atm: the time to each pressure matches the closed form of dm/dt = −A·G(p)', () => {
    // exit at M = 1/√γ: p² − G²RT = k G, k = 64 μ L R T/D², so G = 2p²/(k + √(k² + 4RT p²)), and
    // t(p) = V/(2 R T A)·[F(p0) − F(p)], F(p) = −k/p − √(k² + c p²)/p + √c·asinh(√c p/k), c = 4 R T
    const r = toVacuum('10 mL', '101.325 kPa abs', 'capillary: { from: cell, to: vacuum, diameter: 0.1 mm, length: 3 mm }', '20 s');
    const R = 8.314462618 / 0.0289647;
    const T = 293.15;
    const D = 0.1e-3;
    const L = 3e-3;
    const A = (Math.PI / 4) * D * D;
    const mu = 1.716e-5 * Math.pow(T / 273.15, 1.5) * (273.15 + 110.4) / (T + 110.4);
    const k = (64 * mu * L * R * T) / (D * D);
    const c = 4 * R * T;
    const V = 10e-6 + (A * L) / 2;
    const F = (p: number): number => -k / p - Math.sqrt(k * k + c * p * p) / p + Math.sqrt(c) * Math.asinh((Math.sqrt(c) * p) / k);
    const tOf = (p: number): number => (V / (2 * R * T * A)) * (F(101325) - F(p));
    for (const p of [80e3, 50e3, 30e3]) {
      const t = tOf(p);
      expect(t).toBeLessThan(20);
      expect(Math.abs(at(r, 'cell.pressure', t) / p - 1)).toBeLessThan(1e-6);
    }
    expect(r.lines.capillary.regime).toBe('laminar');
    expect(r.lines.capillary.choked).toBe(true);
    expect(Math.abs(r.lines.capillary.peak_mach - 1 / Math.sqrt(1.4))).toBeLessThan(1e-9);
  });
});
