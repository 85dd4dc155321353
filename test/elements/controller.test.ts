/**
 * A controller in a network: saturation events, anti-windup, sampled operation, channels.
 * The plant: a rigid tank filled through a choked valve the controller drives and drained
 * through a laminar capillary (as in test/verification/pi-step.test.ts).
 */
import { describe, expect, it } from 'vitest';
import { traceCsv } from '../../src/index.js';
import { at, channel, modelFromText, runChecked } from '../helpers.js';

function rig(controller: string, duration = '4 s', sample = '2 ms'): string {
  return `
format: 1
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 100 kPa gauge } }
reservoirs:
  supply: { pressure: 600 kPa gauge }
valves:
  fill: { from: supply, to: tank, conductance: 0.02 L/(s*bar), critical-ratio: 0.5 }
lines:
  capillary: { from: tank, to: ambient, diameter: 0.3 mm, length: 1 m }
controllers:
  hold: { kind: pid, measure: tank.gauge, drives: fill, ${controller} }
simulate: { duration: ${duration}, sample: ${sample}, tolerance: 1e-9 }
`;
}

describe('controller in a network', () => {
  it('a large step saturates the output at 100 %, logged as events, then settles on the target', () => {
    const r = runChecked(modelFromText(rig('target: 150 kPa gauge, kp: 10 %/kPa, ki: 10 %/(kPa*s), initially: 10%', '20 s')));
    const ev = r.events.map((e) => e.what);
    expect(ev.some((w) => w.includes('controller hold starts saturated at 100 %'))).toBe(true);
    expect(ev.some((w) => w.includes('controller hold leaves 100 %'))).toBe(true);
    expect(Math.max(...channel(r, 'hold.output'))).toBeLessThanOrEqual(1);
    expect(Math.abs(r.chambers.tank.final.gauge - 150e3)).toBeLessThan(50);
  });

  it('clamping: the output leaves its limit as soon as the error changes sign (no wound-up integral)', () => {
    const r = runChecked(modelFromText(rig('target: 150 kPa gauge, kp: 10 %/kPa, ki: 10 %/(kPa*s), initially: 10%', '20 s')));
    const e = channel(r, 'hold.error');
    const u = channel(r, 'hold.output');
    const ts = r.trace.times;
    const cross = ts.find((_, k) => k > 0 && e[k - 1] > 0 && e[k] <= 0)!;
    const leave = r.events.find((x) => x.what.includes('leaves 100 %'))!.t;
    expect(leave).toBeLessThanOrEqual(cross + 1e-9);
    // back-calculation bleeds the integral while saturated: it leaves the limit before the error turns
    const b = runChecked(modelFromText(rig('target: 150 kPa gauge, kp: 10 %/kPa, ki: 10 %/(kPa*s), initially: 10%, anti-windup: back-calculation, tracking-time: 0.2 s', '20 s')));
    expect(b.events.some((x) => x.what.includes('leaves 100 %'))).toBe(true);
    expect(u.every((x) => x >= 0 && x <= 1)).toBe(true);
  });

  it('a sampled controller holds its output between samples and tracks the continuous one', () => {
    const law = 'target: 110 kPa gauge, kp: 10 %/kPa, ki: 10 %/(kPa*s), initially: 3%';
    const c = runChecked(modelFromText(rig(law, '10 s')));
    const s = runChecked(modelFromText(rig(`${law}, sample: 20 ms`, '10 s')));
    const u = channel(s, 'hold.output');
    const ts = s.trace.times;
    // samples at 2 ms: ten in each 20 ms hold interval carry one value
    for (let k = 1; k < ts.length; k++) {
      // a row at a sample instant shows the value held before it (the left limit)
      const same = Math.ceil(ts[k] / 0.02 - 1e-9) === Math.ceil(ts[k - 1] / 0.02 - 1e-9);
      if (same) expect(u[k]).toBe(u[k - 1]);
    }
    let worst = 0;
    for (let t = 0; t <= 10; t += 0.1) worst = Math.max(worst, Math.abs(at(s, 'tank.gauge', t) - at(c, 'tank.gauge', t)));
    expect(worst).toBeLessThan(0.05 * 10e3);
    expect(Math.abs(s.chambers.tank.final.gauge - 110e3)).toBeLessThan(100);
  });

  it('output and error are CSV columns in SI', () => {
    const r = runChecked(modelFromText(rig('target: 110 kPa gauge, kp: 10 %/kPa, ki: 10 %/(kPa*s), initially: 3%', '0.1 s', '10 ms')));
    const head = traceCsv(r.trace).split('\n')[0];
    expect(head).toContain('hold.output [-]');
    expect(head).toContain('hold.error [Pa]');
    expect(at(r, 'hold.error', 0)).toBeCloseTo(10e3, 6);
    expect(at(r, 'hold.output', 0)).toBe(1); // 3 % + 10 %/kPa × 10 kPa, clamped
  });
});
