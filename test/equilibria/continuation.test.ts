/**
 * Branches of equilibria by pseudo-arclength continuation (Keller 1977; Allgower & Georg 2003):
 * special points against closed forms, and traced states against the equilibria found
 * independently by enumeration at the same parameter value.
 */
import { describe, expect, it } from 'vitest';
import { traceEquilibria, type TraceResult } from '../../src/equilibria/continuation.js';
import { findEquilibria } from '../../src/equilibria/equilibria.js';
import { buildModel } from '../../src/model/build.js';
import { readWithOverrides, splitPath } from '../../src/netlist/override.js';
import type { Model } from '../../src/model/types.js';
import { modelFromFile } from '../helpers.js';

const R = 8.314462618 / 0.0289647;
const LMAX = Math.pow(7, 1 / 6); // neo-Hookean pressure maximum (Treloar 1975; docs/references.md)

function traced(model: Model, vary: string, from: string, to: string): TraceResult {
  const r = traceEquilibria(model, { vary, from, to, maxStep: 0.1, interior: 1 });
  if (!r.ok) throw new Error(`${r.message} (${r.hint})`);
  return r.value;
}

function withOverride(file: string, path: string, value: string): Model {
  const model = modelFromFile(file);
  const doc = readWithOverrides(model.doc.source, file, [{ path: splitPath(path), value, label: path }]);
  if (!doc.ok) throw new Error('override failed');
  const m = buildModel(doc.value);
  if (!m.ok) throw new Error('build failed');
  return m.value;
}

