/**
 * Stability of a PI loop around a rubber chamber past its pressure maximum, from plenum's
 * linearisation, against the Routh–Hurwitz condition and the roots of the same linear model
 * written out by hand (control-forms.ts; Ogata, Modern Control Engineering, ch. 6, from
 * memory).
 *
 * The chamber (neo-Hookean sphere, Treloar 1975, docs/references.md) rests at stretch 1.8, past
 * its maximum at 7^(1/6), where its mass capacitance Cm = dm/dp = (V + Vd + p·dV/dp)/(R T) is
 * negative. It is filled through a choked valve (flow q_max·u, ISO 6358-1, independent of the
 * chamber pressure) and drained by a laminar capillary (G = 2 k p, Hagen–Poiseuille).
 * Linearised: Cm·s² + (G + q_max·kp)·s + q_max·ki = 0. With Cm < 0 the loop is stable only when
 * both other coefficients are negative too: a reverse-acting controller with kp < −G/q_max and
 * ki < 0. A direct-acting PI makes the chamber run away with the growth rate of the positive root.
 */
import { describe, expect, it } from 'vitest';
import { findEquilibria, traceEquilibria } from '../../src/index.js';
import { modelFromText } from '../helpers.js';
import { hurwitz2 } from './control-forms.js';

const R = 8.314462618 / 0.0289647, T = 293.15, pa = 101325;
const mu = 1.716e-5 * Math.pow(T / 273.15, 1.5) * (273.15 + 110.4) / (T + 110.4);
const r0 = 0.02, t0 = 0.001, G0 = 0.4e6, lam = 1.8;
const c = (2 * G0 * t0) / r0;
const dp = c * (1 / lam - 1 / lam ** 7);
const p = pa + dp;
const V0 = (4 / 3) * Math.PI * r0 ** 3;
const V = V0 * lam ** 3;
const D = 0.5e-3, Lc = 1, Vd = (Math.PI * D * D * Lc) / 8;
const k = (Math.PI * D ** 4) / (256 * mu * Lc * R * T);
const G = 2 * k * p;
const qMax = 0.05e-8 * 1.185 * (200e3 + pa);
const dVdp = (3 * V0 * lam ** 2) / (c * (-1 / lam ** 2 + 7 / lam ** 8));
const Cm = (V + Vd + p * dVdp) / (R * T);
const kpStar = -G / qMax;

function netlist(kp: number, ki: number): string {
  return `
format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  cell: { wall: neo-hookean, radius: 20 mm, thickness: 1 mm, shear-modulus: 0.4 MPa, start: { stretch: 1.8 } }
reservoirs:
  supply: { pressure: 200 kPa gauge }
valves:
  fill: { from: supply, to: cell, conductance: 0.05 L/(s*bar), critical-ratio: 0.5 }
lines:
  capillary: { from: cell, to: ambient, diameter: 0.5 mm, length: 1 m }
controllers:
  hold: { kind: pid, measure: cell.gauge, target: ${dp} Pa gauge, kp: ${kp}, ki: ${ki}, drives: fill, initially: 1.4% }
simulate: { duration: 0.5 s }
`;
}

describe('PI loop around a chamber past its pressure maximum (Routh–Hurwitz of the linearisation)', () => {
  it('the plant: negative capacitance past the maximum, choked fill, laminar drain', () => {
    expect(Cm).toBeLessThan(0);
    expect((p / (200e3 + pa))).toBeLessThan(0.5);
    expect((4 * k * (p * p - pa * pa)) / (Math.PI * D * mu)).toBeLessThan(2300);
  });

  it('a direct-acting PI: unstable, growing at the positive root of Cm s² + (G + q kp) s + q ki', () => {
    const kp = 2e-7, ki = 5e-7;
    const eq = findEquilibria(modelFromText(netlist(kp, ki)), { transient: false });
    expect(eq.equilibria).toHaveLength(1);
    const e = eq.equilibria[0];
    expect(e.chambers.cell.gauge).toBeCloseTo(dp, 4);
    expect(e.chambers.cell.branch).toBe('falling');
    expect(hurwitz2(Cm, G + qMax * kp, qMax * ki)).toBe(false);
    const a = Cm, b = G + qMax * kp, cc = qMax * ki;
    const root = (-b - Math.sqrt(b * b - 4 * a * cc)) / (2 * a); // the positive one (a < 0)
    expect(root).toBeGreaterThan(0);
    expect(e.stability).toBe('unstable');
    expect(Math.abs(e.growth_rate! / root - 1)).toBeLessThan(1e-5);
  });

  it('a reverse-acting PI below −G/q_max: stable, with the eigenvalues of the linear model', () => {
    const kp = 3 * kpStar, ki = -2e-7;
    const e = findEquilibria(modelFromText(netlist(kp, ki)), { transient: false }).equilibria[0];
    expect(hurwitz2(Cm, G + qMax * kp, qMax * ki)).toBe(true);
    expect(e.stability).toBe('stable');
    const a = Cm, b = G + qMax * kp, cc = qMax * ki;
    const disc = b * b - 4 * a * cc;
    const re = disc >= 0 ? Math.max((-b + Math.sqrt(disc)) / (2 * a), (-b - Math.sqrt(disc)) / (2 * a)) : -b / (2 * a);
    expect(Math.abs(e.growth_rate! / re - 1)).toBeLessThan(1e-5);
  });

  it('plenum trace --vary controllers.hold.kp finds the stability boundary within 1 % of Routh–Hurwitz (kp = −G/q_max)', () => {
    const model = modelFromText(netlist(2 * kpStar, -2e-7));
    const r = traceEquilibria(model, { vary: 'controllers.hold.kp', from: String(2 * kpStar), to: String(0.5 * kpStar) });
    if (!r.ok) throw new Error(r.message);
    const changes = r.value.branches.flatMap((b) => b.points.filter((q) => q.special === 'stability-change'));
    expect(changes).toHaveLength(1);
    expect(Math.abs(changes[0].parameter / kpStar - 1)).toBeLessThan(0.01);
    // measured: far inside the 1 % (the bisection and the difference jacobian set the limit)
    expect(Math.abs(changes[0].parameter / kpStar - 1)).toBeLessThan(1e-5);
    const pts = r.value.branches[0].points;
    expect(pts[0].stable).toBe(true);
    expect(pts[pts.length - 1].stable).toBe(false);
  });
});
