/** Reading `cylinders:`: values in SI, the sides as nodes and probes, and every rule with its position. */
import { describe, expect, it } from 'vitest';
import type { Diagnostic } from '../../src/diag/diagnostic.js';
import { readNetlist } from '../../src/netlist/read.js';
import type { NetlistDoc } from '../../src/netlist/types.js';

/**
 * Line numbers below refer to this layout:
 *   1 format  2 cylinders  3 clamp  4 bore  5 rod  6 stroke  7 dead-volume  8 moving-mass
 *   9 spring  10 force  11 friction  12 mounting  13 start  14 reservoirs  15 supply
 *   16 valves  17 v_in  18 v_out  19 simulate  20 expect ...
 */
const BASE = `format: 1
cylinders:
  clamp:
    bore: 32 mm
    rod: 12 mm
    stroke: 100 mm
    dead-volume: { cap: 2 mL, rod: 3 mL }
    moving-mass: 1.5 kg
    spring: { rate: 500 N/m, preload: 20 N }
    force: 40 N
    friction: { static: 30 N, sliding: 20 N, viscous: 50 N*s/m }
    mounting: { angle: 90 deg }
    start: { position: 10 mm, cap: { pressure: 0 barg }, rod: { pressure: 1 barg } }
reservoirs:
  supply: { pressure: 6 barg }
valves:
  v_in: { from: supply, to: clamp.cap, orifice: 2 mm, discharge-coefficient: 0.7, initially: open }
  v_out: { from: clamp.rod, to: ambient, orifice: 2 mm, discharge-coefficient: 0.7, initially: open }
simulate: { duration: 1 s }
expect:
  - { probe: clamp.position, at: end, above: 99 mm }
  - { probe: clamp.cap.gauge, at: end, above: 5 barg }
  - { probe: clamp.velocity, over: [0 s, 1 s], stat: max, below: 2 m/s }
`;

function edit(from: string, to: string): string {
  if (!BASE.includes(from)) throw new Error(`the base has no ${from}`);
  return BASE.replace(from, to);
}

function read(source: string): NetlistDoc {
  const r = readNetlist(source, 'rig.yaml');
  if (!r.ok) throw new Error(r.diagnostics.map((d) => `${d.line}:${d.column} ${d.code} ${d.message}`).join('\n'));
  return r.value;
}

function find(source: string, code: string): Diagnostic {
  const r = readNetlist(source, 'rig.yaml');
  if (r.ok) throw new Error(`accepted:\n${source}`);
  const d = r.diagnostics.find((x) => x.code === code && x.severity === 'error');
  if (!d) throw new Error(`no ${code} among:\n${r.diagnostics.map((x) => `${x.line}:${x.column} ${x.code} ${x.message}`).join('\n')}`);
  return d;
}

function expectAt(source: string, code: string, line: number, column: number): Diagnostic {
  const d = find(source, code);
  expect([d.line, d.column], `${code}: ${d.message}`).toEqual([line, column]);
  expect(d.file).toBe('rig.yaml');
  expect(d.hint, `${code} has a hint`).toBeTruthy();
  return d;
}

describe('a valid cylinder', () => {
  const doc = read(BASE);
  const c = doc.cylinders[0];

  it('reads every value in SI', () => {
    expect(c.name).toBe('clamp');
    expect(c.bore).toBeCloseTo(0.032, 15);
    expect(c.rod).toBeCloseTo(0.012, 15);
    expect(c.stroke).toBeCloseTo(0.1, 15);
    expect(c.deadVolume.cap).toBeCloseTo(2e-6, 18);
    expect(c.deadVolume.rod).toBeCloseTo(3e-6, 18);
    expect(c.movingMass).toBe(1.5);
    expect(c.spring).toEqual({ rate: 500, preload: 20 });
    expect(c.force?.at(0.3)).toBe(40);
    expect(c.friction).toEqual({ static: 30, sliding: 20, viscous: 50 });
    expect(c.angle).toBeCloseTo(Math.PI / 2, 14);
    expect(c.start.position).toBeCloseTo(0.01, 15);
    expect(c.start.cap).toEqual({ by: 'pressure', value: 101325 });
    expect(c.start.rod?.by).toBe('pressure');
    expect(c.start.rod?.value).toBeCloseTo(201325, 8);
  });

  it('its sides are nodes for valves and its position, velocity and sides are probes', () => {
    expect(doc.valves.map((v) => [v.from, v.to])).toEqual([['supply', 'clamp.cap'], ['clamp.rod', 'ambient']]);
    const probes = doc.expect.map((e) => (e.kind === 'probe' ? [e.probe.element, e.probe.quantity] : []));
    expect(probes).toEqual([['clamp', 'position'], ['clamp.cap', 'gauge'], ['clamp', 'velocity']]);
    const pos = doc.expect[0];
    expect(pos.kind === 'probe' && pos.compare.kind === 'above' && pos.compare.value).toBeCloseTo(0.099, 15);
  });

  it('defaults: no spring, load, friction or tilt; retracted at ambient', () => {
    const d = read(`format: 1
cylinders:
  ram: { bore: 20 mm, stroke: 50 mm, dead-volume: 1 mL, moving-mass: 0.2 kg }
lines:
  l: { from: ambient, to: ram.cap, diameter: 2 mm, length: 0.5 m }
simulate: { duration: 1 s }
`);
    const r = d.cylinders[0];
    expect(r.rod).toBeUndefined();
    expect(r.deadVolume).toEqual({ cap: 1e-6, rod: 0 });
    expect(r.spring).toEqual({ rate: 0, preload: 0 });
    expect(r.force).toBeUndefined();
    expect(r.friction).toEqual({ static: 0, sliding: 0, viscous: 0 });
    expect(r.angle).toBe(0);
    expect(r.start).toEqual({ position: 0, cap: { by: 'pressure', value: 101325 } });
  });

  it('one dead volume serves both sides; one friction level serves as both', () => {
    const d = read(edit('dead-volume: { cap: 2 mL, rod: 3 mL }', 'dead-volume: 2.5 mL').replace('{ static: 30 N, sliding: 20 N, viscous: 50 N*s/m }', '{ sliding: 20 N }'));
    expect(d.cylinders[0].deadVolume.cap).toBeCloseTo(2.5e-6, 18);
    expect(d.cylinders[0].deadVolume.rod).toBeCloseTo(2.5e-6, 18);
    expect(d.cylinders[0].friction).toEqual({ static: 20, sliding: 20, viscous: 0 });
  });

  it('a load as a table or an expression in t', () => {
    const table = read(edit('force: 40 N', 'force: [[0 s, 0 N], [0.5 s, 40 N]]')).cylinders[0].force;
    expect(table?.at(0.25)).toBeCloseTo(20, 12);
    expect(table?.breakpoints).toEqual([0, 0.5]);
    const expr = read(edit('force: 40 N', 'force: "40 N + 10 N * sin(2*pi*t/(1 s))"')).cylinders[0].force;
    expect(expr?.at(0.25)).toBeCloseTo(50, 12);
  });

  it('a sweep path cylinders.<name>.bore addresses the value', async () => {
    const { readWithOverrides } = await import('../../src/netlist/override.js');
    const r = readWithOverrides(BASE, 'rig.yaml', [{ path: ['cylinders', 'clamp', 'bore'], value: '40 mm', label: 'cylinders.clamp.bore = 40 mm' }]);
    expect(r.ok && r.value.cylinders[0].bore).toBeCloseTo(0.04, 15);
  });
});

