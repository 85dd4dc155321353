import { describe, expect, it } from 'vitest';
import { GASES, makeGas } from '../../src/physics/gas.js';
import {
  STANDARD_GRAVITY, capVolume, circleArea, gasSpringRate, gravityForce, heldAtStop, pistonForce, pistonGeometry,
  rodVolume, springEquilibrium, type PistonLoad,
} from '../../src/physics/piston.js';
import {
  acceleration, breaksAway, hasCoulomb, karnoppFriction, modeAtRest, slidingFriction, type FrictionLaw,
} from '../../src/physics/friction.js';
import { gasTemperatureRate } from '../../src/physics/energy.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const pa = 101325;

describe('piston geometry and gas volumes', () => {
  const g = pistonGeometry(0.032, 0.012, 0.1, 2e-6, 3e-6);

  it('areas of a 32 mm bore with a 12 mm rod: π D²/4 = 804.248 mm², annulus 691.150 mm²', () => {
    expect(rel(g.capArea, 804.2477193e-6)).toBeLessThan(1e-9);
    expect(rel(g.annulusArea, 691.1503838e-6)).toBeLessThan(1e-9);
    expect(circleArea(0)).toBe(0);
  });

  it('cap volume grows as V0c + A_c·x and rod volume shrinks as V0r + A_r·(s − x)', () => {
    expect(capVolume(g, 0)).toBe(2e-6);
    expect(rodVolume(g, 0.1)).toBeCloseTo(3e-6, 18);
    expect(rel(capVolume(g, 0.1), 2e-6 + 0.1 * g.capArea)).toBeLessThan(1e-15);
    expect(rel(rodVolume(g, 0), 3e-6 + 0.1 * g.annulusArea)).toBeLessThan(1e-15);
    // the swept volumes add up: d(V_c + V_r)/dx = A_c − A_r = rod area
    const dx = 0.03;
    const swept = capVolume(g, dx) + rodVolume(g, dx) - capVolume(g, 0) - rodVolume(g, 0);
    expect(rel(swept, dx * circleArea(0.012))).toBeLessThan(1e-9);
  });
});

describe('force balance', () => {
  const g = pistonGeometry(0.032, 0.012, 0.1, 2e-6, 2e-6);
  const l: PistonLoad = { mass: 1.5, springRate: 500, springPreload: 20, gravity: gravityForce(1.5, Math.PI / 2) };

  it('gravity along the axis is M·g·sin θ (standard gravity 9.80665 m/s²)', () => {
    expect(l.gravity).toBeCloseTo(1.5 * 9.80665, 12);
    expect(gravityForce(2, 0)).toBe(0);
    expect(gravityForce(2, -Math.PI / 2)).toBeCloseTo(-2 * STANDARD_GRAVITY, 12);
  });

  it('6 bar gauge on the cap, rod side at ambient, 40 N load at x = 50 mm', () => {
    const F = pistonForce(g, l, pa + 6e5, pa, pa, 0.05, 40);
    const want = 6e5 * g.capArea - (20 + 500 * 0.05) - 40 - 1.5 * 9.80665;
    expect(rel(F, want)).toBeLessThan(1e-14);
  });

  it('equal absolute pressures on both sides push with the rod area only', () => {
    const none: PistonLoad = { mass: 1, springRate: 0, springPreload: 0, gravity: 0 };
    const p = pa + 3e5;
    expect(rel(pistonForce(g, none, p, p, pa, 0.02, 0), 3e5 * circleArea(0.012))).toBeLessThan(1e-12);
  });

  it('the spring equilibrium x = ((p − pa)A − F0 − load − Mg sin θ)/k zeroes the force', () => {
    const single = pistonGeometry(0.032, 0, 0.2, 1e-6, 0);
    const p = pa + 1e5;
    const x = springEquilibrium(single, l, p, pa, 5);
    expect(x).toBeGreaterThan(0);
    expect(Math.abs(pistonForce(single, l, p, pa, pa, x, 5))).toBeLessThan(1e-12);
  });

  it('a piston at a stop stays while the force pushes into it or static friction holds it', () => {
    expect(heldAtStop(1, 10, 0)).toBe(true);
    expect(heldAtStop(1, 0, 0)).toBe(true);
    expect(heldAtStop(1, -1e-9, 0)).toBe(false);
    expect(heldAtStop(1, -20, 30)).toBe(true);
    expect(heldAtStop(1, -31, 30)).toBe(false);
    expect(heldAtStop(-1, -5, 0)).toBe(true);
    expect(heldAtStop(-1, 5, 3)).toBe(false);
  });

  it('gas spring rate n·p·A²/V', () => {
    expect(rel(gasSpringRate(1.4, 2e5, 1e-3, 1e-4), (1.4 * 2e5 * 1e-6) / 1e-4)).toBeLessThan(1e-15);
  });
});

