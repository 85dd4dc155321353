/**
 * The driver's `onStep` hook, which expectations use to see every step's dense output: the
 * pieces tile [t0, tEnd], events cut them, and each piece is reported before its event fires.
 * Problem: a bouncing ball, y'' = −g with restitution 0.9 at y = 0; first impact at √(2h/g)
 * (closed form, elementary mechanics).
 */
import { describe, expect, it } from 'vitest';
import { drive, type EventfulProblem } from '../../src/solve/driver.js';
import { odex } from '../../src/solve/odex.js';
import { rosenbrock } from '../../src/solve/rosenbrock.js';

function ball(): EventfulProblem & { bounces: number[] } {
  const g = 9.81;
  const bounces: number[] = [];
  return {
    n: 2, rtol: 1e-10, atol: new Float64Array([1e-12, 1e-12]),
    rhs(_t, y, d) { d[0] = y[1]; d[1] = -g; },
    breakpoints: [0.3], atBreakpoint() {},
    nEvents: 1,
    eventValues(_t, y, out) { out[0] = -y[0]; },
    eventDirection() { return 1; },
    fireEvent(_k, t, y) { bounces.push(t); y[1] = -0.9 * y[1]; y[0] = 0; return true; },
    bounces,
  };
}

describe('driver onStep hook', () => {
  for (const [name, integrator] of [['rodas', rosenbrock], ['odex', odex]] as const) {
    it(`${name}: pieces tile [t0, tEnd], end at events and breakpoints, and come before the event fires`, () => {
      const p = ball();
      const pieces: { a: number; b: number; bouncesSoFar: number; yEnd: number }[] = [];
      const y = new Float64Array(2);
      const r = drive(p, {
        integrator, t0: 0, tEnd: 1.5, y0: new Float64Array([1, 0]), sample: 0.5, observe() {},
        onStep(a, b, dense) { dense(b, y); pieces.push({ a, b, bouncesSoFar: p.bounces.length, yEnd: y[0] }); },
      });
      expect(r.status).toBe('completed');
      expect(p.bounces.length).toBeGreaterThanOrEqual(1);
      expect(p.bounces[0]).toBeCloseTo(Math.sqrt(2 / 9.81), 8);
      expect(pieces[0].a).toBe(0);
      expect(pieces[pieces.length - 1].b).toBe(1.5);
      for (let i = 1; i < pieces.length; i++) expect(pieces[i].a).toBe(pieces[i - 1].b);
      expect(pieces.some((q) => q.b === 0.3)).toBe(true);
      p.bounces.forEach((tb, k) => {
        const ending = pieces.filter((q) => q.b === tb);
        expect(ending).toHaveLength(1);
        // reported before the bounce was applied, with the pre-bounce interpolant (height 0)
        expect(ending[0].bouncesSoFar).toBe(k);
        expect(Math.abs(ending[0].yEnd)).toBeLessThan(1e-8);
      });
    });
  }
});
