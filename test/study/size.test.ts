/** plenum size as a library: margins, direction, infeasible ranges, robustness, bad options. */
import { describe, expect, test } from 'vitest';
import { expectationMargin, size, sizeJson } from '../../src/index.js';
import { modelFromText, runChecked } from '../helpers.js';

const RIG = `format: 1
title: Gripper charge
chambers:
  supply:
    wall: rigid
    volume: 0.5 L
    start: { pressure: 6 barg }
  finger:
    wall: linear
    volume: 20 mL
    compliance: 0.01 L/bar
    start: { pressure: 0 kPa gauge }
valves:
  inlet:
    from: supply
    to: finger
    orifice: 1 mm
    discharge-coefficient: 0.7
    initially: open
simulate: { duration: 0.5 s, sample: 5 ms }
expect:
  - name: grips within 200 ms
    probe: finger.gauge
    at: 200 ms
    above: 100 kPa gauge
  - name: finger under its rating
    probe: finger.gauge
    over: [0 s, 0.5 s]
    stat: max
    below: 400 kPa gauge
`;

describe('expectation margins', () => {
  const m = modelFromText(RIG);
  test('below and above: the distance to the limit as a fraction of the limit (gauge for pressures)', () => {
    const [grip, rating] = m.expect;
    expect(expectationMargin(grip, 150e3, m.pa)).toBeCloseTo(0.5, 12);
    expect(expectationMargin(grip, 50e3, m.pa)).toBeCloseTo(-0.5, 12);
    expect(expectationMargin(rating, 300e3, m.pa)).toBeCloseTo(0.25, 12);
    expect(expectationMargin(rating, Number.NaN, m.pa)).toBe(-Infinity);
  });
});

describe('size', () => {
  test('the rig runs clean (mass balance)', () => {
    runChecked(modelFromText(RIG));
  });

  test('the smallest orifice: at the boundary the binding expectation has zero margin, and a 10 % margin needs a larger orifice', async () => {
    const a = await size({ source: RIG, file: 'rig.yaml', free: ['valves.inlet.orifice=0.2 mm..3 mm'], jobs: 1 });
    const b = await size({ source: RIG, file: 'rig.yaml', free: ['valves.inlet.orifice=0.2 mm..3 mm'], margin: 0.1, jobs: 1 });
    if (!a.ok || !b.ok) throw new Error('not ok');
    expect(a.value.status).toBe('found');
    expect(a.value.binding).toBe('grips within 200 ms');
    expect(a.value.margins['grips within 200 ms']).toBeGreaterThanOrEqual(0);
    expect(a.value.margins['grips within 200 ms']).toBeLessThan(1e-4);
    expect(a.value.margins['finger under its rating']).toBeGreaterThan(0);
    expect(b.value.parameters[0].value).toBeGreaterThan(a.value.parameters[0].value);
    expect(b.value.margins['grips within 200 ms']).toBeGreaterThanOrEqual(0.1);
    const j = JSON.parse(sizeJson(a.value));
    expect(j).toMatchObject({ status: 'found', binding: 'grips within 200 ms' });
    expect(typeof j.parameters['valves.inlet.orifice']).toBe('number');
    expect(typeof j.margins['finger under its rating']).toBe('number');
  });

  test('a range where nothing passes is infeasible, with the closest design and its binding expectation', async () => {
    const r = await size({ source: RIG, file: 'rig.yaml', free: ['valves.inlet.orifice=0.05 mm..0.1 mm'], jobs: 1 });
    if (!r.ok) throw new Error('not ok');
    expect(r.value.status).toBe('infeasible');
    expect(r.value.binding).toBe('grips within 200 ms');
    expect(r.value.margins['grips within 200 ms']).toBeLessThan(0);
  });

  test('maximise: the largest orifice under a rating that binds from above', async () => {
    const tight = RIG.replace('below: 400 kPa gauge', 'below: 300 kPa gauge').replace('duration: 0.5 s', 'duration: 0.3 s').replace('[0 s, 0.5 s]', '[0 s, 0.3 s]');
    const r = await size({ source: tight, file: 'rig.yaml', free: ['valves.inlet.orifice=0.2 mm..3 mm'], maximise: 'valves.inlet.orifice', jobs: 1 });
    if (!r.ok) throw new Error('not ok');
    expect(r.value.status).toBe('found');
    expect(r.value.binding).toBe('finger under its rating');
    expect(r.value.margins['finger under its rating']).toBeLessThan(1e-4);
  });

  test('Monte Carlo robustness: every draw passes at the design, the probability is reported with its Wilson bound, and it needs a larger orifice than nominal', async () => {
    const nominal = await size({ source: RIG, file: 'rig.yaml', free: ['valves.inlet.orifice=0.2 mm..3 mm'], jobs: 1 });
    const r = await size({ source: RIG, file: 'rig.yaml', free: ['valves.inlet.orifice=0.2 mm..3 mm'], robust: ['valves.inlet.discharge-coefficient±10%', 'chambers.supply.start.pressure±20 kPa'], samples: 8, seed: 3, jobs: 2 });
    if (!r.ok || !nominal.ok) throw new Error('not ok');
    expect(r.value.robust).toMatchObject({ mode: 'monte-carlo', cases: 8, passed: 8 });
    expect(r.value.robust!.probability!.p).toBe(1);
    expect(r.value.robust!.probability!.low).toBeCloseTo(8 / (8 + 1.959964 ** 2), 4); // Wilson's lower bound for 8 of 8: n/(n + z²)
    expect(r.value.parameters[0].value).toBeGreaterThan(nominal.value.parameters[0].value);
  });

  test('bad options are diagnostics', async () => {
    const bad = async (o: Partial<Parameters<typeof size>[0]>) => {
      const r = await size({ source: RIG, file: 'rig.yaml', free: ['valves.inlet.orifice=0.2 mm..3 mm'], jobs: 1, ...o });
      if (r.ok) throw new Error('expected diagnostics');
      return r.diagnostics[0];
    };
    expect((await bad({ free: ['valves.inlet.orifice'] })).message).toMatch(/needs bounds/);
    expect((await bad({ free: ['valves.inlet.orifise=1 mm..2 mm'] })).hint).toMatch(/orifice/);
    expect((await bad({ minimise: 'lines.none' })).message).toMatch(/not a free parameter/);
    expect((await bad({ robust: ['valves.inlet.orifice+5%'] })).message).toMatch(/PATH±TOL/);
    expect((await bad({ margin: 1.5 })).message).toMatch(/margin/);
    expect((await bad({ source: RIG.slice(0, RIG.indexOf('expect:')) })).message).toMatch(/no expectations/);
  });
});
