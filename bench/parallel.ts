/**
 * Parallel speed-up of the two commands that spread work over threads: `plenum sweep` (grids of
 * 64 and 256 cases of an example netlist) and `plenum check` (four copies of each example),
 * each with --jobs 1 and --jobs 2, run alternately so that load shifts fall on both alike; the
 * fastest round of each is kept. Whole-process wall and CPU times through the bundled CLI.
 */
import { copyFileSync, mkdirSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { runCli } from './measure.js';

export interface SpeedupRow { command: string; work: string; oneS: number; twoS: number; speedup: number; oneCpuS: number; twoCpuS: number }

const ROOT = join(import.meta.dirname, '..');

export function parallelSpeedups(work: string, rounds: number): SpeedupRow[] {
  const usage = join(work, 'parallel-usage.json');
  const dir = join(work, 'check-copies');
  mkdirSync(dir, { recursive: true });
  const examples = readdirSync(join(ROOT, 'networks')).filter((f) => f.endsWith('.yaml')).sort();
  const files: string[] = [];
  for (let k = 0; k < 4; k++) {
    for (const f of examples) {
      const to = join(dir, `${k}-${f}`);
      copyFileSync(join(ROOT, 'networks', f), to);
      files.push(to);
    }
  }
  const jobs: { command: string; work: string; args: string[] }[] = [
    {
      command: 'plenum sweep', work: '64 cases of networks/gripper-charge.yaml',
      args: ['sweep', 'networks/gripper-charge.yaml', '--vary', 'lines.feed_tube.diameter=2 mm:6 mm:8', '--vary', 'chambers.finger.thickness=0.8 mm:1.2 mm:8', '-q', '--json', join(work, 'sweep.json')],
    },
    {
      // the same study four times as large: the fixed cost of a second thread (its start-up, its
      // own warm-up and optimising compilation of the hot code, some 0.6–0.9 s of CPU) spread thinner
      command: 'plenum sweep', work: '256 cases of networks/gripper-charge.yaml',
      args: ['sweep', 'networks/gripper-charge.yaml', '--vary', 'lines.feed_tube.diameter=2 mm:6 mm:16', '--vary', 'chambers.finger.thickness=0.8 mm:1.2 mm:16', '-q', '--json', join(work, 'sweep256.json')],
    },
    { command: 'plenum check', work: `${files.length} netlists (4 copies of each example)`, args: ['check', ...files, '-q'] },
  ];
  return jobs.map((j) => {
    const one: { wallS: number; cpuS: number }[] = [];
    const two: { wallS: number; cpuS: number }[] = [];
    runCli([...j.args, '--jobs', '1'], usage); // warm the file cache
    for (let r = 0; r < rounds; r++) {
      one.push(runCli([...j.args, '--jobs', '1'], usage));
      two.push(runCli([...j.args, '--jobs', '2'], usage));
    }
    const best = (xs: { wallS: number; cpuS: number }[]) => xs.reduce((a, b) => (b.wallS < a.wallS ? b : a));
    const a = best(one), b = best(two);
    return { command: j.command, work: j.work, oneS: a.wallS, twoS: b.wallS, speedup: a.wallS / b.wallS, oneCpuS: a.cpuS, twoCpuS: b.cpuS };
  });
}
