// The chamber's warm-started Newton solve (elements/chamber.ts) returns the volume of the
// safeguarded solver (model/volume.ts; Press et al., Numerical Recipes, 3rd ed., §9.4) to
// round-off, and its pressure partials match difference quotients of the solve itself (from
// p(V)·(V + Vd) = m·R·T: ∂p/∂m = p′·κ·R·T, ∂p/∂T = p′·κ·m·R).
import { describe, expect, it } from 'vitest';
import { ChamberState } from '../../src/elements/chamber.js';
import { solveVolume } from '../../src/model/volume.js';
import { modelFromText } from '../helpers.js';

const model = modelFromText(`
format: 1
heat: adiabatic
chambers:
  pod: { wall: neo-hookean, radius: 15 mm, thickness: 1 mm, shear-modulus: 0.3 MPa, start: { stretch: 1.2 } }
  spring: { wall: linear, volume: 30 mL, compliance: 0.2 mL/kPa, start: { pressure: 20 kPa gauge } }
  gent: { wall: gent, radius: 10 mm, thickness: 1 mm, shear-modulus: 0.4 MPa, limit: 20, start: { stretch: 1.6 } }
  bag:
    wall: measured
    points: [[20 mL, -1 kPa gauge], [40 mL, 0 kPa gauge], [60 mL, 8 kPa gauge], [80 mL, 20 kPa gauge]]
    deflation: [[20 mL, -2 kPa gauge], [40 mL, -1 kPa gauge], [60 mL, 4 kPa gauge], [80 mL, 14 kPa gauge]]
    start: { volume: 50 mL }
  tank: { wall: rigid, volume: 20 mL, start: { pressure: 50 kPa gauge } }
lines:
  a: { from: pod, to: spring, diameter: 2 mm, length: 100 mm }
  b: { from: spring, to: gent, diameter: 2 mm, length: 100 mm }
  c: { from: gent, to: bag, diameter: 2 mm, length: 100 mm }
  d: { from: bag, to: tank, diameter: 2 mm, length: 100 mm }
simulate: { duration: 1 s }
`);

describe('ChamberState.solve (warm Newton, safeguarded fallback)', () => {
  it('agrees with the safeguarded solver to 1e-12 over a sweep of masses, warm and cold', () => {
    for (const c of model.chambers) {
      if (c.wall.rigid) continue;
      const ch = new ChamberState(c, model.gas, model.pa);
      const out = { p: 0, V: 0, kappa: 0 };
      const T = c.T0;
      for (let k = -20; k <= 40; k++) {
        const m = c.m0 * (1 + k * 0.01);
        ch.solve(m, T, 0.7, out);
        const ref = solveVolume(ch.wall, model.pa, c.deadVolume, m * model.gas.R * T, c.V0, ch.lo, { p: 0, dpdV: 0 });
        expect(Number.isFinite(ref)).toBe(Number.isFinite(out.V));
        if (Number.isFinite(ref)) expect(Math.abs(out.V - ref)).toBeLessThan(1e-12 * (ref + c.deadVolume));
      }
    }
  });

  it('a negative mass has no volume (NaN pressure), also right after a warm solve', () => {
    const c = model.chambers.find((x) => x.name === 'pod')!;
    const ch = new ChamberState(c, model.gas, model.pa);
    const out = { p: 0, V: 0, kappa: 0 };
    ch.solve(c.m0, c.T0, 1, out);
    expect(Number.isFinite(out.p)).toBe(true);
    ch.solve(-c.m0, c.T0, 1, out);
    expect(Number.isNaN(out.p)).toBe(true);
  });

  it('near the Gent lock the warm solve still lands on the root (pressure rises steeply there)', () => {
    const c = model.chambers.find((x) => x.name === 'gent')!;
    const ch = new ChamberState(c, model.gas, model.pa);
    const out = { p: 0, V: 0, kappa: 0 };
    for (const f of [1, 3, 10, 30]) {
      const m = c.m0 * f;
      ch.solve(m, c.T0, 1, out);
      expect(out.V).toBeLessThan(c.wall.Vmax);
      expect(Math.abs((out.p * (out.V + c.deadVolume)) / (m * model.gas.R * c.T0) - 1)).toBeLessThan(1e-12);
    }
  });

  it('pressure partials match difference quotients of the solve', () => {
    for (const c of model.chambers) {
      const ch = new ChamberState(c, model.gas, model.pa);
      const s = { p: 0, V: 0, kappa: 0 };
      const m = c.m0 * 1.01, T = c.T0 * 1.02, h = 0.4;
      ch.solve(m, T, h, s);
      const pp = { dm: 0, dT: 0, dh: 0 };
      ch.pressurePartials(m, T, h, s.V, s.p, s.kappa, pp);
      const q = { p: 0, V: 0, kappa: 0 };
      const dm = m * 1e-6, dT = T * 1e-6, dh = 1e-6;
      ch.solveAside(m + dm, T, h, q);
      const fm = (q.p - s.p) / dm;
      ch.solveAside(m, T + dT, h, q);
      const fT = (q.p - s.p) / dT;
      ch.solveAside(m, T, h + dh, q);
      const fh = (q.p - s.p) / dh;
      expect(Math.abs(pp.dm - fm)).toBeLessThan(1e-4 * Math.abs(fm));
      expect(Math.abs(pp.dT - fT)).toBeLessThan(1e-4 * Math.abs(fT));
      if (c.deflation) expect(Math.abs(pp.dh - fh)).toBeLessThan(1e-4 * Math.abs(fh));
      else expect(pp.dh).toBe(0);
    }
  });
});
