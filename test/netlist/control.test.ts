/**
 * Reading regulators, delivery curves and controllers: SI values, and the diagnostics of bad
 * input (each with its line and column).
 */
import { describe, expect, it } from 'vitest';
import type { Diagnostic } from '../../src/diag/diagnostic.js';
import { readNetlist } from '../../src/netlist/read.js';
import type { NetlistDoc } from '../../src/netlist/types.js';

/** Line numbers: controllers start at line 11 (`hold:` on line 12). */
const BASE = `format: 1
chambers:
  cell: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }
reservoirs:
  supply: { pressure: 6 bar gauge }
valves:
  fill: { from: supply, to: cell, conductance: 0.5 L/(s*bar), critical-ratio: 0.4 }
  reg: { from: supply, to: cell, conductance: 1 L/(s*bar), critical-ratio: 0.4, regulates: { set: 4 bar gauge, band: 0.3 bar }, relieving: true, time-constant: 20 ms }
feeds:
  comp: { into: cell, curve: [[0 bar gauge, 100 L/min ANR], [6 bar gauge, 60 L/min ANR]], shut-off: 8 bar gauge }
controllers:
  hold: { kind: pid, measure: cell.gauge, target: 2 bar gauge, kp: 2 %/kPa, ki: 5 %/(kPa*s), kd: 0.1 %*s/kPa, drives: fill }
simulate: { duration: 1 s }
`;

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

function edit(from: string, to: string): string {
  if (!BASE.includes(from)) throw new Error(`the base has no ${from}`);
  return BASE.replace(from, to);
}

describe('regulators, delivery curves and controllers read into SI', () => {
  it('a regulator: set gauge, band, relieving, lag', () => {
    const doc = read(BASE);
    const reg = doc.valves.find((v) => v.name === 'reg')!;
    expect(reg.operation).toEqual({ kind: 'regulator', set: 400e3, band: 30e3, relieving: true, timeConstant: 0.02 });
    expect(doc.valves.find((v) => v.name === 'fill')!.operation).toEqual({ kind: 'driven', controller: 'hold' });
  });

  it('a delivery curve: absolute pressures, ANR flows, the shut-off', () => {
    const f = read(BASE).feeds[0];
    expect(f.curve!.pressure).toEqual([101325, 701325]);
    expect(f.curve!.flow.map((q) => q.kind)).toEqual(['anr', 'anr']);
    expect(f.curve!.flow[0].value).toBeCloseTo(100 / 60000, 15);
    expect(f.curve!.shutOff).toBe(901325);
  });

  it('a controller: gains with units in SI, target absolute, defaults', () => {
    const c = read(BASE).controllers[0];
    expect(c.kp).toBeCloseTo(2e-5, 18);     // 2 %/kPa = 0.02/1000 per Pa
    expect(c.ki).toBeCloseTo(5e-5, 18);
    expect(c.kd).toBeCloseTo(1e-6, 18);
    expect(c.filter).toBeCloseTo(0.005, 12); // kd/(10·kp) = (1e-6 s/Pa)/(10 · 2e-5 /Pa)
    expect(c.target.at(0)).toBe(301325);
    expect(c.limits).toEqual({ min: 0, max: 1 });
    expect(c.antiWindup).toBe('clamping');
    expect(c.initially).toBe(0);
    expect(c.measure).toMatchObject({ element: 'cell', quantity: 'gauge' });
    expect(c.sample).toBeUndefined();
  });

  it('a bare-number gain is SI; a flow measure takes flow gains', () => {
    const doc = read(edit('kp: 2 %/kPa, ki: 5 %/(kPa*s), kd: 0.1 %*s/kPa', 'kp: 3e-5, sample: 10 ms'));
    expect(doc.controllers[0].kp).toBe(3e-5);
    expect(doc.controllers[0].sample).toBe(0.01);
    const flow = read(edit('measure: cell.gauge, target: 2 bar gauge, kp: 2 %/kPa, ki: 5 %/(kPa*s), kd: 0.1 %*s/kPa', 'measure: reg.flow, target: 2 g/s, kp: 10 %/(g/s)'));
    expect(flow.controllers[0].kp).toBeCloseTo(100, 10);
    expect(flow.controllers[0].target.at(0)).toBeCloseTo(2e-3, 15);
  });
});

