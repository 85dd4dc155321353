/**
 * `plenum run --csv FILE` streams the trace to disk as the samples are taken (docs/robustness.md,
 * "Limits"): the history is never held as one text (a 3 000-chamber run sampled every 10 ms
 * used 1.33 GB, most of it the CSV text; a text over 512 MB cannot be made at all). The bytes
 * are those of the whole-text writer; a failed write leaves nothing behind.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { CsvFile } from '../../src/cli/csv-file.js';
import { simulate, traceCsv } from '../../src/index.js';
import { modelFromText } from '../helpers.js';

const ROOT = process.cwd();
const NETLIST = readFileSync(join(ROOT, 'networks/cushion-settle.yaml'), 'utf8');

function plenum(cwd: string, ...args: string[]): { code: number | null; out: string; err: string } {
  const r = spawnSync(process.execPath, [join(ROOT, 'bin/plenum'), ...args], { cwd, encoding: 'utf8', timeout: 120_000, env: { ...process.env, CI: '1' } });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

describe('the CSV written as the samples are taken', () => {
  it('reaches the disk during the run, with the bytes of the whole-text writer', () => {
    const dir = mkdtempSync(join(tmpdir(), 'plenum-csv-'));
    const path = join(dir, 'trace.csv');
    const model = modelFromText(NETLIST.replace(/sample: 5 ms/, 'sample: 0.4 ms'), 'cushion.yaml');
    const csv = new CsvFile(path);
    let rows = 0;
    let onDiskDuringRun = 0;
    const r = simulate(model, {
      samples: {
        begin: (channels) => csv.begin(channels),
        sample: (t, row) => { csv.sample(t, row); if (++rows === 15_000) onDiskDuringRun = statSync(path).size; },
      },
    });
    expect(csv.close()).toBeUndefined();
    expect(rows).toBe(20_001);
    expect(onDiskDuringRun).toBeGreaterThan(1_000_000);
    expect(readFileSync(path, 'utf8')).toBe(traceCsv(r.trace));
  });

  it('the CLI writes the same CSV to a file as to standard output', () => {
    const dir = mkdtempSync(join(tmpdir(), 'plenum-csv-'));
    writeFileSync(join(dir, 'rig.yaml'), NETLIST);
    const file = plenum(dir, 'run', 'rig.yaml', '-q', '--csv', 'out.csv', '--json', 'out.json');
    const piped = plenum(dir, 'run', 'rig.yaml', '-q', '--csv', '-');
    expect(file.code).toBe(0);
    expect(readFileSync(join(dir, 'out.csv'), 'utf8')).toBe(piped.out);
    expect(readdirSync(dir).sort()).toEqual(['out.csv', 'out.json', 'rig.yaml']);
  });

  it('an invalid netlist leaves no partial CSV behind', () => {
    const dir = mkdtempSync(join(tmpdir(), 'plenum-csv-'));
    writeFileSync(join(dir, 'rig.yaml'), NETLIST.replace('duration: 8 s', 'duration: -1 s'));
    const r = plenum(dir, 'run', 'rig.yaml', '-q', '--csv', 'out.csv');
    expect(r.code).toBe(2);
    expect(existsSync(join(dir, 'out.csv'))).toBe(false);
    expect(readdirSync(dir)).toEqual(['rig.yaml']);
  });
});
