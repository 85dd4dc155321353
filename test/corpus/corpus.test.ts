/**
 * The corpus of malformed and hostile netlists, run through the real CLI as CI runs an
 * unreviewed netlist: `plenum run FILE --json OUT --csv OUT`. Every case must exit 2, print the
 * expected diagnostic as `file:line:column: error [code]`, print no stack trace, and write
 * nothing (no output file, no temporary file).
 *
 * Committed cases are test/corpus/bad/NNN-name.yaml with their expected diagnostic in
 * test/corpus/bad/expected.json. Cases that would be large or binary files are made here, in a
 * temporary directory, at run time.
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { MAX_SOURCE_BYTES } from '../../src/netlist/limits.js';

interface Expected { code: string; line: number; column: number }
interface Outcome { code: number | null; signal: string | null; err: string; out: string; outDir: string }

const ROOT = process.cwd();
const BAD = join(ROOT, 'test/corpus/bad');
const manifest = JSON.parse(readFileSync(join(BAD, 'expected.json'), 'utf8')) as Record<string, Expected>;
const tmp = mkdtempSync(join(tmpdir(), 'plenum-corpus-'));
/** CLI processes at once: enough to use two cores while each waits on start-up. */
const CONCURRENCY = 4;

/** A small valid netlist that generated cases damage or pad. */
const BASE = `format: 1
chambers:
  tank:
    wall: rigid
    volume: 1 L
    start: { pressure: 200 kPa gauge }
lines:
  vent: { from: tank, to: ambient, diameter: 2 mm, length: 1 m }
simulate: { duration: 1 s }
`;

/** Pseudo-random bytes from a fixed linear congruential sequence: the same junk every run. */
function junk(n: number, seed: number): Buffer {
  const b = Buffer.alloc(n);
  let s = seed;
  for (let i = 0; i < n; i++) {
    s = (s * 1103515245 + 12345) % 2147483648;
    b[i] = s >> 16;
  }
  return b;
}

/** Generated cases: file name, content, expected diagnostic. */
function generated(): { name: string; content: string | Buffer; expected: Expected }[] {
  const deepBlock = Array.from({ length: 40 }, (_, i) => `${' '.repeat(2 * i)}k${i}:`).join('\n');
  return [
    // over the size limit: a valid netlist padded with a comment, and one enormous scalar
    { name: 'g01-too-large-comment.yaml', content: BASE + '#'.repeat(MAX_SOURCE_BYTES + 1024 * 1024) + '\n', expected: { code: 'input-too-large', line: 1, column: 1 } },
    { name: 'g02-too-large-scalar.yaml', content: BASE + 'title: ' + 'x'.repeat(MAX_SOURCE_BYTES + 10) + '\n', expected: { code: 'input-too-large', line: 1, column: 1 } },
    // binary junk: random bytes, file-type signatures, a NUL inside text, broken UTF-8, UTF-16
    { name: 'g03-random-bytes.yaml', content: Buffer.concat([Buffer.from([0x00]), junk(4096, 7)]), expected: { code: 'input-binary', line: 1, column: 1 } },
    { name: 'g04-png.yaml', content: Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), junk(512, 3)]), expected: { code: 'input-binary', line: 1, column: 1 } },
    { name: 'g05-elf.yaml', content: Buffer.concat([Buffer.from([0x7f, 0x45, 0x4c, 0x46, 0x02, 0x01, 0x01]), junk(512, 5)]), expected: { code: 'input-binary', line: 1, column: 1 } },
    { name: 'g06-gzip.yaml', content: Buffer.concat([Buffer.from([0x1f, 0x8b, 0x08, 0x00]), junk(512, 11)]), expected: { code: 'input-binary', line: 1, column: 1 } },
    { name: 'g07-nul-in-text.yaml', content: BASE.replace('volume: 1 L', 'volume: 1\u0000L'), expected: { code: 'input-binary', line: 5, column: 14 } },
    { name: 'g08-bad-utf8.yaml', content: Buffer.concat([Buffer.from('# caf'), Buffer.from([0xc3, 0x28]), Buffer.from('\n' + BASE)]), expected: { code: 'input-binary', line: 1, column: 6 } },
    { name: 'g09-utf16.yaml', content: Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(BASE, 'utf16le')]), expected: { code: 'input-binary', line: 1, column: 1 } },
    // deep nesting: a megabyte of brackets, and 40 levels of block mappings
    { name: 'g10-deep-flow.yaml', content: 'format: 1\nx: ' + '['.repeat(500_000) + ']'.repeat(500_000) + '\n', expected: { code: 'too-deep', line: 2, column: 35 } },
    { name: 'g11-deep-block.yaml', content: 'format: 1\n' + deepBlock + ' 1\n', expected: { code: 'too-deep', line: 34, column: 65 } },
    // a large alias bomb just under the size limit: refused at the first alias, one diagnostic
    {
      name: 'g12-big-alias-bomb.yaml',
      content: 'format: 1\na0: &a0 [lol]\n' + Array.from({ length: 20_000 }, (_, i) => `a${i + 1}: &a${i + 1} [*a${i}, *a${i}, *a${i}, *a${i}]\n`).join(''),
      expected: { code: 'yaml-alias', line: 3, column: 10 },
    },
    // thousands of problems: all counted, the first ones printed
    {
      name: 'g13-many-errors.yaml',
      content: BASE + Array.from({ length: 5000 }, (_, i) => `junk_key_${i}: 1\n`).join(''),
      expected: { code: 'unknown-key', line: 10, column: 1 },
    },
    // did-you-mean on hostile names: it must stay linear (these took 2 min, 71 s and 52 s, and
    // the last printed 16 MB, when every unknown name was compared in full with every name)
    { name: 'g14-long-names.yaml', content: longNames(), expected: { code: 'unconnected-chamber', line: 3, column: 3 } },
    { name: 'g15-misspelt-references.yaml', content: misspeltReferences(3000), expected: { code: 'unknown-reference', line: 3004, column: 27 } },
    { name: 'g16-huge-unknown-key.yaml', content: BASE + 'k'.repeat(MAX_SOURCE_BYTES - 2048) + ': 1\n', expected: { code: 'unknown-key', line: 10, column: 1 } },
    // YAML escapes carrying terminal control sequences and CI workflow commands
    {
      name: 'g17-control-characters.yaml',
      content: 'format: 1\ntitle: "\\e[31m::warning file=x::owned\\n::error::forged\\r"\n' + BASE.slice('format: 1\n'.length) + '"\\e[2J\\n::error::forged": 1\n',
      expected: { code: 'unknown-key', line: 11, column: 1 },
    },
  ];
}

