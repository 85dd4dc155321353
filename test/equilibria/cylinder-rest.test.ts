/** Rest positions of cylinders and their stability with the load's dynamics (equilibria/cylinder-rest.ts). */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { cylinderSummary } from '../../src/transient/results.js';
import { findEquilibria } from '../../src/equilibria/equilibria.js';
import { modelFromText, runChecked } from '../helpers.js';

const PA = 101325;

describe('cylinder rest positions', () => {
  it('against a spring from a constant supply: x = ((p − pa)A − F0 − F)/k (static balance), stable, the transient ends there', () => {
    const model = modelFromText(`format: 1
reservoirs:
  supply: { pressure: 150 kPa gauge }
cylinders:
  c:
    bore: 25 mm
    stroke: 200 mm
    dead-volume: 2 mL
    moving-mass: 0.5 kg
    spring: { rate: 800 N/m, preload: 15 N }
    force: 12 N
    friction: { static: 5 N, sliding: 4 N, viscous: 60 N*s/m }
lines:
  feed: { from: supply, to: c.cap, diameter: 6 mm, length: 0.5 m }
simulate: { duration: 3 s }
`);
    const r = findEquilibria(model);
    const c = r.cylinders![0];
    expect(c.rests.length).toBe(1);
    const e = c.rests[0];
    const A = Math.PI * 0.025 ** 2 / 4;
    const want = (150e3 * A - 15 - 12) / 800;
    expect(Math.abs(e.position - want) / want).toBeLessThan(1e-9);
    expect(e.stable).toBe(true);
    expect(e.stiffness).toBeCloseTo(800, 3);
    // M·s² + c·s + K = 0, overdamped here (ζ = 60/(2√(800·0.5)) = 1.5)
    expect(e.damping).toBeCloseTo(1.5, 6);
    expect(e.eigenvalues.every((x) => x.re < 0 && x.im === 0)).toBe(true);
    // static friction holds it where |F| ≤ 5 N: ±5/800 m around the rest
    expect(e.friction_band![0]).toBeCloseTo(want - 5 / 800, 8);
    expect(e.friction_band![1]).toBeCloseTo(want + 5 / 800, 8);
    // the transient (overdamped, from retracted) comes to rest inside the friction band
    const run = runChecked(model);
    const x = cylinderSummary(run, 'c')!.final.position;
    expect(x).toBeGreaterThanOrEqual(e.friction_band![0] - 1e-9);
    expect(x).toBeLessThanOrEqual(e.friction_band![1] + 1e-9);
  });

  it('a sealed double-acting cylinder is a gas spring: K = k + Σ n·p·A²/V (any fluid-power text, from memory)', () => {
    for (const heat of ['isothermal', 'adiabatic'] as const) {
      const model = modelFromText(`format: 1
heat: ${heat}
ambient: { pressure: 101.325 kPa abs, temperature: 293.15 K }
cylinders:
  c:
    bore: 32 mm
    rod: 12 mm
    stroke: 100 mm
    dead-volume: { cap: 5 mL, rod: 5 mL }
    moving-mass: 2 kg
    spring: { rate: 300 N/m, preload: 0 N }
    force: -15 N
    start: { position: 50 mm }
simulate: { duration: 0.2 s }
`);
      const r = findEquilibria(model, { transient: false });
      const e = r.cylinders![0].rests.find((x) => x.where === 'inside')!;
      const n = heat === 'isothermal' ? 1 : 1.4;
      const Ac = Math.PI * 0.032 ** 2 / 4;
      const Ar = Math.PI * (0.032 ** 2 - 0.012 ** 2) / 4;
      const Vc = (x: number): number => 5e-6 + Ac * x;
      const Vr = (x: number): number => 5e-6 + Ar * (0.1 - x);
      const pc = PA * (Vc(0.05) / Vc(e.position)) ** n;
      const pr = PA * (Vr(0.05) / Vr(e.position)) ** n;
      // the rest balances the force: (pc − pa)Ac − (pr − pa)Ar − k·x + 15 = 0
      expect(Math.abs((pc - PA) * Ac - (pr - PA) * Ar - 300 * e.position + 15)).toBeLessThan(1e-9);
      const K = 300 + n * pc * Ac * Ac / Vc(e.position) + n * pr * Ar * Ar / Vr(e.position);
      expect(Math.abs(e.stiffness! - K) / K).toBeLessThan(1e-6);
      expect(e.stable).toBe(true);
      expect(e.damping).toBe(0); // no viscous friction: undamped, the eigenvalues on the imaginary axis
      expect(Math.abs(e.eigenvalues[0].im - Math.sqrt(K / 2)) / Math.sqrt(K / 2)).toBeLessThan(1e-6);
    }
  });

  it('a cylinder pushed into its stop rests there; one with a side joined to a compliant chamber is not analysed', () => {
    const model = modelFromText(`format: 1
reservoirs:
  supply: { pressure: 5 barg }
chambers:
  bag: { wall: linear, volume: 10 mL, compliance: 0.01 mL/kPa, start: { pressure: 0 barg } }
cylinders:
  a: { bore: 20 mm, stroke: 50 mm, dead-volume: 1 mL, moving-mass: 0.2 kg, spring: { rate: 100 N/m } }
  b: { bore: 20 mm, stroke: 50 mm, dead-volume: 1 mL, moving-mass: 0.2 kg }
lines:
  l1: { from: supply, to: a.cap, diameter: 2 mm, length: 0.3 m }
  l2: { from: bag, to: b.cap, diameter: 2 mm, length: 0.3 m }
simulate: { duration: 0.5 s }
`);
    const r = findEquilibria(model, { transient: false });
    const [a, b] = r.cylinders!;
    expect(a.rests.map((e) => [e.where, e.stable])).toEqual([['full stroke', true]]);
    expect(b.rests).toEqual([]);
    expect(b.note).toContain('compliant chamber');
  });

  it('chambers joined to cylinder sides: the branches to the sides pass no gas at rest, and the transient reaches the rest found', () => {
    const model = modelFromText(readFileSync('networks/clamp-stroke.yaml', 'utf8'), 'networks/clamp-stroke.yaml');
    const r = findEquilibria(model);
    expect(r.equilibria.length).toBe(1);
    expect(Math.abs(r.equilibria[0].chambers.hose_a.gauge)).toBeLessThan(1e-6);
    expect(r.equilibria[0].chambers.hose_b.gauge).toBeCloseTo(6e5, 3);
    expect(r.transient?.reached).toBe(0);
    expect(r.notes.some((n) => n.includes('a_throttle, a_check, b_throttle, b_check join a cylinder side'))).toBe(true);
    expect(r.cylinders![0].rests.map((e) => e.where)).toEqual(['retracted stop']);
  });
});
