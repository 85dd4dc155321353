import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { GASES, makeGas } from '../../src/physics/gas.js';
import { lineFlow } from '../../src/physics/line-flow.js';
import { tubeFlow } from '../../src/physics/tube.js';
import { orificeMassFlow } from '../../src/physics/orifice.js';

const air = makeGas(GASES.air);
const T = 293.15;
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
/** Independent values: test/reference/choked_lines.py (SciPy), see its header for the equations. */
const ref = JSON.parse(readFileSync('test/reference/choked-lines.json', 'utf8')) as {
  p0: number; pb: number; D: number; nozzle: number;
  lines: { L: number; fanno: number; fanno_choked: boolean; isothermal: number; isothermal_choked: boolean; isothermal_mach: number }[];
  back: { L: number; pb: number; isothermal: number; isothermal_choked: boolean; isothermal_mach: number }[];
};

describe('a 4 mm hose venting a 6 bar gauge receiver (docs/references.md, "Compressible flow limits")', () => {
  const nozzle = orificeMassFlow(ref.p0, ref.pb, T, air.R, air.gamma, (Math.PI / 4) * ref.D ** 2);

  it('the ideal 4 mm nozzle from 701.325 kPa abs passes 20.80 g/s (Anderson, Modern Compressible Flow, ch. 5)', () => {
    expect(rel(nozzle, 20.80e-3)).toBeLessThan(2.5e-4);
    expect(rel(nozzle, ref.nozzle)).toBeLessThan(1e-5); // R of the reference script: 8.314462618/0.0289647
  });

  for (const c of ref.lines) {
    it(`L = ${c.L} m: within 20 % of Fanno flow (Shapiro 1953, ch. 6), below the nozzle, and the law as computed independently`, () => {
      const f = lineFlow(ref.p0, ref.pb, T, air, ref.D, c.L, 0);
      expect(f.mdot).toBeLessThan(nozzle);
      expect(rel(f.mdot, c.fanno)).toBeLessThan(0.2);
      // measured: −4.3 %, −5.2 %, −3.0 %, −0.2 %, +0.3 % from 0.01 m to 100 m
      expect(rel(f.mdot, c.fanno)).toBeLessThan(0.06);
      expect(rel(f.mdot, c.isothermal)).toBeLessThan(1e-9);
      expect(f.choked).toBe(c.isothermal_choked);
      expect(f.choked).toBe(c.fanno_choked);
      expect(rel(f.mach, c.isothermal_mach)).toBeLessThan(1e-8);
      expect(f.limited).toBe(false);
    });
  }

  it('the old friction-only law gave 55.8 g/s at 0.1 m, 2.7 times the nozzle: the reason for this law', () => {
    expect(rel(tubeFlow(ref.p0, ref.pb, T, air, ref.D, 0.1, 0).mdot, 55.8e-3)).toBeLessThan(1e-3);
  });

  for (const c of ref.back) {
    it(`subsonic exit at ${c.pb / 1e3} kPa (1 m): the law as computed independently`, () => {
      const f = lineFlow(ref.p0, c.pb, T, air, ref.D, c.L, 0);
      expect(rel(f.mdot, c.isothermal)).toBeLessThan(1e-9);
      expect(f.choked).toBe(false);
      expect(rel(f.mach, c.isothermal_mach)).toBeLessThan(1e-8);
    });
  }

  it('chokes at the exit Mach number 1/√γ of isothermal flow (Shapiro 1953, ch. 6)', () => {
    const f = lineFlow(ref.p0, ref.pb, T, air, ref.D, 1, 0);
    expect(f.choked).toBe(true);
    expect(rel(f.mach, 1 / Math.sqrt(1.4))).toBeLessThan(1e-12);
  });
});

describe('laminar capillaries keep their closed form (compressible Hagen–Poiseuille; docs/references.md)', () => {
  it('D = 0.3 mm, L = 1 m, 300 → 101.325 kPa: identical to the friction-only law, 5.19403e-6 kg/s', () => {
    const f = lineFlow(300e3, 101.325e3, T, air, 0.3e-3, 1, 0);
    const o = tubeFlow(300e3, 101.325e3, T, air, 0.3e-3, 1, 0);
    expect(f.mdot).toBe(o.mdot);
    expect(rel(f.mdot, 5.19403e-6)).toBeLessThan(2e-6);
    expect(f.choked).toBe(false);
    // reported size of the neglected acceleration: 2 ln(p1/p2)/(f L/D) = 1.24 %
    const accel = (2 * Math.log(300 / 101.325)) / ((64 / o.reynolds) * (1 / 0.3e-3));
    expect(rel(f.accel, accel)).toBeLessThan(1e-12);
    expect(f.accel).toBeGreaterThan(0.012);
    expect(f.accel).toBeLessThan(0.013);
  });

  it('every laminar flow of a grid of capillaries is unchanged (to the bit)', () => {
    for (const D of [0.1e-3, 0.3e-3, 1e-3]) {
      for (const L of [0.05, 0.5, 5]) {
        for (const p1 of [101.5e3, 150e3, 300e3, 800e3]) {
          const o = tubeFlow(p1, 101.325e3, T, air, D, L, 0);
          if (o.regime !== 'laminar') continue;
          const f = lineFlow(p1, 101.325e3, T, air, D, L, 0);
          if (!f.limited) expect(f.mdot).toBe(o.mdot);
        }
      }
    }
  });
});