/** Two chambers with 100 000-character names and a line naming a third, one letter off. */
function longNames(): string {
  const a = 'a'.repeat(100_000);
  const b = 'b'.repeat(100_000);
  return `format: 1
chambers:
  ${a}: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }
  ${b}: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }
lines:
  link:
    from: ${a.slice(1)}c
    to: ${b}
    diameter: 2 mm
    length: 1 m
simulate: { duration: 1 s }
`;
}

/** `n` chambers in a chain whose lines all name chambers that do not exist, each one letter off. */
function misspeltReferences(n: number): string {
  const out = ['format: 1', 'chambers:'];
  for (let i = 0; i < n; i++) out.push(`  cell_${i}: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }`);
  out.push('lines:');
  for (let i = 0; i < n; i++) out.push(`  l${i}: { from: cell_${i}, to: cel_${(i + 1) % n}, diameter: 2 mm, length: 1 m }`);
  out.push('simulate: { duration: 1 s }', '');
  return out.join('\n');
}

function plenum(args: string[]): Promise<Omit<Outcome, 'outDir'>> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ['bin/plenum', ...args], { cwd: ROOT, env: { ...process.env, CI: '1' } });
    let out = '';
    let err = '';
    child.stdout.on('data', (d: Buffer) => { out += d.toString(); });
    child.stderr.on('data', (d: Buffer) => { err += d.toString(); });
    child.on('close', (code, signal) => resolve({ code, signal, out, err }));
  });
}

/** Runs every case with at most CONCURRENCY CLI processes at once. */
async function runAll(files: string[]): Promise<Map<string, Outcome>> {
  const results = new Map<string, Outcome>();
  let next = 0;
  const worker = async (): Promise<void> => {
    while (next < files.length) {
      const file = files[next++];
      const outDir = join(tmp, `out-${results.size}-${file.replace(/[^\w.-]/g, '_')}`);
      mkdirSync(outDir, { recursive: true });
      const r = await plenum(['run', file, '--json', join(outDir, 'out.json'), '--csv', join(outDir, 'out.csv')]);
      results.set(file, { ...r, outDir });
    }
  };
  await Promise.all(Array.from({ length: CONCURRENCY }, worker));
  return results;
}

const STACK_LINE = /^\s+at .*(:\d+:\d+\)?|\(native\))$/m;

