/**
 * `plenum run` and `plenum report` read the netlist once, in their simulating thread
 * (src/cli/run-job.ts); the main thread prints what that reading found. These tests hold the
 * printed diagnostics and warnings to the library's own in-process reading (`loadModel`,
 * formatted), which is what the main thread printed when it read the netlist itself: the same
 * file:line:column, hints and count line, exit 2, nothing written.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { formatDiagnostic, loadModel, type Diagnostic } from '../../src/index.js';

function plenum(args: string[], input?: string): { code: number; out: string; err: string } {
  const r = spawnSync(process.execPath, ['bin/plenum', ...args], { encoding: 'utf8', input, env: { ...process.env, CI: '1' } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr };
}

const tmp = mkdtempSync(join(tmpdir(), 'plenum-reading-'));

/** Three kinds of error (unknown key, a unit of the wrong dimension, a name that is not defined) and more. */
const BAD = `format: 1
chambers:
  cell: { wall: rigid, volume: 1 L, start: { pressure: 2 bar } }
  pod: { wall: neo-hookean, radius: 15 mm, thickness: 1 kg, shear-modulus: 0.3 MPa, start: { stretch: 1.1 } }
lines:
  l1: { from: cell, to: nowhere, diameter: 2 mm, length: 1 m }
simulate: { duration: 1 s, colour: red }
`;

/** What the in-process reading prints for `text` named `file`: its diagnostics and the count line. */
function expectedFailure(text: string, file: string): string {
  const m = loadModel(text, file);
  if (m.ok) throw new Error('the test netlist must be invalid');
  const n = m.diagnostics.filter((d) => d.severity === 'error').length;
  return `${m.diagnostics.map(formatDiagnostic).join('\n')}\nplenum: ${n} error${n === 1 ? '' : 's'} in ${file}; nothing was simulated or written\n`;
}

describe('the netlist read once, in the simulating thread', () => {
  const bad = join(tmp, 'bad.yaml');
  writeFileSync(bad, BAD);

  it('run: the diagnostics of an invalid netlist are those of the in-process reading; exit 2, nothing written', () => {
    const json = join(tmp, 'bad.json');
    const csv = join(tmp, 'bad.csv');
    const plots = join(tmp, 'bad-plots');
    const r = plenum(['run', bad, '--json', json, '--csv', csv, '--plots', plots]);
    expect(r.code).toBe(2);
    expect(r.err).toBe(expectedFailure(BAD, bad));
    expect(r.err.split('\n').filter((l) => l.startsWith(`${bad}:`)).length).toBeGreaterThanOrEqual(3);
    expect(r.out).toBe('');
    for (const f of [json, csv, plots]) expect(existsSync(f), f).toBe(false);
  });

  it('report: the same diagnostics, exit 2, no report written', () => {
    const out = join(tmp, 'bad.html');
    const r = plenum(['report', bad, '--out', out]);
    expect(r.code).toBe(2);
    expect(r.err).toBe(expectedFailure(BAD, bad));
    expect(existsSync(out)).toBe(false);
  });

  it('a netlist from standard input is named <stdin>, as before', () => {
    const r = plenum(['run', '-', '-q'], BAD);
    expect(r.code).toBe(2);
    expect(r.err).toBe(expectedFailure(BAD, '<stdin>'));
  });

  it('the warnings of a valid netlist are printed before the run, as the in-process reading gives them', () => {
    const file = 'networks/gripper-charge.yaml';
    const m = loadModel(readFileSync(file, 'utf8'), file);
    if (!m.ok) throw new Error('the example must load');
    const warnings: Diagnostic[] = m.warnings;
    expect(warnings.length).toBeGreaterThan(0);
    const json = join(tmp, 'gripper.json');
    const r = plenum(['run', file, '-q', '--json', json]);
    expect(r.code, r.err).toBe(0);
    expect(r.err).toBe(`${warnings.map(formatDiagnostic).join('\n')}\n`);
    expect(JSON.parse(readFileSync(json, 'utf8')).status).toBe('completed');
    const html = join(tmp, 'gripper.html');
    const rep = plenum(['report', file, '-q', '--out', html]);
    expect(rep.code, rep.err).toBe(0);
    expect(rep.err).toBe(`${warnings.map(formatDiagnostic).join('\n')}\n`);
  });
});
