import { describe, expect, it } from 'vitest';
import { GASES, makeGas } from '../../src/physics/gas.js';
import {
  RE_LAMINAR, RE_TURBULENT, frictionFactor, haalandFriction, tubeFlow, tubeFlowInto, type TubeFlow,
} from '../../src/physics/tube.js';

const air = makeGas(GASES.air);
const T = 293.15;
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

/** Colebrook (1939) by fixed-point iteration on 1/√f. */
function colebrook(Re: number, rr: number): number {
  let x = 8;
  for (let i = 0; i < 200; i++) x = -2 * Math.log10(rr / 3.7 + 2.51 * x / Re);
  return 1 / (x * x);
}

describe('laminar: compressible Hagen–Poiseuille (Bird, Stewart & Lightfoot, Transport Phenomena, §2.3)', () => {
  const D = 0.3e-3;
  const L = 1;
  const mu = air.viscosity(T);

  it('D = 0.3 mm, L = 1 m, 300 → 101.325 kPa: ṁ = 5.19403e-6 kg/s, Re = 1215.7 (docs/references.md)', () => {
    const f = tubeFlow(300e3, 101.325e3, T, air, D, L, 0);
    const closed = (Math.PI * D ** 4 * (300e3 ** 2 - 101.325e3 ** 2)) / (256 * mu * L * air.R * T);
    expect(rel(f.mdot, closed)).toBeLessThan(1e-12);
    expect(rel(f.mdot, 5.19403e-6)).toBeLessThan(2e-6);
    expect(rel(f.reynolds, 1215.7)).toBeLessThan(5e-5);
    expect(f.regime).toBe('laminar');
    expect(rel(f.friction, 64 / f.reynolds)).toBeLessThan(1e-15);
  });

  it('small Δp: equals incompressible Q = πD⁴Δp/(128μL) = 1.09635e-8 m³/s at the mean density', () => {
    // Exactly, ṁ = ρ(p̄)·Q with p̄ the arithmetic mean pressure; at the outlet density the
    // volumetric flow is larger by p̄/p2 − 1 = Δp/(2 p2) ≈ 0.5 % (the compressibility effect).
    const p1 = 101.825e3;
    const p2 = 100.825e3;
    const m = tubeFlow(p1, p2, T, air, D, L, 0).mdot;
    const Q = (Math.PI * D ** 4 * 1000) / (128 * mu * L);
    expect(rel(Q, 1.09635e-8)).toBeLessThan(5e-6);
    const rhoMean = (0.5 * (p1 + p2)) / (air.R * T);
    expect(rel(m / rhoMean, Q)).toBeLessThan(1e-12);
    const Qout = m / (p2 / (air.R * T));
    expect(rel(Qout / Q - 1, 1000 / (2 * p2))).toBeLessThan(1e-9);
    expect(rel(Qout, Q)).toBeLessThan(6e-3);
  });

  it('is exactly 0 at equal pressures, antisymmetric, and linear in p1 − p2 near zero', () => {
    expect(tubeFlow(2e5, 2e5, T, air, D, L, 0).mdot).toBe(0);
    const slope0 = (Math.PI * D ** 4 * 2 * 2e5) / (256 * mu * L * air.R * T);
    for (const d of [1e-3, 1, 100]) {
      const p1 = 2e5 + d / 2;
      const p2 = 2e5 - d / 2;
      const m = tubeFlow(p1, p2, T, air, D, L, 0).mdot;
      expect(rel(m / (p1 - p2), slope0)).toBeLessThan(1e-9);
      expect(tubeFlow(p2, p1, T, air, D, L, 0).mdot).toBe(-m);
    }
  });
});

