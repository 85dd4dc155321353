/**
 * The command line in pipelines and scripts, as a new user meets it: netlists from a pipe,
 * closed pipes, `-` for standard output, quoted globs, no command, the progress line.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DELAY_MS, progressLine } from '../../src/cli/progress.js';

const SETTLE = 'networks/cushion-settle.yaml';
const tmp = mkdtempSync(join(tmpdir(), 'plenum-pipes-'));
/** A stack trace line, as Node prints one. */
const STACK = /\n\s+at .*:\d+:\d+/;

function plenum(args: string[], opts: { input?: string; env?: Record<string, string> } = {}): { code: number; out: string; err: string } {
  const r = spawnSync(process.execPath, ['bin/plenum', ...args], { encoding: 'utf8', input: opts.input, env: { ...process.env, CI: '1', ...opts.env } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr };
}

/** Runs a shell pipeline; returns the exit status of the first command and its stderr. */
function pipeline(cmd: string): { code: number; err: string; out: string } {
  const r = spawnSync('bash', ['-c', `set -o pipefail; ${cmd} 2>${join(tmp, 'err.txt')} | head -c 20 >/dev/null; echo "\${PIPESTATUS[0]}"`], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { code: Number(r.stdout.trim()), err: readFileSync(join(tmp, 'err.txt'), 'utf8'), out: r.stdout };
}

describe('netlists from a pipe (`run -`, `run /dev/stdin`)', () => {
  const text = readFileSync(SETTLE, 'utf8');

  it('`plenum run -` reads the netlist from standard input and meets its expectations', () => {
    const r = plenum(['run', '-', '--json', '-'], { input: text });
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.status).toBe('completed');
    expect(j.expectations.length).toBe(2);
    expect(j.chambers.cell_a.final.gauge).toBeGreaterThan(15e3);
  });

  it('`plenum run /dev/stdin` reads the pipe once (it used to read it as empty)', () => {
    const r = plenum(['run', '/dev/stdin', '-q'], { input: text });
    expect(r.code, r.err).toBe(0);
    expect(r.err).not.toContain('empty');
  });

  it('errors in a piped netlist name `<stdin>` with line and column, exit 2', () => {
    const r = plenum(['run', '-'], { input: text.replace('thickness: 1.5 mm', 'thicknes: 1.5 mm') });
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/<stdin>:\d+:\d+: error \[unknown-key\]/);
  });
});

describe('a closed pipe ends quietly with the usual status', () => {
  it('`plenum schema | head` exits 0 without an EPIPE trace', () => {
    // the schema is larger than a pipe buffer, so the writer meets the closed pipe
    const r = pipeline(`${process.execPath} bin/plenum schema`);
    expect(r.err).not.toContain('EPIPE');
    expect(r.err).not.toMatch(STACK);
    expect(r.code).toBe(0);
  });

  it('`plenum run X --csv - | head` exits 0 (its expectations pass), not 1', () => {
    const r = pipeline(`${process.execPath} bin/plenum run ${SETTLE} --csv -`);
    expect(r.err).not.toContain('EPIPE');
    expect(r.err).not.toMatch(STACK);
    expect(r.code).toBe(0);
  });
});

describe('`-` means standard output for every output option', () => {
  it('`check --junit -` writes the XML to stdout and the lines to stderr, and no file named -', () => {
    const r = spawnSync(process.execPath, [join(process.cwd(), 'bin/plenum'), 'check', join(process.cwd(), SETTLE), '--junit', '-'], { cwd: tmp, encoding: 'utf8', env: { ...process.env, CI: '1' } });
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/^<\?xml/);
    expect(r.stdout).toContain('<testsuites');
    expect(r.stderr).toContain('check: 2 expectations');
    expect(existsSync(join(tmp, '-'))).toBe(false);
  });

  it('`run --baseline -` writes the baseline to stdout and the summary to stderr', () => {
    const r = spawnSync(process.execPath, [join(process.cwd(), 'bin/plenum'), 'run', join(process.cwd(), SETTLE), '--baseline', '-'], { cwd: tmp, encoding: 'utf8', env: { ...process.env, CI: '1' } });
    expect(r.status, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout).plenum).toBe('baseline');
    expect(r.stderr).toContain('cell_a');
    expect(existsSync(join(tmp, '-'))).toBe(false);
  });

  it('`report --out -` writes the HTML to stdout', () => {
    const r = plenum(['report', SETTLE, '--out', '-']);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/^<!doctype html>/i);
    expect(r.err).toContain('cell_a');
  });

  it('two outputs cannot both take standard output', () => {
    const r = spawnSync(process.execPath, [join(process.cwd(), 'bin/plenum'), 'run', join(process.cwd(), SETTLE), '--json', '-', '--baseline', '-'], { cwd: tmp, encoding: 'utf8', env: { ...process.env, CI: '1' } });
    expect(r.status).toBe(2);
    expect(r.stderr).toContain('only one of --json and --baseline');
    expect(existsSync(join(tmp, '-'))).toBe(false);
  });
});

