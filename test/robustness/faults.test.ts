/**
 * Numerical faults and budgets: each netlist in test/corpus/faults/ stops early. The run must
 * end with status `failed` and a fault naming the element, the time and a likely cause
 * (test/corpus/faults/expected.json); through the CLI it exits 3 and still writes the results
 * up to that time, whole: JSON that parses, CSV whose rows are complete and in time order.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { simulate } from '../../src/transient/transient.js';
import { modelFromFile } from '../helpers.js';

interface Expected { cause: string; kind: string | null; element: string | null; says: string }

const DIR = 'test/corpus/faults';
const expected = JSON.parse(readFileSync(join(DIR, 'expected.json'), 'utf8')) as Record<string, Expected>;
const files = Object.keys(expected).sort();
const tmp = mkdtempSync(join(tmpdir(), 'plenum-faults-'));

describe('fault netlists', () => {
  it('every fault netlist has an expectation', () => {
    expect(readdirSync(DIR).filter((f) => f.endsWith('.yaml')).sort()).toEqual(files);
  });

  it.each(files)('%s: status failed, a fault naming the element, the time and a likely cause', (f) => {
    const e = expected[f];
    const model = modelFromFile(join(DIR, f));
    const r = simulate(model);
    expect(r.status).toBe('failed');
    expect(r.end).toBeGreaterThan(0);
    expect(r.end).toBeLessThan(model.simulate.duration);
    expect(r.fault).toMatchObject({ cause: e.cause, kind: e.kind, element: e.element, t: r.end });
    expect(r.message).toContain(e.says);
    if (e.element) expect(r.message).toContain(`\`${e.element}\``);
    expect(r.message).toMatch(/at t = \d/);
    // the mass balance still holds for what was computed
    expect(Math.abs(r.mass.drift)).toBeLessThan(1e-9);
  });

  it.each(files)('%s through the CLI: exit 3, the results so far written whole', (f) => {
    const json = join(tmp, `${f}.json`);
    const csv = join(tmp, `${f}.csv`);
    const r = spawnSync(process.execPath, ['bin/plenum', 'run', join(DIR, f), '--json', json, '--csv', csv, '-q'], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
    expect(r.status, r.stderr).toBe(3);
    expect(r.stderr).not.toMatch(/^\s+at .*:\d+:\d+\)?$/m);
    const j = JSON.parse(readFileSync(json, 'utf8'));
    expect(j.status).toBe('failed');
    expect(j.fault).toMatchObject({ cause: expected[f].cause, element: expected[f].element });
    expect(j.message).toContain(expected[f].says);
    const rows = readFileSync(csv, 'utf8').trimEnd().split('\n');
    const width = rows[0].split(',').length;
    expect(rows[0].startsWith('time [s],')).toBe(true);
    expect(rows.length).toBeGreaterThan(1);
    const times = rows.slice(1).map((row) => {
      const cells = row.split(',');
      expect(cells).toHaveLength(width);
      return Number(cells[0]);
    });
    expect(times[0]).toBe(0);
    for (let k = 1; k < times.length; k++) expect(times[k]).toBeGreaterThan(times[k - 1]);
    expect(times[times.length - 1]).toBeLessThanOrEqual(j.end);
    // the summary on stderr says why, even with -q
    expect(r.stderr).toContain('stopped');
  });
});
