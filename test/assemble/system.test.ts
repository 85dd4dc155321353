/** Behaviour of the assembled network: valves, feeds, reservoirs, hysteresis. */
import { describe, expect, it } from 'vitest';
import { NetworkSystem } from '../../src/assemble/system.js';
import { drive } from '../../src/solve/driver.js';
import { rosenbrock } from '../../src/solve/rosenbrock.js';
import { at, channel, modelFromText, runChecked } from '../helpers.js';

describe('relief valve', () => {
  it('opens exactly at its set point and reseats at its reseat pressure (events located on the dense output)', () => {
    const model = modelFromText(`
format: 1
reservoirs:
  supply: { pressure: [[0 s, 300 kPa gauge], [2 s, 300 kPa gauge], [2.01 s, 0 kPa gauge], [4 s, 0 kPa gauge]] }
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }
lines:
  fill: { from: supply, to: tank, diameter: 2.5 mm, length: 0.5 m }
valves:
  relief: { from: tank, to: ambient, orifice: 6 mm, discharge-coefficient: 0.6, relief: { opens-above: 100 kPa gauge, reseats-below: 80 kPa gauge } }
simulate: { duration: 4 s, sample: 1 ms, tolerance: 1e-9 }
`);
    // Drive the assembled system directly to read the state at the event times themselves
    // (the driver observes the located event state as a step end).
    const sys = new NetworkSystem(model);
    const seen: { t: number; gauge: number }[] = [];
    const r = drive(sys, {
      integrator: rosenbrock, t0: 0, tEnd: 4, y0: sys.initialState(), sample: 0.01,
      observe: (t, y) => { sys.evaluate(t, y); seen.push({ t, gauge: sys.p[0] - sys.pa }); },
    });
    expect(r.status).toBe('completed');
    const gaugeAt = (t: number): number => seen.find((s) => s.t === t)!.gauge;
    const opens = sys.log.filter((e) => e.what === 'relief valve relief opens');
    const reseats = sys.log.filter((e) => e.what === 'relief valve relief reseats');
    expect(opens.length).toBeGreaterThan(0);
    expect(reseats.length).toBeGreaterThan(0);
    for (const e of opens) expect(Math.abs(gaugeAt(e.t) - 100e3)).toBeLessThan(1e-3);
    for (const e of reseats) expect(Math.abs(gaugeAt(e.t) - 80e3)).toBeLessThan(1e-3);
    // and the whole run holds the tank near the set point (the relief is much larger than the fill line)
    const res = runChecked(model);
    expect(res.chambers.tank.peak.gauge).toBeLessThan(101e3);
  });
});

describe('check valve', () => {
  it('passes flow only forward, and holds back its cracking pressure', () => {
    const r = runChecked(modelFromText(`
format: 1
chambers:
  up: { wall: rigid, volume: 1 L, start: { pressure: 50 kPa gauge } }
  down: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }
  back: { wall: rigid, volume: 1 L, start: { pressure: 200 kPa gauge } }
valves:
  fwd: { from: up, to: down, orifice: 2 mm, discharge-coefficient: 0.7, check: { cracking: 20 kPa } }
  rev: { from: down, to: back, orifice: 2 mm, discharge-coefficient: 0.7, check: { cracking: 5 kPa } }
simulate: { duration: 5 s, sample: 5 ms, tolerance: 1e-9 }
`));
    // forward valve stops when up − down = cracking; the reverse-mounted one never flows
    expect(r.chambers.up.final.pressure - r.chambers.down.final.pressure).toBeCloseTo(20e3, -1);
    expect(Math.max(...channel(r, 'rev.flow').map(Math.abs))).toBe(0);
    expect(r.chambers.back.final.gauge).toBeCloseTo(200e3, 6);
    expect(r.events.some((e) => e.what === 'check valve fwd closes')).toBe(true);
  });
});

