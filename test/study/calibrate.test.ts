/** plenum calibrate as a library: recovery, interval coverage, several recordings, identifiability, outputs. */
import { parseDocument } from 'yaml';
import { describe, expect, test } from 'vitest';
import { calibrate, calibratedNetlist, calibrationJson, residualCsv } from '../../src/index.js';
import { Evaluator } from '../../src/studies/evaluate.js';
import { caseStream } from '../../src/studies/rng.js';
import { modelFromText, runChecked } from '../helpers.js';

const RIG = `# a receiver vented through an orifice
format: 1
title: Receiver blow-down
chambers:
  receiver:
    wall: rigid
    volume: 1 L
    start: { pressure: 550 kPa gauge }   # as read on the gauge
valves:
  vent:
    from: receiver
    to: ambient
    orifice: 2 mm
    discharge-coefficient: 0.6   # catalogue value
    initially: open
simulate: { duration: 2 s, sample: 10 ms }
`;

const TIMES = Array.from({ length: 41 }, (_, k) => k * 0.05);

/** A recording made by the model itself with true values and seeded Gaussian noise (kPa). */
function recording(params: { path: string; text: string }[], seed: number, noiseKpa: number, overrides: { path: string; text: string }[] = []): string {
  const ev = new Evaluator({ source: RIG, file: 'rig.yaml', experiments: [{ overrides, probe: { times: TIMES, keys: ['receiver.gauge'] } }] });
  const r = ev.run({ experiment: 0, params });
  if (r.status !== 'completed') throw new Error(r.message);
  const rng = caseStream(seed, 0);
  const rows = TIMES.map((t, k) => `${t},${(r.probed![0][k] / 1000 + noiseKpa * rng.normal()).toFixed(5)}`);
  return ['# synthetic test recording', 'time [s],receiver.gauge [kPa]', ...rows].join('\n') + '\n';
}

const TRUE = [{ path: 'valves.vent.discharge-coefficient', text: '0.7' }, { path: 'chambers.receiver.start.pressure', text: '600 kPa gauge' }];
const FREE = ['valves.vent.discharge-coefficient=0.3..1', 'chambers.receiver.start.pressure=400 kPa gauge..800 kPa gauge'];

