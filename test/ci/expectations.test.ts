/**
 * `expect:` judged on the dense solution: `at` exact at any time, `over` max/min refined inside
 * steps, `mean` by quadrature of the dense output, `settles` as documented, and messages that
 * say what was expected, what happened (with units), when, and where.
 */
import { describe, expect, it } from 'vitest';
import { channel, modelFromText, runChecked } from '../helpers.js';
import type { RunResult } from '../../src/index.js';
import { ExpectationMonitor, type ChannelSource } from '../../src/transient/expectations.js';

// Rigid tank blowing down through a laminar capillary, isothermal (docs/references.md, closed form):
// dp/dt = −k(p² − pa²), k = πD⁴/(256 μ L V), p(t) = pa(1 + A e^(−2 pa k t))/(1 − A e^(−2 pa k t)),
// A = (p0 − pa)/(p0 + pa). Integrating the closed form (substitute u = A e^(−2 pa k t)):
// ∫₀ᵀ p dt = pa T + (1/k)[ln(1 − A e^(−2 pa k T)) − ln(1 − A)].
// The line's volume is lumped half into the tank (plenum's documented choice): V = 1 L + πD²L/8.
const D = 0.3e-3, L = 1, pa = 101325, p0 = 300e3, T = 293.15;
const mu = (1.716e-5 * Math.pow(T / 273.15, 1.5) * (273.15 + 110.4)) / (T + 110.4);
const V = 1e-3 + (Math.PI * D * D * L) / 8;
const k = (Math.PI * D ** 4) / (256 * mu * L * V);
const A = (p0 - pa) / (p0 + pa);
const pClosed = (t: number): number => {
  const e = A * Math.exp(-2 * pa * k * t);
  return (pa * (1 + e)) / (1 - e);
};
const integralClosed = (t: number): number => pa * t + (Math.log(1 - A * Math.exp(-2 * pa * k * t)) - Math.log(1 - A)) / k;

function blowdown(method: string, expectations: string, sample = '300 s'): RunResult {
  return runChecked(modelFromText(`
format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 300 kPa abs } }
lines:
  capillary: { from: tank, to: ambient, diameter: 0.3 mm, length: 1 m }
simulate: { duration: 600 s, sample: ${sample}, tolerance: 1e-10, method: ${method} }
expect:
${expectations}`, 'blowdown.yaml'));
}

const result = (r: RunResult, name: string) => {
  const e = r.expectations.find((x) => x.name === name);
  if (!e) throw new Error(`no expectation ${name}`);
  return e;
};

describe('expectations on the closed-form capillary blowdown (docs/references.md)', () => {
  for (const method of ['explicit', 'implicit']) {
    it(`${method}: \`at\` between samples reads the dense output (p(100 s) to 1e-7 with samples 300 s apart)`, () => {
      const r = blowdown(method, `
  - { name: p100, probe: tank.pressure, at: 100 s, near: { value: 262 kPa abs, within: 5% } }
  - { name: g250, probe: tank.gauge, at: 250 s, above: 0 kPa gauge }`);
      expect(Math.abs(result(r, 'p100').actual / pClosed(100) - 1)).toBeLessThan(1e-7);
      // gauge probes report gauge values
      expect(Math.abs((result(r, 'g250').actual + pa) / pClosed(250) - 1)).toBeLessThan(1e-7);
      // linear interpolation between the samples would be far off: the check is not vacuous
      const lin = pClosed(0) + (100 / 300) * (pClosed(300) - pClosed(0));
      expect(Math.abs(lin / pClosed(100) - 1)).toBeGreaterThan(1e-3);
    });

    it(`${method}: \`mean\` integrates the dense output (closed-form integral to 1e-7)`, () => {
      const r = blowdown(method, `
  - { name: mean, probe: tank.pressure, over: [0 s, 600 s], stat: mean, below: 300 kPa abs }
  - { name: mean-late, probe: tank.pressure, over: [120 s, 470 s], stat: mean, below: 300 kPa abs }`);
      expect(Math.abs(result(r, 'mean').actual / (integralClosed(600) / 600) - 1)).toBeLessThan(1e-7);
      const want = (integralClosed(470) - integralClosed(120)) / 350;
      expect(Math.abs(result(r, 'mean-late').actual / want - 1)).toBeLessThan(1e-7);
    });

    it(`${method}: \`min\`/\`max\` of a monotone decay sit at the window's ends, with their times`, () => {
      const r = blowdown(method, `
  - { name: lo, probe: tank.pressure, over: [100 s, 450 s], stat: min, above: 100 kPa abs }
  - { name: hi, probe: tank.pressure, over: [100 s, 450 s], stat: max, below: 300 kPa abs }`);
      expect(Math.abs(result(r, 'lo').actual / pClosed(450) - 1)).toBeLessThan(1e-7);
      expect(Math.abs(result(r, 'hi').actual / pClosed(100) - 1)).toBeLessThan(1e-7);
      expect(result(r, 'lo').message).toContain('at t = 450 s');
      expect(result(r, 'hi').message).toContain('at t = 100 s');
    });
  }
});

