/**
 * The fixed leak (src/elements/leak.ts), the worked example of an element kind: its table, its
 * flow against a closed form, its observables in the run summary, CSV, JSON and expectations,
 * and the equilibria of a leaking chamber.
 */
import { describe, expect, it } from 'vitest';
import { findEquilibria } from '../../src/equilibria/equilibria.js';
import { readNetlist } from '../../src/netlist/read.js';
import { resultJson } from '../../src/report/json.js';
import { traceCsv } from '../../src/report/csv.js';
import { summaryText } from '../../src/report/table.js';
import { reportHtml } from '../../src/report/html.js';
import { reportInput } from '../../src/transient/report-input.js';
import { at, modelFromText, runChecked } from '../helpers.js';

const R_AIR = 8.314462618 / 0.0289647;
const GAMMA = 1.4;

const tank = (extra = '', method = 'implicit'): string => `
format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  tank: { wall: rigid, volume: 2 L, start: { pressure: 500 kPa gauge } }
leaks:
  pinhole: { from: tank, diameter: 0.3 mm, discharge-coefficient: 0.62 }
simulate: { duration: 60 s, sample: 1 s, tolerance: 1e-9, method: ${method} }
${extra}`;

describe('leak: isothermal blow-down of a rigid tank through a choked orifice (closed form)', () => {
  // Choked flow ṁ = Cd·A·p·√(γ/(R·T))·(2/(γ+1))^((γ+1)/(2(γ−1))) (Anderson, Modern Compressible
  // Flow, 3rd ed., ch. 5) is linear in p, so an isothermal rigid tank (V dp/dt = −R·T·ṁ) decays
  // exponentially, p(t) = p0·e^(−t/τ), τ = V/(Cd·A·√(γ·R·T)·(2/(γ+1))^((γ+1)/(2(γ−1)))), while
  // p_a/p stays below the critical ratio 0.528 (here p ≥ 460 kPa abs throughout).
  const V = 2e-3, T = 293.15, pa = 101325, p0 = 500e3 + pa;
  const A = (Math.PI / 4) * 0.3e-3 ** 2;
  const psi = Math.sqrt(GAMMA * R_AIR * T) * Math.pow(2 / (GAMMA + 1), (GAMMA + 1) / (2 * (GAMMA - 1)));
  const tau = V / (0.62 * A * psi);
  for (const method of ['implicit', 'explicit']) {
    it(`${method}: p(t) within 1e-6 relative, and the gas lost is what the tank lost`, () => {
      const r = runChecked(modelFromText(tank('', method)));
      for (const t of [10, 30, 60]) {
        expect(Math.abs(at(r, 'tank.pressure', t) / (p0 * Math.exp(-t / tau)) - 1)).toBeLessThan(1e-6);
      }
      const lost = at(r, 'pinhole.lost', 60);
      expect(Math.abs(lost - (r.mass.initial - r.chambers.tank.final.mass)) / lost).toBeLessThan(1e-9);
      expect(r.mass.through_boundaries).toBeCloseTo(-lost, 15);
    });
  }
});

describe('leak: one table and one element file make it appear everywhere', () => {
  it('is read from its table (units, defaults, references checked)', () => {
    const bad = readNetlist(tank().replace('from: tank', 'from: tonk'), 'leak.yaml');
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.diagnostics.find((d) => d.code === 'unknown-reference')?.hint).toContain('tank');
    const noUnit = readNetlist(tank().replace('diameter: 0.3 mm', 'diameter: 0.3 kg'), 'leak.yaml');
    expect(noUnit.ok).toBe(false);
    const doc = readNetlist(tank().replace(', discharge-coefficient: 0.62', ''), 'leak.yaml');
    expect(doc.ok && doc.value.elements?.[0].values['discharge-coefficient']).toBe(0.6);
  });

  it('shows up in the CSV, the JSON, the printed summary, the HTML report and the expectations', () => {
    const model = modelFromText(tank(`expect:
  - { name: gas lost, probe: pinhole.lost, at: end, above: 1 g }
  - { name: leak flow, probe: pinhole.flow, at: 0 s, near: { value: 0.06 g/s, within: 5% } }`));
    const r = runChecked(model);
    expect(reportHtml(reportInput(model, r))).toMatch(/<h3>Leaks<\/h3>.*pinhole/s);
    expect(traceCsv(r.trace).split('\n')[0]).toContain('pinhole.flow [kg/s],pinhole.lost [kg]');
    const json = JSON.parse(resultJson(r));
    expect(json.leaks.pinhole.choked).toBe(true);
    expect(json.leaks.pinhole.lost).toBeGreaterThan(1e-3);
    expect(summaryText(r)).toMatch(/pinhole .* yes/);
    expect(r.expectations.map((e) => e.passed)).toEqual([true, true]);
  });

  it('opens the group it touches: the run calls it open and the equilibria rest at ambient', () => {
    const model = modelFromText(tank());
    const r = runChecked(model);
    expect(r.outcomes?.[0].closed).toBe(false);
    const eq = findEquilibria(model, { transient: false });
    expect(eq.groups[0].kind).toBe('open');
    expect(eq.equilibria).toHaveLength(1);
    expect(Math.abs(eq.equilibria[0].chambers.tank.gauge)).toBeLessThan(1e-3);
    expect(eq.equilibria[0].stable).toBe(true);
  });
});
