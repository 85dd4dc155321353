/** Self-checks of the closed forms in control-forms.ts (they must be right before they judge). */
import { describe, expect, it } from 'vitest';
import { expm2, hurwitz2, hurwitz3, piDamping, piStep, type PiLoop } from './control-forms.js';

describe('closed forms of the linear PI loop (Ogata ch. 5–6, from memory)', () => {
  const L: PiLoop = { Cm: 1.2e-8, G: 3e-9, qMax: 8e-3, kp: 2e-6, ki: 4e-6 };
  it('expm2 agrees with a Taylor series of exp(At)', () => {
    const A = [-0.7, 0.4, -1.3, 0.2];
    const v = [0.3, -1.1];
    let term = v.slice();
    const sum = v.slice();
    const t = 1.7;
    for (let k = 1; k < 60; k++) {
      term = [(A[0] * term[0] + A[1] * term[1]) * t / k, (A[2] * term[0] + A[3] * term[1]) * t / k];
      sum[0] += term[0]; sum[1] += term[1];
    }
    const [x, y] = expm2(A, t, v);
    expect(x).toBeCloseTo(sum[0], 12);
    expect(y).toBeCloseTo(sum[1], 12);
  });

  it('the step response starts at rest, ends at the target, and satisfies the loop equations', () => {
    const d = 20;
    expect(piStep(L, d, 0)).toBeCloseTo(0, 12);
    expect(piStep(L, d, 1e3)).toBeCloseTo(d, 9);
    // Cm·ẍ + (G + q·kp)·ẋ + q·ki·x = q·ki·δ for t > 0, and the kick: Cm·ẋ(0+) = q·kp·δ
    const h0 = 1e-7;
    expect((L.Cm * (piStep(L, d, h0) - piStep(L, d, 0))) / h0 / (L.qMax * L.kp * d)).toBeCloseTo(1, 4);
    for (const t of [0.002, 0.01, 0.03]) {
      const h = 1e-6;
      const x = piStep(L, d, t), xp = piStep(L, d, t + h), xm = piStep(L, d, t - h);
      const x1 = (xp - xm) / (2 * h), x2 = (xp - 2 * x + xm) / (h * h);
      const res = L.Cm * x2 + (L.G + L.qMax * L.kp) * x1 + L.qMax * L.ki * (x - d);
      expect(Math.abs(res) / (L.qMax * L.ki * d)).toBeLessThan(1e-3);
    }
    const { zeta } = piDamping(L);
    expect(zeta).toBeGreaterThan(0);
  });

  it('Routh–Hurwitz of the second- and third-order polynomials', () => {
    expect(hurwitz2(1, 2, 3)).toBe(true);
    expect(hurwitz2(-1, -2, -3)).toBe(true);
    expect(hurwitz2(-1, 2, 3)).toBe(false);
    // (s + 1)³ = s³ + 3s² + 3s + 1: stable; s³ + s² + s + 2 has roots with positive real part
    expect(hurwitz3(1, 3, 3, 1)).toBe(true);
    expect(hurwitz3(1, 1, 1, 2)).toBe(false);
  });
});
