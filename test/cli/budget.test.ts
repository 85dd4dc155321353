/** `--max-wall` of `plenum equilibria` and `plenum trace` as a user gives it. */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sphereChainNetlist } from '../../bench/networks.js';

function plenum(...args: string[]): { code: number; out: string; err: string } {
  const r = spawnSync(process.execPath, ['bin/plenum', ...args], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr };
}

const tmp = mkdtempSync(join(tmpdir(), 'plenum-budget-'));

describe('--max-wall', () => {
  it('equilibria of 200 spheres: the list found within the budget, marked incomplete in the text and the JSON', () => {
    const file = join(tmp, 'spheres.yaml');
    writeFileSync(file, sphereChainNetlist(200));
    const r = plenum('equilibria', file, '--max-wall', '1 s', '--no-transient', '--json', '-');
    expect(r.code, r.err).toBe(0);
    expect(r.err).toMatch(/incomplete: the time budget of 1 s ran out/);
    expect(r.err).toMatch(/2\^200 \(1\.61e\+60\) branch combinations, \d+ Newton starts of 3264 tried/);
    const j = JSON.parse(r.out);
    expect(j.complete).toBe(false);
    expect(j.timed_out).toBe(true);
    expect(j.max_wall).toBe(1);
    expect(j.groups[0].branch_combinations).toBe(2 ** 200);
    expect(j.groups[0].examined).toBeGreaterThan(0);
    expect(j.count).toBeGreaterThanOrEqual(1);
  });

  it('refuses a budget that is not a positive time, with exit 2', () => {
    for (const bad of ['soon', '-3 s', '0', '2 kg']) {
      const r = plenum('equilibria', 'networks/cushion-runaway.yaml', '--max-wall', bad);
      expect(r.code, bad).toBe(2);
      expect(r.err).toContain('--max-wall must be a positive time');
    }
    const t = plenum('trace', 'networks/cushion-runaway.yaml', '--vary', 'mass:cell_a', '--from', '1 g', '--to', '4 g', '--max-wall', 'x');
    expect(t.code).toBe(2);
  });

  it('accepts a bare number of seconds and a unit', () => {
    const r = plenum('equilibria', 'networks/cushion-runaway.yaml', '--max-wall', '120', '--no-transient', '--json', '-', '-q');
    expect(r.code, r.err).toBe(0);
    expect(JSON.parse(r.out).max_wall).toBe(120);
    const m = plenum('equilibria', 'networks/cushion-runaway.yaml', '--max-wall', '2 min', '--no-transient', '--json', '-', '-q');
    expect(JSON.parse(m.out).max_wall).toBe(120);
    expect(JSON.parse(m.out).complete).toBe(true);
  });
});