describe('traceEquilibria', () => {
  it('gas of two equal cells: the symmetric branch changes stability at a branch point where each holds the gas of the maximum', () => {
    const model = modelFromFile('test/reference/eq-two-cells-past.yaml');
    const r = traced(model, 'mass:a', '0.1 g', '0.5 g');
    // both cells at the maximum: m* = (pa + Δp_max)(V* + Vd)/(R T), Δp_max = 1.2394629 μ t0/r0
    const c = model.chambers[0];
    const mStar = ((model.pa + 1.2394629 * 0.3e6 * 0.05) * (c.wall.volumeAtStretch(LMAX) + c.deadVolume)) / (R * 293.15);
    const symmetric = r.branches.find((b) => b.points.every((p) => Math.abs(p.chambers.a.mass - p.chambers.b.mass) < 1e-9 * p.chambers.a.mass))!;
    expect(symmetric).toBeDefined();
    const bp = symmetric.points.filter((p) => p.special === 'branch-point');
    expect(bp).toHaveLength(1);
    expect(Math.abs(bp[0].parameter * 1e-3 / (2 * mStar) - 1)).toBeLessThan(1e-7);
    expect(Math.abs(bp[0].chambers.a.stretch! - LMAX)).toBeLessThan(1e-6);
    expect(symmetric.points.filter((p) => p.special === 'stability-change')).toHaveLength(1);
    for (const p of symmetric.points) {
      if (p.special) continue;
      expect(p.stability).toBe(p.parameter * 1e-3 < 2 * mStar ? 'stable' : 'unstable');
    }
    // the lopsided branch turns at the same gas (a fold of the pitchfork) and is stable throughout
    const lopsided = r.branches.find((b) => b !== symmetric)!;
    const fold = lopsided.points.filter((p) => p.special === 'fold');
    expect(fold).toHaveLength(1);
    expect(Math.abs(fold[0].parameter * 1e-3 / (2 * mStar) - 1)).toBeLessThan(1e-6);
    expect(lopsided.points.filter((p) => !p.special).every((p) => p.stable)).toBe(true);
  });

  it('wall thickness of one cushion cell: an S-shaped branch whose folds bound the range with three equilibria', () => {
    const file = 'networks/cushion-runaway.yaml';
    const r = traced(modelFromFile(file), 'chambers.cell_a.thickness', '1.2 mm', '1.8 mm');
    expect(r.branches).toHaveLength(1);
    const folds = r.branches[0].points.filter((p) => p.special === 'fold').map((p) => p.parameter).sort((a, b) => a - b);
    expect(folds).toHaveLength(2);
    // enumeration at the same netlist, independently of the continuation: 3 equilibria between the folds, 1 outside
    // (the trace keeps the gas of the netlist as written; a thinner wall at the same start stretch would hold less)
    const gas = modelFromFile(file).chambers.map((c) => c.m0);
    const count = (t: number): number => findEquilibria(withOverride(file, 'chambers.cell_a.thickness', `${t} mm`), { transient: false, masses: gas }).count;
    expect(count(folds[0] * (1 - 1e-3))).toBe(1);
    expect(count(folds[0] * (1 + 1e-3))).toBe(3);
    expect(count(folds[1] * (1 - 1e-3))).toBe(3);
    expect(count(folds[1] * (1 + 1e-3))).toBe(1);
    // every fold is also where stability changes (a real eigenvalue passes zero)
    expect(r.branches[0].points.filter((p) => p.special === 'stability-change')).toHaveLength(2);
  });

  it('traced states are equilibria: interior points match the enumeration at their parameter value to 1e-8', () => {
    const file = 'networks/cushion-runaway.yaml';
    const r = traced(modelFromFile(file), 'chambers.cell_a.thickness', '1.2 mm', '1.8 mm');
    const pts = r.branches[0].points.filter((p) => !p.special);
    const gas = modelFromFile(file).chambers.map((c) => c.m0);
    for (const p of [pts[5], pts[Math.floor(pts.length / 2)], pts[pts.length - 6]]) {
      const eq = findEquilibria(withOverride(file, 'chambers.cell_a.thickness', `${p.parameter} mm`), { transient: false, masses: gas });
      const match = eq.equilibria.filter((e) => ['cell_a', 'cell_b'].every((n) => Math.abs(e.chambers[n].mass - p.chambers[n].mass) < 1e-8 * p.chambers[n].mass));
      expect(match, `at ${p.parameter} mm`).toHaveLength(1);
      expect(match[0].stability).toBe(p.stability);
      expect(Math.abs(match[0].growth_rate! - p.growth_rate!)).toBeLessThan(1e-6 * Math.abs(p.growth_rate!));
    }
  });

  it('a supply pressure for two cells: the branches fold where the supply reaches the cells\' maximum, Δp_max = 1.2394629 μ t0/r0', () => {
    const r = traced(modelFromFile('test/reference/eq-open.yaml'), 'reservoirs.supply.pressure', '5 kPa gauge', '25 kPa gauge');
    const folds = r.branches.flatMap((b) => b.points.filter((p) => p.special === 'fold'));
    expect(folds.length).toBeGreaterThan(0);
    for (const f of folds) expect(Math.abs(f.parameter * 1e3 / (1.2394629 * 0.3e6 * 0.05) - 1)).toBeLessThan(1e-6);
    // no equilibrium above the maximum: every point lies below it
    for (const b of r.branches) for (const p of b.points) expect(p.parameter * 1e3).toBeLessThanOrEqual(1.2394629 * 0.3e6 * 0.05 * (1 + 1e-6));
  });

  it('refuses parameters it cannot follow, with a hint', () => {
    const model = modelFromFile('networks/cushion-runaway.yaml');
    const bad = traceEquilibria(model, { vary: 'chambers.cell_a.thicknes', from: '1 mm', to: '2 mm' });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.hint).toMatch(/thickness/);
    const units = traceEquilibria(model, { vary: 'chambers.cell_a.thickness', from: '1 mm', to: '0.2 cm' });
    expect(units.ok).toBe(false);
    const none = traceEquilibria(model, { vary: 'mass:nobody', from: '1 g', to: '2 g' });
    expect(none.ok).toBe(false);
  });
});