describe('line flow: the properties a network solver needs', () => {
  const cases = [
    { D: 4e-3, L: 0.1 }, { D: 4e-3, L: 2 }, { D: 6e-3, L: 10 }, { D: 1e-3, L: 0.05 }, { D: 0.5e-3, L: 0.2 },
  ];

  it('continuous and monotone in the back pressure, flat once choked, antisymmetric', () => {
    for (const { D, L } of cases) {
      const p0 = 800e3;
      let last = Infinity;
      let lastM = 0;
      let sawChoked = false;
      const scale = lineFlow(p0, 1e3, T, air, D, L, 0).mdot;
      for (let i = 0; i <= 2000; i++) {
        const pb = 1e3 + (i / 2000) * (p0 - 1e3);
        const f = lineFlow(p0, pb, T, air, D, L, 0);
        expect(f.mdot).toBeLessThanOrEqual(last * (1 + 1e-12));
        // no jumps: a thousandth of a pascal changes the flow by far less than 1e-4 of its scale
        expect(Math.abs(lineFlow(p0, pb + 1e-3, T, air, D, L, 0).mdot - f.mdot)).toBeLessThan(1e-4 * scale);
        if (f.choked) {
          sawChoked = true;
          if (lastM > 0) expect(rel(f.mdot, lastM)).toBeLessThan(1e-9);
          lastM = f.mdot;
        }
        last = f.mdot;
        expect(lineFlow(pb, p0, T, air, D, L, 0).mdot + f.mdot).toBe(0);
        expect(f.mdot).toBeLessThanOrEqual(orificeMassFlow(p0, pb, T, air.R, air.gamma, (Math.PI / 4) * D * D) * (1 + 1e-12));
      }
      expect(sawChoked).toBe(true);
    }
  });

  it('increasing in the upstream pressure', () => {
    for (const { D, L } of cases) {
      let last = 0;
      for (let i = 1; i <= 1000; i++) {
        const p0 = 101.325e3 + i * 1e3;
        const m = lineFlow(p0, 101.325e3, T, air, D, L, 0).mdot;
        expect(m).toBeGreaterThan(last);
        last = m;
      }
    }
  });

  it('exactly 0 at equal pressures, with a finite slope there (laminar)', () => {
    for (const { D, L } of cases) {
      expect(lineFlow(3e5, 3e5, T, air, D, L, 0).mdot).toBe(0);
      const s1 = lineFlow(3e5 + 1, 3e5, T, air, D, L, 0).mdot / 1;
      const s2 = lineFlow(3e5 + 1e-3, 3e5, T, air, D, L, 0).mdot / 1e-3;
      expect(Number.isFinite(s1)).toBe(true);
      expect(rel(s1, s2)).toBeLessThan(1e-4);
    }
  });

  it('a tiny bore into near vacuum is held at the ideal nozzle (the bound binds)', () => {
    const D = 0.02e-3;
    const f = lineFlow(200e3, 100, T, air, D, 0.1e-3, 0);
    const noz = orificeMassFlow(200e3, 100, T, air.R, air.gamma, (Math.PI / 4) * D * D);
    expect(f.limited).toBe(true);
    expect(f.mdot).toBe(noz);
    expect(f.choked).toBe(true);
    expect(tubeFlow(200e3, 100, T, air, D, 0.1e-3, 0).mdot).toBeGreaterThan(2 * noz); // what it would have been
  });

  it('a laminar capillary into near vacuum chokes at M = 1/√γ: p0² − G²RT = 64 μ L R T G/D² (Shapiro 1953, ch. 6)', () => {
    const D = 0.1e-3;
    const L = 3e-3;
    const mu = air.viscosity(T);
    const f = lineFlow(101.325e3, 100, T, air, D, L, 0);
    const k = (64 * mu * L * air.R * T) / (D * D);
    const RT = air.R * T;
    const G = (-k + Math.sqrt(k * k + 4 * RT * 101.325e3 ** 2)) / (2 * RT);
    expect(f.choked).toBe(true);
    expect(f.limited).toBe(false);
    expect(f.regime).toBe('laminar');
    expect(rel(f.mdot, G * (Math.PI / 4) * D * D)).toBeLessThan(1e-12);
    expect(rel(f.mach, 1 / Math.sqrt(1.4))).toBeLessThan(1e-12);
    expect(lineFlow(101.325e3, 1000, T, air, D, L, 0).mdot).toBe(f.mdot); // flat below the choking exit pressure
    expect(tubeFlow(101.325e3, 100, T, air, D, L, 0).mdot).toBeGreaterThan(1.5 * f.mdot);
  });
});
