/** The CLI as a user runs it: exit codes, outputs written whole or not at all, no stack traces. */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

function plenum(...args: string[]): { code: number; out: string; err: string } {
  const r = spawnSync(process.execPath, ['bin/plenum', ...args], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr };
}

const tmp = mkdtempSync(join(tmpdir(), 'plenum-cli-'));

describe('plenum CLI', () => {
  it('--help lists the commands and exits 0', () => {
    const r = plenum('--help');
    expect(r.code).toBe(0);
    for (const c of ['run', 'schema', 'kinds']) expect(r.out).toContain(c);
  });

  it('run prints a summary and writes CSV and JSON per the contract', () => {
    const csv = join(tmp, 'out.csv');
    const json = join(tmp, 'out.json');
    const r = plenum('run', 'networks/cushion-settle.yaml', '--csv', csv, '--json', json);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toContain('cell_a');
    const j = JSON.parse(readFileSync(json, 'utf8'));
    expect(j.format).toBe(1);
    expect(j.status).toBe('completed');
    for (const k of ['message', 'end', 'stats', 'chambers', 'lines', 'valves', 'mass', 'events', 'warnings', 'expectations']) expect(j).toHaveProperty(k);
    for (const k of ['method', 'steps', 'rejected', 'rhs', 'jacobians', 'wall_ms']) expect(j.stats).toHaveProperty(k);
    for (const k of ['pressure', 'gauge', 'volume', 'mass', 'temperature', 'stretch']) expect(j.chambers.cell_a.final).toHaveProperty(k);
    expect(j.chambers.cell_a.peak).toHaveProperty('at');
    expect(j.chambers.cell_a.least).toHaveProperty('gauge');
    expect(j.lines.crossover).toHaveProperty('regime');
    expect(j.valves.crossover_valve).toHaveProperty('choked');
    for (const k of ['initial', 'final', 'through_boundaries', 'drift']) expect(j.mass).toHaveProperty(k);
    const head = readFileSync(csv, 'utf8').split('\n')[0].split(',');
    expect(head[0]).toBe('time [s]');
    expect(head).toContain('cell_a.gauge [Pa]');
    expect(head).toContain('crossover.flow [kg/s]');
  });

  it('--json - writes JSON to stdout and the summary to stderr', () => {
    const r = plenum('run', 'networks/cushion-settle.yaml', '--json', '-');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out).status).toBe('completed');
    expect(r.err).toContain('cell_a');
  });

  it('a typo gives exit 2, file:line:column, a did-you-mean hint, no stack trace, and writes nothing', () => {
    const bad = join(tmp, 'typo.yaml');
    writeFileSync(bad, readFileSync('networks/cushion-settle.yaml', 'utf8').replace('    thickness: 1.5 mm\n    shear', '    thicknes: 1.5 mm\n    shear'));
    const out = join(tmp, 'typo.json');
    const r = plenum('run', bad, '--json', out);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/typo\.yaml:\d+:\d+/);
    expect(r.err).toContain('thickness');
    expect(r.err).not.toMatch(/\n\s+at .*\(.*:\d+:\d+\)/);
    expect(existsSync(out)).toBe(false);
  });

  it('a wave line with zero segments and a relief valve whose full lift is below its set pressure: exit 2 with file:line:column, nothing written', () => {
    const cases: [string, string, RegExp][] = [
      ['zero-segments.yaml', 'lines:\n  hose: { from: tank, to: ambient, diameter: 4 mm, length: 10 m, model: wave, segments: 0 }\n', /zero-segments\.yaml:9:89: error \[out-of-range\] `segments`/],
      ['low-lift.yaml', 'valves:\n  relief:\n    from: tank\n    to: ambient\n    orifice: 2 mm\n    discharge-coefficient: 0.6\n    relief: { opens-above: 5 barg, full-lift-at: 4.5 barg }\n', /low-lift\.yaml:14:50: error \[out-of-range\] `full-lift-at` must be higher than `opens-above`/],
    ];
    for (const [name, tail, where] of cases) {
      const file = join(tmp, name);
      writeFileSync(file, `format: 1
chambers:
  tank:
    wall: rigid
    volume: 1 L
    start: { pressure: 6 barg }
simulate: { duration: 1 s }
${tail}`);
      const out = join(tmp, `${name}.json`);
      const r = plenum('run', file, '--json', out);
      expect(r.code, r.err).toBe(2);
      expect(r.err).toMatch(where);
      expect(r.err).not.toMatch(/\n\s+at .*\(.*:\d+:\d+\)/);
      expect(existsSync(out)).toBe(false);
    }
  });

  it('a missing file and an unknown option exit 2', () => {
    expect(plenum('run', join(tmp, 'nope.yaml')).code).toBe(2);
    expect(plenum('run', 'networks/cushion-settle.yaml', '--bogus').code).toBe(2);
  });

  it('a failing expectation exits 1', () => {
    const f = join(tmp, 'fail.yaml');
    writeFileSync(f, readFileSync('networks/cushion-settle.yaml', 'utf8').replace('near: { value: 15.5 kPa gauge', 'near: { value: 5 kPa gauge'));
    expect(plenum('run', f).code).toBe(1);
  });

  it('a step budget that runs out exits 3 and still writes the results so far', () => {
    const f = join(tmp, 'budget.yaml');
    writeFileSync(f, readFileSync('networks/cushion-runaway.yaml', 'utf8').replace('tolerance: 1e-7 }', 'tolerance: 1e-7, max-steps: 30 }'));
    const json = join(tmp, 'budget.json');
    const csv = join(tmp, 'budget.csv');
    const r = plenum('run', f, '--json', json, '--csv', csv);
    expect(r.code).toBe(3);
    const j = JSON.parse(readFileSync(json, 'utf8'));
    expect(j.status).toBe('failed');
    expect(j.end).toBeGreaterThan(0);
    expect(j.end).toBeLessThan(6);
    expect(readFileSync(csv, 'utf8').split('\n').length).toBeGreaterThan(2);
  });

  it('schema prints a JSON Schema', () => {
    const r = plenum('schema');
    expect(r.code).toBe(0);
    const s = JSON.parse(r.out);
    expect(s.$schema).toContain('draft-07');
  });

  it('kinds lists the wall laws with their parameters', () => {
    const r = plenum('kinds');
    expect(r.code).toBe(0);
    for (const k of ['neo-hookean', 'mooney-rivlin', 'gent', 'measured', 'shear-modulus', 'critical-ratio']) expect(r.out).toContain(k);
  });
});
