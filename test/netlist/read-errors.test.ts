import { describe, expect, it } from 'vitest';
import type { Diagnostic } from '../../src/diag/diagnostic.js';
import { readNetlist } from '../../src/netlist/read.js';
import { MAX_SOURCE_BYTES } from '../../src/netlist/limits.js';

/**
 * A valid netlist; each case edits it. Line numbers below refer to this layout:
 *   1 format  2 chambers  3 cell  4 wall  5 volume  6 start  7 lines  8 vent  9 simulate
 * and anything appended starts at line 10.
 */
const BASE = `format: 1
chambers:
  cell:
    wall: rigid
    volume: 1 L
    start: { pressure: 100 kPa gauge }
lines:
  vent: { from: cell, to: ambient, diameter: 1 mm, length: 1 m }
simulate: { duration: 1 s }
`;

function edit(from: string, to: string, append = ''): string {
  if (!BASE.includes(from)) throw new Error(`the base has no ${from}`);
  return BASE.replace(from, to) + append;
}

function problems(source: string): Diagnostic[] {
  const r = readNetlist(source, 'rig.yaml');
  if (r.ok) throw new Error(`accepted:\n${source}`);
  return r.diagnostics;
}

/** The first error with `code`; fails with the full list when there is none. */
function find(source: string, code: string): Diagnostic {
  const ds = problems(source);
  const d = ds.find((x) => x.code === code && x.severity === 'error');
  if (!d) throw new Error(`no ${code} among:\n${ds.map((x) => `${x.line}:${x.column} ${x.code} ${x.message}`).join('\n')}`);
  return d;
}

function expectAt(source: string, code: string, line: number, column: number): Diagnostic {
  const d = find(source, code);
  expect([d.line, d.column], `${code}: ${d.message}`).toEqual([line, column]);
  expect(d.file).toBe('rig.yaml');
  expect(d.hint, `${code} has a hint`).toBeTruthy();
  return d;
}

const VALVE_BLOCK = (body: string): string => `valves:\n  v:\n    from: cell\n    to: ambient\n${body}`;
const ORIFICE = '    orifice: 1 mm\n    discharge-coefficient: 0.6\n';

describe('readNetlist: the base netlist is valid', () => {
  it('parses without problems', () => {
    const r = readNetlist(BASE, 'rig.yaml');
    expect(r.ok && r.warnings).toEqual([]);
  });
});

describe('readNetlist: input guards', () => {
  it('YAML syntax error', () => {
    // `chambers: [1, 2` swallows the next lines into the flow list; the parser reports the
    // first problem where the implicit key `cell:` shows up inside it.
    expectAt(edit('chambers:\n', 'chambers: [1, 2\n'), 'yaml-syntax', 2, 15);
  });

  it('duplicate key', () => {
    expectAt(edit('    volume: 1 L\n', '    volume: 1 L\n    volume: 2 L\n'), 'duplicate-key', 6, 5);
  });

  it('alias bomb: aliases are refused before anything expands', () => {
    const rows = ['format: 1', 'a: &a [x, x, x, x, x, x, x, x, x]'];
    for (let i = 1; i < 12; i++) rows.push(`${String.fromCharCode(97 + i)}: &${String.fromCharCode(97 + i)} [${Array(9).fill(`*${String.fromCharCode(96 + i)}`).join(', ')}]`);
    const d = expectAt(rows.join('\n') + '\n', 'yaml-alias', 3, 8);
    expect(d.message).toContain('*a');
  });

  it('unknown tags (warnings in YAML) are errors', () => {
    expectAt(edit('volume: 1 L', 'volume: !python/object 1 L'), 'yaml-tag', 5, 13);
  });

  it('several documents', () => {
    expectAt(BASE + '---\nformat: 1\n', 'yaml-syntax', 10, 1);
  });

  it('empty file', () => {
    expectAt('', 'empty-netlist', 1, 1);
    expectAt('# only a comment\n', 'empty-netlist', 1, 1);
  });

  it('binary junk', () => {
    const d = expectAt('format: 1\nchambers:\n\u0000\u0007\u00ff\u0001junk', 'input-binary', 3, 1);
    expect(d.message).toContain('does not look like a YAML netlist');
    expectAt('format: 1\ntitle: caf\uFFFD\n', 'input-binary', 2, 11);
  });

  it('oversized file (limit 8 MiB)', () => {
    const d = expectAt('format: 1\n' + '#'.repeat(MAX_SOURCE_BYTES), 'input-too-large', 1, 1);
    expect(d.message).toContain('8388608 bytes (8 MiB)');
  });

  it('deep nesting is refused before the YAML parser recurses', () => {
    // Line 2 is `x: [[[...`: depth 1 (the key) + brackets; the 32nd bracket (column 35) exceeds 32.
    expectAt('format: 1\nx: ' + '['.repeat(200_000) + ']'.repeat(200_000) + '\n', 'too-deep', 2, 35);
    const block = Array.from({ length: 40 }, (_, i) => `${' '.repeat(2 * i)}k${i}:`).join('\n');
    expectAt('format: 1\n' + block + ' 1\n', 'too-deep', 34, 65);
  });

  it('a top level that is not a mapping', () => {
    expectAt('- format: 1\n', 'wrong-type', 1, 1);
  });
});

