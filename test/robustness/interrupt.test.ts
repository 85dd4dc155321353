/**
 * Ctrl-C during `plenum run`: the run stops, writes what it has computed so far (whole), and
 * exits 3. The simulation runs on a worker thread so that the main thread can take the signal
 * (src/cli/run-thread.ts); this test sends a real SIGINT to the bundled CLI.
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

/** Long enough never to finish on its own; the wall budget only guards against a hang. */
const LONG_RUN = `format: 1
title: pulsed cushion, long run
chambers:
  cell: { wall: neo-hookean, radius: 20 mm, thickness: 1 mm, shear-modulus: 0.4 MPa, start: { stretch: 1.3 } }
  tank: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }
reservoirs:
  pulse: { pressure: "100 kPa + 50 kPa * sin(2*pi*t/(10 ms)) gauge" }
lines:
  l1: { from: pulse, to: cell, diameter: 2 mm, length: 1 m }
  l2: { from: cell, to: tank, diameter: 2 mm, length: 1 m }
simulate: { duration: 5000 s, sample: 10 ms, max-wall: 120 s }
`;

const sleep = (ms: number): Promise<void> => new Promise((resolve) => setTimeout(resolve, ms));

describe('Ctrl-C', () => {
  it('stops the run, writes the results so far whole, and exits 3', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'plenum-sigint-'));
    const netlist = join(dir, 'long.yaml');
    writeFileSync(netlist, LONG_RUN);
    const json = join(dir, 'out.json');
    const csv = join(dir, 'out.csv');
    // The CLI takes Ctrl-C from the moment its run command starts (before it reads the
    // netlist). A signal that arrives earlier, while Node is still starting, ends the process
    // by the signal: then try again with a longer head start.
    let code: number | null = null;
    let err = '';
    for (const headStart of [1500, 4000, 10000]) {
      const child = spawn(process.execPath, ['bin/plenum', 'run', netlist, '--json', json, '--csv', csv, '-q'], { env: { ...process.env, CI: '1' } });
      err = '';
      child.stderr.on('data', (d: Buffer) => { err += d.toString(); });
      const exited = new Promise<[number | null, string | null]>((resolve) => child.on('close', (c, signal) => resolve([c, signal])));
      await sleep(headStart);
      child.kill('SIGINT');
      const [c, signal] = await exited;
      code = c;
      if (signal === null) break;
    }

    expect(code, err).toBe(3);
    expect(err).toContain('interrupted');
    const j = JSON.parse(readFileSync(json, 'utf8'));
    expect(j.status).toBe('failed');
    expect(j.message).toContain('interrupted (Ctrl-C)');
    expect(j.fault).toMatchObject({ cause: 'interrupted', element: null });
    expect(j.end).toBeGreaterThan(0);
    expect(j.end).toBeLessThan(5000);
    const rows = readFileSync(csv, 'utf8').trimEnd().split('\n');
    const width = rows[0].split(',').length;
    let last = -1;
    for (const row of rows.slice(1)) {
      const cells = row.split(',');
      expect(cells).toHaveLength(width);
      expect(Number(cells[0])).toBeGreaterThan(last);
      last = Number(cells[0]);
    }
    expect(last).toBeLessThanOrEqual(j.end);
    expect(readdirSync(dir).sort()).toEqual(['long.yaml', 'out.csv', 'out.json']);
  });
});
