// Rigid 1 L tank discharging through a 0.3 mm × 1 m laminar capillary, isothermal air at
// 293.15 K: dp/dt = −k(p² − pa²), k = πD⁴/(256 μ L V) (Hagen–Poiseuille at the mean density;
// Bird, Stewart & Lightfoot, Transport Phenomena, 2nd ed., §2.3), closed form
// p(t) = pa(1 + A e^(−2 pa k t))/(1 − A e^(−2 pa k t)), A = (p0 − pa)/(p0 + pa); μ from
// Sutherland's law; docs/references.md ("Rigid tank through a laminar capillary").
// Shared by the integrators' order tests.
import { expect } from 'vitest';
import type { OdeProblem, StepCallback } from '../../src/solve/types.js';

const D = 0.3e-3; // m
const Lc = 1; // m
const V = 1e-3; // m³
const mu = 1.716e-5 * (293.15 / 273.15) ** 1.5 * (273.15 + 110.4) / (293.15 + 110.4); // Pa·s
export const pa = 101325; // Pa
export const p0 = 300e3; // Pa
export const k = (Math.PI * D ** 4) / (256 * mu * Lc * V); // 1/(Pa·s)
export const A = (p0 - pa) / (p0 + pa);
export function pExact(t: number): number {
  const e = A * Math.exp(-2 * pa * k * t);
  return (pa * (1 + e)) / (1 - e);
}
export const tank: OdeProblem = {
  n: 1,
  rhs: (_t, y, dydt) => { dydt[0] = -k * (y[0] ** 2 - pa ** 2); },
  jacobian: (_t, y, J) => { J[0] = -2 * k * y[0]; },
  rtol: 1e-8,
  atol: Float64Array.of(1e-4),
};

type FixedSteps = (steps: number, onStep: StepCallback) => { status: string };

/** Largest dense-output error against the closed form at four points inside every step, checking the step ends too. */
export function denseError(run: FixedSteps, steps: number): number {
  const out = new Float64Array(1);
  let worst = 0;
  const r = run(steps, (tOld, tNew, yNew, dense) => {
    for (const s of [0.2, 0.4, 0.6, 0.8]) {
      const t = tOld + s * (tNew - tOld);
      dense(t, out);
      worst = Math.max(worst, Math.abs(out[0] - pExact(t)));
    }
    dense(tNew, out);
    expect(Math.abs(out[0] - yNew[0])).toBeLessThan(1e-15 * yNew[0]);
  });
  expect(r.status).toBe('completed');
  return worst;
}