describe('cylinder rules, each at its line and column', () => {
  it('a rod not thinner than the bore', () => {
    const d = expectAt(edit('rod: 12 mm', 'rod: 32 mm'), 'out-of-range', 5, 10);
    expect(d.message).toContain('not thinner than the bore');
  });

  it('a start outside the stroke, either side', () => {
    expectAt(edit('position: 10 mm', 'position: 120 mm'), 'out-of-range', 13, 24);
    const d = expectAt(edit('position: 10 mm', 'position: -1 mm'), 'out-of-range', 13, 24);
    expect(d.message).toContain('outside the stroke');
  });

  it('a negative or zero moving mass', () => {
    expectAt(edit('moving-mass: 1.5 kg', 'moving-mass: -1.5 kg'), 'out-of-range', 8, 18);
    expectAt(edit('moving-mass: 1.5 kg', 'moving-mass: 0 kg'), 'out-of-range', 8, 18);
  });

  it('units are checked: a bore in newtons, a spring rate in N', () => {
    expectAt(edit('bore: 32 mm', 'bore: 32 N'), 'unit-dimension', 4, 11);
    expectAt(edit('rate: 500 N/m', 'rate: 500 N'), 'unit-dimension', 9, 21);
  });

  it('static friction below sliding friction', () => {
    const d = expectAt(edit('static: 30 N', 'static: 10 N'), 'out-of-range', 11, 25);
    expect(d.message).toContain('below sliding friction');
  });

  it('an angle without a unit', () => {
    expectAt(edit('angle: 90 deg', 'angle: 90'), 'unit-missing', 12, 24);
  });

  it('a single-acting cylinder has no rod side: start, dead volume and lines to it are refused', () => {
    const single = edit('    rod: 12 mm\n', '');
    // line numbers shift up by one after removing the rod line
    const r = readNetlist(single, 'rig.yaml');
    const at = r.ok ? [] : r.diagnostics.filter((x) => x.code === 'not-applicable').map((x) => [x.line, x.column]);
    expect(at).toEqual([[6, 31], [12, 58]]); // the rod dead volume, start.rod
    const d = find(single, 'unknown-reference');
    expect(d.hint).toContain('single-acting');
  });

  it('a line to the cylinder itself is pointed at its sides', () => {
    const d = find(edit('to: clamp.cap', 'to: clamp'), 'wrong-reference');
    expect(d.hint).toContain('`clamp.cap` or `clamp.rod`');
  });

  it('a side that does not exist, and a probe quantity a cylinder lacks', () => {
    find(edit('to: clamp.cap', 'to: clamp.cop'), 'bad-name');
    const d = find(edit('probe: clamp.position', 'probe: clamp.stretch'), 'unknown-quantity');
    expect(d.hint).toContain('position');
    find(edit('probe: clamp.cap.gauge', 'probe: clamp.cap.position'), 'unknown-quantity');
  });

  it('a double-acting cylinder’s dead volume needs both sides when given by side', () => {
    find(edit('dead-volume: { cap: 2 mL, rod: 3 mL }', 'dead-volume: { cap: 2 mL }'), 'missing-key');
  });

  it('unknown keys are named with a suggestion', () => {
    const d = find(edit('moving-mass: 1.5 kg', 'moving-mas: 1.5 kg'), 'unknown-key');
    expect(d.hint).toContain('moving-mass');
  });
});
