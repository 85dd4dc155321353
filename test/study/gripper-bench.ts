/**
 * The synthetic bench recording of the gripper example (networks/data/gripper-charge-bench-synthetic.csv):
 * networks/gripper-charge.yaml run with "true" values that differ from the netlist's
 * (solenoid conductance 0.34 L/(s·bar) instead of 0.3, finger shear modulus 0.56 MPa instead
 * of 0.6), read at 5 ms intervals over the first 250 ms (the charge, before the relief valve acts) from the dense output, with seeded Gaussian noise (0.5 kPa on
 * the finger's gauge, 1.5 kPa on the supply's). Invented for the example; regenerate with
 * `npx tsx test/study/gripper-bench.ts > networks/data/gripper-charge-bench-synthetic.csv`.
 */
import { readFileSync } from 'node:fs';
import { Evaluator } from '../../src/studies/evaluate.js';
import { caseStream } from '../../src/studies/rng.js';

export const GRIPPER_TRUE = { conductance: '0.34 L/(s*bar)', shearModulus: '0.56 MPa' };

export function gripperBench(): string {
  const source = readFileSync('networks/gripper-charge.yaml', 'utf8');
  const times = Array.from({ length: 51 }, (_, k) => Number((k * 0.005).toFixed(3)));
  const keys = ['finger.gauge', 'supply.gauge'];
  const ev = new Evaluator({ source, file: 'gripper-charge.yaml', experiments: [{ overrides: [], probe: { times, keys } }] });
  const r = ev.run({ experiment: 0, params: [
    { path: 'valves.solenoid.conductance', text: GRIPPER_TRUE.conductance },
    { path: 'chambers.finger.shear-modulus', text: GRIPPER_TRUE.shearModulus },
  ] });
  if (r.status !== 'completed') throw new Error(r.message);
  const rng = caseStream(2026, 0);
  const rows = times.map((t, k) => {
    const finger = r.probed![0][k] / 1000 + 0.5 * rng.normal();
    const supply = r.probed![1][k] / 1000 + 1.5 * rng.normal();
    return `${t},${finger.toFixed(2)},${supply.toFixed(1)}`;
  });
  return [
    '# SYNTHETIC DEMO DATA, not a measurement: made by plenum from networks/gripper-charge.yaml with',
    `# the solenoid's conductance ${GRIPPER_TRUE.conductance} and the finger's shear modulus ${GRIPPER_TRUE.shearModulus},`,
    '# read every 5 ms for the first 250 ms (the charge), plus Gaussian noise of 0.5 kPa (finger) and 1.5 kPa (supply); see test/study/gripper-bench.ts.',
    'time [s],finger.gauge [kPa],supply.gauge [kPa]',
    ...rows,
  ].join('\n') + '\n';
}

if (process.argv[1]?.endsWith('gripper-bench.ts')) process.stdout.write(gripperBench());
