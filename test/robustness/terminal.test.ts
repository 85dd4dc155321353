/**
 * Nothing from a netlist reaches the terminal raw (docs/robustness.md, "Untrusted netlists"):
 * YAML escapes in a title, a key or a file name must not drive the terminal (control
 * sequences) or a CI runner (`::warning file=...::` workflow commands at the start of a line).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { clip, printable, printableOutput } from '../../src/diag/text.js';
import { formatDiagnostic } from '../../src/diag/diagnostic.js';

const ROOT = process.cwd();
const RAW_CONTROL = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/;
/** A title that tries both: colour and clear-screen sequences, and forged workflow commands. */
const EVIL_TITLE = '"::warning file=x.yaml::owned\\e[31m\\n::error::forged\\r\\e[2J"';

function netlist(title: string): string {
  return `format: 1
title: ${title}
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 200 kPa gauge } }
lines:
  vent: { from: tank, to: ambient, diameter: 2 mm, length: 1 m }
simulate: { duration: 0.2 s, sample: 10 ms }
expect:
  - { name: "slow\\e[5m::error::x", probe: tank.gauge, at: 0.2 s, above: 1 MPa gauge }
`;
}

function plenum(cwd: string, ...args: string[]): { code: number | null; all: string } {
  const r = spawnSync(process.execPath, [join(ROOT, 'bin/plenum'), ...args], { cwd, encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { code: r.status, all: r.stdout + r.stderr };
}

describe('printable', () => {
  it('escapes control characters, line breaks and bidirectional overrides', () => {
    expect(printable('a\u001b[31mb\nc\rd\u0000e\u009bf\u202eg')).toBe('a\\x1b[31mb\\nc\\rd\\x00e\\x9bf\\u202eg');
  });
  it('breaks up a leading workflow command', () => {
    expect(printable('::warning file=x::y')).toBe('\\x3a:warning file=x::y');
  });
  it('keeps the progress display\'s own carriage return and erase-line in composed output', () => {
    expect(printableOutput('\r\u001b[K  line\u001b[2J\n')).toBe('\r\u001b[K  line\\x1b[2J\n');
  });
  it('clips long text, saying how long it was', () => {
    expect(clip('x'.repeat(5000), 10)).toBe('xxxxxxxxxx… (5000 characters)');
  });
  it('a diagnostic quoting hostile text prints as inert lines', () => {
    const text = formatDiagnostic({ code: 'unknown-key', severity: 'error', message: 'unknown key `\u001b[2J\n::error::x`', file: 'a\u001b.yaml', line: 1, column: 1, path: ['\u001b'], hint: 'h\n::warning::y' });
    expect(text).not.toMatch(RAW_CONTROL);
    expect(text).not.toMatch(/^::/m);
  });
});

describe('the CLI prints no raw control character from a netlist', () => {
  const dir = mkdtempSync(join(tmpdir(), 'plenum-tty-'));
  writeFileSync(join(dir, 'rig.yaml'), netlist(EVIL_TITLE));

  it('run: the summary escapes the title and the expectation name', () => {
    const r = plenum(dir, 'run', 'rig.yaml');
    expect(r.code).toBe(1);
    expect(r.all).toContain('\\x3a:warning file=x.yaml::owned\\x1b[31m\\n::error::forged');
    expect(r.all).not.toMatch(RAW_CONTROL);
    expect(r.all).not.toMatch(/^::/m);
  });

  it('check --annotations: only plenum\'s own workflow commands start a line', () => {
    const r = plenum(dir, 'check', 'rig.yaml', '--annotations');
    expect(r.code).toBe(1);
    expect(r.all).not.toMatch(RAW_CONTROL);
    const commands = r.all.split('\n').filter((l) => l.startsWith('::'));
    expect(commands.length).toBeGreaterThan(0);
    for (const c of commands) expect(c).toMatch(/^::(error|warning) file=rig\.yaml(,line=\d+,col=\d+)?,title=[^:]*::/);
    expect(commands.join('\n')).not.toMatch(/::error::forged$|::error::x$/m);
  });

  it('a file name with escapes is printed escaped', () => {
    const name = 'evil\u001b[2J.yaml';
    writeFileSync(join(dir, name), 'format: 1\nchambers: {}\n');
    const r = plenum(dir, 'check', name);
    expect(r.code).toBe(2);
    expect(r.all).toContain('evil\\x1b[2J.yaml');
    expect(r.all).not.toMatch(RAW_CONTROL);
  });
});