describe('Karnopp stick–slip friction (J. Dyn. Sys. Meas. Control 107 (1985) 100)', () => {
  const f: FrictionLaw = { static: 30, sliding: 20, viscous: 50 };

  it('inside the zero-velocity band friction balances the applied force up to F_s', () => {
    expect(karnoppFriction(f, 0, 25, 1e-4)).toBe(25);
    expect(karnoppFriction(f, 5e-5, -29, 1e-4)).toBe(-29);
    expect(karnoppFriction(f, 0, 40, 1e-4)).toBe(30);
    expect(karnoppFriction(f, 0, -40, 1e-4)).toBe(-30);
  });

  it('outside the band: F_c·sign(v) + c·v, whatever the applied force', () => {
    expect(karnoppFriction(f, 0.2, 0, 1e-4)).toBeCloseTo(20 + 10, 12);
    expect(karnoppFriction(f, -0.2, 1000, 1e-4)).toBeCloseTo(-30, 12);
    expect(slidingFriction(f, 1, 0.2)).toBeCloseTo(30, 12);
    expect(slidingFriction(f, -1, -0.2)).toBeCloseTo(-30, 12);
  });

  it('a body at rest breaks away only above F_s, in the direction of the force', () => {
    expect(breaksAway(f, 30)).toBe(false);
    expect(breaksAway(f, 30.000001)).toBe(true);
    expect(modeAtRest(f, 29)).toBe(0);
    expect(modeAtRest(f, -31)).toBe(-1);
    expect(modeAtRest(f, 31)).toBe(1);
    expect(hasCoulomb(f)).toBe(true);
    expect(hasCoulomb({ static: 0, sliding: 0, viscous: 5 })).toBe(false);
  });

  it('acceleration: zero while stuck, (F − F_c·s − c·v)/M while sliding', () => {
    expect(acceleration(f, 0, 0, 25, 2)).toBe(0);
    expect(acceleration(f, 1, 0.1, 40, 2)).toBeCloseTo((40 - 20 - 5) / 2, 12);
    expect(acceleration(f, -1, -0.1, 0, 2)).toBeCloseTo((0 + 20 + 5) / 2, 12);
  });

  it('the band law converges to the mode law as Δv → 0 (same friction for any v ≠ 0)', () => {
    for (const v of [-0.3, -1e-3, 1e-3, 0.3]) {
      expect(karnoppFriction(f, v, 12, 1e-9)).toBeCloseTo(slidingFriction(f, v > 0 ? 1 : -1, v), 12);
    }
  });
});

describe('energy of gas behind a moving boundary (Cengel & Boles, unsteady-flow processes)', () => {
  const air = makeGas(GASES.air);
  const none = { mIn: 0, mOut: 0, hIn: 0, hA: 0, Ta: 293.15 };

  it('a sealed volume compressed by a piston follows Poisson T·V^(γ−1) = const (isentropic)', () => {
    // integrate Ṫ = −p·V̇/(m·cv) with V(t) = V0 − A·u·t by classical RK4; closed form T0 (V0/V)^(γ−1)
    const m = 1e-3;
    const T0 = 293.15;
    const V0 = 1e-3;
    const Vdot = -2e-3; // m³/s: to half the volume in 0.25 s
    const f = (t: number, T: number): number => {
      const V = V0 + Vdot * t;
      return gasTemperatureRate(air, m, T, (m * air.R * T) / V, 0, Vdot, none);
    };
    let T = T0;
    const n = 4000;
    const h = 0.25 / n;
    for (let i = 0; i < n; i++) {
      const t = i * h;
      const k1 = f(t, T);
      const k2 = f(t + h / 2, T + (h / 2) * k1);
      const k3 = f(t + h / 2, T + (h / 2) * k2);
      const k4 = f(t + h, T + h * k3);
      T += (h / 6) * (k1 + 2 * k2 + 2 * k3 + k4);
    }
    const want = T0 * 2 ** (air.gamma - 1);
    expect(rel(T, want)).toBeLessThan(1e-9);
  });

  it('with κ = 0 and V̇ = 0 it is the rigid-vessel energy balance: filling from vacuum tends to γ·T_in', () => {
    // d(mT)/dt form: at m → 0 with inflow at T_in the limit temperature is γ T_in (Cengel & Boles, from memory)
    const Tin = 300;
    const mdot = 1e-3;
    const rate = gasTemperatureRate(air, 1e-9, air.gamma * Tin, 1e5, 0, 0, { mIn: mdot, mOut: 0, hIn: mdot * Tin, hA: 0, Ta: Tin });
    expect(Math.abs(rate)).toBeLessThan(1e-6);
  });

  it('heat exchange drives the gas towards the surroundings', () => {
    const rate = gasTemperatureRate(air, 1e-3, 350, 1e5, 0, 0, { ...none, hA: 2, Ta: 293.15 });
    expect(rel(rate, (2 * (293.15 - 350)) / (1e-3 * air.cv))).toBeLessThan(1e-14);
  });
});