describe('readNetlist: top level', () => {
  it('missing format', () => {
    expectAt(BASE.replace('format: 1\n', ''), 'format-missing', 1, 1);
  });

  it('unsupported format', () => {
    expectAt(BASE.replace('format: 1', 'format: 2'), 'format-version', 1, 9);
  });

  it('unknown top-level key with did-you-mean', () => {
    const d = expectAt(BASE + 'simluate: {}\n', 'unknown-key', 10, 1);
    expect(d.hint).toBe('did you mean `simulate`?');
  });

  it('a key nothing resembles lists the allowed keys, each once (a chamber with no wall: the keys of every wall law)', () => {
    const d = find(edit('    wall: rigid\n    volume: 1 L\n', '    zzzz: 3\n'), 'unknown-key');
    expect(d.hint).toMatch(/^allowed keys: /);
    const keys = d.hint!.replace('allowed keys: ', '').split(', ');
    expect(keys.length).toBeGreaterThan(5);
    expect(new Set(keys).size).toBe(keys.length);
  });

  it('unknown gas with did-you-mean', () => {
    const d = expectAt(BASE + 'gas: helim\n', 'unknown-gas', 10, 6);
    expect(d.hint).toContain('did you mean `helium`?');
  });

  it('missing simulate.duration', () => {
    const d = expectAt(edit('simulate: { duration: 1 s }', 'simulate: { sample: 1 ms }'), 'missing-key', 9, 1);
    expect(d.path).toEqual(['simulate', 'duration']);
  });

  it('sample longer than duration', () => {
    expectAt(edit('{ duration: 1 s }', '{ duration: 1 s, sample: 2 s }'), 'out-of-range', 9, 36);
  });

  it('tolerance out of (0, 0.1]', () => {
    expectAt(edit('{ duration: 1 s }', '{ duration: 1 s, tolerance: 0.5 }'), 'out-of-range', 9, 39);
  });

  it('unknown method', () => {
    const d = expectAt(edit('{ duration: 1 s }', '{ duration: 1 s, method: implict }'), 'unknown-value', 9, 36);
    expect(d.hint).toContain('`implicit`');
  });

  it('max-steps must be a whole number', () => {
    expectAt(edit('{ duration: 1 s }', '{ duration: 1 s, max-steps: 1.5 }'), 'wrong-type', 9, 39);
  });

  it('heat: exchange needs heat-transfer on every chamber', () => {
    const d = expectAt(BASE + 'heat: exchange\n', 'missing-key', 3, 3);
    expect(d.path).toEqual(['chambers', 'cell', 'heat-transfer']);
  });
});

