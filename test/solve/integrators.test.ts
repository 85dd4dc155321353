// Behaviour the integrators share through the Integrator contract (src/solve/types.ts):
// accuracy against closed forms, dense output, work counts, invariants and statuses.
// Sources are named per test; the tank closed form and its worked numbers are from
// docs/references.md ("Rigid tank through a laminar capillary").
import { describe, expect, it } from 'vitest';
import { bdf } from '../../src/solve/bdf.js';
import { odex } from '../../src/solve/odex.js';
import { rosenbrock } from '../../src/solve/rosenbrock.js';
import type { IntegrateResult, Integrator, OdeProblem, StepCallback } from '../../src/solve/types.js';
import { robertsonRhs } from './robertson.js';

// ---- Problems -------------------------------------------------------------------------------

// Tank blowdown through a laminar capillary: dp/dt = −k(p² − pa²), k = πD⁴/(256 μ L V);
// V = 1 L, D = 0.3 mm, L = 1 m, air at 293.15 K with Sutherland μ (docs/references.md).
const pa = 101325; // Pa
const p0 = 300e3; // Pa
const mu = 1.716e-5 * (293.15 / 273.15) ** 1.5 * (273.15 + 110.4) / (293.15 + 110.4); // Pa·s
const k = (Math.PI * 0.3e-3 ** 4) / (256 * mu * 1 * 1e-3); // 1/(Pa·s)
function pExact(t: number): number {
  const e = ((p0 - pa) / (p0 + pa)) * Math.exp(-2 * pa * k * t);
  return (pa * (1 + e)) / (1 - e);
}
function tank(rtol: number, analyticJacobian = true): OdeProblem & { calls: number } {
  const problem = {
    n: 1,
    calls: 0,
    rhs(_t: number, y: Float64Array, dydt: Float64Array) {
      problem.calls++;
      dydt[0] = -k * (y[0] ** 2 - pa ** 2);
    },
    jacobian: analyticJacobian ? (_t: number, y: Float64Array, J: Float64Array) => { J[0] = -2 * k * y[0]; } : undefined,
    rtol,
    atol: Float64Array.of(rtol * 10), // Pa
  };
  return problem;
}

// Robertson's chemical kinetics (Hairer & Wanner, Solving ODEs II, 2nd ed., §IV.1).
const robertsonJacobian = (_t: number, y: Float64Array, J: Float64Array) => {
  J.set([-0.04, 1e4 * y[2], 1e4 * y[1], 0.04, -1e4 * y[2] - 6e7 * y[1], -1e4 * y[1], 0, 6e7 * y[1], 0]);
};
function robertson(analyticJacobian: boolean): OdeProblem {
  return {
    n: 3,
    rhs: robertsonRhs,
    jacobian: analyticJacobian ? robertsonJacobian : undefined,
    rtol: 1e-6,
    atol: Float64Array.of(1e-8, 1e-12, 1e-8),
  };
}

// Closed three-node systems whose rhs components sum to zero: Σy is a linear invariant.
const linearExchange = (analytic: boolean): OdeProblem => ({
  n: 3,
  rhs: (_t, y, d) => { d[0] = y[1] - y[0]; d[1] = y[0] - 2 * y[1] + y[2]; d[2] = y[1] - y[2]; },
  jacobian: analytic ? (_t, _y, J) => { J.set([-1, 1, 0, 1, -2, 1, 0, 1, -1]); } : undefined,
  rtol: 1e-6,
  atol: Float64Array.of(1e-9, 1e-9, 1e-9),
});
/** Three chambers in a row joined by laminar capillaries: flows ∝ p_i² − p_j² (nonlinear). */
const capillaryChain = (analytic: boolean): OdeProblem => {
  const c = 1e-6; // 1/(Pa·s)
  return {
    n: 3,
    rhs: (_t, y, d) => {
      const q12 = c * (y[0] ** 2 - y[1] ** 2), q23 = c * (y[1] ** 2 - y[2] ** 2);
      d[0] = -q12;
      d[1] = q12 - q23;
      d[2] = q23;
    },
    jacobian: analytic
      ? (_t, y, J) => { J.set([-2 * c * y[0], 2 * c * y[1], 0, 2 * c * y[0], -4 * c * y[1], 2 * c * y[2], 0, 2 * c * y[1], -2 * c * y[2]]); }
      : undefined,
    rtol: 1e-6,
    atol: Float64Array.of(1e-3, 1e-3, 1e-3),
  };
};

