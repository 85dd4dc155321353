// ROS34PW2 (src/solve/rosw.ts): order conditions of its coefficients, stability function,
// observed order on a closed form with an exact and with a frozen (wrong) jacobian, dense
// output, conservation of a linear invariant with an old jacobian, adaptive runs and statuses.
// Sources: J. Rang & L. Angermann, BIT Numer. Math. 45 (2005) 761 (ROS34PW2: order 3, W-method,
// L-stable, stiffly accurate); Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, §IV.7 (order
// conditions of Rosenbrock methods, Table 7.1; W-methods) and §IV.3 (stability function); the
// tank closed form from docs/references.md ("Rigid tank through a laminar capillary").
import { describe, expect, it } from 'vitest';
import { rosw, roswFixedSteps, ROSW_ALPHA, ROSW_B, ROSW_BHAT, ROSW_GAMMA, ROSW_GAMMA_IJ } from '../../src/solve/rosw.js';
import type { OdeProblem } from '../../src/solve/types.js';
import { denseError, p0, pExact, tank } from './tank-blowdown.js';

const s = 4;
const alpha = (i: number, j: number): number => (j < i ? ROSW_ALPHA[i][j] : 0);
const beta = (i: number, j: number): number => alpha(i, j) + (j < i ? ROSW_GAMMA_IJ[i][j] : 0);
const sum = (f: (i: number) => number): number => { let x = 0; for (let i = 0; i < s; i++) x += f(i); return x; };
const ai = (i: number): number => sum((j) => alpha(i, j));
const bi = (i: number): number => sum((j) => beta(i, j));
const g = ROSW_GAMMA;

describe('ROS34PW2 coefficients (Hairer & Wanner II, §IV.7, Table 7.1)', () => {
  it('satisfy the order conditions up to order 3 for b and up to order 2 for b̂', () => {
    for (const [w, order] of [[ROSW_B, 3], [ROSW_BHAT, 2]] as [number[], number][]) {
      expect(sum((i) => w[i])).toBeCloseTo(1, 14);
      expect(sum((i) => w[i] * bi(i))).toBeCloseTo(0.5 - g, 14);
      if (order >= 3) {
        expect(sum((i) => w[i] * ai(i) ** 2)).toBeCloseTo(1 / 3, 14);
        expect(sum((i) => w[i] * sum((j) => beta(i, j) * bi(j)))).toBeCloseTo(1 / 6 - g + g * g, 14);
      }
    }
    // b̂ is not of order 3 (else the estimate would vanish)
    expect(Math.abs(sum((i) => ROSW_BHAT[i] * ai(i) ** 2) - 1 / 3)).toBeGreaterThan(1e-3);
  });

  it('are stiffly accurate: b is the last row of α + Γ', () => {
    for (let j = 0; j < s; j++) expect(beta(3, j) + (j === 3 ? g : 0)).toBeCloseTo(ROSW_B[j], 15);
  });
});

/** One step of size 1 on y' = z·y from y = 1, with the jacobian Jz (= z: Rosenbrock; ≠ z: W-method). */
function oneStep(z: number, Jz = z): number {
  const problem: OdeProblem = {
    n: 1,
    rhs: (_t, y, dydt) => { dydt[0] = z * y[0]; },
    jacobian: (_t, _y, J) => { J[0] = Jz; },
    rtol: 1e-6,
    atol: Float64Array.of(1e-12),
  };
  const r = roswFixedSteps(problem, 0, Float64Array.of(1), 1, 1);
  expect(r.status).toBe('completed');
  return r.y[0];
}

describe('ROS34PW2 stability function (Hairer & Wanner II, §IV.3)', () => {
  it('R(z) − e^z = O(z^4): the error ratio when z halves tends to 2^4', () => {
    for (const z0 of [0.02, -0.02]) {
      const err = (z: number) => oneStep(z) - Math.exp(z);
      const ratio = err(z0) / err(z0 / 2);
      expect(ratio).toBeGreaterThan(16 * 0.9);
      expect(ratio).toBeLessThan(16 * 1.1);
    }
  });

  it('is L-stable: |R(z)| < 1 on the negative axis and the imaginary axis, R(z) → 0 as z → −∞', () => {
    for (const z of [-0.1, -1, -10, -100, -1e3]) expect(Math.abs(oneStep(z))).toBeLessThan(1);
    const r4 = Math.abs(oneStep(-1e4)), r6 = Math.abs(oneStep(-1e6));
    expect(r6).toBeLessThan(1e-4);
    expect(r6 / r4).toBeGreaterThan(0.5e-2); // R(z) ~ c/z
    expect(r6 / r4).toBeLessThan(2e-2);
    // |R(iy)| ≤ 1 (A-stability) from the complex stability function R(z) = 1 + z bᵀ(I − zB)⁻¹𝟙, B = α + Γ
    for (const y of [0.1, 1, 3, 10, 100, 1e4]) {
      // (I − zB) x = 𝟙, B lower triangular with γ on the diagonal: forward substitution in complex numbers
      const xr: number[] = [], xi: number[] = [];
      for (let i = 0; i < s; i++) {
        let rr = 1, ri = 0;
        for (let j = 0; j < i; j++) { rr += -y * beta(i, j) * xi[j]; ri += y * beta(i, j) * xr[j]; } // + zB x, z = iy
        const dr = 1, di = -y * g; // 1 − zγ
        const den = dr * dr + di * di;
        xr.push((rr * dr + ri * di) / den);
        xi.push((ri * dr - rr * di) / den);
      }
      const br = sum((i) => ROSW_B[i] * xr[i]), bim = sum((i) => ROSW_B[i] * xi[i]);
      const Rr = 1 - y * bim, Ri = y * br;
      expect(Math.hypot(Rr, Ri)).toBeLessThanOrEqual(1 + 1e-12);
    }
  });
});