describe('bad controller input: exit-2 diagnostics with line and column', () => {
  it('an unknown probe, with a did-you-mean', () => {
    const d = find(edit('measure: cell.gauge', 'measure: cel.gauge'), 'unknown-reference');
    expect([d.line, d.column]).toEqual([12, 31]);
    expect(d.hint).toContain('cell');
  });

  it('a probe quantity the element does not have', () => {
    const d = find(edit('measure: cell.gauge', 'measure: cell.flow'), 'unknown-quantity');
    expect(d.line).toBe(12);
  });

  it('gains of the wrong dimension, each by name', () => {
    const src = edit('kp: 2 %/kPa, ki: 5 %/(kPa*s), kd: 0.1 %*s/kPa', 'kp: 2 %/s, ki: 5 %/kPa, kd: 3 kPa');
    const r = readNetlist(src, 'rig.yaml');
    if (r.ok) throw new Error('accepted');
    const dims = r.diagnostics.filter((x) => x.code === 'unit-dimension');
    expect(dims.map((x) => x.path.join('.'))).toEqual(['controllers.hold.kp', 'controllers.hold.ki', 'controllers.hold.kd']);
    expect(dims.every((x) => x.line === 12)).toBe(true);
    expect(dims[0].message).toContain('opening per unit of the measure');
  });

  it('a controller driving a valve that has a schedule too', () => {
    const src = edit('critical-ratio: 0.4 }\n  reg', 'critical-ratio: 0.4, schedule: [{ at: 0.5 s, open: 50% }] }\n  reg');
    const d = find(src, 'driven-valve-operated');
    expect([d.line, d.path.join('.')]).toEqual([12, 'controllers.hold.drives']);
    expect(d.message).toContain('schedule');
    expect(d.message).toContain('line 7');
  });

  it('a controller driving a regulator, a line, or a valve another controller drives', () => {
    expect(find(edit('drives: fill', 'drives: reg'), 'driven-valve-operated').message).toContain('regulates');
    expect(find(edit('drives: fill', 'drives: cell'), 'wrong-reference').line).toBe(12);
    const two = BASE.replace('simulate:', '  again: { kind: pid, measure: cell.gauge, target: 1 bar gauge, kp: 1 %/kPa, drives: fill }\nsimulate:');
    expect(find(two, 'conflicting-keys').path.join('.')).toBe('controllers.again.drives');
  });

  it('limits, start output and target of the wrong kind', () => {
    expect(find(edit('drives: fill', 'drives: fill, limits: { min: 60%, max: 40% }'), 'out-of-range').path.join('.')).toBe('controllers.hold.limits.max');
    expect(find(edit('drives: fill', 'drives: fill, limits: { max: 40% }, initially: 50%'), 'out-of-range').path.join('.')).toBe('controllers.hold.initially');
    expect(find(edit('target: 2 bar gauge', 'target: 2 bar'), 'pressure-reference').line).toBe(12);
    expect(find(edit('target: 2 bar gauge', 'target: 2 L'), 'unit-dimension').line).toBe(12);
  });
});

describe('bad regulator and curve input', () => {
  it('a regulator without a band, with a zero band, or with a second way of opening', () => {
    expect(find(edit('band: 0.3 bar', 'band: 0 bar'), 'out-of-range').path.join('.')).toBe('valves.reg.regulates.band');
    expect(find(edit('band: 0.3 bar }', '}'), 'missing-key').path.join('.')).toBe('valves.reg.regulates.band');
    expect(find(edit('relieving: true', 'relieving: true, initially: open'), 'conflicting-keys').line).toBe(8);
    expect(find(edit('relieving: true', 'relieving: 3'), 'wrong-type').path.join('.')).toBe('valves.reg.relieving');
  });

  it('a curve that ends with flow and no shut-off, a shut-off without curve, rate and curve together', () => {
    expect(find(edit(', shut-off: 8 bar gauge', ''), 'curve-open-end').line).toBe(10);
    expect(find(edit('curve: [[0 bar gauge, 100 L/min ANR], [6 bar gauge, 60 L/min ANR]]', 'rate: 1 g/s'), 'shut-off-needs-curve').line).toBe(10);
    expect(find(edit('curve:', 'rate: 1 g/s, curve:'), 'conflicting-keys').line).toBe(10);
    expect(find(edit('[6 bar gauge, 60 L/min ANR]', '[0 bar gauge, 60 L/min ANR]'), 'table-order').line).toBe(10);
    expect(find(edit('shut-off: 8 bar gauge', 'shut-off: 5 bar gauge'), 'out-of-range').line).toBe(10);
    // ending at zero flow needs no shut-off
    const closed = read(edit('[6 bar gauge, 60 L/min ANR]], shut-off: 8 bar gauge', '[6 bar gauge, 0 L/min ANR]]'));
    expect(closed.feeds[0].curve!.shutOff).toBe(701325);
  });
});