const decay: OdeProblem = {
  n: 1,
  rhs: (_t, y, d) => { d[0] = -y[0]; },
  rtol: 1e-6,
  atol: Float64Array.of(1e-9),
};

const keepGoing: StepCallback = () => true;

const integrators: [string, Integrator][] = [['rosenbrock', rosenbrock], ['odex', odex], ['bdf', bdf]];

// ---- Tests ----------------------------------------------------------------------------------

describe.each(integrators)('%s', (name, integrate) => {
  it('matches the tank blowdown worked numbers at rtol 1e-8 (docs/references.md; closed form)', () => {
    for (const analytic of [true, false]) {
      for (const [tEnd, pRef] of [[100, 262498.02], [600, 170397.16]]) {
        const r = integrate(tank(1e-8, analytic), 0, Float64Array.of(p0), tEnd, keepGoing);
        expect(r.status).toBe('completed');
        expect(r.t).toBe(tEnd);
        expect(Math.abs(r.y[0] / pRef - 1)).toBeLessThan(1e-6);
        expect(Math.abs(r.y[0] / pExact(tEnd) - 1)).toBeLessThan(1e-7);
      }
    }
  });

  it('counts every rhs evaluation and reports contiguous steps ending exactly at tEnd', () => {
    const problem = tank(1e-6, false);
    const spans: [number, number][] = [];
    const r = integrate(problem, 0, Float64Array.of(p0), 600, (tOld, tNew) => { spans.push([tOld, tNew]); });
    expect(r.status).toBe('completed');
    expect(r.work.rhs).toBe(problem.calls);
    expect(r.work.steps).toBe(spans.length);
    expect(spans[0][0]).toBe(0);
    expect(spans[spans.length - 1][1]).toBe(600);
    for (let i = 0; i < spans.length; i++) {
      expect(spans[i][1]).toBeGreaterThan(spans[i][0]);
      if (i > 0) expect(spans[i][0]).toBe(spans[i - 1][1]);
    }
    if (name === 'rosenbrock') {
      // Finite-difference jacobian (n = 1 column) + ∂f/∂t + f(t, y) + 5 stages per attempt.
      expect(r.work.jacobians).toBeGreaterThanOrEqual(r.work.steps);
      expect(r.work.lu).toBe(r.work.steps + r.work.rejected);
    } else if (name === 'bdf') {
      // one jacobian kept for the whole run (Newton converges with it), an LU per change of h or order
      expect(r.work.jacobians).toBe(1);
      expect(r.work.lu).toBeGreaterThanOrEqual(1);
      expect(r.work.lu).toBeLessThan(r.work.steps);
    } else {
      expect(r.work.jacobians).toBe(0);
      expect(r.work.lu).toBe(0);
    }
  });

  it('dense output matches the closed form inside steps and the step ends exactly (order-3 interpolant / ODEX dense output)', () => {
    const rtol = 1e-6;
    const out = new Float64Array(1);
    let worst = 0;
    let yPrev = p0;
    const r = integrate(tank(rtol), 0, Float64Array.of(p0), 2000, (tOld, tNew, yNew, dense) => {
      for (let j = 1; j < 10; j++) {
        const t = tOld + (j / 10) * (tNew - tOld);
        dense(t, out);
        worst = Math.max(worst, Math.abs(out[0] / pExact(t) - 1));
      }
      dense(tOld, out);
      expect(Math.abs(out[0] / yPrev - 1)).toBeLessThan(1e-14);
      dense(tNew, out);
      expect(Math.abs(out[0] / yNew[0] - 1)).toBeLessThan(1e-14);
      // Repeated calls (as a root finder makes) give the same value.
      const again = new Float64Array(1);
      dense(0.5 * (tOld + tNew), out);
      dense(0.5 * (tOld + tNew), again);
      expect(again[0]).toBe(out[0]);
      yPrev = yNew[0];
    });
    expect(r.status).toBe('completed');
    expect(r.work.steps).toBeGreaterThan(5);
    expect(worst).toBeLessThan(10 * rtol);
  });

  it('preserves the linear invariant Σy of closed systems to round-off, analytic and finite-difference jacobian', () => {
    // Source: Hairer, Lubich & Wanner, Geometric Numerical Integration, 2nd ed. 2006, §IV.1
    // (Runge–Kutta and extrapolated explicit methods conserve linear invariants; section from
    // memory). For Rosenbrock stages the same argument needs 1ᵀJ = 0 as well as 1ᵀf = 0; a
    // difference-quotient J has 1ᵀJ = O(√eps·|f|/|y|) from rounding in f, hence the looser
    // bound for that case.
    for (const [make, y0] of [[linearExchange, [3, 1, 0.5]], [capillaryChain, [3e5, 1e5, 2e5]]] as const) {
      for (const analytic of [true, false]) {
        const s0 = y0[0] + y0[1] + y0[2];
        let worst = 0;
        const r = integrate(make(analytic), 0, Float64Array.from(y0), 20, (_a, _b, y) => {
          worst = Math.max(worst, Math.abs((y[0] + y[1] + y[2]) / s0 - 1));
        });
        expect(r.status).toBe('completed');
        expect(r.work.steps).toBeGreaterThan(5);
        expect(worst).toBeLessThan(analytic || name === 'odex' ? 1e-14 : 1e-12);
      }
    }
  });

  it("returns 'stopped' at the step where onStep returns false", () => {
    let calls = 0;
    let stopT = NaN;
    let stopY = NaN;
    const r = integrate(tank(1e-8), 0, Float64Array.of(p0), 600, (_tOld, tNew, yNew) => {
      if (++calls < 3) return true;
      stopT = tNew;
      stopY = yNew[0];
      return false;
    });
    expect(r.status).toBe('stopped');
    expect(r.work.steps).toBe(3);
    expect(r.t).toBe(stopT);
    expect(r.y[0]).toBe(stopY);
    expect(r.hLast).toBeGreaterThan(0);
  });

  it("returns 'max-steps' when the step budget is exhausted", () => {
    const r = integrate(tank(1e-10), 0, Float64Array.of(p0), 600, keepGoing, { maxSteps: 3 });
    expect(r.status).toBe('max-steps');
    expect(r.work.steps + r.work.rejected).toBeLessThanOrEqual(3);
    expect(r.t).toBeLessThan(600);
  });

  it("returns 'non-finite' (not an exception) when the rhs turns NaN past t = 0.5", () => {
    const problem: OdeProblem = { ...decay, rhs: (t, y, d) => { d[0] = t > 0.5 ? NaN : -y[0]; } };
    const r = integrate(problem, 0, Float64Array.of(1), 1, keepGoing);
    expect(r.status).toBe('non-finite');
    expect(r.t).toBeLessThanOrEqual(0.5);
    expect(r.t).toBeGreaterThan(0.45);
    expect(Math.abs(r.y[0] / Math.exp(-r.t) - 1)).toBeLessThan(1e-5);
  });

  it("returns 'non-finite' at once when the rhs is not finite at the initial point", () => {
    const problem: OdeProblem = { ...decay, rhs: (_t, _y, d) => { d[0] = Infinity; } };
    const r = integrate(problem, 0, Float64Array.of(1), 1, keepGoing);
    expect(r.status).toBe('non-finite');
    expect(r.t).toBe(0);
  });

  it("ends a finite-time blow-up (y' = y², y(0) = 1, pole at t = 1) with a status, not a hang", () => {
    const problem: OdeProblem = { ...decay, rhs: (_t, y, d) => { d[0] = y[0] * y[0]; } };
    const r: IntegrateResult = integrate(problem, 0, Float64Array.of(1), 2, keepGoing);
    expect(['step-too-small', 'non-finite']).toContain(r.status);
    expect(Math.abs(r.t - 1)).toBeLessThan(1e-3);
    expect(r.work.steps + r.work.rejected).toBeLessThan(5000);
  });

  it('never samples f at or past tEnd, so a schedule switching there is not seen (common practice: the driver restarts at breakpoints)', () => {
    for (const rightContinuous of [true, false]) {
      let latest = -Infinity;
      const ramp: OdeProblem = {
        ...decay,
        rhs: (t, _y, d) => {
          latest = Math.max(latest, t);
          d[0] = (rightContinuous ? t < 0.5 : t <= 0.5) ? 1 : -1;
        },
      };
      const r = integrate(ramp, 0, Float64Array.of(0), 0.5, keepGoing);
      expect(r.status).toBe('completed');
      expect(latest).toBeLessThan(0.5);
      // A constant rhs is integrated exactly by both methods.
      expect(Math.abs(r.y[0] - 0.5)).toBeLessThan(1e-14);
    }
  });

  it('honours hMax and integrates backwards in time', () => {
    let longest = 0;
    const r = integrate(decay, 0, Float64Array.of(1), 5, (a, b) => { longest = Math.max(longest, b - a); }, { hMax: 0.25 });
    expect(r.status).toBe('completed');
    expect(longest).toBeLessThanOrEqual(0.25 * (1 + 1e-12));
    expect(Math.abs(r.y[0] / Math.exp(-5) - 1)).toBeLessThan(1e-4);
    const back = integrate(decay, 5, Float64Array.of(Math.exp(-5)), 0, keepGoing);
    expect(back.status).toBe('completed');
    expect(back.t).toBe(0);
    expect(Math.abs(back.y[0] - 1)).toBeLessThan(1e-4);
  });

  it('returns at once on an empty interval', () => {
    const r = integrate(decay, 1, Float64Array.of(2), 1, () => { throw new Error('no step expected'); });
    expect(r.status).toBe('completed');
    expect(r.y[0]).toBe(2);
    expect(r.work.rhs).toBe(0);
  });
});

