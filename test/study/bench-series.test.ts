/** Measured time series: units, gauge/abs, blanks, conditions, and channel values at given times. */
import { describe, expect, test } from 'vitest';
import { readMeasuredCsv } from '../../src/studies/bench-series.js';
import { simulate } from '../../src/index.js';
import { modelFromText } from '../helpers.js';

const PA = 101325;

describe('readMeasuredCsv', () => {
  test('converts to SI as the simulation reports: .pressure absolute, .gauge gauge, °C to K, ms to s; blanks are missing', () => {
    const r = readMeasuredCsv('# a bench log\n# set reservoirs.supply.pressure = 4 barg\ntime [ms],a.pressure [kPa gauge],b.pressure [bar],a.gauge [kPa],a.temperature [degC]\n0,10,1.5,10,20\n100,,2,12,21\n', 'b.csv', PA);
    if (!r.ok) throw new Error(r.diagnostics.map((d) => d.message).join('\n'));
    const s = r.value;
    expect(Array.from(s.times)).toEqual([0, 0.1]);
    expect(s.columns[0].values[0]).toBeCloseTo(10e3 + PA, 6);
    expect(Number.isNaN(s.columns[0].values[1])).toBe(true);
    expect(s.columns[1].values[1]).toBeCloseTo(2e5, 6);
    expect(s.columns[2].values[1]).toBeCloseTo(12e3, 6);
    expect(s.columns[3].values[0]).toBeCloseTo(293.15, 9);
    expect(s.overrides).toEqual([{ path: 'reservoirs.supply.pressure', value: '4 barg', line: 2 }]);
    expect(Array.from(s.lines)).toEqual([4, 5]);
  });

  test('problems carry line and column', () => {
    const r = readMeasuredCsv('time,a.gauge [kPa]\n0,x\n', 'b.csv', PA);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.diagnostics[0]).toMatchObject({ line: 1, column: 1, code: 'data-units' });
    const c = readMeasuredCsv('time [s],a.gauge [kPa]\n0,x\n', 'b.csv', PA);
    if (!c.ok) expect(c.diagnostics[0]).toMatchObject({ line: 2, column: 3 });
    const q = readMeasuredCsv('time [s],a.wobble [kPa]\n0,1\n', 'b.csv', PA);
    if (!q.ok) expect(q.diagnostics[0]).toMatchObject({ line: 1, column: 10 });
  });
});

describe('channel values at given times (dense output)', () => {
  test('agree with the samples at sample times, and read exactly the requested times between them', () => {
    const m = modelFromText(`format: 1
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 300 kPa gauge } }
valves:
  v: { from: tank, to: ambient, orifice: 1 mm, discharge-coefficient: 0.7, initially: open }
simulate: { duration: 1 s, sample: 100 ms, tolerance: 1e-9 }
`);
    const times = [0, 0.1, 0.123, 0.5, 1];
    const r = simulate(m, { probe: { times, keys: ['tank.gauge'] } });
    expect(r.mass.drift).toBeLessThan(1e-9);
    const g = r.probed![0];
    const col = r.trace.channels.findIndex((c) => c.key === 'tank.gauge');
    for (const [k, t] of times.entries()) {
      const s = r.trace.times.findIndex((x) => Math.abs(x - t) < 1e-12);
      if (s >= 0) expect(g[k]).toBeCloseTo(r.trace.values[col][s], 6);
    }
    // between samples: a choked isothermal blow-down is exponential in the absolute pressure
    // (p = p0 e^(−t/τ), Anderson ch. 5, from memory) while p ≥ pa/0.528, so log p is linear in t
    const lp = (t: number): number => Math.log(g[times.indexOf(t)] + 101325);
    expect((lp(0.123) - lp(0.1)) / 0.023).toBeCloseTo((lp(0.5) - lp(0.1)) / 0.4, 4);
  });
});
