/** `plenum report` and `plenum run --plots` as a user runs them: files written whole, or nothing. */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseXml } from './xml.js';

function plenum(...args: string[]): { code: number; out: string; err: string } {
  const r = spawnSync(process.execPath, ['bin/plenum', ...args], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr };
}

const tmp = mkdtempSync(join(tmpdir(), 'plenum-report-'));

describe('plenum report', () => {
  it('writes one HTML file and, with --plots, one SVG a figure', () => {
    const out = join(tmp, 'settle.html');
    const dir = join(tmp, 'settle-plots');
    const r = plenum('report', 'networks/cushion-settle.yaml', '--out', out, '--plots', dir);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toContain(`report written to ${out}`);
    const html = readFileSync(out, 'utf8');
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html).toContain('Cushion cells straddling the pressure maximum');
    expect(html).toMatch(/<footer>Report written by plenum \d+\.\d+\.\d+\./);
    expect(readdirSync(dir).sort()).toEqual(['flow.svg', 'network.svg', 'pressure-stretch.svg', 'pressure.svg', 'stretch.svg']);
    for (const f of readdirSync(dir)) expect(() => parseXml(readFileSync(join(dir, f), 'utf8')), f).not.toThrow();
    expect(readdirSync(tmp).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });

  it('exits 2 and writes nothing for an invalid netlist', () => {
    const bad = join(tmp, 'typo.yaml');
    writeFileSync(bad, readFileSync('networks/cushion-settle.yaml', 'utf8').replace('    thickness: 1.5 mm\n    shear', '    thicknes: 1.5 mm\n    shear'));
    const out = join(tmp, 'typo.html');
    const dir = join(tmp, 'typo-plots');
    const r = plenum('report', bad, '--out', out, '--plots', dir);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/typo\.yaml:\d+:\d+/);
    expect(existsSync(out)).toBe(false);
    expect(existsSync(dir)).toBe(false);
  });

  it('exits 2 without --out, with --out on the netlist, or with --plots on a file', () => {
    expect(plenum('report', 'networks/cushion-settle.yaml').code).toBe(2);
    const copy = join(tmp, 'copy.yaml');
    writeFileSync(copy, readFileSync('networks/cushion-settle.yaml', 'utf8'));
    const same = plenum('report', copy, '--out', copy);
    expect(same.code).toBe(2);
    expect(readFileSync(copy, 'utf8')).toBe(readFileSync('networks/cushion-settle.yaml', 'utf8'));
    const file = join(tmp, 'not-a-dir');
    writeFileSync(file, 'x');
    const r = plenum('report', 'networks/cushion-settle.yaml', '--out', join(tmp, 'x.html'), '--plots', file);
    expect(r.code).toBe(2);
    expect(r.err).toContain('not a directory');
    expect(existsSync(join(tmp, 'x.html'))).toBe(false);
  });

  it('still writes the report of a run that stops early, and exits 3', () => {
    const src = readFileSync('networks/cushion-settle.yaml', 'utf8').replace('tolerance: 1e-7 }', 'tolerance: 1e-7, max-steps: 3 }');
    const nl = join(tmp, 'budget.yaml');
    writeFileSync(nl, src);
    const out = join(tmp, 'budget.html');
    const r = plenum('report', nl, '--out', out, '-q');
    expect(r.code).toBe(3);
    expect(readFileSync(out, 'utf8')).toContain('run failed');
  });
});

describe('plenum run --plots', () => {
  it('writes the figures as standalone SVG files', () => {
    const dir = join(tmp, 'run-plots');
    const r = plenum('run', 'networks/gripper-charge.yaml', '--plots', dir, '-q');
    expect(r.code, r.err).toBe(0);
    expect(readdirSync(dir).sort()).toEqual(['flow.svg', 'network.svg', 'pressure-stretch.svg', 'pressure.svg', 'stretch.svg', 'temperature.svg']);
    const svg = readFileSync(join(dir, 'temperature.svg'), 'utf8');
    expect(svg.startsWith('<?xml version="1.0" encoding="UTF-8"?>')).toBe(true);
    expect(svg).toContain('data-ylabel="temperature [°C]"');
  });
});
