import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { formatDiagnostic } from '../../src/diag/diagnostic.js';
import { closestMatches, didYouMean, editDistance, listChoices } from '../../src/diag/did-you-mean.js';
import { readNetlist } from '../../src/netlist/read.js';

describe('formatDiagnostic', () => {
  const src = `format: 1
chambers:
  cell: { wall: rigid, volume: 1 L, start: { pressure: 1 bar } }
lines:
  vent: { from: cell, to: ambient, diamter: 1 mm, length: 1 m }
simulate: { duration: 1 s }
`;
  const r = readNetlist(src, 'networks/rig.yaml');
  const lines = r.ok ? [] : r.diagnostics.map(formatDiagnostic);

  it('prints file:line:column: severity [code] message (at path) and the hint', () => {
    expect(lines).toEqual([
      'networks/rig.yaml:3:56: error [pressure-reference] `pressure`: the pressure `1 bar` does not say gauge or absolute (at chambers.cell.start.pressure)\n' +
        '  hint: write `1 bar gauge` (= 201.325 kPa abs) or `1 bar abs`',
      'networks/rig.yaml:5:36: error [unknown-key] unknown key `diamter` in line `vent` (at lines.vent.diamter)\n  hint: did you mean `diameter`?',
    ]);
  });

  it('never contains a stack trace, for any kind of problem', () => {
    const inputs = ['', '\u0000', 'a: [', 'format: 1\na: &x 1\nb: *x\n', src, '['.repeat(100), 'format: 1\nreservoirs: { r: { pressure: "import(1) gauge" } }\n'];
    for (const input of inputs) {
      const res = readNetlist(input, 'x.yaml');
      expect(res.ok).toBe(false);
      if (res.ok) continue;
      for (const d of res.diagnostics) {
        const text = formatDiagnostic(d);
        expect(text).toMatch(/^x\.yaml(:\d+:\d+)?: (error|warning) \[[a-z0-9-]+\] [^\n]+(\n {2}hint: [^\n]+)?$/);
        expect(text).not.toMatch(/\n\s+at |Error:|\.ts:\d+/);
      }
    }
  });
});

describe('did-you-mean', () => {
  it('counts edits, a transposition as one (Damerau 1964)', () => {
    expect(editDistance('diamter', 'diameter')).toBe(1);
    expect(editDistance('lenght', 'length')).toBe(1);
    expect(editDistance('kitten', 'sitting')).toBe(3);
    expect(editDistance('', 'abc')).toBe(3);
  });

  it('prefers case-insensitive exact matches', () => {
    expect(closestMatches('KPA', ['kPa', 'Pa', 'bar'])).toEqual(['kPa']);
    expect(didYouMean('diamter', ['diameter', 'length', 'roughness'])).toBe('did you mean `diameter`?');
    expect(didYouMean('xyzzy', ['diameter', 'length'])).toBeUndefined();
  });

  it('lists choices', () => {
    expect(listChoices(['a', 'b', 'c'])).toBe('`a`, `b` or `c`');
    expect(listChoices(['a'])).toBe('`a`');
  });
});

describe('readNetlist on damaged input', () => {
  it('never throws, and every problem has a code, a position and a hint', () => {
    const src = readFileSync(fileURLToPath(new URL('./full-netlist.yaml', import.meta.url)), 'utf8');
    const junk = ['', ' ', ':', '-', '[', ']', '{', '}', ',', '"', "'", '\n', 'x', '0', '%', '*', '&a ', '!!str ', 'kPa', 'gauge', '.nan', '~', '?', '#', '|'];
    let seed = 12345; // a fixed linear congruential sequence: the same damage every run
    const rnd = (): number => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648;
    let rejected = 0;
    for (let i = 0; i < 400; i++) {
      let s = src;
      for (let k = 0; k < 1 + Math.floor(rnd() * 4); k++) {
        const at = Math.floor(rnd() * s.length);
        s = s.slice(0, at) + junk[Math.floor(rnd() * junk.length)] + s.slice(at + Math.floor(rnd() * 6));
      }
      const r = readNetlist(s, 'f.yaml');
      if (r.ok) continue;
      rejected++;
      for (const d of r.diagnostics) {
        expect(d.line).toBeGreaterThanOrEqual(1);
        expect(d.column).toBeGreaterThanOrEqual(1);
        expect(d.code).toMatch(/^[a-z0-9-]+$/);
        expect(d.hint).toBeTruthy();
      }
    }
    expect(rejected).toBeGreaterThan(300);
  });
});