function checkOutcome(file: string, r: Outcome, e: Expected): void {
  const context = `${file}\n${r.err.slice(0, 2000)}`;
  expect(r.signal, context).toBeNull();
  expect(r.code, context).toBe(2);
  expect(r.err, context).toContain(`${file}:${e.line}:${e.column}: error [${e.code}]`);
  expect(r.err, context).not.toMatch(STACK_LINE);
  expect(r.err, context).not.toContain('internal error');
  expect(r.err, context).toContain('nothing was simulated or written');
  expect(r.out, context).toBe('');
  // no output and no temporary file
  expect(readdirSync(r.outDir), context).toEqual([]);
}

const committed = Object.keys(manifest).sort();
const cases = generated();
let outcomes: Map<string, Outcome>;

beforeAll(async () => {
  const genDir = join(tmp, 'generated');
  mkdirSync(genDir);
  for (const c of cases) writeFileSync(join(genDir, c.name), c.content);
  const files = [
    ...committed.map((f) => relative(ROOT, join(BAD, f))),
    ...cases.map((c) => relative(ROOT, join(genDir, c.name))),
  ];
  outcomes = await runAll(files);
}, 600_000);

describe('the corpus of malformed netlists', () => {
  it('has a manifest entry for every committed file and a file for every entry', () => {
    const files = readdirSync(BAD).filter((f) => f.endsWith('.yaml')).sort();
    expect(files).toEqual(committed);
    expect(files.length).toBeGreaterThanOrEqual(60);
    for (const f of files) expect(f).toMatch(/^\d{3}-[a-z0-9-]+\.yaml$/);
  });

  it.each(committed)('%s: exit 2, the expected diagnostic, no stack trace, nothing written', (f) => {
    const file = relative(ROOT, join(BAD, f));
    checkOutcome(file, outcomes.get(file)!, manifest[f]);
  });

  it.each(cases.map((c) => [c.name, c] as const))('generated %s: exit 2, the expected diagnostic, nothing written', (name, c) => {
    const file = relative(ROOT, join(tmp, 'generated', name));
    checkOutcome(file, outcomes.get(file)!, c.expected);
  });

  it('prints at most 50 diagnostics and counts the rest', () => {
    const file = relative(ROOT, join(tmp, 'generated', 'g13-many-errors.yaml'));
    const err = outcomes.get(file)!.err;
    expect(err.match(/: error \[/g)).toHaveLength(50);
    expect(err).toContain('... and 4950 more problems not shown');
    expect(err).toContain('5000 errors in');
  });

  it('clips a huge unknown key in its message: a few lines, not megabytes', () => {
    const file = relative(ROOT, join(tmp, 'generated', 'g16-huge-unknown-key.yaml'));
    const err = outcomes.get(file)!.err;
    expect(err.length).toBeLessThan(20_000);
    expect(err).toMatch(/characters\)/);
  });

  it('prints 50 of 3 000 misspelt references, counts the rest', () => {
    const file = relative(ROOT, join(tmp, 'generated', 'g15-misspelt-references.yaml'));
    const err = outcomes.get(file)!.err;
    expect(err.match(/: error \[/g)).toHaveLength(50);
    expect(err).toContain('did you mean `cell_1`');
    expect(err).toMatch(/\.\.\. and \d+ more problems not shown/);
  });

  it('escapes control characters and breaks up CI workflow commands from the netlist', () => {
    const file = relative(ROOT, join(tmp, 'generated', 'g17-control-characters.yaml'));
    const err = outcomes.get(file)!.err;
    expect(err).not.toMatch(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/);
    expect(err).not.toMatch(/^::/m);
    expect(err).toContain('\\x1b[2J\\n::error::forged');
  });

  it('reports an alias bomb once, with the number of aliases', () => {
    const file = relative(ROOT, join(tmp, 'generated', 'g12-big-alias-bomb.yaml'));
    const err = outcomes.get(file)!.err;
    expect(err.match(/\[yaml-alias\]/g)).toHaveLength(1);
    expect(err).toContain('and 79999 more');
  });
});

describe('inputs that are not netlist files', () => {
  it('an endless device is refused at the size limit, not read into memory', async () => {
    if (!existsSync('/dev/zero')) return;
    const r = await plenum(['run', '/dev/zero']);
    expect(r.code).toBe(2);
    expect(r.err).toContain('/dev/zero:1:1: error [input-too-large]');
    expect(r.err).toContain(`longer than the limit of ${MAX_SOURCE_BYTES} bytes`);
  });

  it('a directory and a missing file exit 2 with a message and no stack trace', async () => {
    for (const [arg, text] of [[tmp, 'is a directory'], [join(tmp, 'nope.yaml'), 'no such file']] as const) {
      const r = await plenum(['run', arg]);
      expect(r.code).toBe(2);
      expect(r.err).toContain(text);
      expect(r.err).not.toMatch(STACK_LINE);
    }
  });
});
