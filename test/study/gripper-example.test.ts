/** The README's walk-through: the gripper's synthetic bench recording regenerates, calibrates back, and the valve sizes. */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { calibrate, calibratedNetlist, size } from '../../src/index.js';
import { modelFromText, runChecked } from '../helpers.js';
import { gripperBench } from './gripper-bench.js';

const NETLIST = 'networks/gripper-charge.yaml';
const DATA = 'networks/data/gripper-charge-bench-synthetic.csv';

describe('the gripper walk-through', () => {
  test('the example recording is what gripper-bench.ts makes', () => {
    expect(readFileSync(DATA, 'utf8')).toBe(gripperBench());
  });

  test('calibration recovers the values the recording was made with, within its 95 % intervals; sizing then finds the valve', async () => {
    const source = readFileSync(NETLIST, 'utf8');
    const r = await calibrate({
      source, file: NETLIST, data: [{ text: readFileSync(DATA, 'utf8'), file: DATA }], jobs: 1,
      free: ['valves.solenoid.conductance=0.05 L/(s*bar)..1 L/(s*bar)', 'chambers.finger.shear-modulus'],
    });
    if (!r.ok) throw new Error(r.diagnostics.map((d) => d.message).join('\n'));
    expect(r.value.status).toBe('converged');
    // the one warning is the feed tube's wave travel time against the 5 ms solenoid ramp (model/wave.ts)
    expect(r.value.warnings.filter((w) => !w.includes('a pressure wave needs'))).toEqual([]);
    const [g, mu] = r.value.parameters;
    expect(g.low).toBeLessThan(0.34e-8);
    expect(g.high).toBeGreaterThan(0.34e-8);
    expect(mu.low).toBeLessThan(0.56e6);
    expect(mu.high).toBeGreaterThan(0.56e6);
    const calibrated = calibratedNetlist(source, r.value);
    runChecked(modelFromText(calibrated));
    const s = await size({ source: calibrated, file: 'gripper-calibrated.yaml', free: ['valves.solenoid.conductance=0.05 L/(s*bar)..1 L/(s*bar)'], margin: 0.1, jobs: 1 });
    if (!s.ok) throw new Error('size');
    expect(s.value.status).toBe('found');
    expect(s.value.binding).toBe('the finger grips firmly 200 ms after the valve opens');
    expect(s.value.margins['the finger grips firmly 200 ms after the valve opens']).toBeGreaterThanOrEqual(0.1);
  }, 120_000);
});