// A supply tank fills a pad through a line while the pad vents through an orifice: the pad's
// pressure rises, peaks inside an integration step and falls. Sampling does not change the
// steps (samples come from the dense output), so a finely sampled run of the same netlist
// shows where the true maximum is. A demo scenario.
function pad(sample: string, method: string, expectations: string): RunResult {
  return runChecked(modelFromText(`
format: 1
ambient: { pressure: 101.325 kPa, temperature: 293.15 K }
chambers:
  tank: { wall: rigid, volume: 0.5 L, start: { pressure: 400 kPa abs } }
  pad: { wall: rigid, volume: 0.2 L, start: { pressure: 0 kPa gauge } }
lines:
  feed: { from: tank, to: pad, diameter: 1 mm, length: 1 m }
valves:
  vent: { from: pad, to: ambient, orifice: 0.4 mm, discharge-coefficient: 0.7, initially: open }
simulate: { duration: 20 s, sample: ${sample}, tolerance: 1e-8, method: ${method} }
expect:
${expectations}`, 'pad.yaml'));
}

describe('extrema inside steps', () => {
  for (const method of ['explicit', 'implicit']) {
    it(`${method}: the max is that of the dense output, not of samples or step ends`, () => {
      const spec = '  - { name: peak, probe: pad.gauge, over: [0 s, 20 s], stat: max, below: 1 MPa gauge }';
      const coarse = pad('2 s', method, spec);
      const fine = pad('0.1 ms', method, spec);
      expect(fine.stats.steps).toBe(coarse.stats.steps);
      const g = channel(fine, 'pad.gauge');
      let iMax = 0;
      g.forEach((x, i) => { if (x > g[iMax]) iMax = i; });
      const fineMax = g[iMax];
      const tFine = fine.trace.times[iMax];
      const peak = result(coarse, 'peak');
      // the refined max bounds every sample of the dense output and is no further above the
      // best of 200 000 samples than the curvature over half a sample spacing allows
      expect(peak.actual).toBeGreaterThanOrEqual(fineMax - 1e-9 * fineMax);
      expect((peak.actual - fineMax) / fineMax).toBeLessThan(1e-9);
      const m = /at t = ([\d.]+) s/.exec(peak.message);
      expect(m).not.toBeNull();
      expect(Math.abs(Number(m![1]) - tFine)).toBeLessThan(5e-3);
      // the samples of the coarse run miss the peak by far more
      expect((peak.actual - Math.max(...channel(coarse, 'pad.gauge'))) / peak.actual).toBeGreaterThan(1e-4);
    });
  }

  it('the min of a flow that is zero before a valve opens is found at the start', () => {
    const r = pad('1 s', 'auto', '  - { name: least, probe: vent.flow, over: [0 s, 20 s], stat: min, above: -1 g/s }');
    expect(result(r, 'least').actual).toBe(0);
    expect(result(r, 'least').passed).toBe(true);
  });
});

