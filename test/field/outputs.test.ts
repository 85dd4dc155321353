/**
 * Outputs a user can work from alone: valve openings and relief/check states in the CSV and
 * JSON, the flow sign convention in the printed table (item 18); the report's expectations,
 * outcome, warnings and valve symbols (item 19); the report of a large network (item 20).
 */
import { describe, expect, it } from 'vitest';
import { summaryText, traceCsv } from '../../src/index.js';
import { channel, modelFromFile, runChecked } from '../helpers.js';

describe('valve openings and states in CSV and JSON (item 18)', () => {
  const r = runChecked(modelFromFile('networks/gripper-charge.yaml'));

  it('the CSV has each valve\'s opening (0–1) and the relief valve\'s state; the scheduled ramp plots from it', () => {
    const head = traceCsv(r.trace).split('\n')[0]?.split(',') ?? [];
    expect(head).toContain('solenoid.opening [-]');
    expect(head).toContain('relief.opening [-]');
    expect(head).toContain('relief.open [-]');
    // the solenoid ramps 0 → 100 % over 5 ms from 50 ms (the netlist's schedule), linearly
    const t = r.trace.times;
    const open = channel(r, 'solenoid.opening');
    const at = (x: number): number => open[t.findIndex((s) => Math.abs(s - x) < 1e-9)] ?? Number.NaN;
    expect(at(0.05)).toBe(0);
    for (const k of [1, 2, 3, 4]) expect(at(0.05 + k * 0.001)).toBeCloseTo(k / 5, 12);
    expect(at(0.055)).toBe(1);
    expect(at(0.9)).toBe(0);
    // the relief valve's state is 0 or 1 and is 1 exactly where its opening is
    const state = channel(r, 'relief.open');
    expect(new Set(state)).toEqual(new Set([0, 1]));
    expect(state).toEqual(channel(r, 'relief.opening'));
  });

  it('JSON valves carry the opening range and, for relief and check valves, the state at the end and how often they opened', () => {
    const v = r.valves;
    expect(v['solenoid']?.opening).toEqual({ final: 0, min: 0, max: 1 });
    expect(v['relief']?.open_at_end).toBe(false);
    const opens = r.events.filter((e) => e.what === 'relief valve relief opens').length;
    expect(opens).toBeGreaterThan(0);
    expect(v['relief']?.times_opened).toBe(opens);
  });

  it('the printed table states the sign convention of flows', () => {
    const text = summaryText(r);
    expect(text).toMatch(/^line\s+peak flow \(\+ from→to\)/m);
    expect(text).toMatch(/^valve\s+peak flow \(\+ from→to\)\s+choked\s+opening/m);
  });
});
