/**
 * Equilibria and their stability against values computed outside the project:
 * test/reference/equilibria.py finds every equilibrium from the membrane laws alone (polynomial
 * roots in the stretch, a pressure scan and brentq per branch combination, NumPy eigenvalues of
 * the linearised mass balance with the conservation mode projected out by scipy null_space).
 * Acceptance in the issue: the number of equilibria, stretches to 0.3 %, stability, growth rate
 * to 5 %. The model equations are the same, so plenum is held to much tighter limits here.
 *
 * The two-chamber criterion (Müller & Strehlow, Rubber and Rubber Balloons, Springer LNP 637,
 * 2004, from memory; docs/references.md): d(δm1)/dt = −G(1/C1 + 1/C2)·δm1 with
 * C = dm/dp = ((V + Vd)/(n p) + dV/dp)·ρ, n = 1 isothermal; a sphere has C < 0 exactly past its
 * pressure maximum. It is evaluated in this file from the neo-Hookean law and compressible
 * Hagen–Poiseuille, independently of plenum's code.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { findEquilibria } from '../../src/equilibria/equilibria.js';
import { modelFromFile } from '../helpers.js';

interface RefEq {
  gauge: number;
  segments: number[];
  growth_rate: number;
  stable: boolean;
  formula_rate?: number;
  chambers: Record<string, { volume: number; mass: number; stretch?: number }>;
}
const ref = JSON.parse(readFileSync('test/reference/equilibria.json', 'utf8')) as Record<string, { count: number; equilibria: RefEq[] }>;

const R = 8.314462618 / 0.0289647;
const T = 293.15;
const pa = 101325;
const muGas = 1.716e-5 * Math.pow(T / 273.15, 1.5) * (273.15 + 110.4) / (T + 110.4);

/** −G(1/C1 + 1/C2) for two equal neo-Hookean cells (r0, t0, μ) at stretches l1, l2 and common pressure, joined by a line D × L. */
function twoCellRate(l1: number, l2: number, r0: number, t0: number, mu: number, D: number, L: number): number {
  const V0 = (4 / 3) * Math.PI * r0 ** 3;
  const Vd = (Math.PI * D * D * L) / 8;
  const c = (2 * mu * t0) / r0;
  const C = (l: number): number => {
    const p = pa + c * (1 / l - Math.pow(l, -7));
    const ddp = c * (-1 / (l * l) + 7 * Math.pow(l, -8));
    return (V0 * l ** 3 + Vd + p * (3 * V0 * l * l) / ddp) / (R * T);
  };
  const p = pa + c * (1 / l1 - Math.pow(l1, -7));
  const G = (2 * Math.PI * D ** 4 * p) / (256 * muGas * L * R * T);
  return -G * (1 / C(l1) + 1 / C(l2));
}

for (const [name, want] of Object.entries(ref)) {
  describe(`equilibria of ${name} against test/reference/equilibria.py (NumPy/SciPy)`, () => {
    const got = findEquilibria(modelFromFile(`test/reference/${name}.yaml`), { transient: false });

    it(`finds the same ${want.count} equilibria, with stretches and masses to 1e-9`, () => {
      expect(got.status).toBe('ok');
      expect(got.groups.every((g) => g.complete)).toBe(true);
      expect(got.count).toBe(want.count);
      for (const e of want.equilibria) {
        const match = got.equilibria.filter((q) => Object.entries(e.chambers).every(([n, c]) => Math.abs(q.chambers[n].mass - c.mass) <= 1e-9 * c.mass));
        expect(match.length, `equilibrium at ${e.gauge.toFixed(1)} Pa gauge, segments ${e.segments}`).toBe(1);
        const q = match[0];
        for (const [n, c] of Object.entries(e.chambers)) {
          if (c.stretch !== undefined) expect(Math.abs(q.chambers[n].stretch! - c.stretch) / c.stretch).toBeLessThan(1e-9);
          expect(Math.abs(q.chambers[n].volume - c.volume) / c.volume).toBeLessThan(1e-9);
          expect(Math.abs(q.chambers[n].gauge - e.gauge)).toBeLessThan(1e-6 * (pa + e.gauge));
          expect(q.chambers[n].segment).toBe(e.segments[Object.keys(e.chambers).indexOf(n)]);
        }
      }
    });

    it('agrees on stability and on the growth rate to 1e-5', () => {
      for (const e of want.equilibria) {
        const q = got.equilibria.find((x) => Object.entries(e.chambers).every(([n, c]) => Math.abs(x.chambers[n].mass - c.mass) <= 1e-9 * c.mass))!;
        expect(q.stable, `segments ${e.segments}`).toBe(e.stable);
        expect(q.stability).toBe(e.stable ? 'stable' : 'unstable');
        expect(Math.abs(q.growth_rate! - e.growth_rate) / Math.abs(e.growth_rate)).toBeLessThan(1e-5);
        if (e.formula_rate !== undefined) expect(Math.abs(q.growth_rate! - e.formula_rate) / Math.abs(e.formula_rate)).toBeLessThan(1e-5);
      }
    });
  });
}

describe('two-chamber criterion −G(1/C1 + 1/C2) (Müller & Strehlow 2004, from memory)', () => {
  const cell = { r0: 0.02, t0: 0.001, mu: 0.3e6, D: 0.5e-3, L: 0.5 };
  it('past the maximum the symmetric state is unstable, the lopsided ones stable; rates match the formula', () => {
    const r = findEquilibria(modelFromFile('test/reference/eq-two-cells-past.yaml'), { transient: false });
    const sym = r.equilibria.filter((e) => Math.abs(e.chambers.a.stretch! - e.chambers.b.stretch!) < 1e-9);
    expect(sym.length).toBe(1);
    const l = sym[0].chambers.a.stretch!;
    expect(l).toBeGreaterThan(Math.pow(7, 1 / 6));
    expect(sym[0].stability).toBe('unstable');
    const sigma = twoCellRate(l, l, cell.r0, cell.t0, cell.mu, cell.D, cell.L);
    expect(sigma).toBeGreaterThan(0);
    expect(Math.abs(sym[0].growth_rate! / sigma - 1)).toBeLessThan(1e-6);
    for (const e of r.equilibria.filter((x) => x !== sym[0])) {
      expect(e.stability).toBe('stable');
      const rate = twoCellRate(e.chambers.a.stretch!, e.chambers.b.stretch!, cell.r0, cell.t0, cell.mu, cell.D, cell.L);
      expect(Math.abs(e.growth_rate! / rate - 1)).toBeLessThan(1e-6);
      expect(e.time_constant).toBeCloseTo(-1 / rate, 6);
    }
  });

  it('before the maximum the symmetric state is the only one, and stable at the formula rate', () => {
    const r = findEquilibria(modelFromFile('test/reference/eq-two-cells-before.yaml'), { transient: false });
    expect(r.count).toBe(1);
    const e = r.equilibria[0];
    expect(e.chambers.a.stretch!).toBeLessThan(Math.pow(7, 1 / 6));
    expect(e.chambers.a.stretch!).toBeCloseTo(e.chambers.b.stretch!, 12);
    expect(e.stability).toBe('stable');
    const sigma = twoCellRate(e.chambers.a.stretch!, e.chambers.b.stretch!, cell.r0, cell.t0, cell.mu, cell.D, cell.L);
    expect(Math.abs(e.growth_rate! / sigma - 1)).toBeLessThan(1e-6);
  });
});
