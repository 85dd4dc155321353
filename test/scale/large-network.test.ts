// Correctness at scale (timings live in the benchmark, `npm run bench`, not here):
// - a generated 2 000-chamber chain completes and conserves mass to round-off (the state
//   layout makes Σ of all mass slots an exact invariant; Rosenbrock methods preserve linear
//   invariants: Hairer, Lubich & Wanner, Geometric Numerical Integration, 2nd ed., §IV.1);
// - sparse and dense LU give the same solution on a mid-size network, to solver tolerance (only
//   the linear algebra differs; Hairer & Wanner, Solving ODEs II, §IV.7–8).
import { describe, expect, it } from 'vitest';
import { NetworkSystem } from '../../src/assemble/system.js';
import { drive } from '../../src/solve/driver.js';
import { chooseLinearAlgebra } from '../../src/solve/iteration-matrix.js';
import { rosenbrock } from '../../src/solve/rosenbrock.js';
import type { Integrator } from '../../src/solve/types.js';
import { chainNetlist, gridNetlist, starNetlist } from '../../bench/networks.js';
import { modelFromText, runChecked } from '../helpers.js';

describe('a 10 000-chamber netlist written in block style, with limits', () => {
  it('is read whole (about 2.2 MB: over the former 2 MiB limit, within the 8 MiB one)', () => {
    const flow = chainNetlist(10_000);
    // the same chain, every element as a block mapping under a comment, every chamber with limits
    const block = flow.replace(/^ {2}([a-z]\d+): \{ ([^[\n]*) \}$/gm, (_, name: string, body: string) => {
      const entries = body.split(/, (?=[a-z-]+: )/).map((e) => `    ${e}`);
      if (body.includes('neo-hookean')) entries.push('    limits: { pressure: 30 kPa gauge, stretch: 2.5 }');
      if (body.includes('rigid')) entries.push('    limits: { pressure: 30 kPa gauge }');
      return `  # element ${name} of the generated chain\n  ${name}:\n${entries.join('\n')}`;
    });
    expect(Buffer.byteLength(block)).toBeGreaterThan(2 * 1024 * 1024);
    const model = modelFromText(block);
    expect(model.chambers).toHaveLength(10_000);
    expect(model.chambers.filter((c) => c.limits.stretch === 2.5)).toHaveLength(5000);
  });
});

describe('a 2 000-chamber chain (generated, as in the benchmark)', () => {
  it('completes with the stiff method on sparse LU and conserves mass (drift < 1e-9)', () => {
    const model = modelFromText(chainNetlist(2000, { sample: '100 ms', duration: '0.6 s' }));
    const sys = new NetworkSystem(model);
    expect(chooseLinearAlgebra(sys)).toBe('sparse');
    const r = runChecked(model);
    expect(r.stats.method).toBe('rodas');
    // the vent opened at 0.5 s: gas left through it, and the first tank (far from the vent)
    // has felt the pods around it (its pressure rose above ambient)
    expect(r.mass.through_boundaries).toBeLessThan(0);
    expect(r.chambers.c0.final.gauge).toBeGreaterThan(100);
    expect(r.events.some((e) => e.what.includes('vent'))).toBe(true);
  });
});

describe('sparse and dense LU agree on mid-size networks', () => {
  const withLinearAlgebra = (la: 'dense' | 'sparse'): Integrator =>
    (p, t0, y0, tEnd, onStep, options) => rosenbrock(p, t0, y0, tEnd, onStep, { ...options, linearAlgebra: la });

  // 40 rubber pods past their pressure maximum (stretch 1.6, negative capacitance: the iteration
  // matrix loses its diagonal dominance) with one slightly larger: the runaway of
  // Müller & Strehlow (Rubber and Rubber Balloons, 2004) through the static-pivot guard.
  const pods = ['format: 1', 'chambers:'];
  for (let i = 0; i < 40; i++) pods.push(`  p${i}: { wall: neo-hookean, radius: 15 mm, thickness: 1 mm, shear-modulus: 0.3 MPa, start: { stretch: ${i === 0 ? 1.61 : 1.6} } }`);
  pods.push('lines:');
  for (let i = 0; i + 1 < 40; i++) pods.push(`  l${i}: { from: p${i}, to: p${i + 1}, diameter: 1 mm, length: 200 mm }`);
  pods.push('simulate: { duration: 2 s, sample: 50 ms, tolerance: 1e-8, method: implicit }', '');

  for (const [name, text] of [
    ['40 pods past their pressure maximum (unstable)', pods.join('\n')],
    ['chain of 60', chainNetlist(60, { tolerance: 1e-8 })],
    ['manifold grid of about 60', gridNetlist(60, { tolerance: 1e-8 })],
    ['star of 60, adiabatic', starNetlist(60, { tolerance: 1e-8, heat: 'adiabatic' })],
  ] as const) {
    it(name, () => {
      const finals: Float64Array[] = [];
      for (const la of ['dense', 'sparse'] as const) {
        const sys = new NetworkSystem(modelFromText(text));
        const y0 = sys.initialState();
        const r = drive(sys, {
          integrator: withLinearAlgebra(la), t0: 0, tEnd: sys.model.simulate.duration, y0, sample: 0.1, observe: () => {},
        });
        expect(r.status, r.message).toBe('completed');
        const drift = (sys.totalMass(r.y) - sys.totalMass(y0) - sys.boundaryInflow(r.y)) / sys.totalMass(y0);
        expect(Math.abs(drift)).toBeLessThan(1e-9);
        finals.push(r.y);
      }
      const [d, s] = finals;
      const sys = new NetworkSystem(modelFromText(text));
      for (let i = 0; i < d.length; i++) {
        const scale = sys.atol[i] + 1e-8 * Math.abs(d[i]);
        expect(Math.abs(s[i] - d[i]) / scale).toBeLessThan(100);
      }
    });
  }
});
