/**
 * (d) A full cylinder transient against an independent solution computed outside the project:
 * test/reference/cylinder.py integrates the same equations with SciPy (Radau, rtol 1e-11,
 * stick–slip and end stops as terminal events). The network (cylinder-stroke.yaml) breaks
 * away, strokes out through a laminar line, hits its end stop, is held there, and after the
 * supply drops retracts by its spring in stick–slip.
 */
import { readFileSync } from 'node:fs';
import { cylinderSummary } from '../../src/transient/results.js';
import { describe, expect, it } from 'vitest';
import { at, modelFromFile, runChecked } from '../helpers.js';

interface Ref {
  times: number[];
  events: { t: number; what: string; velocity?: number }[];
  channels: Record<string, number[]>;
}

describe('reference case cylinder-stroke (SciPy Radau, test/reference/cylinder.py)', () => {
  const ref = JSON.parse(readFileSync('test/reference/cylinder-stroke.json', 'utf8')) as Ref;
  for (const method of ['implicit', 'explicit'] as const) {
    it(`${method}: every channel within 1e-4 of its range along the trajectory; events at the same instants`, () => {
      const model = modelFromFile('test/reference/cylinder-stroke.yaml');
      (model.simulate as { method: string }).method = method;
      const r = runChecked(model);
      for (const [key, series] of Object.entries(ref.channels)) {
        const lo = Math.min(...series);
        const hi = Math.max(...series);
        const scale = key.endsWith('temperature') ? hi - lo : Math.max(Math.abs(lo), Math.abs(hi));
        let worst = 0;
        ref.times.forEach((t, k) => {
          worst = Math.max(worst, Math.abs(at(r, key, t) - series[k]) / scale);
        });
        expect(worst, `${key} time course`).toBeLessThan(1e-4);
      }
      const starts = r.events.filter((e) => e.what.includes('starts to move')).map((e) => e.t);
      const refStarts = ref.events.filter((e) => e.what === 'starts to move').map((e) => e.t);
      expect(starts.length).toBe(refStarts.length);
      starts.forEach((t, i) => expect(Math.abs(t - refStarts[i]), `start ${i}`).toBeLessThan(1e-5));
      const impact = ref.events.find((e) => e.what === 'impact')!;
      const full = r.events.find((e) => e.what.includes('reaches full stroke'))!;
      expect(Math.abs(full.t - impact.t)).toBeLessThan(1e-5);
      const v = cylinderSummary(r, 'c')!.impacts[0].velocity;
      expect(Math.abs(v - (impact.velocity as number)) / Math.abs(impact.velocity as number)).toBeLessThan(1e-4);
    });
  }
});
