/**
 * The certified sparse rightmost eigenvalue of a rest state (src/equilibria/rightmost.ts:
 * shift-and-invert Arnoldi, Saad, Numerical Methods for Large Eigenvalue Problems, 2nd ed.,
 * SIAM 2011, §7.1; inertia counts, Sylvester's law, Golub & Van Loan, 4th ed., §8.1) against the
 * dense eigenvalues of the same linearisation, and the linearisation of a ring of identical
 * chambers against the closed form of the cycle graph's Laplacian, eigenvalues ∝ 2 − 2cos(2πk/n)
 * (docs/references.md, "Spectra of graph Laplacians").
 */
import { describe, expect, it } from 'vitest';
import { traceEquilibria } from '../../src/equilibria/continuation.js';
import { restSetup } from '../../src/equilibria/rest.js';
import { groupLinearisation, groupStability } from '../../src/equilibria/rest-stability.js';
import { rightmostStability } from '../../src/equilibria/rightmost.js';
import { stabilityAt } from '../../src/equilibria/stability.js';
import type { Model } from '../../src/model/types.js';
import { modelFromText } from '../helpers.js';

const HEAD = 'format: 1\ntitle: t\nambient: { pressure: 101.325 kPa, temperature: 20 degC }\nheat: isothermal\n';
const TAIL = 'simulate: { duration: 1 s }\n';

/** n identical air springs joined in a ring (every chamber has two lines, so the same lumped line volume). */
function ring(n: number): Model {
  const ch = Array.from({ length: n }, (_, i) => `  c${i}: { wall: linear, volume: 30 mL, compliance: 0.2 mL/kPa, start: { pressure: 20 kPa gauge } }\n`);
  const ln = Array.from({ length: n }, (_, i) => `  l${i}: { from: c${i}, to: c${(i + 1) % n}, diameter: 2 mm, length: 100 mm }\n`);
  return modelFromText(`${HEAD}chambers:\n${ch.join('')}lines:\n${ln.join('')}${TAIL}`);
}

/** A chain of air springs of different sizes, compliances and lines. */
function mixedChain(n: number): Model {
  const ch = Array.from({ length: n }, (_, i) => `  c${i}: { wall: linear, volume: ${20 + (i % 7) * 5} mL, compliance: ${(0.05 + 0.03 * (i % 5)).toFixed(2)} mL/kPa, start: { pressure: ${10 + (i % 3) * 5} kPa gauge } }\n`);
  const ln = Array.from({ length: n - 1 }, (_, i) => `  l${i}: { from: c${i}, to: c${i + 1}, diameter: ${1.5 + 0.25 * (i % 3)} mm, length: ${80 + 10 * (i % 4)} mm }\n`);
  return modelFromText(`${HEAD}chambers:\n${ch.join('')}lines:\n${ln.join('')}${TAIL}`);
}

function restOf(model: Model, masses?: number[]) {
  const setup = restSetup(model, 'end');
  const g = setup.groups[0];
  const base = model.chambers.map((c) => c.m0);
  const gm = masses ?? g.chambers.map((c) => base[c]);
  return { setup, g, base, gm, L: groupLinearisation(setup, g, gm, base) };
}

