// The system's memo of its last evaluation and its time-invariance test must never change a
// result: the rhs at a point is the same whatever was evaluated before, a relief valve that
// switches is seen at once, and ∂f/∂t is declared zero only where f does not depend on t.
import { describe, expect, it } from 'vitest';
import { NetworkSystem } from '../../src/assemble/system.js';
import { modelFromText } from '../helpers.js';

const text = `
format: 1
reservoirs:
  supply: { pressure: 200 kPa gauge }
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 150 kPa gauge } }
  pod: { wall: neo-hookean, radius: 15 mm, thickness: 1 mm, shear-modulus: 0.3 MPa, start: { stretch: 1.1 } }
lines:
  fill: { from: supply, to: tank, diameter: 2.5 mm, length: 0.5 m }
  link: { from: tank, to: pod, diameter: 2 mm, length: 0.1 m }
valves:
  relief: { from: tank, to: ambient, orifice: 2 mm, discharge-coefficient: 0.6, relief: { opens-above: 100 kPa gauge, reseats-below: 80 kPa gauge } }
  vent: { from: pod, to: ambient, orifice: 1 mm, discharge-coefficient: 0.6, initially: closed, schedule: [ { at: 1 s, open: 100%, over: 0.5 s } ] }
simulate: { duration: 3 s }
`;

describe('NetworkSystem evaluation memo', () => {
  it('gives the rhs of a fresh system at any point, whatever was evaluated before', () => {
    const a = new NetworkSystem(modelFromText(text));
    const y = a.initialState();
    const f1 = new Float64Array(a.n), f2 = new Float64Array(a.n), f3 = new Float64Array(a.n);
    a.rhs(1.2, y, f1);
    const y2 = Float64Array.from(y, (v) => v * 1.01);
    a.rhs(1.2, y2, f2);
    a.rhs(1.2, y, f3); // back at the first point
    const b = new NetworkSystem(modelFromText(text));
    const fb = new Float64Array(b.n);
    b.rhs(1.2, y, fb);
    for (let i = 0; i < a.n; i++) {
      expect(f3[i]).toBeCloseTo(f1[i], 12);
      expect(Math.abs(f3[i] - fb[i])).toBeLessThanOrEqual(1e-12 * Math.max(1e-30, Math.abs(fb[i])));
    }
    // and the state change was seen
    expect(f2.some((v, i) => v !== f1[i])).toBe(true);
  });

  it('sees a relief valve switch at the same (t, y), even one made from outside', () => {
    const sys = new NetworkSystem(modelFromText(text));
    const y = sys.initialState();
    const closed = new Float64Array(sys.n), open = new Float64Array(sys.n);
    sys.rhs(0, y, closed);
    const k = sys.model.branches.findIndex((b) => b.name === 'relief');
    sys.branches[k].open = true;
    sys.rhs(0, y, open);
    expect(open[sys.mIdx[0]]).toBeLessThan(closed[sys.mIdx[0]]);
  });
});

describe('NetworkSystem.timeInvariant', () => {
  it('is true before and after a ramp, false across it, and false with a time-varying reservoir', () => {
    const sys = new NetworkSystem(modelFromText(text));
    expect(sys.timeInvariant(0, 0.9)).toBe(true);
    expect(sys.timeInvariant(0.9, 1.1)).toBe(false);
    expect(sys.timeInvariant(1.2, 1.3)).toBe(false);
    expect(sys.timeInvariant(1.5, 3)).toBe(true);
    const tabled = new NetworkSystem(modelFromText(text.replace('pressure: 200 kPa gauge', 'pressure: [[0 s, 200 kPa gauge], [2 s, 100 kPa gauge]]')));
    expect(tabled.timeInvariant(0, 0.5)).toBe(false);
  });

  it('where it says true, the rhs really does not change with t', () => {
    const sys = new NetworkSystem(modelFromText(text));
    const y = sys.initialState();
    const a = new Float64Array(sys.n), b = new Float64Array(sys.n);
    sys.rhs(0.2, y, a);
    sys.rhs(0.8, y, b);
    expect(Array.from(b)).toEqual(Array.from(a));
    sys.rhs(1.6, y, a);
    sys.rhs(2.9, y, b);
    expect(Array.from(b)).toEqual(Array.from(a));
  });
});