describe('readNetlist: names and references', () => {
  it('unknown key with did-you-mean, reported once', () => {
    const ds = problems(edit('diameter: 1 mm', 'diamter: 1 mm'));
    expect(ds).toHaveLength(1);
    expect(ds[0]).toMatchObject({ code: 'unknown-key', line: 8, column: 36, path: ['lines', 'vent', 'diamter'] });
    expect(ds[0].hint).toBe('did you mean `diameter`?');
  });

  it('a parameter of another wall law is explained', () => {
    const d = expectAt(edit('    volume: 1 L\n', '    volume: 1 L\n    radius: 2 cm\n'), 'unknown-key', 6, 5);
    expect(d.hint).toContain('a `rigid` wall takes volume');
  });

  it('unknown wall law with did-you-mean', () => {
    const d = expectAt(edit('wall: rigid', 'wall: rigd'), 'unknown-wall', 4, 11);
    expect(d.hint).toContain('did you mean `rigid`?');
  });

  it('unknown node in a line', () => {
    const d = expectAt(edit('to: ambient', 'to: ambeint'), 'unknown-reference', 8, 27);
    expect(d.hint).toBe('did you mean `ambient`?');
  });

  it('self-connection', () => {
    expectAt(edit('to: ambient', 'to: cell'), 'self-connection', 8, 27);
  });

  it('duplicate names across sections', () => {
    const d = expectAt(edit('  vent:', '  cell:'), 'duplicate-name', 8, 3);
    expect(d.message).toContain('already used by a chamber');
  });

  it('reserved name `ambient`', () => {
    expectAt(edit('  cell:', '  ambient:'), 'reserved-name', 3, 3);
  });

  it('names must be identifiers', () => {
    expectAt(edit('  vent:', '  vent-1:'), 'bad-name', 8, 3);
  });

  it('a feed must go into a chamber', () => {
    const src = BASE + 'reservoirs:\n  r: { pressure: 1 bar abs }\nfeeds:\n  f: { into: r, rate: 1 g/s }\n';
    expectAt(src, 'wrong-reference', 13, 14);
  });

  it('a chamber connected to nothing is an error (an isolated chamber is almost always a slip)', () => {
    const d = expectAt(BASE.replace('lines:\n  vent: { from: cell, to: ambient, diameter: 1 mm, length: 1 m }\n', ''), 'unconnected-chamber', 3, 3);
    expect(d.hint).toContain('initially: closed');
  });

  it('a chamber with only a feed is connected (a vessel being charged)', () => {
    const r = readNetlist(BASE.replace('lines:\n  vent: { from: cell, to: ambient, diameter: 1 mm, length: 1 m }\n', 'feeds:\n  pump: { into: cell, rate: 1 g/s }\n'), 'rig.yaml');
    expect(r.ok && r.warnings).toEqual([]);
  });

  it('a reference with another error does not also make the chamber unconnected', () => {
    const ds = problems(edit('  vent:', '  vent-1:'));
    expect(ds.map((d) => d.code)).toEqual(['bad-name']);
  });
});

