/**
 * A sweep sets each case's values in the parsed netlist (netlist/override.ts: one parse per
 * thread) rather than writing the netlist out with the values and reading it again, as it once
 * did. Each case must still give exactly what the netlist edited as text gives when read and
 * run on its own: the same final pressures, volumes, peaks and expectation values to the bit,
 * and mass conserved.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { applyOverrides, loadModel, runSweep, simulate } from '../../src/index.js';
import { overrideValue, splitPath } from '../../src/netlist/override.js';

const FILE = 'networks/gripper-charge.yaml';

describe('a sweep case against the netlist edited as text', () => {
  it('gives the same numbers to the bit, case by case, on worker threads', async () => {
    const source = readFileSync(FILE, 'utf8');
    const r = await runSweep({ source, file: FILE, vary: ['lines.feed_tube.diameter=2 mm,5 mm', 'chambers.finger.thickness=0.8 mm,1.2 mm'], jobs: 2 });
    if (!r.ok) throw new Error(r.diagnostics.map((d) => d.message).join('\n'));
    expect(r.value.cases).toHaveLength(4);
    for (const c of r.value.cases) {
      expect(c.status, c.message).toBe('completed');
      const text = applyOverrides(source, c.params.map((p) => ({ path: splitPath(p.path), value: overrideValue(p.text), label: p.path })));
      const m = loadModel(text, FILE);
      if (!m.ok) throw new Error(m.diagnostics.map((d) => d.message).join('\n'));
      const run = simulate(m.value, { record: 'outcomes' });
      expect(run.status).toBe('completed');
      // mass conservation of the run the case is compared with
      expect(Math.abs(run.mass.drift)).toBeLessThan(1e-9);
      for (const [name, s] of Object.entries(run.chambers)) {
        const k = c.chambers[name];
        expect(k, name).toBeDefined();
        expect(k.gauge, `${name} gauge, case ${c.index}`).toBe(s.final.gauge);
        expect(k.volume, `${name} volume, case ${c.index}`).toBe(s.final.volume);
        expect(k.peak_gauge, `${name} peak, case ${c.index}`).toBe(s.peak.gauge);
      }
      expect(c.expectations.map((e) => [e.name, e.passed, e.actual])).toEqual(run.expectations.map((e) => [e.name, e.passed, e.actual]));
    }
    // the cases differ from one another: the varied values did reach the runs
    expect(new Set(r.value.cases.map((c) => JSON.stringify(c.chambers))).size).toBe(4);
  });
});
