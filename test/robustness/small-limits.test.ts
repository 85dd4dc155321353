/**
 * Small correctness items of the limits (docs/robustness.md): mass drift measured against the
 * gas that was there or came through, connections read only from the keys that name nodes,
 * a start on a level part of a measured curve refused, one highest pressure for every pressure
 * read, hints never found on the object prototype, and a warning when a run's pressures leave
 * any physical range.
 */
import { describe, expect, it } from 'vitest';
import { loadModel } from '../../src/index.js';
import { modelFromText, runChecked } from '../helpers.js';

function errors(text: string): { code: string; message: string; hint?: string; path: (string | number)[] }[] {
  const m = loadModel(text, 'x.yaml');
  return m.ok ? [] : m.diagnostics.filter((d) => d.severity === 'error');
}

describe('mass drift', () => {
  it('is relative to the larger of the start mass and the mass through the boundaries', () => {
    // a feed into a chamber that starts nearly empty (1e-28 kg): the start mass alone made
    // round-off of the gram fed look like a drift of 3.6e9
    const r = runChecked(modelFromText(`format: 1
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 1e-20 Pa abs } }
lines:
  vent: { from: tank, to: ambient, diameter: 1 mm, length: 1 m }
feeds:
  f: { into: tank, rate: 1 g/s, initially: 100% }
simulate: { duration: 1 s }
`), 1e-12);
    expect(Math.abs(r.mass.drift)).toBeLessThan(1e-12);
    expect(r.warnings.join('\n')).not.toContain('drift');
  });
});

describe('connections', () => {
  it('a valve `initially: open` does not connect a chamber named `open`', () => {
    const e = errors(`format: 1
chambers:
  open: { wall: rigid, volume: 1 L, start: { pressure: 10 kPa gauge } }
  tank: { wall: rigid, volume: 1 L, start: { pressure: 10 kPa gauge } }
valves:
  v: { from: tank, to: ambient, orifice: 1 mm, discharge-coefficient: 0.6, initially: open }
simulate: { duration: 1 s }
`);
    expect(e.map((d) => [d.code, d.path.join('.')])).toEqual([['unconnected-chamber', 'chambers.open']]);
  });
});

describe('start states', () => {
  it('a start pressure on a level part of a measured curve is refused (the volume is undetermined)', () => {
    const e = errors(`format: 1
chambers:
  bag:
    wall: measured
    points: [[1 L, 0 kPa], [2 L, 5 kPa], [3 L, 5 kPa], [4 L, 10 kPa]]
    start: { pressure: 5 kPa gauge }
valves:
  v: { from: bag, to: ambient, orifice: 1 mm, discharge-coefficient: 0.6, initially: closed }
simulate: { duration: 1 s }
`);
    expect(e.map((d) => d.code)).toEqual(['start-unreachable']);
    expect(e[0].message).toContain('level part of the measured curve');
  });
});

describe('one highest pressure', () => {
  it('a cracking pressure and a measured point above 1 GPa are refused like a set point', () => {
    const e = errors(`format: 1
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }
  bag:
    wall: measured
    points: [[1 L, 0 kPa], [1.5 L, 5 kPa], [2 L, 500 GPa]]
    start: { volume: 1.5 L }
valves:
  c: { from: tank, to: bag, orifice: 1 mm, discharge-coefficient: 0.6, check: { cracking: 500 GPa } }
  r: { from: tank, to: ambient, orifice: 1 mm, discharge-coefficient: 0.6, relief: { opens-above: 500 GPa gauge, reseats-below: 400 kPa gauge } }
simulate: { duration: 1 s }
`);
    const above = e.filter((d) => d.code === 'out-of-range' && /above 1000 MPa absolute, the highest gas pressure plenum accepts/.test(d.message));
    expect(above.map((d) => d.path.join('.')).sort()).toEqual(['chambers.bag.points.2.1', 'valves.c.check.cracking', 'valves.r.relief.opens-above']);
  });
});

describe('hints and tables', () => {
  it('`0.5 constructor` gets no hint from Object, `gas: constructor` is unknown', () => {
    const e = errors(`format: 1
gas: constructor
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 0.5 constructor } }
valves:
  v: { from: tank, to: ambient, orifice: 1 mm, discharge-coefficient: 0.6, initially: open }
simulate: { duration: 1 s }
`);
    expect(e.map((d) => d.code).sort()).toEqual(['unit-unknown', 'unknown-gas']);
    for (const d of e) {
      expect(typeof d.hint).toBe('string');
      expect(d.hint).not.toContain('[native code]');
      expect(d.hint).not.toContain('function');
    }
  });
});

describe('pressures beyond any physical range', () => {
  it('a run that reaches 8.4e12 Pa completes with a warning, not silently', () => {
    const r = runChecked(modelFromText(`format: 1
chambers:
  tank: { wall: rigid, volume: 1 mL, start: { pressure: 0 kPa gauge } }
feeds:
  f: { into: tank, rate: 1 kg/s, initially: 100% }
simulate: { duration: 100 s }
`));
    expect(r.status).toBe('completed');
    expect(r.warnings.some((w) => /tank reached 8\.\d\de\+12 Pa absolute .* above 1000 MPa/.test(w))).toBe(true);
  });
});
