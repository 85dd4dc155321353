/** Levenberg–Marquardt on problems with known minimisers. */
import { describe, expect, it } from 'vitest';
import { inverseNormalMatrix, levenbergMarquardt } from '../../src/studies/fit-lm.js';

describe('levenbergMarquardt (Madsen, Nielsen & Tingleff 2004, §3.2)', () => {
  it("finds Rosenbrock's minimum (1, 1) from (−1.2, 1): r = (10(x2 − x1²), 1 − x1) (MNT 2004, Example 3.13)", () => {
    const r = levenbergMarquardt({
      m: 2, n: 2,
      residuals: (x, out) => { out[0] = 10 * (x[1] - x[0] * x[0]); out[1] = 1 - x[0]; return true; },
    }, [-1.2, 1]);
    expect(r.converged).toBe(true);
    expect(r.x[0]).toBeCloseTo(1, 8);
    expect(r.x[1]).toBeCloseTo(1, 8);
  });

  it('gives the linear least-squares solution of a straight-line fit (normal equations by hand)', () => {
    const t = [0, 1, 2, 3, 4];
    const y = [1.1, 2.9, 5.2, 7.1, 8.8];
    // slope = Σ(t−t̄)(y−ȳ)/Σ(t−t̄)² = 19.6/10, intercept = ȳ − slope·t̄
    const slope = 1.96;
    const intercept = 5.02 - slope * 2;
    const r = levenbergMarquardt({ m: 5, n: 2, residuals: (x, out) => { t.forEach((ti, i) => { out[i] = x[0] + x[1] * ti - y[i]; }); return true; } }, [0, 0]);
    expect(r.x[0]).toBeCloseTo(intercept, 10);
    expect(r.x[1]).toBeCloseTo(slope, 10);
  });

  it('recovers an exponential decay exactly from noise-free data, starting far off', () => {
    const t = Array.from({ length: 20 }, (_, i) => i * 0.25);
    const y = t.map((ti) => 3.5 * Math.exp(-0.8 * ti));
    const r = levenbergMarquardt({ m: t.length, n: 2, residuals: (x, out) => { t.forEach((ti, i) => { out[i] = x[0] * Math.exp(-x[1] * ti) - y[i]; }); return true; } }, [1, 3]);
    expect(r.converged).toBe(true);
    expect(r.x[0]).toBeCloseTo(3.5, 9);
    expect(r.x[1]).toBeCloseTo(0.8, 9);
  });

  it('treats a point where the residuals cannot be evaluated as a failed step and still converges', () => {
    // r = √x − 0.1 is undefined for x < 0; the Gauss–Newton step from x = 4 is −7.6, into x < 0.
    let refused = 0;
    const r = levenbergMarquardt({ m: 1, n: 1, residuals: (x, out) => { if (x[0] < 0) { refused++; return false; } out[0] = Math.sqrt(x[0]) - 0.1; return true; } }, [4], { tau: 1e-8 });
    expect(refused).toBeGreaterThan(0);
    expect(r.converged).toBe(true);
    expect(r.x[0]).toBeCloseTo(0.01, 10);
  });

  it('keeps a bound: minimising (x + 1)² with x ≥ 0 ends at 0', () => {
    const r = levenbergMarquardt({ m: 1, n: 1, residuals: (x, out) => { out[0] = x[0] + 1; return true; } }, [2], { lower: [0] });
    expect(r.x[0]).toBe(0);
  });

  it('reports not-evaluable when the start itself cannot be evaluated', () => {
    const r = levenbergMarquardt({ m: 1, n: 1, residuals: () => false }, [1]);
    expect(r.status).toBe('not-evaluable');
    expect(r.converged).toBe(false);
  });

  it('inverseNormalMatrix inverts JᵀJ even with badly scaled columns', () => {
    // J = [[1e6, 1], [0, 1], [1e6, 0]]: JᵀJ = [[2e12, 1e6], [1e6, 2]]; det = 4e12 − 1e12 = 3e12.
    const J = Float64Array.from([1e6, 1, 0, 1, 1e6, 0]);
    const inv = inverseNormalMatrix(J, 3, 2) as Float64Array;
    expect(inv[0]).toBeCloseTo(2 / 3e12, 24);
    expect(inv[1] / (-1e6 / 3e12)).toBeCloseTo(1, 12);
    expect(inv[3] / (2e12 / 3e12)).toBeCloseTo(1, 12);
    expect(inverseNormalMatrix(Float64Array.from([1, 2, 2, 4]), 2, 2)).toBeUndefined();
  });
});
