/**
 * Outputs go only where they should (docs/robustness.md, "Outputs are whole or absent"):
 * devices, pipes and symbolic links are written through and never replaced, `--plots` never
 * lands on the netlist nor spins on a pseudo file system, every command turns a write failure
 * into exit 2 with a message (no stack trace, no temporary file, no partial output), and every
 * input file is read with the netlist's size limit.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, lstatSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, readlinkSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const ROOT = process.cwd();
const STACK_LINE = /^\s+at .*:\d+:\d+\)?$/m;
const NETLIST = `format: 1
title: vent
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 200 kPa gauge } }
lines:
  vent: { from: tank, to: ambient, diameter: 2 mm, length: 1 m }
simulate: { duration: 0.2 s, sample: 10 ms }
`;

function plenum(cwd: string, ...args: string[]): { code: number | null; out: string; err: string } {
  const r = spawnSync(process.execPath, [join(ROOT, 'bin/plenum'), ...args], { cwd, encoding: 'utf8', timeout: 60_000, env: { ...process.env, CI: '1' } });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

function workspace(): string {
  const dir = mkdtempSync(join(tmpdir(), 'plenum-targets-'));
  writeFileSync(join(dir, 'rig.yaml'), NETLIST);
  return dir;
}

function clean(r: { code: number | null; err: string }): void {
  expect(r.err).not.toMatch(STACK_LINE);
  expect(r.err).not.toContain('internal error');
}

const isRoot = process.getuid?.() === 0;

describe('devices, pipes and links are written through, never replaced', () => {
  it('a symbolic link to /dev/null stays a link and /dev/null stays a character device', () => {
    const dir = workspace();
    symlinkSync('/dev/null', join(dir, 'null.json'));
    const r = plenum(dir, 'run', 'rig.yaml', '-q', '--json', 'null.json', '--csv', 'out.csv');
    expect(r.code, r.err).toBe(0);
    expect(lstatSync(join(dir, 'null.json')).isSymbolicLink()).toBe(true);
    expect(lstatSync('/dev/null').isCharacterDevice()).toBe(true);
    expect(readdirSync(dir).sort()).toEqual(['null.json', 'out.csv', 'rig.yaml']);
  });

  it.runIf(isRoot)('a character device inside the output directory stays a device', () => {
    const dir = workspace();
    const made = spawnSync('mknod', [join(dir, 'null'), 'c', '1', '3']);
    expect(made.status).toBe(0);
    const r = plenum(dir, 'run', 'rig.yaml', '-q', '--json', 'null');
    expect(r.code, r.err).toBe(0);
    expect(lstatSync(join(dir, 'null')).isCharacterDevice()).toBe(true);
  });

  it('a symbolic link to a file: the file gets the output, the link stays a link', () => {
    const dir = workspace();
    writeFileSync(join(dir, 'real.json'), 'old');
    symlinkSync('real.json', join(dir, 'link.json'));
    const r = plenum(dir, 'run', 'rig.yaml', '-q', '--json', 'link.json');
    expect(r.code, r.err).toBe(0);
    expect(readlinkSync(join(dir, 'link.json'))).toBe('real.json');
    expect(JSON.parse(readFileSync(join(dir, 'real.json'), 'utf8')).title).toBe('vent');
  });

  it('a dangling link is refused before the run (exit 2), nothing written', () => {
    const dir = workspace();
    symlinkSync('nowhere/at/all.json', join(dir, 'dangling.json'));
    const r = plenum(dir, 'run', 'rig.yaml', '-q', '--json', 'dangling.json', '--csv', 'out.csv');
    expect(r.code).toBe(2);
    expect(r.err).toContain('symbolic link to nothing');
    clean(r);
    expect(readdirSync(dir).sort()).toEqual(['dangling.json', 'rig.yaml']);
  });
});

describe('--plots', () => {
  it('never overwrites the netlist, even when it has a figure\'s name', () => {
    const dir = workspace();
    writeFileSync(join(dir, 'pressure.svg'), NETLIST);
    const r = plenum(dir, 'run', 'pressure.svg', '-q', '--plots', '.', '--json', 'out.json');
    expect(r.code).toBe(2);
    expect(r.err).toContain('refusing to overwrite the netlist');
    clean(r);
    expect(readFileSync(join(dir, 'pressure.svg'), 'utf8')).toBe(NETLIST);
    expect(readdirSync(dir).sort()).toEqual(['pressure.svg', 'rig.yaml']);
  });

  it('under /proc is refused (exit 2) rather than spinning', () => {
    const dir = workspace();
    const r = plenum(dir, 'run', 'rig.yaml', '-q', '--plots', '/proc/plenum-plots-test');
    expect(r.code, r.err).toBe(2);
    clean(r);
  });

  it('a missing parent directory is refused before the run', () => {
    const dir = workspace();
    const r = plenum(dir, 'run', 'rig.yaml', '-q', '--plots', 'no/such/dir');
    expect(r.code).toBe(2);
    expect(r.err).toContain('does not exist');
    expect(readdirSync(dir)).toEqual(['rig.yaml']);
  });
});

describe('write failures: exit 2, a message, nothing else written', () => {
  const full = existsSync('/dev/full');

  it.runIf(full)('run: a full device for --csv leaves --json unwritten', () => {
    const dir = workspace();
    const r = plenum(dir, 'run', 'rig.yaml', '-q', '--json', 'out.json', '--csv', '/dev/full');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/cannot write --csv \/dev\/full \(ENOSPC\)/);
    clean(r);
    expect(readdirSync(dir)).toEqual(['rig.yaml']);
  });

  it.runIf(full).each([
    ['equilibria', ['rig.yaml', '--no-transient', '-q', '--json', '/dev/full']],
    ['trace', ['rig.yaml', '--vary', 'mass:tank', '--from', '1 g', '--to', '2 g', '-q', '--json', '/dev/full', '--csv', 'branches.csv']],
    ['sweep', ['rig.yaml', '--vary', 'lines.vent.diameter=1 mm,2 mm', '--jobs', '1', '-q', '--json', '/dev/full', '--csv', 'cases.csv']],
    ['fit', [join(ROOT, 'networks/data/latex-cell-bench-synthetic.csv'), '--wall', 'gent', '--radius', '40mm', '--thickness', '1.5 mm', '-q', '--json', '/dev/full', '--csv', 'res.csv']],
  ])('%s', (command, args) => {
    const dir = workspace();
    const r = plenum(dir, command, ...args);
    expect(r.code, r.err).toBe(2);
    expect(r.err).toMatch(/cannot write --json \/dev\/full/);
    clean(r);
    expect(readdirSync(dir)).toEqual(['rig.yaml']);
  });
});

describe('every input is read with the size limit', () => {
  it.each([
    ['fit', ['/dev/zero', '--wall', 'gent', '--radius', '40mm', '--thickness', '1.5 mm']],
    ['diff', ['/dev/zero', 'rig.yaml']],
    ['merge', ['/dev/zero']],
  ])('%s /dev/zero is refused with exit 2', (command, args) => {
    const dir = workspace();
    const r = plenum(dir, command, ...args);
    expect(r.code).toBe(2);
    expect(r.err).toContain('longer than the limit');
    clean(r);
  });

  it('merge refuses a malformed shard with exit 2, naming what is wrong', () => {
    const dir = workspace();
    const shapes = [
      { format: 1, kind: 'plenum-sweep', study: {}, cases: [null] },
      { format: 1, kind: 'plenum-sweep', study: { id: 'x', netlist: { file: 'a', sha256: 'b' }, title: '', vary: [], seed: null, samples: 1, groups: 1, cases: 1, chambers: [], expectations: [] }, cases: [{ index: 'zero' }] },
      { format: 1, kind: 'plenum-sweep', study: { id: 'x', netlist: null }, shard: { index: 1, count: 2 }, cases: [] },
    ];
    shapes.forEach((s, i) => {
      const f = join(dir, `shard${i}.json`);
      writeFileSync(f, JSON.stringify(s));
      const r = plenum(dir, 'merge', f, '--json', 'merged.json');
      expect(r.code, r.err).toBe(2);
      expect(r.err).toContain('is not a study as `plenum sweep --json` writes it');
      clean(r);
    });
    expect(existsSync(join(dir, 'merged.json'))).toBe(false);
  });
});

describe('nothing is created for an output that cannot be', () => {
  it('a socket-like or block target is refused before the run', () => {
    const dir = workspace();
    mkdirSync(join(dir, 'sub'));
    const r = plenum(dir, 'run', 'rig.yaml', '-q', '--json', 'sub');
    expect(r.code).toBe(2);
    expect(r.err).toContain('is a directory');
    clean(r);
  });
});