describe('feeds', () => {
  it('a standard volumetric rate uses the ISO 6358-1 reference density 1.185 kg/m³ for air (from memory)', () => {
    const r = runChecked(modelFromText(`
format: 1
chambers:
  tank: { wall: rigid, volume: 5 L, start: { pressure: 0 kPa gauge } }
feeds:
  pump: { into: tank, rate: 10 L/min ANR }
simulate: { duration: 60 s, sample: 1 s }
`));
    expect(r.mass.through_boundaries).toBeCloseTo((10e-3 / 60) * 1.185 * 60, 12);
  });

  it('a schedule scales the rate', () => {
    const r = runChecked(modelFromText(`
format: 1
chambers:
  tank: { wall: rigid, volume: 5 L, start: { pressure: 0 kPa gauge } }
feeds:
  pump: { into: tank, rate: 1 g/s, initially: 0%, schedule: [ { at: 1 s, open: 100%, over: 2 s }, { at: 5 s, open: 0% } ] }
simulate: { duration: 6 s, sample: 10 ms }
`));
    // 1 g/s × (ramp 2 s at half + 2 s full) = 3 g
    expect(r.mass.through_boundaries).toBeCloseTo(3e-3, 12);
  });
});

describe('reservoir pressure tables', () => {
  it('a tank on a large line follows a stepped supply table (auto hands over to the stiff method at the kink)', () => {
    const r = runChecked(modelFromText(`
format: 1
reservoirs:
  supply: { pressure: [[0 s, 0 kPa gauge], [1 s, 0 kPa gauge], [1.001 s, 200 kPa gauge], [3 s, 200 kPa gauge]] }
chambers:
  tank: { wall: rigid, volume: 0.1 L, start: { pressure: 0 kPa gauge } }
lines:
  hose: { from: supply, to: tank, diameter: 4 mm, length: 0.3 m }
simulate: { duration: 3 s, sample: 10 ms }
`));
    expect(Math.abs(at(r, 'tank.gauge', 0.99))).toBeLessThan(1e-6);
    expect(r.chambers.tank.final.gauge).toBeCloseTo(200e3, -1);
    expect(r.stats.method).toMatch(/rodas/);
  });
});

describe('measured wall with hysteresis', () => {
  it('follows the inflation curve while filling and moves to the deflation curve while emptying', () => {
    const curve = (pts: [number, number][], V: number): number => {
      for (let i = 1; i < pts.length; i++) {
        if (V <= pts[i][0]) return pts[i - 1][1] + ((pts[i][1] - pts[i - 1][1]) * (V - pts[i - 1][0])) / (pts[i][0] - pts[i - 1][0]);
      }
      return Number.NaN;
    };
    const up: [number, number][] = [[20, 0], [60, 10], [100, 30], [140, 60]];
    const down: [number, number][] = [[20, 0], [60, 4], [100, 20], [140, 50]];
    const pts = (c: [number, number][]) => c.map(([v, p]) => `[${v} mL, ${p} kPa gauge]`).join(', ');
    const r = runChecked(modelFromText(`
format: 1
chambers:
  bag: { wall: measured, points: [${pts(up)}], deflation: [${pts(down)}], start: { volume: 40 mL } }
feeds:
  pump: { into: bag, rate: 0.05 g/s, schedule: [ { at: 2 s, open: 0% } ] }
valves:
  vent: { from: bag, to: ambient, orifice: 1 mm, discharge-coefficient: 0.6, initially: closed, schedule: [ { at: 2.5 s, open: 100% } ] }
simulate: { duration: 6 s, sample: 10 ms, tolerance: 1e-9 }
`));
    // The interpolant is a monotone cubic, not the straight lines above, so compare where
    // the two curves differ by far more than the interpolation difference: at mid-range.
    const V1 = at(r, 'bag.volume', 1.9) * 1e6;
    const g1 = at(r, 'bag.gauge', 1.9) / 1e3;
    expect(V1).toBeGreaterThan(70);
    expect(Math.abs(g1 - curve(up, V1))).toBeLessThan(Math.abs(g1 - curve(down, V1)));
    const k = r.trace.times.findIndex((t) => t > 2.5 && channel(r, 'bag.volume')[r.trace.times.indexOf(t)] * 1e6 < V1 - 20);
    expect(k).toBeGreaterThan(0);
    const V2 = channel(r, 'bag.volume')[k] * 1e6;
    const g2 = channel(r, 'bag.gauge')[k] / 1e3;
    expect(Math.abs(g2 - curve(down, V2))).toBeLessThan(Math.abs(g2 - curve(up, V2)));
  });
});