describe('turbulent friction (Haaland, J. Fluids Eng. 105 (1983) 89)', () => {
  it('Haaland is within 1.5 % of Colebrook (the accuracy Haaland states) for smooth and rough tubes', () => {
    let worst = 0;
    for (const rr of [0, 1e-5, 1e-4, 1e-3, 1e-2, 5e-2]) {
      for (let e = Math.log10(4000); e <= 8; e += 0.05) {
        const Re = 10 ** e;
        worst = Math.max(worst, rel(haalandFriction(Re, rr), colebrook(Re, rr)));
      }
    }
    expect(worst).toBeLessThan(0.015);
  });

  it('smooth tube, Re 1e4–1e5: Haaland within 3.5 % of Blasius 0.3164 Re^-0.25 (Blasius itself is up to 3 % above Colebrook there)', () => {
    for (const Re of [1e4, 2e4, 5e4, 1e5]) {
      const blasius = 0.3164 * Re ** -0.25;
      expect(rel(colebrook(Re, 0), blasius)).toBeLessThan(0.03);
      expect(rel(frictionFactor(Re, 0), blasius)).toBeLessThan(0.035);
    }
    // where Blasius and Colebrook agree (about 4e3–1e4 and near 1e5) the match is within 2.5 %
    for (const Re of [5e3, 1e4, 1e5]) expect(rel(frictionFactor(Re, 0), 0.3164 * Re ** -0.25)).toBeLessThan(0.025);
  });

  it('blended f is continuous at 2300 and 4000, and f·Re² is strictly increasing across the blend (unique solution)', () => {
    for (const rr of [0, 1e-3, 5e-2]) {
      expect(rel(frictionFactor(RE_LAMINAR * (1 + 1e-12), rr), 64 / RE_LAMINAR)).toBeLessThan(1e-9);
      expect(rel(frictionFactor(RE_TURBULENT * (1 - 1e-12), rr), haalandFriction(RE_TURBULENT, rr))).toBeLessThan(1e-9);
      let prev = 0;
      for (let Re = 1000; Re <= 6000; Re += 0.5) {
        const F = frictionFactor(Re, rr) * Re * Re;
        expect(F).toBeGreaterThan(prev);
        prev = F;
      }
    }
  });

  it('solves p1² − p2² = f (L/D) G² R T to round-off in transitional and turbulent flow', () => {
    const D = 4e-3;
    const L = 2;
    for (const [p1, rough] of [[101.8e3, 0], [103e3, 0], [130e3, 1.5e-6], [600e3, 0], [600e3, 5e-5], [2e6, 1e-4]]) {
      const f = tubeFlow(p1, 101.325e3, T, air, D, L, rough);
      const G = f.mdot / (Math.PI * D * D / 4);
      const lhs = p1 * p1 - 101.325e3 ** 2;
      const rhs = f.friction * (L / D) * G * G * air.R * T;
      expect(rel(rhs, lhs)).toBeLessThan(1e-12);
      expect(rel(f.reynolds, (G * D) / air.viscosity(T))).toBeLessThan(1e-12);
      expect(rel(f.friction, frictionFactor(f.reynolds, rough / D))).toBeLessThan(1e-15);
      expect(f.regime).toBe(f.reynolds <= RE_LAMINAR ? 'laminar' : f.reynolds < RE_TURBULENT ? 'transitional' : 'turbulent');
    }
    expect(tubeFlow(600e3, 101.325e3, T, air, D, L, 0).regime).toBe('turbulent');
  });

  it('gives the same root to 1e-12 from any warm start (the previous Reynolds number in `out`), blend ends included', () => {
    const D = 4e-3;
    const L = 2;
    // pressures from just above the laminar limit to fully rough turbulence, densely through the
    // blend (Re 2300–4000) where the friction law is only C¹
    const p1s = Array.from({ length: 400 }, (_, k) => 101.325e3 * (1 + 0.0002 * 1.025 ** k));
    const guesses = [0, 2300.5, 2301, 3000, 3999.9, 4000.1, 1e4, 1e6, 5e7];
    for (const rough of [0, 5e-5]) {
      for (const p1 of p1s) {
        const cold = tubeFlow(p1, 101.325e3, T, air, D, L, rough);
        if (cold.regime === 'laminar') continue;
        const G = cold.mdot / (Math.PI * D * D / 4);
        expect(rel(cold.friction * (L / D) * G * G * air.R * T, (p1 - 101.325e3) * (p1 + 101.325e3))).toBeLessThan(1e-12);
        for (const guess of guesses) {
          const out = { mdot: 0, reynolds: guess, regime: 'turbulent' as const, friction: 0 };
          const warm = tubeFlowInto(out, p1, 101.325e3, T, air, D, L, rough);
          expect(rel(warm.reynolds, cold.reynolds)).toBeLessThan(1e-12);
        }
      }
    }
  });

  it('flow is C¹ and increasing in p1 through the laminar–turbulent transition; antisymmetric', () => {
    const D = 4e-3;
    const L = 2;
    const m = (p1: number): number => tubeFlow(p1, 101.325e3, T, air, D, L, 0).mdot;
    let prev = 0;
    for (let p1 = 101.4e3; p1 <= 140e3; p1 += 5) {
      expect(m(p1)).toBeGreaterThan(prev);
      expect(tubeFlow(101.325e3, p1, T, air, D, L, 0).mdot).toBe(-m(p1));
      prev = m(p1);
    }
    for (const ReB of [RE_LAMINAR, RE_TURBULENT]) {
      let lo = 101.4e3;
      let hi = 140e3;
      for (let i = 0; i < 80; i++) {
        const mid = 0.5 * (lo + hi);
        if (tubeFlow(mid, 101.325e3, T, air, D, L, 0).reynolds < ReB) lo = mid; else hi = mid;
      }
      const p = 0.5 * (lo + hi);
      expect(rel(m(p * (1 + 1e-12)), m(p * (1 - 1e-12)))).toBeLessThan(1e-9);
      // One-sided slopes differ by O(h) (curvature) at a C¹ point but by O(1) at a kink.
      const gap = (h: number): number => rel((m(p) - m(p - h)) / h, (m(p + h) - m(p)) / h);
      expect(gap(1e-7 * p)).toBeLessThan(2e-4);
      expect(gap(1e-7 * p)).toBeLessThan(0.2 * gap(1e-6 * p));
    }
    const regimes = new Set([101.8e3, 103e3, 130e3].map((p) => tubeFlow(p, 101.325e3, T, air, D, L, 0).regime));
    expect(regimes).toEqual(new Set(['laminar', 'transitional', 'turbulent']));
  });

  it('tubeFlowInto fills and returns the given object', () => {
    const out: TubeFlow = { mdot: 0, reynolds: 0, regime: 'laminar', friction: 0 };
    expect(tubeFlowInto(out, 600e3, 101.325e3, T, air, 4e-3, 2, 0)).toBe(out);
    expect(out).toEqual(tubeFlow(600e3, 101.325e3, T, air, 4e-3, 2, 0));
  });
});