describe('rightmost eigenvalue, sparse and certified', () => {
  it('a ring of 40 identical chambers: the spectrum is the cycle graph\'s, −s·(2 − 2cos(2πk/n)), and the sparse growth rate its rightmost', () => {
    const n = 40;
    const model = ring(n);
    // at rest at one pressure after the start (all equal): the state as built
    const { setup, L } = restOf(model);
    const dense = stabilityAt(setup.sys, L);
    expect(dense.ok).toBe(true);
    const ev = dense.eigenvalues.map((z) => z.re).sort((a, b) => b - a); // n − 1 values, gas mode removed
    expect(ev).toHaveLength(n - 1);
    const s = -ev[0] / (2 - 2 * Math.cos((2 * Math.PI) / n));
    const closed = Array.from({ length: n - 1 }, (_, k) => -s * (2 - 2 * Math.cos((2 * Math.PI * (k + 1)) / n))).sort((a, b) => b - a);
    for (let k = 0; k < n - 1; k++) expect(Math.abs(ev[k] - closed[k])).toBeLessThan(1e-6 * Math.abs(closed[n - 2]));
    for (const z of dense.eigenvalues) expect(Math.abs(z.im)).toBeLessThan(1e-6 * Math.abs(closed[n - 2]));
    const fast = rightmostStability(setup.sys, L, Number.NaN);
    expect(fast).not.toBeNull();
    expect(fast!.stability).toBe('stable');
    expect(Math.abs(fast!.growth_rate / dense.growth_rate! - 1)).toBeLessThan(1e-8);
  });

  it('a chain of 60 different chambers: equal to the dense growth rate, whatever the hint; never a different number', () => {
    const model = mixedChain(60);
    const { setup, L } = restOf(model);
    const dense = stabilityAt(setup.sys, L);
    const g = dense.growth_rate!;
    expect(g).toBeLessThan(0);
    let certified = 0;
    for (const hint of [Number.NaN, g, 1.01 * g, 0.5 * g, 3 * g, 100 * g, -g, 0.01 * g]) {
      const fast = rightmostStability(setup.sys, L, hint);
      if (!fast) continue;
      certified++;
      expect(fast.stability).toBe('stable');
      expect(Math.abs(fast.growth_rate / g - 1), `hint ${hint}`).toBeLessThan(1e-8);
    }
    expect(certified).toBeGreaterThanOrEqual(4); // the hints near the answer certify
  });

  it('leaves chambers past their pressure maximum (dp/dm < 0, no symmetrising similarity) to the dense eigenvalues', () => {
    const POD = 'wall: neo-hookean, radius: 15 mm, thickness: 1 mm, shear-modulus: 0.3 MPa';
    const n = 40;
    const ch = Array.from({ length: n }, (_, i) => `  s${i}: { ${POD}, start: { stretch: ${i === 7 ? 1.7 : 1.2} } }\n`);
    const ln = Array.from({ length: n - 1 }, (_, i) => `  l${i}: { from: s${i}, to: s${i + 1}, diameter: 2 mm, length: 100 mm }\n`);
    const model = modelFromText(`${HEAD}chambers:\n${ch.join('')}lines:\n${ln.join('')}${TAIL}`);
    const { setup, g, base, gm, L } = restOf(model);
    // not at rest (pressures differ), but the linearisation is what the certificate examines
    expect(rightmostStability(setup.sys, L, -1)).toBeNull();
    expect(groupStability(setup, g, gm, base).ok).toBe(true);
  });

  it('a trace of 60 chambers reports at every point the growth rate of the dense eigenvalues there', () => {
    const model = mixedChain(60);
    const total = model.chambers.reduce((a, c) => a + c.m0, 0);
    const r = traceEquilibria(model, { vary: 'mass:c0', from: `${(0.8 * total * 1e3).toPrecision(6)} g`, to: `${(1.4 * total * 1e3).toPrecision(6)} g`, interior: 0 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.branches).toHaveLength(1);
    const pts = r.value.branches[0].points;
    expect(pts.length).toBeGreaterThan(5);
    const setup = restSetup(model, 'end');
    const g = setup.groups[0];
    const base = model.chambers.map((c) => c.m0);
    let sparse = 0;
    let prev = Number.NaN;
    for (const p of pts) {
      const gm = g.chambers.map((c) => p.chambers[model.chambers[c].name].mass);
      const dense = groupStability(setup, g, gm, base);
      expect(p.stability).toBe(dense.stability);
      expect(Math.abs(p.growth_rate! / dense.growth_rate! - 1)).toBeLessThan(1e-7);
      // and the certified path did serve these states
      if (rightmostStability(setup.sys, groupLinearisation(setup, g, gm, base), prev)) sparse++;
      prev = p.growth_rate!;
    }
    expect(sparse).toBe(pts.length);
  });
});
