// The example networks (networks/*.yaml) with the NDF/BDF integrator (`simulate(model, { stiff:
// 'bdf' })`, method implicit) against the same runs with RODAS: each completes, conserves mass
// (runChecked's drift bound), meets its own `expect:` checks, and its trace agrees with RODAS's.
// The bound on the agreement is measured, not a published value: against RODAS at rtol 1e-10
// the two integrators deviate from the reference by 0.3–3 times each other's deviation, up to
// about 1e-4 of a channel's range on networks/manifold-mixed.yaml (events on a valve opening
// located on each method's dense output); docs/performance.md, "Stiff integrators".
import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loadModel } from '../../src/index.js';
import { simulate } from '../../src/transient/transient.js';
import type { Model } from '../../src/model/types.js';

const dir = new URL('../../networks/', import.meta.url);
const files = readdirSync(dir).filter((f) => f.endsWith('.yaml')).sort();

function implicitModel(file: string): Model {
  const m = loadModel(readFileSync(new URL(file, dir), 'utf8'), file);
  if (!m.ok) throw new Error(`${file} does not load`);
  return { ...m.value, simulate: { ...m.value.simulate, method: 'implicit' } };
}

describe('example networks with the NDF/BDF integrator against RODAS', () => {
  it.each(files)('%s', (file) => {
    const model = implicitModel(file);
    const bdf = simulate(model, { stiff: 'bdf' });
    const rodas = simulate(model, { stiff: 'rodas' });
    for (const r of [bdf, rodas]) {
      expect(r.status, r.message).toBe('completed');
      expect(Math.abs(r.mass.drift), `mass drift ${r.mass.drift}`).toBeLessThan(1e-9);
    }
    expect(bdf.stats.method).toBe('bdf');
    expect(rodas.stats.method).toBe('rodas');
    // the netlist's own checks hold with either integrator
    expect(bdf.expectations.map((e) => [e.name, e.passed])).toEqual(rodas.expectations.map((e) => [e.name, e.passed]));
    // and the traces agree within 1e-3 of each channel's range
    expect(bdf.trace.times).toEqual(rodas.trace.times);
    let worst = 0, where = '';
    bdf.trace.channels.forEach((c, i) => {
      const a = bdf.trace.values[i], b = rodas.trace.values[i];
      let range = 0, dev = 0;
      for (let k = 0; k < b.length; k++) { range = Math.max(range, Math.abs(b[k])); dev = Math.max(dev, Math.abs(a[k] - b[k])); }
      if (range > 0 && dev / range > worst) { worst = dev / range; where = c.key; }
    });
    expect(worst, `largest deviation in ${where}`).toBeLessThan(1e-3);
    // the multistep method keeps its jacobian: far fewer than RODAS's one a step
    expect(bdf.stats.jacobians).toBeLessThan(rodas.stats.jacobians / 5);
  });
});
