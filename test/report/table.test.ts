/** The terminal summary of `plenum run` (src/report/table.ts). */
import { describe, expect, it } from 'vitest';
import { summaryText, MAX_TABLE_ROWS } from '../../src/report/table.js';
import { chainNetlist } from '../../bench/networks.js';
import { modelFromFile, modelFromText, runChecked } from '../helpers.js';

describe('summaryText', () => {
  it('lists every chamber, line and valve of a small network', () => {
    const r = runChecked(modelFromFile('networks/manifold-mixed.yaml'));
    const text = summaryText(r);
    for (const name of [...Object.keys(r.chambers), ...Object.keys(r.lines), ...Object.keys(r.valves)]) {
      expect(text).toMatch(new RegExp(`^${name}\\s`, 'm'));
    }
    expect(text).not.toContain('not shown');
  });

  it(`shows the ${MAX_TABLE_ROWS} chambers and lines that swing most of a large network, in netlist order, and counts the rest`, () => {
    const r = runChecked(modelFromText(chainNetlist(120, { duration: '20 ms', sample: '1 ms' })));
    const text = summaryText(r);
    const lines = text.split('\n');
    const chamberRows = lines.filter((l) => /^c\d+\s/.test(l)).map((l) => l.split(/\s+/)[0]);
    expect(chamberRows.length).toBe(MAX_TABLE_ROWS);
    const swing = (n: string): number => r.chambers[n].peak.gauge - r.chambers[n].least.gauge;
    const ranked = Object.keys(r.chambers).sort((a, b) => swing(b) - swing(a));
    expect(new Set(chamberRows)).toEqual(new Set(ranked.slice(0, MAX_TABLE_ROWS)));
    expect(chamberRows).toEqual([...chamberRows].sort((a, b) => Number(a.slice(1)) - Number(b.slice(1))));
    expect(text).toContain(`... ${120 - MAX_TABLE_ROWS} more chambers not shown`);
    expect(lines.filter((l) => /^l\d+\s/.test(l)).length).toBe(MAX_TABLE_ROWS);
    expect(text).toContain(`... ${119 - MAX_TABLE_ROWS} more lines not shown`);
    expect(text).toContain('outcome: c0, c1, c2 … c119 (120 chambers)');
    for (const l of lines) expect(l.length).toBeLessThan(200);
  });
});
