/**
 * Output safety: results go only where the command line says, are written whole or not at
 * all (temporary file + rename), and never over the netlist.
 */
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, linkSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { writeAtomic } from '../../src/cli/io.js';

const NETLIST = `format: 1
title: ../../../../tmp/escape attempt
chambers:
  tank: { wall: rigid, volume: 1 L, start: { pressure: 200 kPa gauge } }
lines:
  vent: { from: tank, to: ambient, diameter: 2 mm, length: 1 m }
simulate: { duration: 0.5 s, sample: 10 ms }
`;

const STACK_LINE = /^\s+at .*:\d+:\d+\)?$/m;

function plenum(cwd: string, ...args: string[]): { code: number | null; err: string } {
  const r = spawnSync(process.execPath, [join(process.cwd(), 'bin/plenum'), ...args], { cwd, encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { code: r.status, err: r.stderr };
}

/** A fresh directory holding the netlist, with the netlist's bytes and time stamp. */
function workspace(): { dir: string; netlist: string; bytes: string; mtime: number } {
  const dir = mkdtempSync(join(tmpdir(), 'plenum-out-'));
  const netlist = join(dir, 'rig.yaml');
  writeFileSync(netlist, NETLIST);
  return { dir, netlist, bytes: NETLIST, mtime: statSync(netlist).mtimeMs };
}

function untouched(w: ReturnType<typeof workspace>): void {
  expect(readFileSync(w.netlist, 'utf8')).toBe(w.bytes);
  expect(statSync(w.netlist).mtimeMs).toBe(w.mtime);
}

describe('the netlist is never overwritten', () => {
  it.each(['--json', '--csv'])('%s naming the netlist is refused with exit 2, the netlist untouched', (option) => {
    const w = workspace();
    for (const name of ['rig.yaml', './rig.yaml', w.netlist, join(w.dir, '..', w.dir.split('/').pop()!, 'rig.yaml')]) {
      const r = plenum(w.dir, 'run', 'rig.yaml', option, name);
      expect(r.code, r.err).toBe(2);
      expect(r.err).toContain('refusing to overwrite the netlist');
      expect(r.err).not.toMatch(STACK_LINE);
      untouched(w);
    }
    expect(readdirSync(w.dir)).toEqual(['rig.yaml']);
  });

  it('a hard link to the netlist is the netlist', () => {
    const w = workspace();
    linkSync(w.netlist, join(w.dir, 'other-name.json'));
    const r = plenum(w.dir, 'run', 'rig.yaml', '--json', 'other-name.json');
    expect(r.code).toBe(2);
    untouched(w);
  });
});

describe('outputs go only where the command line says', () => {
  it('a run writes exactly the files named, whatever the netlist holds', () => {
    const w = workspace();
    const r = plenum(w.dir, 'run', 'rig.yaml', '--json', 'out.json', '--csv', 'out.csv', '-q');
    expect(r.code, r.err).toBe(0);
    expect(readdirSync(w.dir).sort()).toEqual(['out.csv', 'out.json', 'rig.yaml']);
    untouched(w);
    expect(JSON.parse(readFileSync(join(w.dir, 'out.json'), 'utf8')).status).toBe('completed');
  });

  it('no netlist key names a file: output, include and file keys are unknown keys', () => {
    const w = workspace();
    for (const key of ['output: /tmp/x.json', 'include: other.yaml', 'results: { file: out.json }', 'csv: out.csv']) {
      writeFileSync(w.netlist, NETLIST + key + '\n');
      const r = plenum(w.dir, 'run', 'rig.yaml');
      expect(r.code).toBe(2);
      expect(r.err).toContain('[unknown-key]');
    }
    expect(readdirSync(w.dir)).toEqual(['rig.yaml']);
  });

  it('bad output paths are refused before anything runs: missing directory, a directory, the same file twice', () => {
    const w = workspace();
    mkdirSync(join(w.dir, 'sub'));
    const cases: [string[], string][] = [
      [['--json', 'nowhere/out.json'], 'does not exist'],
      [['--csv', 'sub'], 'is a directory'],
      [['--json', 'same.out', '--csv', 'same.out'], 'name the same file'],
    ];
    for (const [args, text] of cases) {
      const r = plenum(w.dir, 'run', 'rig.yaml', ...args);
      expect(r.code, r.err).toBe(2);
      expect(r.err).toContain(text);
      expect(r.err).not.toMatch(STACK_LINE);
    }
    expect(readdirSync(w.dir).sort()).toEqual(['rig.yaml', 'sub']);
    expect(readdirSync(join(w.dir, 'sub'))).toEqual([]);
  });
});

describe('writeAtomic: whole or absent', () => {
  it('a failed write leaves the old file untouched and no temporary file', () => {
    const dir = mkdtempSync(join(tmpdir(), 'plenum-atomic-'));
    const target = join(dir, 'out.json');
    writeFileSync(target, 'old');
    // renaming a file onto a non-empty directory fails after the temporary file is written
    const blocker = join(dir, 'blocked');
    mkdirSync(blocker);
    writeFileSync(join(blocker, 'x'), 'x');
    expect(() => writeAtomic(blocker, 'new')).toThrow();
    expect(readdirSync(dir).sort()).toEqual(['blocked', 'out.json']);
    expect(readFileSync(target, 'utf8')).toBe('old');
    // a directory that does not exist: nothing is created anywhere
    expect(() => writeAtomic(join(dir, 'missing', 'out.json'), 'new')).toThrow();
    expect(readdirSync(dir).sort()).toEqual(['blocked', 'out.json']);
    writeAtomic(target, 'new');
    expect(readFileSync(target, 'utf8')).toBe('new');
    expect(readdirSync(dir).sort()).toEqual(['blocked', 'out.json']);
  });

  it('a reader polling the path never sees a part of a file', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'plenum-atomic-'));
    const target = join(dir, 'big.csv');
    const versions = ['a', 'b', 'c'].map((ch) => ch.repeat(4 * 1024 * 1024));
    writeAtomic(target, versions[0]);
    // a separate process reads the file in a loop and reports anything that is not a whole version
    const reader = spawn(process.execPath, ['-e', `
      const fs = require('fs');
      let seen = 0, torn = 0;
      process.stdin.on('data', () => { process.stdout.write(JSON.stringify({ seen, torn })); process.exit(0); });
      (function poll() {
        try {
          const s = fs.readFileSync(${JSON.stringify(target)}, 'latin1');
          seen++;
          if (s.length !== ${versions[0].length} || s !== s[0].repeat(s.length)) torn++;
        } catch { torn++; }
        setImmediate(poll);
      })();
    `], { stdio: ['pipe', 'pipe', 'inherit'] });
    let report = '';
    reader.stdout.on('data', (d: Buffer) => { report += d.toString(); });
    const done = new Promise<void>((resolve) => reader.on('close', () => resolve()));
    for (let k = 1; k <= 30; k++) {
      writeAtomic(target, versions[k % 3]);
      await new Promise((resolve) => setTimeout(resolve, 5));
    }
    reader.stdin.write('stop\n');
    await done;
    const { seen, torn } = JSON.parse(report) as { seen: number; torn: number };
    expect(seen).toBeGreaterThan(0);
    expect(torn).toBe(0);
    expect(existsSync(target)).toBe(true);
    expect(readdirSync(dir)).toEqual(['big.csv']);
  });
});