describe('rosenbrock specifics', () => {
  it('takes h0 as its first step', () => {
    const steps: number[] = [];
    rosenbrock(tank(1e-6), 0, Float64Array.of(p0), 600, (a, b) => { steps.push(b - a); }, { h0: 0.125 });
    expect(steps[0]).toBe(0.125);
  });
});

describe('odex specifics', () => {
  it('does not forward odex\'s report of the initial point as a step, and takes h0 ≥ 1e-4 as its first step', () => {
    const spans: [number, number][] = [];
    const r = odex(tank(1e-6), 0, Float64Array.of(p0), 600, (a, b) => { spans.push([a, b]); }, { h0: 0.5 });
    expect(r.status).toBe('completed');
    expect(spans[0]).toEqual([0, 0.5]);
  });

  it('gets past an equilibrium whose rhs is round-off noise (ODEX\'s stability check would halve the step to zero)', () => {
    // two chambers at equal pressure: the flow between them is ±3e-18 kg/s, changing sign from
    // one evaluation to the next (warm-started solves differ in their last bits), against masses
    // of 5.7e-4 kg with an absolute tolerance of 1e-14. A later evaluation is a hair larger, so
    // the change of f along a substep is always more than twice f: the check's ratio exceeds 4.
    let sign = 1;
    let calls = 0;
    const p: OdeProblem = {
      n: 2, rtol: 1e-7, atol: new Float64Array([1e-14, 1e-14]),
      rhs(_t, _y, d) {
        sign = -sign;
        const q = 3.4e-18 * (1 + 1e-3 * ++calls);
        d[0] = q * sign;
        d[1] = -q * sign;
      },
    };
    const r = odex(p, 3.9, Float64Array.of(5.7316e-4, 5.7316e-4), 8, () => {}, { maxSteps: 20_000 });
    expect(r.status).toBe('completed');
    expect(r.t).toBe(8);
    expect(r.work.rhs).toBeLessThan(5_000);
    expect(Math.abs(r.y[0] + r.y[1] - 2 * 5.7316e-4)).toBeLessThan(1e-18); // the noise cancels in the sum
    expect(Math.abs(r.y[0] - 5.7316e-4)).toBeLessThan(1e-12);
  });
});

