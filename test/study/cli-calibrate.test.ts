/** `plenum calibrate`, `plenum size`, `plenum report --data` and `plenum diff` with a recording, as a user runs them. */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';

function plenum(...args: string[]): { code: number; out: string; err: string } {
  const r = spawnSync(process.execPath, ['bin/plenum', ...args], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr };
}

const tmp = mkdtempSync(join(tmpdir(), 'plenum-calibrate-'));
const RIG = 'test/reference/blowdown.yaml';
const DATA = 'test/reference/blowdown.csv';
const FREE = ['--free', 'valves.vent.discharge-coefficient=0.3..1'];

describe('plenum calibrate', () => {
  test('fits, prints the table, writes JSON, residuals and the calibrated netlist; exit 0', () => {
    const json = join(tmp, 'cal.json');
    const res = join(tmp, 'res.csv');
    const net = join(tmp, 'cal.yaml');
    const r = plenum('calibrate', RIG, '--data', DATA, ...FREE, '--jobs', '2', '--json', json, '--residuals', res, '--write-netlist', net);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/valves\.vent\.discharge-coefficient\s+0\.71/);
    expect(r.err).toBe(''); // no progress when not on a terminal
    const j = JSON.parse(readFileSync(json, 'utf8'));
    expect(j.status).toBe('converged');
    expect(j.parameters['valves.vent.discharge-coefficient'].value).toBeCloseTo(0.72, 2);
    expect(j.channels['receiver.gauge'].r2).toBeGreaterThan(0.999);
    expect(readFileSync(res, 'utf8').split('\n')[0]).toBe('file,line,time [s],probe,unit,measured,simulated,residual');
    const y = readFileSync(net, 'utf8');
    expect(y).toMatch(/discharge-coefficient: 0\.71/);
    expect(plenum('run', net, '-q').code).toBe(0);
  });

  test('bad data: exit 2 with file:line:column, nothing written', () => {
    const bad = join(tmp, 'bad.csv');
    const json = join(tmp, 'never.json');
    const cases: [string, RegExp][] = [
      ['time [s],receiver.gauge [kPa]\n0,600\n0.2,500\n0.1,550\n', /bad\.csv:4:1: error \[data-row\] the time 0\.1 does not increase/],
      ['time [s],reservoir.gauge [kPa]\n0,600\n', /bad\.csv:1:10: error \[data-probe\] the netlist has no probe `reservoir\.gauge`/],
      ['time [s],receiver.gauge\n0,600\n', /bad\.csv:1:10: error \[data-units\]/],
      ['time [s],receiver.gauge [kPa]\n100,600\n200,500\n', /bad\.csv:2:1: error \[data-time\]/],
    ];
    for (const [text, want] of cases) {
      writeFileSync(bad, text);
      const r = plenum('calibrate', RIG, '--data', bad, ...FREE, '--json', json);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(want);
      expect(r.err).not.toMatch(/at .*\.js:\d+/); // no stack trace
      expect(existsSync(json)).toBe(false);
    }
  });

  test('usage errors are exit 2', () => {
    expect(plenum('calibrate', RIG, ...FREE).code).toBe(2);
    expect(plenum('calibrate', RIG, '--data', DATA).code).toBe(2);
    expect(plenum('calibrate', RIG, '--data', DATA, '--free', 'valves.vent.discharge-coefficient=1..0.3').code).toBe(2);
  });
});

describe('plenum size', () => {
  const RIG_SIZE = join(tmp, 'vent.yaml');
  writeFileSync(RIG_SIZE, readFileSync(RIG, 'utf8') + `expect:
  - name: vented below 200 kPa gauge at 1 s
    probe: receiver.gauge
    at: 1 s
    below: 200 kPa gauge
`);
  test('found: exit 0 and the contract JSON', () => {
    const json = join(tmp, 'size.json');
    const r = plenum('size', RIG_SIZE, '--free', 'valves.vent.orifice=0.5 mm..6 mm', '--margin', '5%', '--json', json);
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(readFileSync(json, 'utf8'));
    expect(j.status).toBe('found');
    expect(j.binding).toBe('vented below 200 kPa gauge at 1 s');
    expect(j.margins['vented below 200 kPa gauge at 1 s']).toBeGreaterThanOrEqual(0.05);
    expect(j.parameters['valves.vent.orifice']).toBeGreaterThan(0.0005);
    expect(r.out).toMatch(/binding/);
  });
  test('infeasible: exit 1; bad options: exit 2', () => {
    expect(plenum('size', RIG_SIZE, '--free', 'valves.vent.orifice=0.1 mm..0.2 mm', '-q').code).toBe(1);
    expect(plenum('size', RIG_SIZE, '--free', 'valves.vent.orifise=0.1 mm..0.2 mm').code).toBe(2);
    expect(plenum('size', RIG, '--free', 'valves.vent.orifice=0.1 mm..0.2 mm').code).toBe(2); // no expectations
  });
});

describe('recordings in reports and diffs', () => {
  test('report --data adds the overlay and the residual panel; bad data is exit 2 with nothing written', () => {
    const out = join(tmp, 'r.html');
    const r = plenum('report', RIG, '--data', DATA, '--out', out, '-q');
    expect(r.code, r.err).toBe(0);
    const html = readFileSync(out, 'utf8');
    expect(html).toContain('id="fig-measured-gauge"');
    expect(html).toContain('id="fig-residuals-gauge"');
    const bad = join(tmp, 'bad2.csv');
    writeFileSync(bad, 'time [s],receiver.gage [kPa]\n0,1\n');
    const out2 = join(tmp, 'r2.html');
    const b = plenum('report', RIG, '--data', bad, '--out', out2);
    expect(b.code).toBe(2);
    expect(b.err).toMatch(/bad2\.csv:1:10/);
    expect(existsSync(out2)).toBe(false);
  });

  test('diff compares a simulated trace with a recording at the reading times', () => {
    const sim = join(tmp, 'sim.csv');
    expect(plenum('run', RIG, '-q', '--csv', sim).code).toBe(0);
    const r = plenum('diff', sim, DATA, '--tol', 'receiver.gauge=1 kPa');
    expect(r.out).toMatch(/bench recording, 81 samples, 1 channels/);
    expect(r.out).toMatch(/compared 1 channels at 81 times/);
    expect(r.code).toBe(1); // the netlist's Cd = 0.6 is not the recording's 0.72
    const cal = join(tmp, 'cal2.yaml');
    expect(plenum('calibrate', RIG, '--data', DATA, ...FREE, '--write-netlist', cal, '-q').code).toBe(0);
    const sim2 = join(tmp, 'sim2.csv');
    expect(plenum('run', cal, '-q', '--csv', sim2).code).toBe(0);
    // calibrated: within four noise standard deviations (0.3 kPa) everywhere
    expect(plenum('diff', sim2, DATA, '--tol', 'receiver.gauge=1.2 kPa').code).toBe(0);
  });
});