describe('settles', () => {
  // two rigid tanks joined by a line equalise; the largest distance from the final values after
  // `within` is judged on the dense output (here it is at t = within, the approach is monotone)
  const net = (band: string) => `
format: 1
chambers:
  a: { wall: rigid, volume: 0.5 L, start: { pressure: 300 kPa gauge } }
  b: { wall: linear, volume: 0.2 L, compliance: 0.1 mL/kPa, start: { pressure: 0 kPa gauge } }
lines:
  j: { from: a, to: b, diameter: 1 mm, length: 0.5 m }
simulate: { duration: 10 s, sample: 1 ms, tolerance: 1e-9 }
expect:
  - { name: settled, settles: { within: 2 s, band: ${band} } }
`;
  it('is the largest distance of any chamber\'s pressure or volume from its final value after `within`, as a fraction of its excursion over the run (floor 0.1 % of the final value)', () => {
    const r = runChecked(modelFromText(net('50%')));
    const e = result(r, 'settled');
    expect(e.passed).toBe(true);
    // brute force on the 1 ms samples (a.volume is rigid: its excursion is 0, so the floor counts)
    let worst = 0;
    for (const key of ['a.pressure', 'a.volume', 'b.pressure', 'b.volume']) {
      const v = channel(r, key);
      const fin = v[v.length - 1];
      const excursion = Math.max(...v.map((x) => Math.abs(x - fin)));
      const scale = Math.max(excursion, 1e-3 * Math.abs(fin));
      r.trace.times.forEach((t, i) => { if (t >= 2) worst = Math.max(worst, Math.abs(v[i] - fin) / scale); });
    }
    expect(worst).toBeGreaterThan(1e-4);
    expect(e.actual).toBeGreaterThanOrEqual(worst * (1 - 1e-9));
    expect(e.actual).toBeLessThan(worst * (1 + 1e-6));
    // just above passes, just below fails, with a message naming the chamber quantity and time
    const above = result(runChecked(modelFromText(net(`${(e.actual * 100 * 1.001).toPrecision(6)}%`))), 'settled');
    const below = result(runChecked(modelFromText(net(`${(e.actual * 100 * 0.999).toPrecision(6)}%`))), 'settled');
    expect(above.passed).toBe(true);
    expect(below.passed).toBe(false);
    expect(below.message).toMatch(/^[ab]\.(pressure|volume) is [\d.]+ % of its excursion \([\d.]+ k?Pa\) away from its final value .* at t = 2 s; expected within [\d.]+ % for t ≥ 2 s$/);
  });
});