describe('readNetlist: values', () => {
  it('wrong dimension', () => {
    const d = expectAt(edit('volume: 1 L', 'volume: 1 kPa'), 'unit-dimension', 5, 13);
    expect(d.message).toContain('expected a volume, got a pressure');
  });

  it('missing gauge/abs', () => {
    const d = expectAt(edit('100 kPa gauge', '100 kPa'), 'pressure-reference', 6, 24);
    expect(d.hint).toBe('write `100 kPa gauge` (= 201.325 kPa abs) or `100 kPa abs`');
  });

  it('negative size', () => {
    expectAt(edit('diameter: 1 mm', 'diameter: -1 mm'), 'out-of-range', 8, 46);
  });

  it('zero size', () => {
    const d = expectAt(edit('length: 1 m', 'length: 0 m'), 'out-of-range', 8, 60);
    expect(d.message).toContain('greater than 0');
  });

  it('non-finite value', () => {
    expectAt(edit('volume: 1 L', 'volume: .inf'), 'not-finite', 5, 13);
    expectAt(edit('volume: 1 L', 'volume: .nan'), 'not-finite', 5, 13);
  });

  it('case slip in a unit name', () => {
    const k = expectAt(edit('100 kPa gauge', '100 kpa gauge'), 'unit-unknown', 6, 24);
    expect(k.hint).toContain('did you mean `kPa`?');
  });

  it('start with two states', () => {
    expectAt(edit('{ pressure: 100 kPa gauge }', '{ pressure: 100 kPa gauge, mass: 1 g }'), 'conflicting-keys', 6, 39);
  });

  it('stretch start on a rigid chamber', () => {
    expectAt(edit('{ pressure: 100 kPa gauge }', '{ stretch: 1.2 }'), 'not-applicable', 6, 23);
  });

  it('stretch start beyond the Gent lock stretch', () => {
    // Jm = 10: 2λ² + λ⁻⁴ − 3 = 10 at λ = 2.54718 (2·2.54718² + 2.54718⁻⁴ − 3 = 12.976 + 0.024 − 3),
    // so a start stretch of 3 is locked.
    const src = edit('    wall: rigid\n    volume: 1 L\n    start: { pressure: 100 kPa gauge }\n', '    wall: gent\n    radius: 2 cm\n    thickness: 1 mm\n    shear-modulus: 0.4 MPa\n    limit: 10\n    start: { stretch: 3 }\n');
    const d = expectAt(src, 'gent-lock', 9, 23);
    expect(d.message).toContain('2.547');
  });

  it('Mooney–Rivlin constants: c1 > 0, c2 ≥ 0', () => {
    const src = edit('    wall: rigid\n    volume: 1 L\n', '    wall: mooney-rivlin\n    radius: 2 cm\n    thickness: 1 mm\n    c1: 0 MPa\n    c2: -1 kPa\n');
    const ds = problems(src).filter((d) => d.code === 'out-of-range');
    expect(ds.map((d) => [d.line, d.column])).toEqual([[7, 9], [8, 9]]);
  });

  it('mixed-up entries in a measured table', () => {
    const src = edit('    wall: rigid\n    volume: 1 L\n    start: { pressure: 100 kPa gauge }\n', '    wall: measured\n    points: [[0.1 L, 0 kPa], [2 kPa, 0.5 L], [1 L, 3 kPa]]\n    start: { mass: 1 g }\n');
    const d = expectAt(src, 'unit-dimension', 5, 31);
    expect(d.message).toContain('point 2');
    expect(d.message).toContain('swapped');
  });

  it('a measured table needs 3 points', () => {
    const src = edit('    wall: rigid\n    volume: 1 L\n    start: { pressure: 100 kPa gauge }\n', '    wall: measured\n    points: [[0.1 L, 0 kPa], [0.5 L, 2 kPa]]\n    start: { mass: 1 g }\n');
    expectAt(src, 'too-few-points', 5, 13);
  });

  it('schedule out of order', () => {
    const src = BASE + VALVE_BLOCK(ORIFICE + '    schedule:\n      - { at: 2 s, open: 100% }\n      - { at: 1 s, open: 0% }\n');
    expectAt(src, 'schedule-order', 18, 15);
  });

  it('opening of 120 %', () => {
    const src = BASE + VALVE_BLOCK(ORIFICE + '    schedule:\n      - { at: 2 s, open: 120% }\n');
    expectAt(src, 'out-of-range', 17, 26);
  });

  it('a valve with two ratings', () => {
    const src = BASE + VALVE_BLOCK('    conductance: 1 L/(s*bar)\n    critical-ratio: 0.3\n' + ORIFICE + '    initially: open\n');
    expectAt(src, 'conflicting-keys', 16, 5);
  });

  it('critical-ratio in (0, 1) and discharge-coefficient in (0, 1]', () => {
    expectAt(BASE + VALVE_BLOCK('    conductance: 1 L/(s*bar)\n    critical-ratio: 1\n    initially: open\n'), 'out-of-range', 15, 21);
    expectAt(BASE + VALVE_BLOCK('    orifice: 1 mm\n    discharge-coefficient: 1.2\n    initially: open\n'), 'out-of-range', 15, 28);
  });

  it('relief must reseat below where it opens', () => {
    const src = BASE + VALVE_BLOCK(ORIFICE + '    relief: { opens-above: 50 kPa gauge, reseats-below: 60 kPa gauge }\n');
    expectAt(src, 'out-of-range', 16, 57);
  });

  it('proportional relief: full lift must be above the set pressure', () => {
    const src = BASE + VALVE_BLOCK(ORIFICE + '    relief: { opens-above: 50 kPa gauge, full-lift-at: 45 kPa gauge }\n');
    const d = expectAt(src, 'out-of-range', 16, 56);
    expect(d.message).toContain('`full-lift-at` must be higher than `opens-above`');
  });

  it('relief: pop action or proportional lift, not both, not neither', () => {
    expectAt(BASE + VALVE_BLOCK(ORIFICE + '    relief: { opens-above: 50 kPa gauge, reseats-below: 45 kPa gauge, full-lift-at: 55 kPa gauge }\n'), 'conflicting-keys', 16, 85);
    expectAt(BASE + VALVE_BLOCK(ORIFICE + '    relief: { opens-above: 50 kPa gauge }\n'), 'missing-key', 16, 13);
  });

  it('a valve that opens in two ways', () => {
    const src = BASE + VALVE_BLOCK(ORIFICE + '    initially: open\n    check: { cracking: 5 kPa }\n');
    expectAt(src, 'conflicting-keys', 17, 5);
  });

  it('an in-line valve whose ends disagree with its line', () => {
    const src = BASE + 'valves:\n  v: { in-line: vent, from: ambient, orifice: 1 mm, discharge-coefficient: 0.6, initially: open }\n';
    expectAt(src, 'in-line-mismatch', 11, 29);
  });

  it('one valve per line', () => {
    const v = (name: string): string => `  ${name}: { in-line: vent, orifice: 1 mm, discharge-coefficient: 0.6, initially: open }\n`;
    const d = expectAt(BASE + 'valves:\n' + v('v1') + v('v2'), 'conflicting-keys', 12, 18);
    expect(d.message).toContain('already holds valve `v1`');
  });

  it('a plain volume flow without ANR', () => {
    const d = expectAt(BASE + 'feeds:\n  f: { into: cell, rate: 10 L/min }\n', 'volume-flow-without-anr', 11, 26);
    expect(d.hint).toContain('`10 L/min ANR`');
  });

  it('a time table out of order', () => {
    expectAt(BASE + 'reservoirs:\n  r: { pressure: [[0 s, 1 bar abs], [0 s, 2 bar abs]] }\n', 'table-order', 11, 38);
  });
});

