/**
 * The PID law (physics/pid.ts; Åström & Hägglund, Advanced PID Control, ISA 2006, ch. 3,
 * from memory): output and modes, the two anti-windup schemes, the derivative filter, and the
 * sampled form against its own recursion solved by hand.
 */
import { describe, expect, it } from 'vitest';
import { filterRate, integralRate, pidModeOf, pidOutput, pidRaw, pidSample, type PidLaw, type SampledPid } from '../../src/physics/pid.js';

const law: PidLaw = { kp: 2, ki: 4, kd: 0.5, tf: 0.05, umin: 0, umax: 1, antiWindup: 'clamping', tt: 0.5 };

describe('continuous PID law', () => {
  it('output = kp·e + I − kd·(y − yf)/Tf, clamped by mode', () => {
    expect(pidRaw(law, 0.1, 3, 0.2, 2.9)).toBeCloseTo(2 * 0.1 + 0.2 - (0.5 * 0.1) / 0.05, 14);
    expect(pidModeOf(law, 1.2)).toBe('high');
    expect(pidModeOf(law, -0.1)).toBe('low');
    expect(pidModeOf(law, 0.5)).toBe('free');
    expect(pidOutput(law, 1.2, 'high')).toBe(1);
    expect(pidOutput(law, 0.7, 'free')).toBe(0.7);
    expect(filterRate(law, 3, 2.9)).toBeCloseTo(0.1 / 0.05, 12);
    expect(filterRate({ ...law, kd: 0 }, 3, 2.9)).toBe(0);
  });

  it('clamping stops integration only while the error pushes further into the limit', () => {
    expect(integralRate(law, 0.1, 1.3, 'high')).toBe(0);
    expect(integralRate(law, -0.1, 1.3, 'high')).toBeCloseTo(-0.4, 14);
    expect(integralRate(law, -0.1, -0.3, 'low')).toBe(0);
    expect(integralRate(law, 0.1, 0.5, 'free')).toBeCloseTo(0.4, 14);
  });

  it('back-calculation bleeds the integral by (u − v)/Tt while saturated', () => {
    const bc: PidLaw = { ...law, antiWindup: 'back-calculation' };
    expect(integralRate(bc, 0.1, 1.3, 'high')).toBeCloseTo(0.4 + (1 - 1.3) / 0.5, 14);
    expect(integralRate(bc, 0.1, 0.5, 'free')).toBeCloseTo(0.4, 14);
  });
});

describe('sampled PID law', () => {
  it('PI: u_k = kp·e_k + I_k, I_{k+1} = I_k + Ts·ki·e_k (hand recursion)', () => {
    const pi: PidLaw = { ...law, kd: 0, umin: -10, umax: 10 };
    const s: SampledPid = { I: 0.1, D: 0, yPrev: Number.NaN, u: 0 };
    const es = [0.5, 0.3, -0.2];
    let I = 0.1;
    for (const e of es) {
      pidSample(pi, s, e, 1 - e, 0.01);
      expect(s.u).toBeCloseTo(2 * e + I, 14);
      I += 0.01 * 4 * e;
      expect(s.I).toBeCloseTo(I, 14);
    }
  });

  it('the filtered derivative follows D_k = (Tf·D_{k−1} − kd·Δy)/(Tf + Ts)', () => {
    const pd: PidLaw = { ...law, ki: 0, kp: 0, umin: -10, umax: 10 };
    const s: SampledPid = { I: 0, D: 0, yPrev: Number.NaN, u: 0 };
    pidSample(pd, s, 0, 1, 0.01);
    expect(s.D).toBe(0); // no previous sample: no derivative kick
    pidSample(pd, s, 0, 1.2, 0.01);
    const D1 = (0 - 0.5 * 0.2) / 0.06;
    expect(s.D).toBeCloseTo(D1, 14);
    pidSample(pd, s, 0, 1.2, 0.01);
    expect(s.D).toBeCloseTo((0.05 * D1) / 0.06, 14);
  });

  it('clamping holds the integral while saturated and pushing; back-calculation bleeds it', () => {
    const s: SampledPid = { I: 0.9, D: 0, yPrev: Number.NaN, u: 0 };
    const pi: PidLaw = { ...law, kd: 0 };
    pidSample(pi, s, 0.5, 0, 0.01);
    expect(s.u).toBe(1);
    expect(s.I).toBe(0.9);
    const bc = { ...pi, antiWindup: 'back-calculation' as const };
    const b: SampledPid = { I: 0.9, D: 0, yPrev: Number.NaN, u: 0 };
    pidSample(bc, b, 0.5, 0, 0.01);
    expect(b.I).toBeCloseTo(0.9 + 0.01 * (4 * 0.5 + (1 - 1.9) / 0.5), 14);
  });
});
