import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { readNetlist } from '../../src/netlist/read.js';
import type { NetlistDoc } from '../../src/netlist/types.js';

const FILE = fileURLToPath(new URL('./full-netlist.yaml', import.meta.url));
/** 1 psi in Pa as mathjs 15 defines it (exact definition 6894.757293168 Pa, NIST SP 811 B.8). */
const PSI = 6894.75729276459;

function readFull(): NetlistDoc {
  const r = readNetlist(readFileSync(FILE, 'utf8'), FILE);
  if (!r.ok) throw new Error(r.diagnostics.map((d) => `${d.line}:${d.column} ${d.code} ${d.message}`).join('\n'));
  expect(r.warnings).toEqual([]);
  return r.value;
}

const byName = <T extends { name: string }>(xs: T[], name: string): T => {
  const x = xs.find((e) => e.name === name);
  if (!x) throw new Error(`no ${name}`);
  return x;
};

describe('readNetlist: a netlist using every key of format 1', () => {
  const doc = readFull();

  it('reads the top level', () => {
    expect(doc.format).toBe(1);
    expect(doc.title).toBe('Twin-cell cushion crossover test');
    expect(doc.gas).toEqual({ name: 'air', molarMass: 0.0289647, gamma: 1.4, viscosity: { value: 1.716e-5, at: 273.15, sutherland: 110.4 } });
    expect(doc.ambient.pressure).toBe(101325);
    expect(doc.ambient.temperature).toBeCloseTo(293.15, 12);
    expect(doc.heat).toBe('exchange');
    expect(doc.source).toContain('format: 1');
  });

  it('reads every wall law in SI', () => {
    const a = byName(doc.chambers, 'cell_a');
    expect(a.wall).toEqual({ law: 'gent', radius: 0.04, thickness: 0.0015, shearModulus: 400000, limit: 97.2 });
    expect(a.start).toEqual({ by: 'stretch', value: 1.2 });
    expect(a.temperature).toBeCloseTo(298.15, 12);
    expect(a.limits?.pressure).toBeCloseTo(131325, 9);
    expect(a.limits?.stretch).toBe(3);
    expect(a.heatTransfer).toBe(2);
    expect(byName(doc.chambers, 'cell_b').wall).toEqual({ law: 'neo-hookean', radius: 0.04, thickness: 0.0015, shearModulus: 400000 });
    const bellows = byName(doc.chambers, 'bellows');
    expect(bellows.wall).toEqual({ law: 'mooney-rivlin', radius: 0.03, thickness: 0.001, c1: 160000, c2: 20000 });
    expect(bellows.start.by).toBe('volume');
    expect(bellows.start.value).toBeCloseTo(2e-4, 15);
    const bag = byName(doc.chambers, 'bag');
    expect(bag.wall.law).toBe('measured');
    if (bag.wall.law === 'measured') {
      expect(bag.wall.points.map(([V, p]) => [V * 1e3, p])).toEqual([[0.1, 0], [0.5, 2000], [1, 3500], [1.2, 8000]].map(([V, p]) => [expect.closeTo(V, 12), p]));
      expect(bag.wall.deflation?.length).toBe(3);
    }
    expect(bag.start.by).toBe('mass');
    expect(bag.start.value).toBeCloseTo(1.2e-3, 15);
    const acc = byName(doc.chambers, 'accumulator');
    expect(acc.wall.law).toBe('linear');
    if (acc.wall.law === 'linear') expect(acc.wall.compliance / 1e-9).toBeCloseTo(1, 12);
    expect(byName(doc.chambers, 'tank').wall).toEqual({ law: 'rigid', volume: 0.005 });
  });

  it('converts the checked pressures exactly', () => {
    // 0.35 MPa gauge with ambient 101.325 kPa → 451325 Pa absolute.
    expect(byName(doc.chambers, 'cell_b').start).toEqual({ by: 'pressure', value: 451325 });
    // 30 psig → 101325 + 30 psi.
    expect(byName(doc.chambers, 'accumulator').start.value).toBeCloseTo(101325 + 30 * PSI, 6);
    expect(byName(doc.chambers, 'tank').start.value).toBeCloseTo(600000, 9);
  });

  it('records positions of chambers and their fields', () => {
    const a = byName(doc.chambers, 'cell_a');
    expect(a.pos).toMatchObject({ line: 9, column: 3, path: ['chambers', 'cell_a'] });
    expect(a.fieldPos['wall.radius']).toMatchObject({ line: 11, column: 13 });
    expect(a.fieldPos.wall).toMatchObject({ line: 10, column: 11 });
    expect(a.fieldPos['start.stretch']).toMatchObject({ line: 15, column: 14 });
  });

  it('reads the three forms of reservoir pressure', () => {
    const supply = byName(doc.reservoirs, 'supply');
    expect(supply.pressure.constant).toBe(true);
    expect(supply.pressure.at(3)).toBeCloseTo(701325, 9);
    expect(supply.temperature).toBeCloseTo(293.15, 12);
    const pulse = byName(doc.reservoirs, 'pulse');
    expect(pulse.pressure.constant).toBe(false);
    expect(pulse.pressure.at(0.25)).toBeCloseTo(350000 + 101325, 6);
    expect(pulse.pressure.breakpoints).toEqual([]);
    const pulse2 = byName(doc.reservoirs, 'pulse2');
    expect(pulse2.pressure.at(2)).toBeCloseTo(100000 + 20000 / Math.E, 6);
    const ramp = byName(doc.reservoirs, 'ramp');
    expect(ramp.pressure.breakpoints).toEqual([0, 1, 2]);
    expect(ramp.pressure.at(-1)).toBeCloseTo(101325, 9);
    expect(ramp.pressure.at(0.5)).toBeCloseTo(201325, 9);
    expect(ramp.pressure.at(1.5)).toBeCloseTo(301325, 9);
    expect(ramp.pressure.at(10)).toBeCloseTo(301325, 9);
  });

  it('reads lines, with the documented roughness default of 0 (smooth)', () => {
    expect(byName(doc.lines, 'crossover')).toMatchObject({ from: 'cell_a', to: 'cell_b', diameter: 0.004, length: 0.3 });
    expect(byName(doc.lines, 'crossover').roughness).toBeCloseTo(1.5e-6, 18);
    expect(byName(doc.lines, 'feedline').roughness).toBe(0);
    expect(byName(doc.lines, 'vent').to).toBe('ambient');
    expect(doc.defaulted).toContain('lines.feedline.roughness');
  });

  it('reads valve ratings: 0.9 L/(s*bar) → 9e-9 m³/(s·Pa), subsonic index default 0.5', () => {
    const fill = byName(doc.valves, 'v_fill');
    expect(fill.rating.kind).toBe('iso6358');
    if (fill.rating.kind === 'iso6358') {
      expect(fill.rating.conductance / 9e-9).toBeCloseTo(1, 12);
      expect(fill.rating.criticalRatio).toBe(0.3);
      expect(fill.rating.subsonicIndex).toBe(0.5);
    }
    const ramp = byName(doc.valves, 'v_ramp');
    expect(ramp.rating).toMatchObject({ kind: 'iso6358', criticalRatio: 0.25, subsonicIndex: 0.6 });
    if (ramp.rating.kind === 'iso6358') expect(ramp.rating.conductance / 1e-8).toBeCloseTo(1, 12);
    expect(byName(doc.valves, 'v_check').rating).toEqual({ kind: 'orifice', diameter: 0.001, dischargeCoefficient: 0.8 });
  });

  it('reads every way of opening a valve', () => {
    expect(byName(doc.valves, 'v_fill').operation).toEqual({ kind: 'schedule', initially: 0, steps: [{ at: 1, open: 1, over: expect.closeTo(0.05, 15) }, { at: 3, open: 0, over: 0 }] });
    expect(byName(doc.valves, 'v_ramp').operation).toEqual({ kind: 'schedule', initially: 1, steps: [] });
    expect(byName(doc.valves, 'v_check').operation).toEqual({ kind: 'check', cracking: 5000 });
    expect(byName(doc.valves, 'v_relief').operation).toEqual({ kind: 'relief', opensAbove: expect.closeTo(250000, 6), reseatsBelow: expect.closeTo(220000, 6) });
  });

  it('copies from/to from the line for an in-line valve', () => {
    const cross = byName(doc.valves, 'v_cross');
    expect(cross).toMatchObject({ from: 'cell_a', to: 'cell_b', inLine: 'crossover' });
    expect(cross.operation).toEqual({ kind: 'schedule', initially: 0.4, steps: [{ at: 0.5, open: 1, over: 0.1 }] });
  });

  it('reads feeds: 10 L/min ANR → 1.6667e-4 m³/s standard volume flow', () => {
    const pump = byName(doc.feeds, 'pump');
    expect(pump.rate.kind).toBe('anr');
    expect(pump.rate.value).toBeCloseTo(1.6666666666666666e-4, 15);
    expect(pump.temperature).toBeCloseTo(303.15, 12);
    expect(pump.initially).toBe(1);
    expect(pump.steps).toEqual([{ at: 2, open: 0, over: expect.closeTo(0.1, 15) }]);
    const trickle = byName(doc.feeds, 'trickle');
    expect(trickle.rate).toEqual({ kind: 'mass', value: expect.closeTo(5e-5, 15) });
    expect(trickle.initially).toBe(0.5);
  });

  it('reads simulate', () => {
    const { samplePos, ...simulate } = doc.simulate;
    expect(simulate).toEqual({ duration: 5, sample: 0.001, method: 'implicit', tolerance: 1e-7, maxSteps: 100000, maxWall: 30 });
    expect(samplePos?.path).toEqual(['simulate', 'sample']);
  });

  it('reads every kind of expectation with SI values (pressures absolute)', () => {
    const e = Object.fromEntries(doc.expect.map((x) => [x.name, x]));
    expect(e['cell pressure stays low']).toMatchObject({ kind: 'probe', probe: { element: 'cell_a', quantity: 'gauge' }, when: { over: [0, 5], stat: 'max' }, compare: { kind: 'below', value: 131325 } });
    expect(e['tank ends near supply']).toMatchObject({ when: { at: 'end' }, compare: { kind: 'near', value: expect.closeTo(701325, 6), within: { rel: 0.02 } } });
    expect(e['vent flow']).toMatchObject({ probe: { element: 'vent', quantity: 'flow' }, when: { at: 2.5 }, compare: { kind: 'above', value: expect.closeTo(1e-4, 15) } });
    expect(e['valve reynolds']).toMatchObject({ when: { over: [1, 3], stat: 'mean' }, compare: { kind: 'below', value: 2300 } });
    expect(e.mass).toMatchObject({ probe: { element: 'total', quantity: 'mass' }, compare: { kind: 'near', value: expect.closeTo(0.05, 15), within: { abs: expect.closeTo(0.001, 15) } } });
    expect(e.stretch).toMatchObject({ compare: { kind: 'below', value: 2.5 } });
    expect(e.warm).toMatchObject({ compare: { kind: 'near', value: expect.closeTo(293.15, 12), within: { abs: expect.closeTo(2, 12) } } });
    expect(e.volume).toMatchObject({ compare: { kind: 'above', value: expect.closeTo(1e-4, 15) } });
    expect(e.settled).toMatchObject({ kind: 'settles', within: 3, band: 0.02 });
    expect(doc.expect).toHaveLength(10);
  });
});

