/** Overrides by netlist path: checked paths, edited YAML, diagnostics mapped back to the user's input. */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { applyOverrides, checkPath, overrideValue, readWithOverrides, splitPath, type Override } from '../../src/netlist/override.js';
import { readNetlist } from '../../src/netlist/read.js';
import { parseYamlTree } from '../../src/netlist/yaml-tree.js';

const FILE = 'networks/cushion-runaway.yaml';
const source = readFileSync(FILE, 'utf8');

function ov(path: string, text: string): Override {
  return { path: splitPath(path), value: overrideValue(text), label: `${path} = ${text}` };
}

describe('checkPath', () => {
  it('accepts paths to values, including list items and keys inside flow mappings', () => {
    for (const p of ['chambers.cell_a.thickness', 'valves.crossover_valve.schedule.0.at', 'chambers.cell_a.start.stretch', 'simulate.tolerance', 'lines.crossover.diameter']) {
      const r = checkPath(source, p);
      expect(r.ok, p).toBe(true);
      if (r.ok) expect(r.exists).toBe(true);
    }
  });

  it('accepts a key not yet written in an existing mapping (a defaulted parameter)', () => {
    const r = checkPath(source, 'lines.crossover.roughness');
    expect(r).toEqual({ ok: true, path: ['lines', 'crossover', 'roughness'], exists: false });
  });

  it('refuses a misspelt name with a did-you-mean', () => {
    const r = checkPath(source, 'chambers.cel_a.thickness');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.hint).toMatch(/^did you mean `cell_a`/);
    const k = checkPath(source, 'chambers.cell_a.thicknes');
    expect(!k.ok && k.hint).toBe('did you mean `thickness`?');
  });

  it('refuses list indices out of range, mappings and paths through single values', () => {
    const idx = checkPath(source, 'valves.crossover_valve.schedule.3.at');
    expect(!idx.ok && idx.hint).toMatch(/0\.\.0/);
    const map = checkPath(source, 'chambers.cell_a.start');
    expect(!map.ok && map.message).toMatch(/mapping/);
    expect(!map.ok && map.hint).toMatch(/stretch/);
    const through = checkPath(source, 'chambers.cell_a.thickness.value');
    expect(through.ok).toBe(false);
    expect(checkPath(source, 'chambers..x').ok).toBe(false);
  });
});

describe('applyOverrides', () => {
  it('sets values (numbers as numbers), keeps everything else, and the result reads', () => {
    const text = applyOverrides(source, [ov('chambers.cell_a.thickness', '1.4 mm'), ov('chambers.cell_b.start.stretch', '1.65'), ov('simulate.duration', '9 s')]);
    const doc = readNetlist(text, FILE);
    expect(doc.ok).toBe(true);
    if (!doc.ok) return;
    const a = doc.value.chambers.find((c) => c.name === 'cell_a');
    const b = doc.value.chambers.find((c) => c.name === 'cell_b');
    expect(a?.wall).toMatchObject({ thickness: 0.0014 });
    expect(b?.start).toEqual({ by: 'stretch', value: 1.65 });
    expect(doc.value.simulate.duration).toBe(9);
    expect(doc.value.expect.length).toBe(3);
    expect(text).toContain('# Two cells of an inflatable seat cushion');
  });
});

describe('readWithOverrides', () => {
  it('a bad override value is reported against the override, not a line of the edited text', () => {
    const r = readWithOverrides(source, FILE, [ov('chambers.cell_a.thickness', '-1 mm')]);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.diagnostics[0].file).toBe(`${FILE} (override chambers.cell_a.thickness = -1 mm)`);
    expect(r.diagnostics[0].line).toBe(0);
    expect(r.diagnostics[0].code).toBe('out-of-range');
  });

  it('a problem elsewhere caused by an override points at the original line and names the override', () => {
    // A shorter duration puts the expectation window [0 s, 8 s] past the end of the run.
    const r = readWithOverrides(source, FILE, [ov('simulate.duration', '2 s')]);
    const all = r.ok ? r.warnings : r.diagnostics;
    const d = all.find((x) => x.path[0] === 'expect');
    expect(d, JSON.stringify(all)).toBeDefined();
    if (!d) return;
    expect(d.file).toBe(FILE);
    const line = source.split('\n').findIndex((l) => l.includes('over: [0 s, 8 s]')) + 1;
    expect(d.line).toBe(line);
    expect(d.message).toContain('with simulate.duration = 2 s');
  });

  it('without overrides it is readNetlist', () => {
    const r = readWithOverrides(source, FILE, []);
    expect(r.ok).toBe(true);
  });
});

describe('overrides set in the parsed netlist (one parse for many cases)', () => {
  // The same overrides through the text (applyOverrides, then the reader) and through the tree
  // (overrideTree) must give the same document and the same diagnostics. Positions differ where
  // the text path re-wrote flow mappings as blocks (its positions are those of the edited
  // text); the tree path keeps the user's own lines, checked against the unedited netlist.
  const noPos = (x: unknown): unknown => JSON.parse(JSON.stringify(x, (k, v) => (k === 'pos' || k === 'line' || k === 'column' ? undefined : v)));
  const strip = (r: ReturnType<typeof readWithOverrides>): unknown =>
    noPos(r.ok ? { ...r.value, source: undefined, warnings: r.warnings } : r.diagnostics);
  const cases: [string, [string, string][]][] = [
    ['networks/cushion-runaway.yaml', [['chambers.cell_a.thickness', '1.4 mm'], ['chambers.cell_b.start.stretch', '1.65'], ['simulate.duration', '7 s']]],
    ['networks/cushion-runaway.yaml', [['lines.crossover.roughness', '0.01 mm']]],
    ['networks/cushion-runaway.yaml', [['valves.crossover_valve.schedule.0.at', '2 s'], ['chambers.cell_a.thickness', '-1 mm']]],
    ['networks/cushion-runaway.yaml', [['chambers.cell_a.wall', 'rubber'], ['simulate.tolerance', 'true']]],
    ['networks/gripper-charge.yaml', [['lines.feed_tube.diameter', '3 mm'], ['chambers.finger.limits.stretch', '4']]],
  ];
  it.each(cases)('%s with %j', (file, sets) => {
    const text = readFileSync(file, 'utf8');
    const overrides = sets.map(([p, v]) => ov(p, v));
    const tree = parseYamlTree(text, file);
    const before = JSON.stringify(tree);
    const viaText = readWithOverrides(text, file, overrides);
    const viaTree = readWithOverrides(text, file, overrides, tree);
    expect(strip(viaTree)).toEqual(strip(viaText));
    const plain = readNetlist(text, file);
    if (plain.ok && viaTree.ok) expect(viaTree.value.chambers.map((c) => c.pos)).toEqual(plain.value.chambers.map((c) => c.pos));
    expect(JSON.stringify(tree)).toBe(before); // the shared tree is not touched
  });
});