describe('messages of failing expectations', () => {
  it('say what was expected, what happened with units and when; the result carries file:line:column', () => {
    const r = pad('1 s', 'auto', `  - name: peak under 100 kPa
    probe: pad.gauge
    over: [0 s, 20 s]
    stat: max
    below: 100 kPa gauge
  - { name: at 3 s, probe: pad.pressure, at: 3 s, near: { value: 150 kPa abs, within: 1 kPa } }
  - { name: vent flow, probe: vent.flow, at: end, above: 1 kg/s }
  - { name: mean volume, probe: pad.mass, over: [1 s, 2 s], stat: mean, above: 1 kg }`);
    const [peak, at3, flow, mass] = r.expectations;
    for (const e of r.expectations) expect(e.passed).toBe(false);
    expect(peak.message).toMatch(/^max of pad\.gauge over \[0 s, 20 s\] is 161\.1 kPa gauge at t = 5\.77\d* s; expected below 100 kPa gauge$/);
    expect(peak).toMatchObject({ file: 'pad.yaml', line: 13, column: 5 });
    expect(at3.message).toMatch(/^pad\.pressure at t = 3 s is [\d.]+ kPa abs \(off by [\d.]+ kPa, [\d.]+ %\); expected 150 kPa abs ± 1 kPa$/);
    expect(at3).toMatchObject({ line: 18, column: 5 });
    expect(flow.message).toMatch(/^vent\.flow at the end \(t = 20 s\) is 0\.0[\d]+ g\/s; expected above 1 kg\/s$/);
    expect(mass.message).toMatch(/^mean of pad\.mass over \[1 s, 2 s\] is [\d.]+ g; expected above 1 kg$/);
  });

  it('print enough digits to tell the actual value from a limit close to it', () => {
    const first = pad('1 s', 'auto', '  - { name: peak, probe: pad.gauge, over: [0 s, 20 s], stat: max, below: 1 MPa gauge }');
    const peak = result(first, 'peak').actual;
    const limit = `${((peak - 0.5) / 1000).toFixed(4)} kPa gauge`;
    const r = pad('1 s', 'auto', `  - { name: peak, probe: pad.gauge, over: [0 s, 20 s], stat: max, below: ${limit} }`);
    const e = result(r, 'peak');
    expect(e.passed).toBe(false);
    const m = /is ([\d.]+) kPa gauge .*expected below ([\d.]+) kPa gauge/.exec(e.message);
    expect(m).not.toBeNull();
    expect(m![1]).not.toBe(m![2]);
    expect(Number(m![1])).toBeGreaterThan(Number(m![2]));
  });
});

describe('the cost of a settles check on many chambers', () => {
  /**
   * n chambers whose pressure and volume decay to their final values, q(t) = q∞(1 + a·e^(−t)),
   * observed through a counting source. The check's answer is the largest distance from the
   * final value after `within` as a fraction of the excursion q(0) − q(1):
   * (e^(−within) − e^(−1))/(1 − e^(−1)), the same for every chamber. Its cost must not grow with chambers × steps evaluations: each evaluation of the
   * network is a full one (all chambers), so the nodes of a step are evaluated once, whatever
   * the number of channels tracked, including for the step the window starts in.
   */
  it('evaluates the network a few times a step, not once a tracked channel, and finds the largest deviation', () => {
    const n = 200;
    const keys = new Map<string, number>();
    for (let i = 0; i < n; i++) { keys.set(`c${i}.pressure`, 2 * i); keys.set(`c${i}.volume`, 2 * i + 1); }
    const amp = (i: number): number => 0.01 + 0.1 * (i / n);
    let evaluations = 0;
    const src: ChannelSource = {
      keys, width: 2 * n, n: 1,
      observe(t, _y, row) {
        evaluations++;
        for (let i = 0; i < n; i++) {
          row[2 * i] = 2e5 * (1 + amp(i) * Math.exp(-t));
          row[2 * i + 1] = 1e-3 * (1 + 0.5 * amp(i) * Math.exp(-t));
        }
      },
    };
    const within = 0.55;
    const monitor = new ExpectationMonitor([{ kind: 'settles', name: 'settles', within, band: 0.05, pos: { file: 'x.yaml', line: 1, column: 1, path: ['expect', 0] } }],
      src, Array.from({ length: n }, (_, i) => `c${i}`), 101325);
    const steps = 10;
    for (let k = 0; k < steps; k++) {
      const tOld = k * 0.1, tNew = (k + 1) * 0.1;
      monitor.step(tOld, tNew, (t, y) => { y[0] = t; });
    }
    const before = evaluations;
    const [r] = monitor.results(1, new Float64Array(1));
    expect(evaluations - before).toBe(1); // the final state
    // 7 nodes a step, plus the piece of the step in which the window starts
    expect(before).toBeLessThanOrEqual(7 * (steps + 1));
    expect(r.passed).toBe(false);
    expect(r.actual).toBeCloseTo((Math.exp(-within) - Math.exp(-1)) / (1 - Math.exp(-1)), 12);
  });
});
