/**
 * The two-chamber stability criterion (Müller & Strehlow, Rubber and Rubber Balloons, Springer
 * LNP 637, 2004, from memory; stated in docs/references.md): two chambers at equal
 * pressure joined by a conductance G = ∂ṁ/∂Δp evolve as d(δm1)/dt = −G(1/C1 + 1/C2)·δm1 with
 * the mass capacitance C = dm/dp = (V/(n p) + dV/dp)·ρ (n = 1 isothermal). A sphere has C < 0
 * exactly past its pressure maximum, so two equal spheres there run away, and before it they
 * equalise. Here the growth rate seen in the transient is compared with the formula, evaluated
 * in this file from the neo-Hookean law and compressible Hagen–Poiseuille (not plenum's code).
 */
import { describe, expect, it } from 'vitest';
import { channel, modelFromText, runChecked } from '../helpers.js';

const R = 8.314462618 / 0.0289647;
const T = 293.15;
const pa = 101325;
const mu = 1.716e-5 * Math.pow(T / 273.15, 1.5) * (273.15 + 110.4) / (T + 110.4);
const r0 = 0.02, t0 = 0.001, G = 0.3e6, D = 0.5e-3, L = 0.5;

function predictedRate(lambda: number): number {
  const c = (2 * G * t0) / r0;
  const dp = c * (1 / lambda - Math.pow(lambda, -7));
  const ddp = c * (-1 / lambda ** 2 + 7 * Math.pow(lambda, -8)); // dΔp/dλ
  const V0 = (4 / 3) * Math.PI * r0 ** 3;
  const V = V0 * lambda ** 3;
  const Vd = (Math.PI * D * D * L) / 8; // half the line, lumped into each chamber
  const p = pa + dp;
  const dVdp = (3 * V0 * lambda ** 2) / ddp;
  const C = (V + Vd) / (R * T) + (p / (R * T)) * dVdp;
  const k = (Math.PI * D ** 4) / (256 * mu * L * R * T);
  const cond = 2 * k * p; // ∂/∂p1 of k(p1² − p2²) at p1 = p2 = p
  return -cond * (2 / C);
}

function netlist(l1: number, l2: number, duration: number): string {
  return `
format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  a: { wall: neo-hookean, radius: 20 mm, thickness: 1 mm, shear-modulus: 0.3 MPa, start: { stretch: ${l1} } }
  b: { wall: neo-hookean, radius: 20 mm, thickness: 1 mm, shear-modulus: 0.3 MPa, start: { stretch: ${l2} } }
lines:
  link: { from: a, to: b, diameter: 0.5 mm, length: 0.5 m }
simulate: { duration: ${duration} s, sample: ${duration / 400} s, tolerance: 1e-11, method: implicit }
`;
}

/** Slope of ln|m_a − m_b| by least squares over samples whose |δ| lies in [lo, hi] relative. */
function observedRate(times: number[], ma: number[], mb: number[], lo: number, hi: number): number {
  const xs: number[] = [];
  const ys: number[] = [];
  times.forEach((t, k) => {
    const d = Math.abs(ma[k] - mb[k]) / ma[k];
    if (d >= lo && d <= hi) { xs.push(t); ys.push(Math.log(d)); }
  });
  expect(xs.length).toBeGreaterThan(20);
  const n = xs.length;
  const mx = xs.reduce((s, x) => s + x, 0) / n;
  const my = ys.reduce((s, y) => s + y, 0) / n;
  let sxy = 0, sxx = 0;
  for (let i = 0; i < n; i++) { sxy += (xs[i] - mx) * (ys[i] - my); sxx += (xs[i] - mx) ** 2; }
  return sxy / sxx;
}

describe('two-chamber stability criterion in a transient (Müller & Strehlow 2004, from memory)', () => {
  it('past the pressure maximum (λ = 1.6) the symmetric state is unstable: growth rate matches −G(1/C1 + 1/C2)', () => {
    const sigma = predictedRate(1.6);
    expect(sigma).toBeGreaterThan(0);
    const duration = 12 / sigma;
    const r = runChecked(modelFromText(netlist(1.6 - 1e-5, 1.6 + 1e-5, duration)));
    const rate = observedRate(r.trace.times, channel(r, 'a.mass'), channel(r, 'b.mass'), 1e-5, 1e-3);
    expect(Math.abs(rate / sigma - 1)).toBeLessThan(0.02);
    // and it ends lopsided: one cell small, the other large
    const la = r.chambers.a.final.stretch!, lb = r.chambers.b.final.stretch!;
    expect(Math.abs(la - lb)).toBeGreaterThan(0.3);
    expect(Math.min(la, lb)).toBeLessThan(Math.pow(7, 1 / 6));
  });

  it('before the maximum (λ = 1.2) the symmetric state is stable: decay rate matches the same formula', () => {
    const sigma = predictedRate(1.2);
    expect(sigma).toBeLessThan(0);
    const duration = 12 / -sigma;
    const r = runChecked(modelFromText(netlist(1.2 - 1e-3, 1.2 + 1e-3, duration)));
    const rate = observedRate(r.trace.times, channel(r, 'a.mass'), channel(r, 'b.mass'), 1e-7, 1e-4);
    expect(Math.abs(rate / sigma - 1)).toBeLessThan(0.02);
    expect(Math.abs(r.chambers.a.final.stretch! - r.chambers.b.final.stretch!)).toBeLessThan(1e-5);
  });
});