describe('ROS34PW2 convergence with fixed steps (order 3, also with an old jacobian)', () => {
  for (const freeze of [false, true]) {
    it(`observed order on the tank blowdown is 3 ± 0.25 (${freeze ? 'jacobian of t = 0 kept: W-method' : 'fresh jacobian each step'})`, () => {
      const e = [32, 64, 128].map((steps) => {
        const r = roswFixedSteps(tank, 0, Float64Array.of(p0), 600, steps, undefined, freeze);
        expect(r.status).toBe('completed');
        expect(r.work.jacobians).toBe(freeze ? 1 : steps);
        return Math.abs(r.y[0] - pExact(600));
      });
      for (let i = 1; i < e.length; i++) {
        const order = Math.log2(e[i - 1] / e[i]);
        expect(order).toBeGreaterThan(2.75);
        expect(order).toBeLessThan(3.25);
      }
    });
  }

  it('observed order on a non-autonomous problem (∂f/∂t and jacobian by differences) is 3 ± 0.25', () => {
    // y' = −y + sin t, y(0) = 0: y = (sin t − cos t + e^−t)/2
    const forced: OdeProblem = { n: 1, rhs: (t, y, d) => { d[0] = -y[0] + Math.sin(t); }, rtol: 1e-8, atol: Float64Array.of(1e-10) };
    const exact = (t: number) => 0.5 * (Math.sin(t) - Math.cos(t) + Math.exp(-t));
    const e = [32, 64, 128].map((steps) => Math.abs(roswFixedSteps(forced, 0, Float64Array.of(0), 5, steps).y[0] - exact(5)));
    for (let i = 1; i < e.length; i++) {
      const order = Math.log2(e[i - 1] / e[i]);
      expect(order).toBeGreaterThan(2.75);
      expect(order).toBeLessThan(3.25);
    }
  });

  it('dense output (cubic Hermite) converges with order 3 or better and meets the step ends', () => {
    const denseErr = (steps: number) => denseError((m, cb) => roswFixedSteps(tank, 0, Float64Array.of(p0), 2000, m, cb), steps);
    const [e1, e2, e3] = [64, 128, 256].map(denseErr);
    expect(Math.log2(e1 / e2)).toBeGreaterThan(2.8);
    expect(Math.log2(e2 / e3)).toBeGreaterThan(2.8);
  });
});

/** Three chambers joined by laminar capillaries: flows ∝ p_i² − p_j²; Σy is a linear invariant. */
const capillaryChain: OdeProblem = {
  n: 3,
  rhs: (_t, y, d) => {
    const c = 1e-6, q12 = c * (y[0] ** 2 - y[1] ** 2), q23 = c * (y[1] ** 2 - y[2] ** 2);
    d[0] = -q12; d[1] = q12 - q23; d[2] = q23;
  },
  jacobian: (_t, y, J) => {
    const c = 1e-6;
    J.set([-2 * c * y[0], 2 * c * y[1], 0, 2 * c * y[0], -4 * c * y[1], 2 * c * y[2], 0, 2 * c * y[1], -2 * c * y[2]]);
  },
  rtol: 1e-6,
  atol: Float64Array.of(1e-3, 1e-3, 1e-3),
};

describe('ROS34PW2 adaptive', () => {
  it('conserves the linear invariant to round-off with a jacobian kept over many steps, steps and dense output alike', () => {
    const y0 = Float64Array.of(300e3, 100e3, 150e3);
    const total = 550e3;
    const out = new Float64Array(3);
    let worst = 0;
    const r = rosw(capillaryChain, 0, y0, 2, (tOld, tNew, y, dense) => {
      worst = Math.max(worst, Math.abs(y[0] + y[1] + y[2] - total));
      dense(0.5 * (tOld + tNew), out);
      worst = Math.max(worst, Math.abs(out[0] + out[1] + out[2] - total));
    });
    expect(r.status).toBe('completed');
    expect(r.work.jacobians).toBeLessThan(r.work.steps);
    expect(worst).toBeLessThan(1e-9 * total);
  });

  it('meets its tolerance on the tank blowdown', () => {
    for (const rtol of [1e-5, 1e-7]) {
      let worst = 0;
      const r = rosw({ ...tank, rtol, atol: Float64Array.of(rtol * 1e3) }, 0, Float64Array.of(p0), 900, (_a, t, y) => {
        worst = Math.max(worst, Math.abs(y[0] - pExact(t)) / pExact(t));
      });
      expect(r.status).toBe('completed');
      expect(r.t).toBe(900);
      expect(worst).toBeLessThan(10 * rtol);
    }
  });

  it('reports a non-finite rhs as a status, and stops when the callback says so', () => {
    const bad: OdeProblem = { n: 1, rhs: (t, y, d) => { d[0] = t > 0.5 ? Number.NaN : -y[0]; }, rtol: 1e-6, atol: Float64Array.of(1e-9) };
    const r = rosw(bad, 0, Float64Array.of(1), 1, () => {});
    expect(r.status).toBe('non-finite');
    expect(r.t).toBeLessThanOrEqual(0.5);
    let calls = 0;
    const s2 = rosw(tank, 0, Float64Array.of(p0), 900, () => ++calls < 3);
    expect(s2.status).toBe('stopped');
    expect(s2.work.steps).toBe(3);
  });
});
