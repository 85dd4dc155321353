// The fast netlist reader (src/netlist/fast-yaml.ts) against the general path (the yaml package,
// YAML 1.2.2 core schema, through yaml-tree.ts): whenever the fast path accepts a text, its tree
// must equal the general path's exactly (values, paths, positions) and the general path must
// find no problem in it. Checked on every netlist in the repository, the generated benchmark
// networks, and thousands of random edits of them (a differential test; the edits are
// deterministic pseudo-random).
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { fastYamlTree } from '../../src/netlist/fast-yaml.js';
import { parseYamlTree } from '../../src/netlist/yaml-tree.js';
import { chainNetlist, gridNetlist, starNetlist } from '../../bench/networks.js';

function yamlFiles(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) { if (name !== 'node_modules' && !name.startsWith('.')) out.push(...yamlFiles(p)); }
    else if (name.endsWith('.yaml') || name.endsWith('.yml')) out.push(p);
  }
  return out;
}

const files = [...yamlFiles('networks'), ...yamlFiles('test')];
const texts: [string, string][] = [
  ...files.map((f) => [f, readFileSync(f, 'utf8')] as [string, string]),
  ['generated chain', chainNetlist(30)],
  ['generated grid', gridNetlist(40)],
  ['generated star', starNetlist(20)],
];

/** Both paths on one text: the fast tree (or undefined) and the general one. */
function both(text: string): { fast: ReturnType<typeof fastYamlTree>; general: ReturnType<typeof parseYamlTree> } {
  return { fast: fastYamlTree(text), general: parseYamlTree(text, 'x.yaml', false) };
}

/** Deterministic pseudo-random integers in [0, n) (a 32-bit LCG; common practice for tests). */
function lcg(seed: number): (n: number) => number {
  let s = seed >>> 0;
  return (n) => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return Math.floor((s / 2 ** 32) * n);
  };
}

const PIECES = [' ', '  ', ':', ': ', '-', '- ', '#', ' #', '{', '}', '[', ']', ',', ', ', '"', '\'', '\n', '\n  ', 'a', 'x: 1', '1', '.5', '0x1F', '0o7', 'true', 'null', '~', '&a', '*a', '!t', '|', '>', '?', '%', '---', '\\', 'é', '1e3', '-1', '.inf', 'key:'];

function mutate(text: string, rnd: (n: number) => number): string {
  const edits = 1 + rnd(3);
  let t = text;
  for (let k = 0; k < edits; k++) {
    const at = rnd(t.length + 1);
    switch (rnd(4)) {
      case 0: t = t.slice(0, at) + t.slice(at + 1 + rnd(3)); break; // delete
      case 1: t = t.slice(0, at) + PIECES[rnd(PIECES.length)] + t.slice(at); break; // insert
      case 2: { // duplicate a line
        const lines = t.split('\n');
        const i = rnd(lines.length);
        lines.splice(i, 0, lines[i]);
        t = lines.join('\n');
        break;
      }
      default: { // re-indent a line
        const lines = t.split('\n');
        const i = rnd(lines.length);
        lines[i] = ' '.repeat(rnd(5)) + lines[i].trimStart();
        t = lines.join('\n');
      }
    }
  }
  return t;
}

describe('fast netlist reader against the yaml package', () => {
  it('accepts every example netlist and every generated benchmark netlist (so large networks read fast)', () => {
    for (const [name, text] of texts) {
      if (name.startsWith('networks/') || name.startsWith('generated')) expect(fastYamlTree(text), name).toBeDefined();
    }
  });

  for (const [name, text] of texts) {
    it(`gives the general path's tree for ${name}`, () => {
      const { fast, general } = both(text);
      if (!fast) return; // outside the subset: read by the general path, nothing to compare
      expect(general.diagnostics, name).toEqual([]);
      expect(fast.root).toEqual(general.root);
    });
  }

  it('on 4 000 random edits: accepted means the same tree and no problem found by the general path', () => {
    const rnd = lcg(20261202);
    let accepted = 0, rejected = 0;
    for (let k = 0; k < 4000; k++) {
      const [, base] = texts[rnd(texts.length)];
      const text = mutate(base, rnd);
      const { fast, general } = both(text);
      if (!fast) { rejected++; continue; }
      accepted++;
      expect(general.diagnostics.filter((d) => d.severity === 'error'), text).toEqual([]);
      expect(fast.root, text).toEqual(general.root);
    }
    // both outcomes occur, so the comparison above is exercised
    expect(accepted).toBeGreaterThan(400);
    expect(rejected).toBeGreaterThan(400);
  });

  it('falls back on what it does not read: aliases, tags, block scalars, tabs, multi-line flow, duplicate keys', () => {
    const base = 'format: 1\nchambers:\n  a: { wall: rigid, volume: 1 L }\n';
    expect(fastYamlTree(base)).toBeDefined();
    for (const bad of [
      'format: 1\nx: &a 1\ny: *a\n', 'format: !!int 1\n', 'title: |\n  text\n', 'format:\t1\n',
      'a: [1,\n  2]\n', 'format: 1\nformat: 2\n', 'a: "x\\ny"\n', '---\nformat: 1\n', 'a:\n- 1\n', '? a\n: 1\n',
    ]) {
      expect(fastYamlTree(bad), bad).toBeUndefined();
    }
  });
});