describe('calibrate', () => {
  test('the rig runs clean (mass balance)', () => {
    runChecked(modelFromText(RIG));
  });

  test('recovers two parameters from a noiseless model recording', async () => {
    const r = await calibrate({ source: RIG, file: 'rig.yaml', free: FREE, data: [{ text: recording(TRUE, 1, 0), file: 'b.csv' }], jobs: 1 });
    if (!r.ok) throw new Error(r.diagnostics.map((d) => d.message).join('\n'));
    expect(r.value.status).toBe('converged');
    expect(r.value.parameters[0].value).toBeCloseTo(0.7, 4);
    expect(r.value.parameters[1].value).toBeCloseTo(600e3 + 101325, -1);
    expect(r.value.channels[0].r2).toBeGreaterThan(1 - 1e-9);
  });

  test('95 % intervals cover the true values at about the nominal rate over 40 seeded noisy recordings (Seber & Wild §2.2)', async () => {
    let coverCd = 0;
    let coverP = 0;
    const seeds = 40;
    for (let s = 1; s <= seeds; s++) {
      const r = await calibrate({ source: RIG, file: 'rig.yaml', free: FREE, data: [{ text: recording(TRUE, s, 1), file: 'b.csv' }], jobs: 1 });
      if (!r.ok || r.value.status !== 'converged') throw new Error(`seed ${s}`);
      const [cd, p] = r.value.parameters;
      if (cd.low <= 0.7 && 0.7 <= cd.high) coverCd++;
      if (p.low <= 701325 && 701325 <= p.high) coverP++;
    }
    // nominal 38 of 40; below 34 has probability 1.4 % for a correct interval, and an interval
    // half as wide as it should be would cover about 27
    expect(coverCd).toBeGreaterThanOrEqual(34);
    expect(coverP).toBeGreaterThanOrEqual(34);
  }, 120_000);

  test('two recordings at different supply conditions fit one coefficient; per-recording fit reported', async () => {
    const low = [{ path: 'chambers.receiver.start.pressure', text: '300 kPa gauge' }];
    const a = recording([TRUE[0]], 3, 0.2);
    const b = recording([TRUE[0]], 4, 0.2, low).replace('# synthetic test recording', '# synthetic test recording\n# set chambers.receiver.start.pressure = 300 kPa gauge');
    const r = await calibrate({ source: RIG, file: 'rig.yaml', free: ['valves.vent.discharge-coefficient=0.3..1'], data: [{ text: a, file: 'a.csv', overrides: ['chambers.receiver.start.pressure=550 kPa gauge'] }, { text: b, file: 'b.csv' }], jobs: 1 });
    if (!r.ok) throw new Error(r.diagnostics.map((d) => d.message).join('\n'));
    // a.csv was made at 550 kPa gauge (the netlist's value) and says so; b.csv at 300 kPa gauge
    expect(r.value.experiments.map((e) => e.overrides.map((o) => o.text))).toEqual([['550 kPa gauge'], ['300 kPa gauge']]);
    expect(Math.abs(r.value.parameters[0].value - 0.7)).toBeLessThan(3 * r.value.parameters[0].stderr);
    expect(r.value.experiments[1].channels[0].rmse).toBeLessThan(400);
    expect(r.value.readings).toBe(2 * TIMES.length);
  });

  test('orifice and discharge coefficient cannot be told apart: the warning names both', async () => {
    const r = await calibrate({ source: RIG, file: 'rig.yaml', free: ['valves.vent.discharge-coefficient=0.3..1', 'valves.vent.orifice=1 mm..4 mm'], data: [{ text: recording([TRUE[0]], 5, 0.5), file: 'b.csv' }], jobs: 1 });
    if (!r.ok) throw new Error('not ok');
    const w = r.value.warnings.join('\n');
    expect(w).toMatch(/valves\.vent\.discharge-coefficient and valves\.vent\.orifice cannot be told apart/);
    expect(Math.abs(r.value.correlation[0][1])).toBeGreaterThan(0.98);
  });

  test('workers give the same answer as the main thread', async () => {
    const data = [{ text: recording(TRUE, 6, 1), file: 'b.csv' }];
    const one = await calibrate({ source: RIG, file: 'rig.yaml', free: FREE, data, jobs: 1 });
    const two = await calibrate({ source: RIG, file: 'rig.yaml', free: FREE, data, jobs: 2 });
    if (!one.ok || !two.ok) throw new Error('not ok');
    expect(two.value.parameters.map((p) => p.value)).toEqual(one.value.parameters.map((p) => p.value));
  });

  test('outputs: JSON per the contract, residual CSV, the netlist written back with comments kept', async () => {
    const r = await calibrate({ source: RIG, file: 'rig.yaml', free: ['valves.vent.discharge-coefficient=0.3..1'], data: [{ text: recording([TRUE[0]], 7, 0.3), file: 'b.csv' }], jobs: 1 });
    if (!r.ok) throw new Error('not ok');
    const j = JSON.parse(calibrationJson(r.value));
    expect(j.status).toBe('converged');
    expect(Object.keys(j.parameters['valves.vent.discharge-coefficient'])).toEqual(expect.arrayContaining(['value', 'stderr', 'low', 'high']));
    expect(Object.keys(j.channels['receiver.gauge'])).toEqual(expect.arrayContaining(['rmse', 'r2']));
    const csv = residualCsv(r.value).trim().split('\n');
    expect(csv[0]).toBe('file,line,time [s],probe,unit,measured,simulated,residual');
    expect(csv).toHaveLength(TIMES.length + 1);
    expect(csv[1].startsWith('b.csv,3,0,receiver.gauge,Pa,')).toBe(true);
    const text = calibratedNetlist(RIG, r.value);
    expect(text).toContain('# catalogue value');
    expect(text).toContain('# as read on the gauge');
    expect(text).toMatch(/^# calibrated with plenum calibrate against b\.csv/m);
    const cd = parseDocument(text).getIn(['valves', 'vent', 'discharge-coefficient']);
    expect(Math.abs(Number(cd) - r.value.parameters[0].value)).toBeLessThan(r.value.parameters[0].stderr);
    runChecked(modelFromText(text));
  });
});

describe('calibrate: bad input is a diagnostic with file:line:column', () => {
  const run = (csv: string, free = ['valves.vent.discharge-coefficient=0.3..1']) => calibrate({ source: RIG, file: 'rig.yaml', free, data: [{ text: csv, file: 'b.csv' }], jobs: 1 });
  const errorsOf = async (csv: string) => {
    const r = await run(csv);
    if (r.ok) throw new Error('expected diagnostics');
    return r.diagnostics;
  };
  test('non-monotone time', async () => {
    const d = await errorsOf('time [s],receiver.gauge [kPa]\n0,500\n0.2,400\n0.1,450\n');
    expect(d[0]).toMatchObject({ file: 'b.csv', line: 4, column: 1 });
    expect(d[0].message).toMatch(/does not increase/);
  });
  test('unknown probe, with a suggestion', async () => {
    const d = await errorsOf('time [s],reciever.gauge [kPa]\n0,500\n');
    expect(d[0]).toMatchObject({ file: 'b.csv', line: 1, column: 10 });
    expect(d[0].hint).toMatch(/receiver\.gauge/);
  });
  test('missing units', async () => {
    const d = await errorsOf('time [s],receiver.gauge\n0,500\n');
    expect(d[0]).toMatchObject({ file: 'b.csv', line: 1, column: 10, code: 'data-units' });
  });
  test('a gauge column that says abs', async () => {
    const d = await errorsOf('time [s],receiver.gauge [kPa abs]\n0,500\n');
    expect(d[0].message).toMatch(/says abs/);
  });
  test('no overlap in time with the simulation', async () => {
    const d = await errorsOf('time [s],receiver.gauge [kPa]\n10,500\n11,400\n');
    expect(d[0]).toMatchObject({ file: 'b.csv', line: 2, column: 1, code: 'data-time' });
  });
  test('a misspelt free path', async () => {
    const r = await run('time [s],receiver.gauge [kPa]\n0,500\n0.1,450\n', ['valves.vent.discharge-coeficient=0.3..1']);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.diagnostics[0].hint).toMatch(/discharge-coefficient/);
  });
});