describe('quoted globs and a missing command', () => {
  it("`plenum check 'networks/*.yaml'` expands the pattern", () => {
    const r = plenum(['check', 'networks/cushion-*.yaml', '-q']);
    expect(r.code, r.out + r.err).toBe(0);
    expect(r.out).toMatch(/in 2 netlists/);
  });

  it('a pattern that matches nothing is a usage error (exit 2)', () => {
    const r = plenum(['check', 'networks/nothing-*.yaml']);
    expect(r.code).toBe(2);
    expect(r.err).toContain('no file matches');
  });

  it('`plenum` with no command exits 2 with the usage on stderr', () => {
    const r = plenum([]);
    expect(r.code).toBe(2);
    expect(r.out).toBe('');
    expect(r.err).toContain('Usage: plenum');
  });
});

describe('the progress line', () => {
  function host(env: Record<string, string | undefined>, isTTY = true): { written: string[]; clock: { t: number }; line: ReturnType<typeof progressLine>; quiet: (q: boolean) => ReturnType<typeof progressLine> } {
    const written: string[] = [];
    const clock = { t: 0 };
    const h = { stream: { isTTY, write: (s: string) => written.push(s) }, env, now: () => clock.t };
    return { written, clock, line: progressLine(false, h), quiet: (q) => progressLine(q, h) };
  }

  it('nothing during the first second, then a line, cleared at the end', () => {
    const { written, clock, line } = host({ TERM: 'xterm' });
    line.update('  simulating: 10 %');
    expect(written).toEqual([]);
    clock.t = DELAY_MS + 1;
    line.update('  simulating: 50 %');
    line.clear();
    expect(written.join('')).toContain('simulating: 50 %');
    expect(written.at(-1)).toBe('\r\x1b[K');
  });

  it('none with -q, none off a terminal, none under CI', () => {
    for (const line of [host({}).quiet(true), host({}, false).line, host({ CI: 'true' }).line]) {
      expect(line.active).toBe(false);
    }
  });

  it('no ANSI escape codes with TERM=dumb or NO_COLOR', () => {
    for (const env of [{ TERM: 'dumb' }, { TERM: 'xterm', NO_COLOR: '1' }]) {
      const { written, clock, line } = host(env);
      clock.t = 2 * DELAY_MS;
      line.update('  simulating: t = 1 s of 8 s (12 %)');
      line.update('  simulating: 99 %');
      line.clear();
      expect(written.join('')).not.toContain('\x1b');
      expect(written.join('')).toContain('12 %');
    }
  });

  it('with -q a run on a terminal prints no progress (under `script`, a pseudo-terminal)', () => {
    const which = spawnSync('bash', ['-c', 'command -v script'], { encoding: 'utf8' });
    if (which.status !== 0) return; // util-linux's script is part of every Debian system
    const env = { ...process.env };
    delete env.CI;
    const out = join(tmp, 'tty.txt');
    // a run long enough to pass the one-second delay on any machine
    const long = join(tmp, 'long.yaml');
    writeFileSync(long, readFileSync(SETTLE, 'utf8').replace(/duration: [^,}]+/, 'duration: 600 s').replace(/sample: [^,}]+/, 'sample: 10 ms').replace(/tolerance: [^,}]+/, 'tolerance: 1e-10'));
    const r = spawnSync('script', ['-qec', `${process.execPath} bin/plenum run ${long} -q --json ${join(tmp, 'long.json')}`, out], { encoding: 'utf8', env });
    expect(r.status).toBe(0);
    const seen = readFileSync(out, 'utf8');
    expect(JSON.parse(readFileSync(join(tmp, 'long.json'), 'utf8')).status).toBe('completed');
    expect(seen).not.toContain('simulating:');
    expect(seen).not.toContain('\x1b[K');
  });
});

describe('description and all problems in one pass', () => {
  it('a top-level `description:` is accepted, carried to the JSON and shown in the report', () => {
    const f = join(tmp, 'described.yaml');
    writeFileSync(f, readFileSync(SETTLE, 'utf8').replace(/^format: 1\n/m, 'format: 1\ndescription: |\n  Two cells joined by a crossover.\n\n  Run after every wall change.\n'));
    const r = plenum(['run', f, '--json', '-']);
    expect(r.code, r.err).toBe(0);
    expect(JSON.parse(r.out).description).toBe('Two cells joined by a crossover.\n\nRun after every wall change.');
    const html = plenum(['report', f, '--out', '-', '-q']).out;
    expect(html).toContain('<p class="job">Two cells joined by a crossover.</p>');
    expect(html).toContain('<p class="job">Run after every wall change.</p>');
  });

  it('an unqualified pressure in an expectation is reported with the other errors, even when its probe is misspelt', () => {
    const f = join(tmp, 'many.yaml');
    const text = readFileSync(SETTLE, 'utf8')
      .replace('thickness: 1.5 mm', 'thicknes: 1.5 mm')
      .replace('probe: cell_a.gauge', 'probe: cell_aa.gauge')
      .replace('value: 15.5 kPa gauge', 'value: 15.5 kPa');
    writeFileSync(f, text);
    const r = plenum(['run', f]);
    expect(r.code).toBe(2);
    expect(r.err).toContain('[unknown-key]');
    expect(r.err).toContain('[unknown-reference]');
    expect(r.err).toMatch(/\[pressure-reference\] `value`: the pressure `15.5 kPa` does not say gauge or absolute/);
  });
});
