/**
 * Determinism: the same netlist gives byte-identical CSV and baselines on every run, and JSON
 * that is identical apart from the wall-clock time in `stats.wall_ms`. Through the bundled CLI,
 * for every example netlist (they cover both integrators, events and breakpoints).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

function plenum(...args: string[]): number {
  const r = spawnSync(process.execPath, ['bin/plenum', ...args], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return r.status ?? -1;
}

const tmp = mkdtempSync(join(tmpdir(), 'plenum-determinism-'));
const examples = readdirSync('networks').filter((f) => f.endsWith('.yaml')).sort();

describe('two runs give identical outputs', () => {
  for (const f of examples) {
    it(f, () => {
      const out = (k: number, ext: string): string => join(tmp, `${f}.${k}.${ext}`);
      for (const k of [1, 2]) expect(plenum('run', `networks/${f}`, '-q', '--csv', out(k, 'csv'), '--json', out(k, 'json'), '--baseline', out(k, 'base.json'))).toBe(0);
      const csv1 = readFileSync(out(1, 'csv'));
      expect(csv1.length).toBeGreaterThan(1000);
      expect(readFileSync(out(2, 'csv')).equals(csv1)).toBe(true);
      expect(readFileSync(out(2, 'base.json')).equals(readFileSync(out(1, 'base.json')))).toBe(true);
      const json = (k: number): string => {
        const j = JSON.parse(readFileSync(out(k, 'json'), 'utf8'));
        expect(typeof j.stats.wall_ms).toBe('number');
        delete j.stats.wall_ms;
        return JSON.stringify(j);
      };
      expect(json(2)).toBe(json(1));
    });
  }
});
