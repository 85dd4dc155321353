/**
 * The time budget of `findEquilibria` and `traceEquilibria` on a group far beyond enumeration:
 * a closed chain of 200 neo-Hookean spheres has 2^200 branch combinations (each sphere small or
 * large at a pressure below its maximum). The test sets a small budget and checks what comes
 * back: marked incomplete, the combinatorial count and how much was examined, and states that
 * are rest states (one pressure, the gas held: the rest equations' residual) of which the stable
 * ones have exactly one sphere past its pressure maximum (the energy form of the criterion of
 * docs/references.md, "Stability of chambers exchanging gas": Σ δm_i²/C_i must be positive on
 * Σ δm_i = 0, which fails when two capacitances C_i are negative). No wall time is asserted.
 */
import { describe, expect, it } from 'vitest';
import { linearChainNetlist, sphereChainNetlist } from '../../bench/networks.js';
import { traceEquilibria } from '../../src/equilibria/continuation.js';
import { findEquilibria } from '../../src/equilibria/equilibria.js';
import { modelFromText } from '../helpers.js';

describe('time budget', () => {
  it('a chain of 200 spheres ends with an incomplete list of rest states, stable ones among them, and the count 2^200', () => {
    const model = modelFromText(sphereChainNetlist(200));
    const M = model.chambers.reduce((a, c) => a + c.m0, 0);
    const r = findEquilibria(model, { maxWall: 2, transient: false });
    expect(r.timed_out).toBe(true);
    expect(r.complete).toBe(false);
    expect(r.max_wall).toBe(2);
    const g = r.groups[0];
    expect(g.method).toBe('deflation');
    expect(g.branch_combinations).toBe(2 ** 200);
    expect(g.examined).toBeGreaterThan(8);
    expect(g.examined).toBeLessThan(g.combinations); // stopped before every planned start
    expect(g.timed_out).toBe(true);
    expect(r.equilibria.length).toBeGreaterThanOrEqual(1);
    for (const e of r.equilibria) {
      const cs = Object.values(e.chambers);
      const p = cs[0].pressure;
      for (const c of cs) expect(Math.abs(c.pressure - p)).toBeLessThan(1e-9 * p);
      expect(Math.abs(cs.reduce((a, c) => a + c.mass, 0) - M)).toBeLessThan(1e-9 * M);
    }
    const stable = r.equilibria.filter((e) => e.stable);
    expect(stable.length).toBeGreaterThan(0);
    for (const e of stable) {
      expect(Object.values(e.chambers).filter((c) => c.branch === 'falling')).toHaveLength(1);
      expect(e.growth_rate!).toBeLessThan(0);
    }
  });

  it('with the transient, the state found from where the run ends is analysed first', () => {
    const model = modelFromText(sphereChainNetlist(40).replace(/duration: 1 s/, 'duration: 0.2 s'));
    const r = findEquilibria(model, { maxWall: 1e-3 });
    expect(r.transient).not.toBeNull();
    expect(r.complete).toBe(false);
    expect(r.equilibria.length).toBeGreaterThanOrEqual(1);
    // the nearest listed state to the run's end is the one Newton reached from it
    expect(r.transient!.nearest).not.toBeNull();
    expect(r.transient!.distance!).toBeLessThan(0.05);
  });

  it('an open group of 40 spheres on a supply (2^40 volume combinations at its pressure) lists what its budget allowed', () => {
    const net = sphereChainNetlist(40).replace('chambers:\n', 'reservoirs:\n  supply: { pressure: 20 kPa gauge }\nchambers:\n')
      .replace('lines:\n', 'lines:\n  feed: { from: supply, to: s0, diameter: 2 mm, length: 100 mm }\n');
    const r = findEquilibria(modelFromText(net), { maxWall: 0.5, transient: false });
    const g = r.groups[0];
    expect(g.kind).toBe('open');
    expect(g.branch_combinations).toBe(2 ** 40);
    expect(r.timed_out).toBe(true);
    expect(r.complete).toBe(false);
    expect(g.equilibria.length).toBeGreaterThanOrEqual(1);
    expect(g.equilibria.length).toBeLessThan(4096);
    expect(g.notes.some((n) => /the time budget ran out: \d+ more equilibria found but not analysed/.test(n))).toBe(true);
    // every state listed rests at the supply's pressure
    for (const e of r.equilibria) for (const c of Object.values(e.chambers)) expect(Math.abs(c.gauge - 20e3)).toBeLessThan(1e-6 * 20e3);
  });

  it('a trace stops at its budget and says so', () => {
    const model = modelFromText(linearChainNetlist(40));
    const r = traceEquilibria(model, { vary: 'chambers.c0.compliance', from: '0.1 mL/kPa', to: '0.4 mL/kPa', maxWall: 1e-3 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.timed_out).toBe(true);
    expect(r.value.max_wall).toBe(1e-3);
    const full = traceEquilibria(model, { vary: 'chambers.c0.compliance', from: '0.1 mL/kPa', to: '0.4 mL/kPa' });
    expect(full.ok && full.value.timed_out).toBe(false);
  });
});
