/**
 * Cylinders against closed forms and against an independent model:
 * (a) gas spring: ω² = (k + Σ n·p·A²/V)/M for small oscillations (any fluid-power text, from
 *     memory), n = 1 isothermal, γ adiabatic — within 1 % from the
 *     simulated ringing;
 * (b) a frictionless piston against a spring from a constant-pressure supply settles at
 *     x = ((p − pa)·A − F0 − F)/k (static force balance, closed form) — to 1e-6;
 * (c) Karnopp stick–slip (J. Dyn. Sys. Meas. Control 107 (1985) 100): a piston under a force
 *     ramp r·t starts when r·t reaches F_s, then M·v̇ = r·t − F_c, so
 *     v = (r(t² − t*²)/2 − F_c(t − t*))/M; under a constant force F > F_s with viscous friction c,
 *     v = ((F − F_c)/c)(1 − e^(−c·t/M)) (closed forms of M·v̇ = F − F_c − c·v) — to 1e-6;
 * (e) invariants: mass to round-off; energy: gas internal energy (adiabatic) or free energy
 *     −m·R·T·ln V (isothermal) + kinetic + spring + load + gravity + ambient work, less what
 *     friction and the stops dissipated, stays constant — to 1e-6 of the energy exchanged.
 * (d) the full transient against test/reference/cylinder.py is in cylinder-reference.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { cylinderSummary } from '../../src/transient/results.js';
import { at, channel, modelFromText, runChecked } from '../helpers.js';

const PA = 101325;
const R_AIR = 8.314462618 / 0.0289647;

/** Times at which a sampled signal crosses `level` upwards, by linear interpolation. */
function upCrossings(ts: number[], v: number[], level: number): number[] {
  const out: number[] = [];
  for (let k = 1; k < v.length; k++) {
    if (v[k - 1] < level && v[k] >= level) out.push(ts[k - 1] + ((level - v[k - 1]) / (v[k] - v[k - 1])) * (ts[k] - ts[k - 1]));
  }
  return out;
}

/** Bisection for f(x) = 0 on [a, b] with a sign change. */
function bisect(f: (x: number) => number, a: number, b: number): number {
  let fa = f(a);
  for (let i = 0; i < 200; i++) {
    const m = 0.5 * (a + b);
    const fm = f(m);
    if (Math.sign(fm) === Math.sign(fa)) { a = m; fa = fm; } else b = m;
  }
  return 0.5 * (a + b);
}

describe("(a) gas spring frequency (any fluid-power text, from memory)", () => {
  // sealed double-acting cylinder, both sides start at ambient with the cap 2 kPa above: the
  // piston rings about the position where the two gas springs and the mechanical spring balance
  const bore = 0.032; const rod = 0.012; const stroke = 0.1; const Vc0 = 5e-6; const Vr0 = 5e-6;
  const M = 2; const k = 300; const x0 = 0.05;
  const Ac = Math.PI * bore * bore / 4;
  const Ar = Math.PI * (bore * bore - rod * rod) / 4;
  for (const heat of ['isothermal', 'adiabatic'] as const) {
    it(`${heat}: the ringing period matches 2π/ω within 1 %`, () => {
      const n = heat === 'isothermal' ? 1 : 1.4;
      const pc0 = PA + 2000;
      const pr0 = PA;
      const preload = -k * x0; // spring relaxed at x0: F0 + k·x0 = 0
      const r = runChecked(modelFromText(`format: 1
heat: ${heat}
ambient: { pressure: 101.325 kPa abs, temperature: 293.15 K }
cylinders:
  c:
    bore: ${bore * 1000} mm
    rod: ${rod * 1000} mm
    stroke: ${stroke * 1000} mm
    dead-volume: { cap: ${Vc0 * 1e6} mL, rod: ${Vr0 * 1e6} mL }
    moving-mass: ${M} kg
    spring: { rate: ${k} N/m, preload: 0 N }
    force: ${preload} N
    start: { position: ${x0 * 1000} mm, cap: { pressure: ${pc0 / 1000} kPa abs }, rod: { pressure: ${pr0 / 1000} kPa abs } }
simulate: { duration: 2 s, sample: 0.1 ms, tolerance: 1e-10 }
`));
      // equilibrium: pc·Vc^n and pr·Vr^n stay constant (no flow, no friction)
      const Vc = (x: number): number => Vc0 + Ac * x;
      const Vr = (x: number): number => Vr0 + Ar * (stroke - x);
      const cc = pc0 * Vc(x0) ** n;
      const cr = pr0 * Vr(x0) ** n;
      const F = (x: number): number => (cc / Vc(x) ** n - PA) * Ac - (cr / Vr(x) ** n - PA) * Ar - k * (x - x0);
      const xe = bisect(F, x0 - 0.02, x0 + 0.02);
      const pc = cc / Vc(xe) ** n;
      const pr = cr / Vr(xe) ** n;
      const omega = Math.sqrt((k + (n * pc * Ac * Ac) / Vc(xe) + (n * pr * Ar * Ar) / Vr(xe)) / M);
      const ts = r.trace.times;
      const ups = upCrossings(ts, channel(r, 'c.position'), xe);
      expect(ups.length).toBeGreaterThan(5);
      const period = (ups[ups.length - 1] - ups[0]) / (ups.length - 1);
      expect(Math.abs(period * omega / (2 * Math.PI) - 1)).toBeLessThan(0.01);
    });
  }
});

