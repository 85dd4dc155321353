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

describe('a capillary whose laminar law would pass more than a nozzle: the ideal nozzle of its bore bounds it (Anderson, Modern Compressible Flow, ch. 5)', () => {
  it('0.02 mm × 0.1 mm from 400 kPa abs into near vacuum: p = p0·exp(−t/τ), τ = V/(A ψ √(γ R T)) (Cd = 1)', () => {
    // the laminar law (acceleration neglected, choking at the exit kept) passes more than the
    // nozzle down to about 110 kPa abs, reached at t ≈ 21 s
    const r = runChecked(modelFromText(`
format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  cell: { wall: rigid, volume: 1 mL, start: { pressure: 400 kPa abs } }
reservoirs:
  vacuum: { pressure: 0.1 kPa abs }
lines:
  pinhole: { from: cell, to: vacuum, diameter: 0.02 mm, length: 0.1 mm }
simulate: { duration: 18 s, sample: 10 ms, tolerance: 1e-10, method: implicit }
`));
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