describe('stiff problem: Robertson kinetics (Hairer & Wanner II, §IV.1)', () => {
  it('rosenbrock matches the tabulated values at t = 40 with far fewer rhs evaluations than odex', () => {
    // y(40) ≈ (0.7158, 9.185e-6, 0.2842): widely tabulated, from memory; confirmed by the
    // example output in the ODEPACK DLSODE documentation (Hindmarsh; run at rtol 1e-4):
    // 7.158050e-01, 9.184616e-06, 2.841858e-01, hence the 1e-3 comparison.
    const expected = [0.7158, 9.185e-6, 0.2842];
    const results = [true, false].map((analytic) => rosenbrock(robertson(analytic), 0, Float64Array.of(1, 0, 0), 40, keepGoing));
    for (const r of results) {
      expect(r.status).toBe('completed');
      for (let i = 0; i < 3; i++) expect(Math.abs(r.y[i] / expected[i] - 1)).toBeLessThan(1e-3);
    }
    const explicit = odex(robertson(false), 0, Float64Array.of(1, 0, 0), 40, keepGoing, { maxSteps: 1_000_000 });
    expect(explicit.status).toBe('completed');
    for (let i = 0; i < 3; i++) expect(Math.abs(explicit.y[i] / expected[i] - 1)).toBeLessThan(1e-3);
    // Measured with the finite-difference jacobian (its rhs calls counted): ≈ 480×.
    const ratio = explicit.work.rhs / results[1].work.rhs;
    expect(ratio).toBeGreaterThan(100);
  });
});