describe('(b) spring equilibrium x = ((p − pa)A − F0 − F)/k (static force balance)', () => {
  it('a frictionless single-acting piston fed through a large line settles there to 1e-6', () => {
    const r = runChecked(modelFromText(`format: 1
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
    friction: { viscous: 60 N*s/m }
lines:
  feed: { from: supply, to: c.cap, diameter: 6 mm, length: 0.5 m }
simulate: { duration: 3 s, tolerance: 1e-9, method: implicit }
`));
    // implicit: the line starts near choking (its flow limited by the gas's acceleration), so
    // `auto` sees a mild problem at the start and picks the explicit method, which then crawls
    // through the stiff rest of the laminar line at equilibrium
    const A = Math.PI * 0.025 ** 2 / 4;
    const want = (150e3 * A - 15 - 12) / 800;
    expect(want).toBeGreaterThan(0.05);
    expect(Math.abs(cylinderSummary(r, 'c')!.final.position - want) / want).toBeLessThan(1e-6);
    expect(Math.abs(cylinderSummary(r, 'c')!.final.velocity)).toBeLessThan(1e-6);
  });
});

describe('(c) Karnopp stick–slip (J. Dyn. Sys. Meas. Control 107 (1985) 100), closed forms of M·v̇ = F − F_c − c·v', () => {
  // a dead volume so large that the sealed cap stays at ambient to about 1e-9 while the piston
  // moves: the net force is the external force alone
  const base = (force: string, friction: string): string => `format: 1
cylinders:
  c:
    bore: 32 mm
    stroke: 3 m
    dead-volume: 1e5 m^3
    moving-mass: 10 kg
    force: "${force}"
    friction: ${friction}
simulate: { duration: 1 s, sample: 1 ms, tolerance: 1e-10 }
`;

  it('under a ramp r·t it starts at t* = F_s/r and then v = (r(t² − t*²)/2 − F_c(t − t*))/M', () => {
    const rate = 50; const Fs = 30; const Fc = 20; const M = 10;
    const r = runChecked(modelFromText(base('-(50 N) * t / (1 s)', `{ static: ${Fs} N, sliding: ${Fc} N }`)));
    const tStar = Fs / rate;
    const start = r.events.find((e) => e.what.includes('starts to move'));
    expect(start, r.events.map((e) => e.what).join('\n')).toBeDefined();
    expect(Math.abs(start!.t - tStar)).toBeLessThan(1e-6 * tStar);
    for (const t of [0.3, 0.59, 0.7, 0.85, 1.0]) {
      const want = t <= tStar ? 0 : (rate * (t * t - tStar * tStar) / 2 - Fc * (t - tStar)) / M;
      expect(Math.abs(at(r, 'c.velocity', t) - want), `v(${t})`).toBeLessThan(1e-6 * Math.max(want, 1e-3));
    }
  });

  it('under a constant force above F_s: v = ((F − F_c)/c)(1 − e^(−c·t/M)) from t = 0', () => {
    const F = 60; const Fc = 20; const c = 25; const M = 10;
    const r = runChecked(modelFromText(base('-60 N', `{ static: 30 N, sliding: ${Fc} N, viscous: ${c} N*s/m }`)));
    for (const t of [0.05, 0.2, 0.5, 1.0]) {
      const want = ((F - Fc) / c) * (1 - Math.exp((-c * t) / M));
      expect(Math.abs(at(r, 'c.velocity', t) - want) / want, `v(${t})`).toBeLessThan(1e-6);
    }
  });

  it('below F_s the piston never moves, and no event chatters', () => {
    const r = runChecked(modelFromText(base('-29.9 N', '{ static: 30 N, sliding: 20 N }')));
    expect(cylinderSummary(r, 'c')!.final.position).toBe(0);
    expect(r.events.filter((e) => e.what.includes('c ')).length).toBe(0);
  });
});

