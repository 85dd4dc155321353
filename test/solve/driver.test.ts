import { describe, expect, it } from 'vitest';
import { drive, type EventfulProblem } from '../../src/solve/driver.js';
import { rosenbrock } from '../../src/solve/rosenbrock.js';
import { odex } from '../../src/solve/odex.js';
import { bdf } from '../../src/solve/bdf.js';

/**
 * A bouncing ball: y'' = −g, bounce with restitution 0.9 at y = 0. The first impact of a ball
 * dropped from height h is at t = √(2h/g) (closed form, elementary mechanics); the next flight
 * lasts 2·0.9·√(2gh)/g.
 */
function ball(): EventfulProblem & { bounces: number[] } {
  const g = 9.81;
  const bounces: number[] = [];
  return {
    n: 2,
    rtol: 1e-10,
    atol: new Float64Array([1e-12, 1e-12]),
    rhs(_t, y, d) { d[0] = y[1]; d[1] = -g; },
    breakpoints: [],
    atBreakpoint() {},
    nEvents: 1,
    eventValues(_t, y, out) { out[0] = -y[0]; },
    eventDirection() { return 1; },
    fireEvent(_k, t, y) { bounces.push(t); y[1] = -0.9 * y[1]; y[0] = 0; return true; },
    bounces,
  };
}

