// RODAS-specific checks: stability function, convergence order and dense-output order.
// Sources: Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, §VI.4 (RODAS: order 4, L-stable,
// stiffly accurate, dense output of order 3) and §IV.3 (stability function R(z) of a
// one-step method applied to y' = λy, z = hλ); the tank closed form from
// docs/references.md ("Rigid tank through a laminar capillary").
import { describe, expect, it } from 'vitest';
import { rosenbrockFixedSteps } from '../../src/solve/rosenbrock.js';
import type { OdeProblem } from '../../src/solve/types.js';
import { A, denseError, k, p0, pa, pExact, tank } from './tank-blowdown.js';

/** One RODAS step of size 1 on y' = z·y from y = 1 gives the stability function R(z). */
function stabilityFunction(z: number): number {
  const problem: OdeProblem = {
    n: 1,
    rhs: (_t, y, dydt) => { dydt[0] = z * y[0]; },
    jacobian: (_t, _y, J) => { J[0] = z; },
    rtol: 1e-6,
    atol: Float64Array.of(1e-12),
  };
  const r = rosenbrockFixedSteps(problem, 0, Float64Array.of(1), 1, 1);
  expect(r.status).toBe('completed');
  return r.y[0];
}

describe('RODAS stability function (Hairer & Wanner II, §VI.4 and §IV.3)', () => {
  it('R(z) − e^z = O(z^5): the error ratio when z halves tends to 2^5', () => {
    for (const z0 of [0.04, -0.04]) {
      const err = (z: number) => stabilityFunction(z) - Math.exp(z);
      const ratio = err(z0) / err(z0 / 2);
      expect(ratio).toBeGreaterThan(32 * 0.9);
      expect(ratio).toBeLessThan(32 * 1.1);
    }
  });

  it('is L-stable: |R(z)| < 1 along the negative axis and R(z) → 0 as z → −∞', () => {
    for (const z of [-0.1, -1, -10, -100, -1e3]) expect(Math.abs(stabilityFunction(z))).toBeLessThan(1);
    const r4 = Math.abs(stabilityFunction(-1e4));
    const r6 = Math.abs(stabilityFunction(-1e6));
    expect(r6).toBeLessThan(1e-4);
    // Stiffly accurate ⇒ R(∞) = 0 with R(z) ~ c/z: a hundredfold larger |z|, a hundredfold smaller R.
    expect(r6 / r4).toBeGreaterThan(0.5e-2);
    expect(r6 / r4).toBeLessThan(2e-2);
  });
});

describe('RODAS convergence with fixed steps (Hairer & Wanner II, §VI.4: order 4)', () => {
  it('closed form of the tank blowdown matches the worked numbers in docs/references.md', () => {
    // The worked numbers are printed to 0.01 Pa and 0.001 s: agree to within that rounding.
    expect(Math.abs(pExact(100) - 262498.02)).toBeLessThanOrEqual(0.005 + 1e-9);
    expect(Math.abs(pExact(600) - 170397.16)).toBeLessThanOrEqual(0.005 + 1e-9);
    const r = (150e3 - pa) / (150e3 + pa);
    expect(Math.abs(-Math.log(r / A) / (2 * pa * k) - 844.809)).toBeLessThanOrEqual(0.0005);
  });

  it('observed order on the tank blowdown is 4 ± 0.2', () => {
    const err = (steps: number) => {
      const r = rosenbrockFixedSteps(tank, 0, Float64Array.of(p0), 600, steps);
      expect(r.status).toBe('completed');
      expect(r.work.steps).toBe(steps);
      return Math.abs(r.y[0] - pExact(600));
    };
    const e = [16, 32, 64].map(err);
    for (let i = 1; i < e.length; i++) {
      const order = Math.log2(e[i - 1] / e[i]);
      expect(order).toBeGreaterThan(3.8);
      expect(order).toBeLessThan(4.2);
    }
  });

  it('observed order on a non-autonomous problem (∂f/∂t by differences, jacobian by differences) is 4 ± 0.2', () => {
    // y' = −y + sin t, y(0) = 0: y = (sin t − cos t + e^−t)/2 (linear, integrating factor).
    const forced: OdeProblem = {
      n: 1,
      rhs: (t, y, dydt) => { dydt[0] = -y[0] + Math.sin(t); },
      rtol: 1e-8,
      atol: Float64Array.of(1e-10),
    };
    const exact = (t: number) => 0.5 * (Math.sin(t) - Math.cos(t) + Math.exp(-t));
    const e = [16, 32, 64].map((steps) => Math.abs(rosenbrockFixedSteps(forced, 0, Float64Array.of(0), 5, steps).y[0] - exact(5)));
    for (let i = 1; i < e.length; i++) {
      const order = Math.log2(e[i - 1] / e[i]);
      expect(order).toBeGreaterThan(3.8);
      expect(order).toBeLessThan(4.2);
    }
  });

  it('dense output converges with order 4 (order-3 continuous extension, local error O(h^4))', () => {
    const denseErr = (steps: number) => denseError((m, cb) => rosenbrockFixedSteps(tank, 0, Float64Array.of(p0), 2000, m, cb), steps);
    const [e1, e2, e3] = [128, 256, 512].map(denseErr);
    expect(Math.log2(e1 / e2)).toBeGreaterThan(3.6);
    expect(Math.log2(e2 / e3)).toBeGreaterThan(3.8);
    expect(Math.log2(e2 / e3)).toBeLessThan(4.3);
  });
});
