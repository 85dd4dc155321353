/**
 * A regulated supply filling a tank, against an independent SciPy solution
 * (test/reference/regulated.py: Radau, rtol 1e-11, the regulator's proportional law and the
 * ISO 6358-1 flow written out there).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { at, modelFromFile, runChecked } from '../helpers.js';
import type { RunResult } from '../../src/index.js';

interface Ref { times: number[]; chambers: { tank: { gauge: number[]; mass: number[] } }; regulator_opening?: number[] }

/** The tank's gauge and mass within 1e-6 (of the largest value) of the reference at every reference time. */
function expectClose(ref: Ref, r: RunResult): void {
  for (const q of ['gauge', 'mass'] as const) {
    const series = ref.chambers.tank[q];
    const scale = Math.max(...series.map(Math.abs));
    let worst = 0;
    ref.times.forEach((t, k) => { worst = Math.max(worst, Math.abs(at(r, `tank.${q}`, t) - series[k]) / scale); });
    expect(worst, `tank.${q}`).toBeLessThan(1e-6);
  }
}

describe('regulated supply filling a tank (SciPy Radau, test/reference/regulated.py)', () => {
  const ref = JSON.parse(readFileSync('test/reference/regulated.json', 'utf8')) as Ref;
  for (const method of ['implicit', 'explicit'] as const) {
    it(`${method}: gauge and mass within 1e-6 of the reference over the fill and at rest`, () => {
      const model = modelFromFile('test/reference/regulated.yaml');
      (model.simulate as { method: string }).method = method;
      const r = runChecked(model);
      expectClose(ref, r);
    });
  }
});

describe('regulated supply with a regulator lag of 50 ms (SciPy Radau, test/reference/regulated.py, case regulated-lag)', () => {
  const ref = JSON.parse(readFileSync('test/reference/regulated-lag.json', 'utf8')) as Ref;
  for (const method of ['implicit', 'explicit'] as const) {
    it(`${method}: gauge and mass within 1e-6 of the reference, the lag overshoots the set pressure`, () => {
      const model = modelFromFile('test/reference/regulated-lag.yaml');
      (model.simulate as { method: string }).method = method;
      const r = runChecked(model);
      expectClose(ref, r);
      // the lag lets the tank pass the lock-up pressure, which the lag-free regulator never does
      expect(Math.max(...ref.chambers.tank.gauge)).toBeGreaterThan(300e3);
      expect(r.chambers.tank.peak.gauge).toBeGreaterThan(300e3);
      expect(r.events.some((e) => e.what.includes('regulator reg locks up'))).toBe(true);
    });
  }
});