describe('(e) invariants with cylinders in the network', () => {
  // sealed double-acting cylinder with spring, load, gravity and friction, released off balance
  const text = (heat: string): string => `format: 1
heat: ${heat}
ambient: { pressure: 101.325 kPa abs, temperature: 293.15 K }
cylinders:
  c:
    bore: 40 mm
    rod: 16 mm
    stroke: 80 mm
    dead-volume: { cap: 4 mL, rod: 6 mL }
    moving-mass: 1.2 kg
    spring: { rate: 400 N/m, preload: 10 N }
    force: 5 N
    friction: { static: 8 N, sliding: 6 N, viscous: 3 N*s/m }
    mounting: { angle: 20 deg }
    start: { position: 20 mm, cap: { pressure: 80 kPa gauge }, rod: { pressure: 10 kPa gauge } }
simulate: { duration: 1.5 s, sample: 0.5 ms, tolerance: 1e-10 }
`;
  for (const heat of ['adiabatic', 'isothermal'] as const) {
    it(`${heat}: energy stored + dissipated stays constant to 1e-6 of the energy exchanged`, () => {
      const r = runChecked(modelFromText(text(heat)), 1e-12);
      const cv = R_AIR / 0.4;
      const Ac = Math.PI * 0.04 ** 2 / 4;
      const Ar = Math.PI * (0.04 ** 2 - 0.016 ** 2) / 4;
      const x = channel(r, 'c.position');
      const v = channel(r, 'c.velocity');
      const mc = channel(r, 'c.cap.mass'); const mr = channel(r, 'c.rod.mass');
      const Tc = channel(r, 'c.cap.temperature'); const Tr = channel(r, 'c.rod.temperature');
      const Vc = channel(r, 'c.cap.volume'); const Vr = channel(r, 'c.rod.volume');
      const lost = channel(r, 'c.dissipated');
      const grav = 1.2 * 9.80665 * Math.sin((20 * Math.PI) / 180);
      const E = (k: number): number => {
        const gas = heat === 'adiabatic'
          ? mc[k] * cv * Tc[k] + mr[k] * cv * Tr[k]
          : -mc[k] * R_AIR * Tc[k] * Math.log(Vc[k]) - mr[k] * R_AIR * Tr[k] * Math.log(Vr[k]);
        return gas + 0.5 * 1.2 * v[k] ** 2 + 10 * x[k] + 0.5 * 400 * x[k] ** 2 + 5 * x[k] + grav * x[k] + PA * (Ac - Ar) * x[k] + lost[k];
      };
      const moved = Math.max(...x) - Math.min(...x);
      expect(moved).toBeGreaterThan(0.005);
      const scale = Math.max(...lost) + 0.5 * 1.2 * Math.max(...v.map((u) => u * u));
      let worst = 0;
      for (let k = 0; k < x.length; k++) worst = Math.max(worst, Math.abs(E(k) - E(0)));
      expect(worst / scale).toBeLessThan(1e-6);
      expect(r.mass.drift).toBe(0);
    });
  }
});
