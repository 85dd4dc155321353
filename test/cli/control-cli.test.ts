/**
 * The CLI on controllers: bad controller input exits 2 with file:line:column and writes nothing;
 * `plenum equilibria` reports an unstable loop and its growth rate; `plenum trace --vary
 * controllers.<name>.kp` locates the change of stability.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

function plenum(...args: string[]): { code: number; out: string; err: string } {
  const r = spawnSync(process.execPath, ['bin/plenum', ...args], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr };
}

const tmp = mkdtempSync(join(tmpdir(), 'plenum-control-'));

function loop(controller: string): string {
  return `format: 1
chambers:
  cell: { wall: neo-hookean, radius: 20 mm, thickness: 1 mm, shear-modulus: 0.4 MPa, start: { stretch: 1.8 } }
reservoirs:
  supply: { pressure: 200 kPa gauge }
valves:
  fill: { from: supply, to: cell, conductance: 0.05 L/(s*bar), critical-ratio: 0.5 }
lines:
  capillary: { from: cell, to: ambient, diameter: 0.5 mm, length: 1 m }
controllers:
  hold: { kind: pid, measure: cell.gauge, target: 21.57 kPa gauge, drives: fill, initially: 1.4%, ${controller} }
simulate: { duration: 0.5 s }
`;
}

describe('plenum and controllers', () => {
  it('bad controller input: exit 2, file:line:column for each problem, nothing written', () => {
    const file = join(tmp, 'bad.yaml');
    writeFileSync(file, loop('kp: 2 %/s, ki: 5 %/kPa').replace('measure: cell.gauge', 'measure: cel.gauge').replace("critical-ratio: 0.5 }", "critical-ratio: 0.5, schedule: [{ at: 0.1 s, open: 50% }] }"));
    const csv = join(tmp, 'bad.csv');
    const r = plenum('run', file, '--csv', csv);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/bad\.yaml:11:\d+: error \[unknown-reference\]/);
    expect(r.err).toMatch(/bad\.yaml:11:\d+: error \[driven-valve-operated\]/);
    expect(r.err).not.toMatch(/at .*\.js:\d+/);
    expect(existsSync(csv)).toBe(false);
  });

  it('equilibria: a direct-acting PI around a chamber past its maximum is unstable, with its growth rate', () => {
    const file = join(tmp, 'direct.yaml');
    writeFileSync(file, loop('kp: 2e-7, ki: 5e-7'));
    const r = plenum('equilibria', file, '--json', '-');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.equilibria).toHaveLength(1);
    expect(j.equilibria[0].stability).toBe('unstable');
    expect(j.equilibria[0].growth_rate).toBeGreaterThan(0);
  });

  it('trace --vary controllers.hold.kp: the gain where stability is lost', () => {
    const file = join(tmp, 'reverse.yaml');
    writeFileSync(file, loop('kp: -1e-6, ki: -2e-7'));
    const r = plenum('trace', file, '--vary', 'controllers.hold.kp', '--from', '-2e-6', '--to', '-2e-7', '--json', '-');
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    const changes = j.branches.flatMap((b: { points: { special?: string; parameter: number }[] }) => b.points.filter((p) => p.special === 'stability-change'));
    expect(changes).toHaveLength(1);
    expect(r.err).toContain('stability-change');
  });
});
