/** `plenum sweep`, `plenum merge` and `plenum fit` as a user runs them (the bundled CLI). */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

function plenum(...args: string[]): { code: number; out: string; err: string } {
  const r = spawnSync(process.execPath, ['bin/plenum', ...args], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr };
}

const tmp = mkdtempSync(join(tmpdir(), 'plenum-study-'));
const NETLIST = join(tmp, 'quick.yaml');
writeFileSync(NETLIST, `format: 1
title: quick charge
chambers:
  supply: { wall: rigid, volume: 0.2 L, start: { pressure: 60 kPa gauge } }
  bladder:
    wall: neo-hookean
    radius: 15 mm
    thickness: 1 mm
    shear-modulus: 0.4 MPa
    start: { pressure: 0 kPa gauge }
lines:
  tube: { from: supply, to: bladder, diameter: 2 mm, length: 0.5 m }
simulate: { duration: 0.4 s, sample: 10 ms, tolerance: 1e-7 }
`);
const VARY = ['--vary', 'lines.tube.diameter=1.5 mm,2.5 mm', '--vary', 'chambers.bladder.thickness=1 mm±5%', '--samples', '3', '--seed', '77'];

describe('plenum sweep and plenum merge', () => {
  it('--help lists the study commands', () => {
    const r = plenum('--help');
    for (const c of ['sweep', 'merge', 'fit']) expect(r.out).toContain(c);
  });

  it('shards merged give byte for byte the JSON and CSV of a single run', () => {
    const whole = plenum('sweep', NETLIST, ...VARY, '--jobs', '2', '--json', join(tmp, 'whole.json'), '--csv', join(tmp, 'whole.csv'));
    expect(whole.code, whole.err).toBe(0);
    expect(whole.out).toContain('largest');
    const shards: string[] = [];
    for (let k = 1; k <= 4; k++) {
      const f = join(tmp, `shard-${k}.json`);
      const r = plenum('sweep', NETLIST, ...VARY, '--jobs', '1', '--shard', `${k}/4`, '--json', f, '-q');
      expect(r.code, r.err).toBe(0);
      shards.push(f);
    }
    expect(JSON.parse(readFileSync(shards[2], 'utf8')).cases.map((c: { index: number }) => c.index)).toEqual([2]);
    // merge in a shuffled order: the result does not depend on it
    const m = plenum('merge', shards[3], shards[1], shards[0], shards[2], '--json', join(tmp, 'merged.json'), '--csv', join(tmp, 'merged.csv'));
    expect(m.code, m.err).toBe(0);
    expect(readFileSync(join(tmp, 'merged.json'), 'utf8')).toBe(readFileSync(join(tmp, 'whole.json'), 'utf8'));
    expect(readFileSync(join(tmp, 'merged.csv'), 'utf8')).toBe(readFileSync(join(tmp, 'whole.csv'), 'utf8'));
    const j = JSON.parse(readFileSync(join(tmp, 'whole.json'), 'utf8'));
    expect(j.cases.length).toBe(6);
    expect(j.study.seed).toBe(77);
    expect(j.shard).toBeUndefined();
    const csv = readFileSync(join(tmp, 'whole.csv'), 'utf8').trim().split('\n');
    expect(csv.length).toBe(7);
    expect(csv[0]).toMatch(/^case,lines\.tube\.diameter \[m\],chambers\.bladder\.thickness \[m\],status,largest,/);
  });

  it('merge refuses a missing shard, a shard given twice, and shards of another study, writing nothing', () => {
    const out = join(tmp, 'bad-merge.json');
    const missing = plenum('merge', join(tmp, 'shard-1.json'), join(tmp, 'shard-2.json'), join(tmp, 'shard-3.json'), '--json', out);
    expect(missing.code).toBe(2);
    expect(missing.err).toContain('shard 4/4 missing');
    const twice = plenum('merge', join(tmp, 'shard-1.json'), join(tmp, 'shard-1.json'), '--json', out);
    expect(twice.code).toBe(2);
    const other = join(tmp, 'other-1.json');
    expect(plenum('sweep', NETLIST, ...VARY.slice(0, -1), '78', '--shard', '1/4', '--json', other, '-q').code).toBe(0);
    const mixed = plenum('merge', other, join(tmp, 'shard-2.json'), join(tmp, 'shard-3.json'), join(tmp, 'shard-4.json'), '--json', out);
    expect(mixed.code).toBe(2);
    expect(mixed.err).toMatch(/not to study/);
    expect(existsSync(out)).toBe(false);
  });

  it('a misspelt path exits 2 with a did-you-mean and writes nothing', () => {
    const out = join(tmp, 'typo.json');
    const r = plenum('sweep', NETLIST, '--vary', 'lines.tube.diamter=1 mm,2 mm', '--json', out);
    expect(r.code).toBe(2);
    expect(r.err).toContain('did you mean `diameter`?');
    expect(r.err).not.toMatch(/\n\s+at .*\(.*:\d+:\d+\)/);
    expect(existsSync(out)).toBe(false);
  });

  it('bad options exit 2: a shard that does not exist, samples without anything random, a bad number', () => {
    expect(plenum('sweep', NETLIST, '--vary', 'lines.tube.diameter=1 mm,2 mm', '--shard', '5/4').code).toBe(2);
    expect(plenum('sweep', NETLIST, '--vary', 'lines.tube.diameter=1 mm,2 mm', '--samples', '3').code).toBe(2);
    expect(plenum('sweep', NETLIST, '--vary', 'lines.tube.diameter=1 mm,2 mm', '--jobs', 'many').code).toBe(2);
    expect(plenum('sweep', NETLIST).code).toBe(2);
  });
});

describe('plenum fit', () => {
  it('fits the example bench data and writes JSON with the netlist parameter names', () => {
    const json = join(tmp, 'fit.json');
    const csv = join(tmp, 'residuals.csv');
    const r = plenum('fit', 'networks/data/latex-cell-bench-synthetic.csv', '--wall', 'gent', '--radius', '40mm', '--thickness', '1.5 mm', '--json', json, '--csv', csv);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toContain('shear-modulus:');
    expect(r.out).toContain('deflation');
    const j = JSON.parse(readFileSync(json, 'utf8'));
    expect(j.wall).toBe('gent');
    expect(Math.abs(j.parameters['shear-modulus'] / 0.42e6 - 1)).toBeLessThan(0.01);
    expect(Math.abs(j.parameters.limit / 35 - 1)).toBeLessThan(0.01);
    expect(readFileSync(csv, 'utf8').split('\n')[0]).toBe('line,curve,stretch [-],gauge [Pa],fitted [Pa],residual [Pa]');
  });

  it('a bad row exits 2 with file:line:column; an unknown law exits 2 with a did-you-mean', () => {
    const bad = join(tmp, 'bad.csv');
    writeFileSync(bad, 'volume [mL],gauge [kPa]\n300,1\n400,x\n');
    const r = plenum('fit', bad, '--wall', 'gent', '--radius', '40mm', '--thickness', '1.5mm');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/bad\.csv:3:5/);
    const law = plenum('fit', bad, '--wall', 'neohookean', '--radius', '40mm', '--thickness', '1.5mm');
    expect(law.code).toBe(2);
    expect(law.err).toContain('neo-hookean');
  });
});
