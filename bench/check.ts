/**
 * Benchmark of `plenum check networks/*.yaml`: wall time of the bundled CLI with one job
 * (everything on the main thread) against the default (the main thread plus one worker per
 * further core). Not a test: it only prints times. Runs alternate between the two settings so
 * that a noisy machine hurts both alike; medians and minima are shown.
 *
 *   npx tsx bench/check.ts              # networks/*.yaml, 5 rounds
 *   npx tsx bench/check.ts --rounds 9 --copies 4
 *
 * `--copies k` checks k copies of every example netlist (in a temporary directory), a longer
 * list on which the workers' start-up cost is spread thinner.
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { availableParallelism, tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';

function arg(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  const v = i >= 0 ? Number(process.argv[i + 1]) : fallback;
  if (!Number.isInteger(v) || v < 1) throw new Error(`--${name} takes a whole number ≥ 1`);
  return v;
}

const rounds = arg('rounds', 5);
const copies = arg('copies', 1);

spawnSync(process.execPath, ['scripts/build.mjs'], { stdio: 'inherit' });

const examples = readdirSync('networks').filter((f) => f.endsWith('.yaml')).sort();
let files = examples.map((f) => join('networks', f));
let dir: string | undefined;
if (copies > 1) {
  dir = mkdtempSync(join(tmpdir(), 'plenum-bench-check-'));
  files = [];
  for (let k = 0; k < copies; k++) {
    for (const f of examples) {
      const to = join(dir, `${k}-${f}`);
      copyFileSync(join('networks', f), to);
      files.push(to);
    }
  }
}

const codes = new Set<number>();
function once(jobs: string[]): number {
  const t = performance.now();
  const r = spawnSync(process.execPath, ['bin/plenum', 'check', ...files, '-q', ...jobs], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
  const ms = performance.now() - t;
  // 0–3 are outcomes of the netlists (still a fair timing); anything else is a crash
  if (r.status === null || r.status > 3) throw new Error(`plenum check exited ${r.status}:\n${r.stdout}${r.stderr}`);
  codes.add(r.status);
  return ms;
}

const median = (xs: number[]): number => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : 0.5 * (s[s.length / 2 - 1] + s[s.length / 2]);
};

const seq: number[] = [];
const par: number[] = [];
once([]); // warm the file cache
for (let r = 0; r < rounds; r++) {
  seq.push(once(['--jobs', '1']));
  par.push(once([]));
}
if (dir) rmSync(dir, { recursive: true, force: true });

const fmt = (xs: number[]): string => `median ${(median(xs) / 1000).toFixed(2)} s, min ${(Math.min(...xs) / 1000).toFixed(2)} s`;
console.log(`plenum check: ${files.length} netlists, ${rounds} rounds, ${availableParallelism()} cores`);
console.log(`  --jobs 1 (main thread only):   ${fmt(seq)}`);
console.log(`  default  (main + workers):     ${fmt(par)}`);
console.log(`  speed-up of the medians: ${(median(seq) / median(par)).toFixed(2)}×`);
if (codes.size !== 1 || !codes.has(0)) console.log(`  (exit codes seen: ${[...codes].join(', ')}; some netlists do not pass)`);