describe('readNetlist: defaults', () => {
  const minimal = `format: 1
chambers:
  cell: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }
lines:
  vent: { from: cell, to: ambient, diameter: 1 mm, length: 1 m }
valves:
  v: { from: cell, to: ambient, conductance: 0.1 L/(s*bar), critical-ratio: 0.3, schedule: [{ at: 1 s, open: 100% }] }
feeds:
  f: { into: cell, rate: 1 g/s }
simulate: { duration: 1 s }
`;
  const r = readNetlist(minimal, 'dir/rig.yaml');

  it('fills the documented defaults', () => {
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const doc = r.value;
    expect(doc.title).toBe('rig.yaml');
    expect(doc.gas.name).toBe('air');
    expect(doc.ambient).toEqual({ pressure: 101325, temperature: expect.closeTo(293.15, 12) });
    expect(doc.heat).toBe('isothermal');
    const { samplePos, ...simulate } = doc.simulate;
    expect(simulate).toEqual({ duration: 1, method: 'auto', tolerance: 1e-6 });
    expect(samplePos?.path).toEqual(['simulate']);
    expect(doc.lines[0].roughness).toBe(0);
    expect(doc.valves[0].operation).toEqual({ kind: 'schedule', initially: 0, steps: [{ at: 1, open: 1, over: 0 }] });
    expect(doc.valves[0].rating).toMatchObject({ subsonicIndex: 0.5 });
    expect(doc.feeds[0]).toMatchObject({ initially: 1, steps: [] });
    expect(doc.chambers[0].start).toEqual({ by: 'pressure', value: 101325 });
    expect(doc.defaulted).toEqual(expect.arrayContaining(['gas', 'heat', 'ambient.pressure', 'simulate.method', 'simulate.tolerance', 'lines.vent.roughness']));
  });

  it('reads named and custom gases', () => {
    const he = readNetlist(minimal + 'gas: helium\n', 'x.yaml');
    expect(he.ok && he.value.gas).toEqual({ name: 'helium', molarMass: 4.002602e-3, gamma: 5 / 3, viscosity: { value: 1.865e-5, at: 273, sutherland: 79.4 } });
    const custom = readNetlist(minimal + 'gas: { molar-mass: 32 g/mol, gamma: 1.4, viscosity: { value: 2.0e-5 Pa*s, at: 20 degC, sutherland: 127 K } }\n', 'x.yaml');
    expect(custom.ok && custom.value.gas).toEqual({ name: 'custom', molarMass: 0.032, gamma: 1.4, viscosity: { value: 2e-5, at: expect.closeTo(293.15, 12), sutherland: 127 } });
  });

  it('accepts a custom ambient, absolute with or without abs', () => {
    const a = readNetlist(minimal + 'ambient: { pressure: 95 kPa abs, temperature: 30 degC }\n', 'x.yaml');
    expect(a.ok && a.value.ambient).toEqual({ pressure: 95000, temperature: expect.closeTo(303.15, 12) });
    const b = readNetlist(minimal.replace('0 kPa gauge', '10 kPa gauge') + 'ambient: { pressure: 14.5 psi }\n', 'x.yaml');
    expect(b.ok && b.value.chambers[0].start.value).toBeCloseTo(14.5 * PSI + 10000, 6);
  });

  it('starts a sphere at stretch 1 (its unstretched size) but not below (the slack regime is for emptying only)', () => {
    const sphere = (start: string): string => minimal.replace('{ wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }', `{ wall: neo-hookean, radius: 2 cm, thickness: 1 mm, shear-modulus: 0.5 MPa, start: ${start} }`);
    const one = readNetlist(sphere('{ stretch: 1 }'), 'x.yaml');
    expect(one.ok && one.value.chambers[0].start).toEqual({ by: 'stretch', value: 1 });
    const slack = readNetlist(sphere('{ stretch: 0.5 }'), 'x.yaml');
    expect(slack.ok).toBe(false);
    if (!slack.ok) expect(slack.diagnostics.map((d) => d.code)).toEqual(['start-range']);
  });
});