describe('driver', () => {
  for (const [name, integrator] of [['rodas', rosenbrock], ['odex', odex], ['bdf', bdf]] as const) {
    it(`${name}: locates state events on the dense output (bouncing ball, closed form)`, () => {
      // The event changes the state: the driver passes its own copy to fireEvent, so we apply
      // the bounce by wrapping: the driver restarts from the (mutated) event state.
      const p = ball();
      const h = 1;
      const samples: number[] = [];
      drive(p, { integrator, t0: 0, tEnd: 1.2, y0: new Float64Array([h, 0]), sample: 0.1, observe: (t, _y, k) => { if (k === 'sample') samples.push(t); } });
      const t1 = Math.sqrt((2 * h) / 9.81);
      const t2 = t1 + (2 * 0.9 * Math.sqrt(2 * 9.81 * h)) / 9.81;
      expect(p.bounces.length).toBeGreaterThanOrEqual(1);
      expect(p.bounces[0]).toBeCloseTo(t1, 8);
      if (p.bounces.length > 1) expect(p.bounces[1]).toBeCloseTo(t2, 7);
      expect(samples.length).toBe(13);
      expect(samples[12]).toBe(1.2);
    });
  }

  it.each([['rodas', rosenbrock], ['bdf', bdf]] as const)('%s: restarts at breakpoints and reports them', (_name, integrator) => {
    const seen: number[] = [];
    const p: EventfulProblem = {
      n: 1, rtol: 1e-9, atol: new Float64Array([1e-12]),
      rhs(t, _y, d) { d[0] = t < 0.5 ? 1 : -1; },
      breakpoints: [0.5], atBreakpoint(t) { seen.push(t); },
      nEvents: 0, eventValues() {}, eventDirection() { return 0; }, fireEvent() { return false; },
    };
    const r = drive(p, { integrator, t0: 0, tEnd: 1, y0: new Float64Array([0]), sample: 0.25, observe() {} });
    expect(r.status).toBe('completed');
    expect(seen).toEqual([0.5]);
    expect(r.y[0]).toBeCloseTo(0, 10); // up for 0.5 s, down for 0.5 s
  });

  it('a step budget stops the run with status failed and keeps the state reached', () => {
    const p: EventfulProblem = {
      n: 1, rtol: 1e-10, atol: new Float64Array([1e-14]),
      rhs(t, _y, d) { d[0] = Math.cos(50 * t); },
      breakpoints: [], atBreakpoint() {}, nEvents: 0, eventValues() {}, eventDirection() { return 0; }, fireEvent() { return false; },
    };
    const r = drive(p, { integrator: rosenbrock, t0: 0, tEnd: 10, y0: new Float64Array([0]), sample: 1, observe() {}, maxSteps: 20 });
    expect(r.status).toBe('failed');
    expect(r.cause).toBe('budget-steps');
    expect(r.t).toBeGreaterThan(0);
    expect(r.t).toBeLessThan(10);
    expect(r.y[0]).toBeCloseTo(Math.sin(50 * r.t) / 50, 6);
  });

  /**
   * A switch that fires every 0.5 ms (g = sin(2000π t), both directions) on a smooth rhs that
   * the integrators would otherwise cross in a few long steps: every step now ends in an event
   * restart, as with a valve chattering between two chambers at equal pressure. Budgets and
   * interrupts must still stop the run (they used to be checked only at steps without events:
   * such a run went on to the end, or forever).
   */
  function switching(): EventfulProblem & { fired: number } {
    const p = {
      fired: 0,
      n: 1, rtol: 1e-8, atol: new Float64Array([1e-12]),
      rhs(_t: number, _y: Float64Array, d: Float64Array) { d[0] = 1; },
      breakpoints: [], atBreakpoint() {},
      nEvents: 1,
      eventValues(t: number, _y: Float64Array, out: Float64Array) { out[0] = Math.sin(2000 * Math.PI * t); },
      eventDirection() { return 0; },
      fireEvent() { p.fired++; return true; },
    };
    return p;
  }

  it('a switch that ends every step is stopped by the step budget', () => {
    for (const integrator of [rosenbrock, odex, bdf]) {
      const p = switching();
      // odex's long steps would step over pairs of crossings: hMax just below their spacing
      const hMax = integrator === odex ? 4.9e-4 : undefined;
      const r = drive(p, { integrator, t0: 0, tEnd: 3, y0: new Float64Array([0]), sample: 0.5, observe() {}, maxSteps: 200, hMax });
      expect(r.status).toBe('failed');
      expect(r.cause).toBe('budget-steps');
      expect(r.work.steps).toBeLessThanOrEqual(200);
      expect(p.fired).toBeGreaterThan(10);
      expect(r.t).toBeLessThan(0.5);
      expect(r.y[0]).toBeCloseTo(r.t, 9); // y = t
    }
  });

  it('a switch that ends every step is stopped by an interrupt', () => {
    let calls = 0;
    const p = switching();
    const r = drive(p, {
      integrator: rosenbrock, t0: 0, tEnd: 3, y0: new Float64Array([0]), sample: 0.5, observe() {},
      interrupt: () => (++calls > 100 ? 'stop requested' : null),
    });
    expect(r.status).toBe('failed');
    expect(r.cause).toBe('interrupted');
    expect(r.t).toBeLessThan(0.5);
  });

  /**
   * n identical components y_k' = 1 + k·s with events g_k = y_k − 1: they cross at
   * t_k = 1/(1 + k·s). With s = 0 all cross at the same instant (identical relief valves on a
   * symmetric rig): every one of them must fire, not only the first. With s > 0 they cross one
   * after another, many within one long step: each is located, in time order, at a cost that
   * does not grow with the number of events crossing in the step.
   */
  function staircase(count: number, s: number): EventfulProblem & { fired: [number, number][]; evaluations: number } {
    const p = {
      fired: [] as [number, number][],
      evaluations: 0,
      n: count, rtol: 1e-10, atol: new Float64Array(count).fill(1e-12),
      rhs(_t: number, _y: Float64Array, d: Float64Array) { for (let k = 0; k < count; k++) d[k] = 1 + k * s; },
      breakpoints: [], atBreakpoint() {},
      nEvents: count,
      eventValues(_t: number, y: Float64Array, out: Float64Array) { p.evaluations++; for (let k = 0; k < count; k++) out[k] = y[k] - 1; },
      eventDirection() { return 1; },
      fireEvent(k: number, t: number) { p.fired.push([k, t]); return true; },
    };
    return p;
  }

  it('events crossing at the same instant all fire, at that instant', () => {
    for (const integrator of [rosenbrock, odex, bdf]) {
      const p = staircase(6, 0);
      const r = drive(p, { integrator, t0: 0, tEnd: 2, y0: new Float64Array(6), sample: 0.5, observe() {} });
      expect(r.status).toBe('completed');
      expect(p.fired.map(([k]) => k).sort()).toEqual([0, 1, 2, 3, 4, 5]);
      for (const [, t] of p.fired) expect(t).toBeCloseTo(1, 12);
    }
  });

  it('many events crossing within one step are located in time order, each at its own instant, with few evaluations each', () => {
    const count = 200;
    const s = 1e-3;
    const p = staircase(count, s);
    const r = drive(p, { integrator: rosenbrock, t0: 0, tEnd: 2, y0: new Float64Array(count), sample: 1, observe() {} });
    expect(r.status).toBe('completed');
    expect(p.fired.length).toBe(count);
    // in time order: the fastest component (largest k) first
    expect(p.fired.map(([k]) => k)).toEqual(Array.from({ length: count }, (_, i) => count - 1 - i));
    for (const [k, t] of p.fired) expect(Math.abs(t - 1 / (1 + k * s))).toBeLessThan(1e-12);
    // locating every crossing of a step alone, and again in each following step until it
    // fires, took about 150 evaluations of the event functions an event here; the search over
    // the set takes about 4.5
    expect(p.evaluations / count).toBeLessThan(20);
  });

  it('goes on past two breakpoints a double apart (a ramp from 1.144 s over 5 ms ends at 1.1489999999999998 s, another schedule starts at 1.149 s)', () => {
    const a = 1.144 + 0.005; // 1.1489999999999998
    const b = 1.149;
    expect(b - a).toBeGreaterThan(0);
    expect(b - a).toBeLessThan(3e-16);
    for (const integrator of [rosenbrock, odex, bdf]) {
      const seen: number[] = [];
      const samples: number[] = [];
      const p: EventfulProblem = {
        n: 1, rtol: 1e-9, atol: new Float64Array([1e-12]),
        rhs(t, _y, d) { d[0] = t < b ? 1 : -1; },
        breakpoints: [a, b], atBreakpoint(t) { seen.push(t); },
        nEvents: 0, eventValues() {}, eventDirection() { return 0; }, fireEvent() { return false; },
      };
      const r = drive(p, { integrator, t0: 0, tEnd: 2, y0: new Float64Array([0]), sample: 0.25, observe(t, _y, kind) { if (kind === 'sample') samples.push(t); } });
      expect(r.status).toBe('completed');
      expect(seen).toEqual([a, b]);
      expect(r.y[0]).toBeCloseTo(b - (2 - b), 9); // up until b, down after
      expect(samples).toEqual([0, 0.25, 0.5, 0.75, 1, 1.25, 1.5, 1.75, 2]);
    }
  });
});
