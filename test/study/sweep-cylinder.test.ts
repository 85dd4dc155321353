/** A sweep over a cylinder's bore by its netlist path, with the cylinder's outcomes per case. */
import { describe, expect, it } from 'vitest';
import { runSweep, sweepCsv } from '../../src/index.js';

const RAM = `format: 1
title: ram against a spring
reservoirs:
  supply: { pressure: 2 barg }
cylinders:
  ram:
    bore: 20 mm
    stroke: 100 mm
    dead-volume: 1 mL
    moving-mass: 0.3 kg
    spring: { rate: 1000 N/m, preload: 10 N }
    friction: { viscous: 40 N*s/m }
lines:
  feed: { from: supply, to: ram.cap, diameter: 4 mm, length: 0.5 m }
simulate: { duration: 1 s, sample: 5 ms }
expect:
  - { name: stays short of the stop, probe: ram.position, at: end, below: 99 mm }
`;

describe('sweeps over cylinders', () => {
  it('cylinders.<name>.bore is a sweep path; each case reports the final position, which follows the static balance', async () => {
    const res = await runSweep({ source: RAM, file: 'ram.yaml', jobs: 1, vary: ['cylinders.ram.bore=16 mm,20 mm'] });
    if (!res.ok) throw new Error(JSON.stringify(res.diagnostics));
    const r = res.value;
    expect(r.cases.map((c) => c.status)).toEqual(['completed', 'completed']);
    expect(r.study.cylinders).toEqual(['ram']);
    r.cases.forEach((c, i) => {
      const D = [0.016, 0.02][i];
      const want = (2e5 * Math.PI * D * D / 4 - 10) / 1000; // x = ((p − pa)A − F0)/k
      expect(Math.abs(c.cylinders!.ram.position - want) / want).toBeLessThan(1e-5);
      expect(c.cylinders!.ram.impact_speed).toBeNull();
    });
    expect(sweepCsv(r).split('\n')[0]).toContain('ram.position [m]');
  });
});
