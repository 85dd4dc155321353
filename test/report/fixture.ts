/**
 * A hand-made ReportInput that needs no solver: two chambers (a neo-Hookean sphere and a linear
 * bag) joined by a line, a relief valve to ambient, events and a limit. Its numbers are
 * invented for rendering tests only; the curves are smooth closed forms so the pictures are
 * stable whatever the integrators do.
 */
import type { ReportInput, WallCurve } from '../../src/transient/report-input.js';
import type { RunResult } from '../../src/transient/results.js';

const PA = 101_325;
/** 2μt0/r0 of the sphere, Pa (μ 0.35 MPa, t0 1.5 mm, r0 40 mm). */
const C = (2 * 0.35e6 * 1.5e-3) / 0.04;

export function sphereGauge(lambda: number): number {
  return C * (1 / lambda - lambda ** -7);
}

/** A synthetic run of `n` samples over `duration` seconds. */
export function syntheticInput(n = 401, duration = 2): ReportInput {
  const times = Array.from({ length: n }, (_, k) => (duration * k) / (n - 1));
  const lam = times.map((t) => 1.6 - 0.45 * (1 - Math.exp(-t / 0.5)));
  const gaugeA = lam.map(sphereGauge);
  const Vb = times.map((t) => 150e-6 + 30e-6 * (1 - Math.exp(-t / 0.5)));
  const gaugeB = Vb.map((V) => (V - 150e-6) / 0.5e-9);
  const flow = times.map((t) => (t < 0.1 ? 0 : 2e-4 * Math.exp(-(t - 0.1) / 0.5)));
  const relief = times.map((t) => (t > 1.2 && t < 1.4 ? 5e-5 : 0));
  const V0 = (4 / 3) * Math.PI * 0.04 ** 3;
  const mass = (g: number[], V: number[]): number[] => g.map((p, k) => ((PA + p) * V[k]) / (287.05 * 293.15));
  const VA = lam.map((l) => V0 * l ** 3);
  const channels: RunResult['trace']['channels'] = [
    { key: 'cell.pressure', unit: 'Pa' }, { key: 'cell.gauge', unit: 'Pa' }, { key: 'cell.volume', unit: 'm^3' }, { key: 'cell.mass', unit: 'kg' }, { key: 'cell.temperature', unit: 'K' }, { key: 'cell.stretch', unit: '-' },
    { key: 'bag.pressure', unit: 'Pa' }, { key: 'bag.gauge', unit: 'Pa' }, { key: 'bag.volume', unit: 'm^3' }, { key: 'bag.mass', unit: 'kg' }, { key: 'bag.temperature', unit: 'K' },
    { key: 'hose.flow', unit: 'kg/s' }, { key: 'hose.reynolds', unit: '-' },
    { key: 'vent.flow', unit: 'kg/s' }, { key: 'vent.reynolds', unit: '-' },
    { key: 'total.mass', unit: 'kg' },
  ];
  const mA = mass(gaugeA, VA), mB = mass(gaugeB, Vb);
  const values = [
    gaugeA.map((g) => g + PA), gaugeA, VA, mA, times.map(() => 293.15), lam,
    gaugeB.map((g) => g + PA), gaugeB, Vb, mB, times.map(() => 293.15),
    flow, flow.map((f) => f * 1e6), relief, relief.map((f) => f * 1e6),
    mA.map((m, k) => m + mB[k]),
  ];
  const last = n - 1;
  const result: RunResult = {
    format: 1, title: 'Synthetic <cell> & bag', file: 'synthetic.yaml', status: 'completed', message: 'completed', end: duration,
    stats: { method: 'odex', steps: 10, rejected: 1, rhs: 100, jacobians: 0, lu: 0, wall_ms: 5 },
    chambers: {
      cell: { final: { pressure: gaugeA[last] + PA, gauge: gaugeA[last], volume: VA[last], mass: mA[last], temperature: 293.15, stretch: lam[last] }, peak: { gauge: gaugeA.reduce((a, v) => Math.max(a, v), -Infinity), at: 0.3 }, least: { gauge: gaugeA[last], at: duration } },
      bag: { final: { pressure: gaugeB[last] + PA, gauge: gaugeB[last], volume: Vb[last], mass: mB[last], temperature: 293.15 }, peak: { gauge: gaugeB[last], at: duration }, least: { gauge: 0, at: 0 } },
    },
    lines: { hose: { peak_flow: 2e-4, peak_reynolds: 900, regime: 'laminar', choked: false, peak_mach: 0.02 } },
    valves: { vent: { peak_flow: 5e-5, choked: true } },
    mass: { initial: mA[0] + mB[0], final: mA[last] + mB[last], through_boundaries: 0, drift: 0 },
    events: [
      { t: 0.1, what: 'valve hose_valve starts opening' },
      { t: 0.12, what: 'valve hose_valve reaches 100 %' },
      { t: 0.9, what: 'cell shrinks back through its pressure maximum (16.27 kPa gauge)' },
      { t: 1.2, what: 'relief valve vent opens' },
      { t: 1.4, what: 'relief valve vent reseats' },
      { t: 1.5, what: 'bag exceeds its pressure limit of 55 kPa gauge' },
    ],
    warnings: ['bag exceeds its pressure limit of 55 kPa gauge at t = 1.5 s: it may burst or yield; see the safety notes'],
    expectations: [
      { name: 'cell ends below its maximum', passed: true, actual: lam[last], message: 'cell.stretch at end is 1.15', file: 'synthetic.yaml', line: 40, column: 5 },
      { name: 'bag stays under 50 kPa', passed: false, actual: gaugeB[last], message: 'max of bag.gauge is 60 kPa; expected below 50 kPa', file: 'synthetic.yaml', line: 44, column: 5 },
    ],
    trace: { channels, times, values },
    ambient: PA,
  };
  const xs = Array.from({ length: 121 }, (_, k) => 1 + (0.75 * k) / 120);
  const lmax = 7 ** (1 / 6);
  const sphereWall: WallCurve = {
    chamber: 'cell', law: 'neo-hookean', axis: 'stretch', key: 'sphere',
    points: xs.map((x) => [x, sphereGauge(x)] as [number, number]),
    extrema: [{ x: lmax, gauge: sphereGauge(lmax), kind: 'max' }],
  };
  const vs = Array.from({ length: 61 }, (_, k) => 140e-6 + (60e-6 * k) / 60);
  const bagWall: WallCurve = {
    chamber: 'bag', law: 'linear', axis: 'volume', key: 'bag',
    points: vs.map((V) => [V, (V - 150e-6) / 0.5e-9] as [number, number]),
    extrema: [],
  };
  return {
    result,
    source: 'format: 1\ntitle: "Synthetic <cell> & bag"\n# </pre><script>alert(1)</script>\n',
    heat: 'isothermal',
    gas: 'air',
    topology: {
      chambers: [
        { name: 'cell', law: 'neo-hookean', sphere: true, rigid: false, describe: 'neo-Hookean sphere, r0 40 mm', limits: { stretch: 3 } },
        { name: 'bag', law: 'linear', sphere: false, rigid: false, describe: 'linear, 150 mL', limits: { gauge: 55e3 } },
      ],
      reservoirs: [{ name: 'ambient', ambient: true, describe: 'ambient, 101.3 kPa abs' }],
      lines: [{ name: 'hose', from: 'cell', to: 'bag', describe: '3 mm bore, 250 mm long', valves: ['hose_valve'] }],
      valves: [
        { name: 'hose_valve', from: 'cell', to: 'bag', inLine: 'hose', operation: 'schedule', describe: 'orifice 2.5 mm' },
        { name: 'vent', from: 'bag', to: 'ambient', operation: 'relief', describe: 'relief', opensAbove: 50e3, reseatsBelow: 45e3 },
      ],
      feeds: [],
    },
    walls: [sphereWall, bagWall],
  };
}
