/**
 * Baselines and `plenum diff`: the comparison on synthetic traces (interpolation onto A's time
 * base, tolerances, structure), and through the bundled CLI an unchanged netlist passes while
 * a changed one is caught.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { diffTraces, readTrace, type TraceFile } from '../../src/index.js';

function plenum(...args: string[]): { code: number; out: string; err: string } {
  const r = spawnSync(process.execPath, ['bin/plenum', ...args], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr };
}

const tmp = mkdtempSync(join(tmpdir(), 'plenum-diff-'));

function trace(times: number[], f: (t: number) => number, g: (t: number) => number = (t) => 1e-3 * t): TraceFile {
  return {
    kind: 'csv', file: 'x.csv', channels: [{ key: 'tank.pressure', unit: 'Pa' }, { key: 'tank.volume', unit: 'm^3' }],
    times, values: [times.map(f), times.map(g)], summary: [],
  };
}

const grid = (n: number, dt: number): number[] => Array.from({ length: n + 1 }, (_, k) => k * dt);

describe('diffTraces', () => {
  const p = (t: number): number => 2e5 - 1e4 * t;

  it('identical traces pass with zero deviation', () => {
    const d = diffTraces(trace(grid(100, 0.01), p), trace(grid(100, 0.01), p));
    expect(d.passed).toBe(true);
    expect(d.deviations.every((x) => x.abs === 0)).toBe(true);
    expect(d.compared).toMatchObject({ channels: 2, points: 101 });
  });

  it('interpolates B onto A\'s time base (a linear signal on a finer grid matches exactly)', () => {
    const d = diffTraces(trace(grid(100, 0.01), p), trace(grid(300, 0.01 / 3), p));
    expect(d.passed).toBe(true);
    expect(d.deviations[0].ratio).toBeLessThan(1e-3);
  });

  it('catches an injected change, names the channel and time, and a per-channel tolerance admits it', () => {
    const times = grid(100, 0.01);
    const changed = (t: number): number => p(t) * (Math.abs(t - 0.37) < 1e-9 ? 1.001 : 1);
    const d = diffTraces(trace(times, p), trace(times, changed));
    expect(d.passed).toBe(false);
    expect(d.deviations[0]).toMatchObject({ key: 'tank.pressure', passed: false });
    expect(d.deviations[0].t).toBeCloseTo(0.37, 12);
    expect(d.deviations[0].abs).toBeCloseTo(p(0.37) * 0.001, 6);
    expect(d.deviations.find((x) => x.key === 'tank.volume')!.passed).toBe(true);
    expect(diffTraces(trace(times, p), trace(times, changed), { byKey: { 'tank.pressure': { rtol: 2e-3 } } }).passed).toBe(true);
    expect(diffTraces(trace(times, p), trace(times, changed), { byQuantity: { pressure: { atol: 500 } } }).passed).toBe(true);
    expect(diffTraces(trace(times, p), trace(times, changed), { byQuantity: { volume: { atol: 500 } } }).passed).toBe(false);
  });

  it('a deviation just inside |a − b| ≤ atol + rtol·max(|a|, |b|) passes and just outside fails', () => {
    const times = grid(10, 0.1);
    const allowed = 0.1 + 1e-6 * 2e5; // default pressure atol 0.1 Pa, default rtol 1e-6
    const at = (shift: number): boolean => diffTraces(trace(times, () => 2e5), trace(times, () => 2e5 + shift)).passed;
    expect(at(0.99 * allowed)).toBe(true);
    expect(at(1.01 * allowed)).toBe(false);
  });

  it('a channel in one trace only, or different end times, make the runs differ', () => {
    const a = trace(grid(100, 0.01), p);
    const b = trace(grid(100, 0.01), p);
    b.channels = [...b.channels, { key: 'extra.flow', unit: 'kg/s' }];
    b.values = [...b.values, b.times.map(() => 0)];
    const d = diffTraces(a, b);
    expect(d.passed).toBe(false);
    expect(d.problems.join()).toContain('only in B: extra.flow');
    const short = diffTraces(a, trace(grid(50, 0.01), p));
    expect(short.passed).toBe(false);
    expect(short.problems.join()).toContain('end at different times');
  });
});

describe('baselines and plenum diff through the CLI', () => {
  const net = 'networks/cushion-settle.yaml';

  it('run --baseline is byte-stable; diff of two runs of one netlist exits 0, of a changed netlist exits 1', () => {
    const a = join(tmp, 'a.json');
    const a2 = join(tmp, 'a2.json');
    expect(plenum('run', net, '-q', '--baseline', a).code).toBe(0);
    expect(plenum('run', net, '-q', '--baseline', a2, '--csv', join(tmp, 'a2.csv')).code).toBe(0);
    expect(readFileSync(a2, 'utf8')).toBe(readFileSync(a, 'utf8'));
    const base = JSON.parse(readFileSync(a, 'utf8'));
    expect(base).toMatchObject({ plenum: 'baseline', version: 1, netlist: net, status: 'completed', digits: 9 });
    expect(base.channels['cell_a.gauge'].unit).toBe('Pa');
    expect(base.channels['cell_a.gauge'].values).toHaveLength(base.time.length);
    expect(typeof base.summary['chambers.cell_a.final.gauge']).toBe('number');
    expect(base.summary['lines.crossover.regime']).toMatch(/laminar|transitional|turbulent/);

    const same = plenum('diff', a, a2);
    expect(same.code, same.out + same.err).toBe(0);
    expect(same.out).toContain('diff: within tolerance');
    // a baseline against the CSV of the same run (12 digits against 9)
    expect(plenum('diff', a, join(tmp, 'a2.csv')).code).toBe(0);

    // inject a change: a slightly smaller orifice in the crossover valve
    const src = readFileSync(net, 'utf8');
    expect(src).toContain('orifice: 2.5 mm');
    const changed = join(tmp, 'changed.yaml');
    writeFileSync(changed, src.replace('orifice: 2.5 mm', 'orifice: 2.4 mm'));
    const b = join(tmp, 'b.json');
    expect(plenum('run', changed, '-q', '--baseline', b).code).toBe(0);
    const d = plenum('diff', a, b);
    expect(d.code, d.out + d.err).toBe(1);
    expect(d.out).toMatch(/largest deviations/);
    expect(d.out).toMatch(/^ {2}cell_[ab]\.\w+ .*OUTSIDE$/m);
    expect(d.out).toMatch(/diff: outside tolerance: \d+ of \d+ values/);
    const listed = d.out.split('\n').filter((l) => /(ok|OUTSIDE)$/.test(l));
    expect(listed.length).toBeLessThanOrEqual(10);
    expect(plenum('diff', a, b, '--top', '3').out.split('\n').filter((l) => /(ok|OUTSIDE)$/.test(l))).toHaveLength(3);
    // loose enough tolerances accept the change
    expect(plenum('diff', a, b, '--rtol', '0.5', '--atol', '1').code).toBe(0);
  });

  it('--tol takes a quantity or a channel with a unit or a percentage; bad input exits 2', () => {
    const a = join(tmp, 'a.json');
    if (plenum('run', net, '-q', '--baseline', a).code !== 0) throw new Error('run failed');
    expect(plenum('diff', a, a, '--tol', 'pressure=50 Pa', '--tol', 'cell_a.gauge=0.1%').code).toBe(0);
    expect(plenum('diff', a, a, '--tol', 'presure=50 Pa').code).toBe(2);
    expect(plenum('diff', a, a, '--tol', 'pressure=50 mm').code).toBe(2);
    expect(plenum('diff', a, a, '--rtol', '-1').code).toBe(2);
    expect(plenum('diff', a, join(tmp, 'nope.json')).code).toBe(2);
    const junk = join(tmp, 'junk.txt');
    writeFileSync(junk, 'hello,world\n1,2\n');
    const r = plenum('diff', a, junk);
    expect(r.code).toBe(2);
    expect(r.err).toContain('time [s]');
  });

  it('readTrace reads a CSV trace and rejects a malformed one', () => {
    const ok = readTrace('time [s],a.pressure [Pa]\n0,1\n0.5,2\n', 'x.csv');
    expect(ok.ok && ok.value.values[0]).toEqual([1, 2]);
    expect(readTrace('time [s],a.pressure [Pa]\n0,1\n0.5\n', 'x.csv').ok).toBe(false);
    expect(readTrace('time [s],a.pressure [Pa]\n1,1\n0.5,2\n', 'x.csv').ok).toBe(false);
    expect(readTrace('{"plenum":"baseline","version":99}', 'x.json').ok).toBe(false);
  });
});