describe('readNetlist: expressions', () => {
  const reservoir = (p: string): string => `${BASE}reservoirs:\n  r: { pressure: ${p} }\n`;

  it.each(['import', 'evaluate', 'createUnit'])('an expression calling %s', (fn) => {
    const d = expectAt(reservoir(`'100 kPa + ${fn}("x") gauge'`), 'expression-forbidden', 11, 18);
    expect(d.message).toContain(`\`${fn}\``);
  });

  it('an expression of the wrong dimension', () => {
    const d = expectAt(reservoir('"100 kPa * t gauge"'), 'expression-dimension', 11, 18);
    expect(d.message).toContain('expected a pressure');
  });

  it('an expression that does not say gauge or abs', () => {
    expectAt(reservoir('"100 kPa + 5 kPa * sin(t/(1 s))"'), 'pressure-reference', 11, 18);
  });

  it('an expression that goes below vacuum within the duration', () => {
    const d = expectAt(reservoir('"-200 kPa * t/(1 s) gauge"'), 'out-of-range', 11, 18);
    expect(d.message).toContain('below vacuum');
  });

  it('the mapping form checks its keys', () => {
    expectAt(reservoir('{ expr: "1 bar", referense: abs }'), 'unknown-key', 11, 35);
  });
});

describe('readNetlist: expect', () => {
  const expectList = (items: string): string => `${BASE}expect:\n${items}`;

  it('a probe naming an unknown element', () => {
    const d = expectAt(expectList('  - { probe: cel.pressure, at: end, below: 1 bar abs }\n'), 'unknown-reference', 11, 14);
    expect(d.hint).toBe('did you mean `cell`?');
  });

  it('a probe asking for a quantity the element lacks', () => {
    const d = expectAt(expectList('  - { probe: vent.pressure, at: end, below: 1 bar abs }\n'), 'unknown-quantity', 11, 14);
    expect(d.hint).toContain('`flow` and `reynolds`');
    expectAt(expectList('  - { probe: cell.stretch, at: end, below: 2 }\n'), 'unknown-quantity', 11, 14);
  });

  it('a probe time after the end', () => {
    expectAt(expectList('  - { probe: cell.gauge, at: 5 s, below: 1 bar gauge }\n'), 'out-of-range', 11, 30);
  });

  it('a pressure comparison without gauge/abs', () => {
    expectAt(expectList('  - { probe: cell.gauge, at: end, below: 1 bar }\n'), 'pressure-reference', 11, 42);
  });

  it('over without stat', () => {
    const d = expectAt(expectList('  - { probe: cell.mass, over: [0 s, 1 s], below: 1 g }\n'), 'missing-key', 11, 5);
    expect(d.path).toEqual(['expect', 0, 'stat']);
  });

  it('`total.mass` is the network total even when an element is named total', () => {
    const src = BASE.replace('  vent:', '  total:') + 'expect:\n  - { probe: total.mass, at: end, below: 1 g }\n';
    const r = readNetlist(src, 'rig.yaml');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.warnings).toMatchObject([{ code: 'ambiguous-probe', line: 11, column: 14 }]);
    expect(r.value.expect[0]).toMatchObject({ probe: { element: 'total', quantity: 'mass' } });
  });

  it('two comparisons', () => {
    expectAt(expectList('  - { probe: cell.mass, at: end, below: 1 g, above: 0.1 g }\n'), 'conflicting-keys', 11, 46);
  });
});

describe('readNetlist: every problem is reported', () => {
  it('collects independent errors from all over the file, in order', () => {
    const src = `format: 1
chambers:
  cell:
    wall: rigid
    volume: -1 L
    start: { pressure: 100 kPa }
lines:
  vent: { from: cell, to: nowhere, diamter: 1 mm, diameter: 1 mm, length: 1 m }
valves:
  v: { from: cell, to: ambient, orifice: 1 mm, discharge-coefficient: 0.6, schedule: [{ at: 1 s, open: 150% }] }
simulate: { sample: 1 ms }
expect:
  - { probe: cell.flow, at: end, below: 1 g/s }
`;
    const ds = problems(src);
    expect(ds.map((d) => [d.code, d.line, d.column])).toEqual([
      ['out-of-range', 5, 13],
      ['pressure-reference', 6, 24],
      ['unknown-reference', 8, 27],
      ['unknown-key', 8, 36],
      ['out-of-range', 10, 104],
      ['missing-key', 11, 1],
      ['unknown-quantity', 13, 14],
    ]);
    for (const d of ds) {
      expect(d.hint).toBeTruthy();
      expect(d.path.length).toBeGreaterThan(0);
    }
  });
});
