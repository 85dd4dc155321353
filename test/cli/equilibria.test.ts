/** `plenum equilibria` and `plenum trace` as a user runs them, and the run's outcome in its outputs. */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { chainNetlist } from '../../bench/networks.js';

function plenum(...args: string[]): { code: number; out: string; err: string } {
  const r = spawnSync(process.execPath, ['bin/plenum', ...args], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr };
}

const tmp = mkdtempSync(join(tmpdir(), 'plenum-eq-'));

/** A generated chain of n chambers (as in the benchmark) written to a file. */
function chainFile(n: number): string {
  const file = join(tmp, `chain-${n}.yaml`);
  writeFileSync(file, chainNetlist(n));
  return file;
}

describe('plenum equilibria', () => {
  it('--help lists equilibria and trace', () => {
    const r = plenum('--help');
    expect(r.out).toContain('equilibria');
    expect(r.out).toContain('trace');
  });

  it('--json - writes the equilibria in SI with stability, growth rate and eigenvalues; the table goes to stderr', () => {
    const r = plenum('equilibria', 'networks/cushion-runaway.yaml', '--json', '-');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.equilibria).toHaveLength(3);
    for (const e of j.equilibria) {
      for (const n of ['cell_a', 'cell_b']) for (const k of ['gauge', 'volume', 'stretch', 'mass']) expect(typeof e.chambers[n][k]).toBe('number');
      expect(typeof e.stable).toBe('boolean');
      expect(typeof e.growth_rate).toBe('number');
      expect(Array.isArray(e.eigenvalues)).toBe(true);
      expect(e.eigenvalues).toHaveLength(1); // two masses less the conserved gas
    }
    expect(j.equilibria.filter((e: { stable: boolean }) => !e.stable)).toHaveLength(1);
    expect(j.transient.reached).toBe(0);
    expect(r.err).toContain('stability');
    expect(r.err).toContain('the equilibrium the transient reaches');
  });

  it('prints a network of many chambers with a chamber a row, and names its group by first and last', () => {
    const file = chainFile(20);
    const r = plenum('equilibria', file, '--no-transient');
    expect(r.code, r.err).toBe(0);
    expect(r.out).toContain('group c0, c1, c2 … c19 (20 chambers)');
    const lines = r.out.split('\n');
    expect(Math.max(...lines.map((l) => l.length))).toBeLessThan(120);
    for (let i = 0; i < 20; i++) expect(lines.some((l) => new RegExp(`^\\s*c${i}\\s+0 kPa`).test(l)), `c${i}`).toBe(true);
  });

  it('refuses at once a group larger than it can analyse in minutes, with exit 2 and the reason', () => {
    const file = chainFile(2001);
    const r = plenum('equilibria', file, '--no-transient');
    expect(r.code).toBe(2);
    expect(r.err).toContain('2001 chambers are joined in one group');
    expect(r.err).toContain('up to 2000 chambers');
    expect(r.err).not.toContain('    at '); // no stack trace
  });

  it('trace refuses at once a group of more than 500 chambers, with exit 2 and the reason', () => {
    const file = chainFile(501);
    const r = plenum('trace', file, '--vary', 'lines.l5.diameter', '--from', '1 mm', '--to', '3 mm');
    expect(r.code).toBe(2);
    expect(r.err).toContain('501 chambers are joined in one group');
    expect(r.err).toContain('plenum trace takes groups of up to 500 chambers');
  });

  it('writes a JSON file whole, and refuses a bad --valves with exit 2', () => {
    const out = join(tmp, 'eq.json');
    const ok = plenum('equilibria', 'networks/cushion-settle.yaml', '--no-transient', '--json', out, '-q');
    expect(ok.code, ok.err).toBe(0);
    expect(ok.out).toBe('');
    expect(JSON.parse(readFileSync(out, 'utf8')).transient).toBeNull();
    const bad = plenum('equilibria', 'networks/cushion-settle.yaml', '--valves', 'sideways');
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--valves must be one of open, closed, end/);
    expect(bad.err).not.toMatch(/\n\s+at /);
  });
});

describe('plenum trace', () => {
  it('writes branches as CSV and JSON, with the special points', () => {
    const csv = join(tmp, 'br.csv');
    const json = join(tmp, 'br.json');
    const r = plenum('trace', 'networks/cushion-runaway.yaml', '--vary', 'mass:cell_a', '--from', '1 g', '--to', '4 g', '--csv', csv, '--json', json);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/branch-point at 1\.984\d* g/);
    const head = readFileSync(csv, 'utf8').split('\n')[0].split(',');
    expect(head.slice(0, 6)).toEqual(['branch', 'point', 'mass:cell_a [g]', 'special', 'stable', 'growth_rate [1/s]']);
    expect(head).toContain('cell_b.stretch [-]');
    const j = JSON.parse(readFileSync(json, 'utf8'));
    expect(j.parameter).toEqual({ vary: 'mass:cell_a', from: 1, to: 4, unit: 'g' });
    expect(j.branches).toHaveLength(2);
  });

  it('a misspelt path exits 2 with a hint and writes nothing', () => {
    const out = join(tmp, 'none.csv');
    const r = plenum('trace', 'networks/cushion-runaway.yaml', '--vary', 'chambers.cell_a.thicknes', '--from', '1 mm', '--to', '2 mm', '--csv', out);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/thickness/);
    expect(existsSync(out)).toBe(false);
  });
});

describe('plenum run reports how each group ends', () => {
  it('the JSON has outcomes and the summary an outcome line', () => {
    const r = plenum('run', 'networks/cushion-settle.yaml', '--json', '-');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.outcomes).toHaveLength(1);
    expect(j.outcomes[0]).toMatchObject({ chambers: ['cell_a', 'cell_b'], closed: true, outcome: 'settled' });
    expect(r.err).toMatch(/outcome: cell_a, cell_b \(closed\): settled within 2 % by/);
  });
});
