/**
 * `npm run bench`: speed and scale of plenum, and the SciPy anchor side by side.
 *
 *   npm run bench                          # everything, sizes 10 … 10 000, results in bench/results.json
 *   npm run bench -- --quick               # sizes up to 1 000, fewer repeats
 *   npm run bench -- --out /tmp/r.json --sizes 10,100,1000 --shapes chain --repeat 5
 *
 * Sections:
 * 1. Cold start: `plenum --help` and `plenum run` of the smallest example netlist.
 * 2. Scaling: generated networks (bench/networks.ts: chain, manifold grid, star around a tank)
 *    of each size, written as YAML and run through the bundled CLI (`node bin/plenum run FILE
 *    --json`), so start-up and reading the netlist are included. Reported: whole-process wall
 *    and CPU time, the solve phase (`stats.wall_ms`, timed inside the process around the
 *    simulation), steps, rhs evaluations, jacobians, LU factorisations, peak memory (maxRSS of
 *    the process, via bench/rss-hook.mjs), and the growth exponent log(t2/t1)/log(n2/n1)
 *    between consecutive sizes. For chains, the anchor (bench/scipy-chain.py: the same chain
 *    in vectorised NumPy, SciPy BDF with a sparse jacobian pattern) runs alternately with
 *    plenum and its printed solve time is shown beside plenum's solve phase.
 * 3. Stiff rig: rhs evaluations of the explicit (odex) and the Rosenbrock (RODAS) method.
 * 4. Work–precision on a closed form (rigid tank through a capillary), both methods,
 *    tolerances 1e-4 … 1e-10: error against rhs evaluations and time.
 * 5. Dense/sparse LU crossover (sets the solver's SPARSE_MIN_N).
 * 6. The targets: met or missed, each with the measured number.
 *
 * Wall times on a shared machine are noisy: each configuration runs `--repeat` times (default
 * 3, once for 10 000 chambers) and the fastest run is reported; the load average is recorded.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, tmpdir, totalmem } from 'node:os';
import { dirname, join } from 'node:path';
import { SPARSE_MIN_N } from '../src/solve/iteration-matrix.js';
import { luCrossover, workPrecision } from './in-process.js';
import { fmt, growth, runAnchor, runCli, table, type AnchorRun, type CliRun } from './measure.js';
import { netlistFor, type NetworkShape } from './networks.js';

const ROOT = join(import.meta.dirname, '..');

// ---- arguments ------------------------------------------------------------------------------

function option(name: string): string | undefined {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? process.argv[i + 1] : undefined;
}
const quick = process.argv.includes('--quick');
const out = option('out') ?? join(ROOT, 'bench', 'results.json');
const sizes = (option('sizes') ?? (quick ? '10,100,1000' : '10,100,1000,10000')).split(',').map(Number);
const shapes = (option('shapes') ?? 'chain,grid,star').split(',') as NetworkShape[];
const repeat = Number(option('repeat') ?? (quick ? 2 : 3));
const anchorScript = option('anchor') ?? join(ROOT, 'bench', 'scipy-chain.py');
for (const s of shapes) if (!['chain', 'grid', 'star'].includes(s)) throw new Error(`unknown shape ${s}`);
for (const n of sizes) if (!Number.isInteger(n) || n < 2) throw new Error(`bad size ${n}`);

// ---- set-up -----------------------------------------------------------------------------------

const work = mkdtempSync(join(tmpdir(), 'plenum-bench-'));
const usage = join(work, 'usage.json');
process.on('exit', () => rmSync(work, { recursive: true, force: true }));
const log = (s = ''): void => { process.stdout.write(`${s}\n`); };

log('building the CLI bundle (scripts/build.mjs) …');
const built = spawnSync(process.execPath, ['scripts/build.mjs'], { cwd: ROOT, stdio: 'inherit' });
if (built.status !== 0) throw new Error('the build failed');

const startLoad = loadavg();
const results: Record<string, unknown> = {
  date: new Date().toISOString(),
  node: process.version,
  machine: { cpus: cpus().length, model: cpus()[0]?.model ?? '', memoryGB: +(totalmem() / 2 ** 30).toFixed(1), loadAverageAtStart: startLoad },
  options: { sizes, shapes, repeat, quick },
};

function best(runs: CliRun[]): CliRun {
  return runs.reduce((a, b) => (b.wallS < a.wallS ? b : a));
}

// ---- 1. cold start ----------------------------------------------------------------------------

log('\n## Cold start');
const examples = readdirSync(join(ROOT, 'networks')).filter((f) => f.endsWith('.yaml'))
  .sort((a, b) => statSync(join(ROOT, 'networks', a)).size - statSync(join(ROOT, 'networks', b)).size);
const smallest = `networks/${examples[0]}`;
const coldReps = Math.max(5, repeat);
const help = best(Array.from({ length: coldReps }, () => runCli(['--help'], usage)));
const small = best(Array.from({ length: coldReps }, () => runCli(['run', smallest, '-q', '--json', join(work, 'small.json')], usage)));
const smallStats = JSON.parse(readFileSync(join(work, 'small.json'), 'utf8')).stats;
results.coldStart = { help: { wallS: help.wallS, peakMB: help.peakMB }, run: { file: smallest, wallS: small.wallS, peakMB: small.peakMB, solveS: smallStats.wall_ms / 1000 } };
log(table(['command', 'wall s (best of ' + coldReps + ')', 'peak MB'], [
  ['plenum --help', fmt(help.wallS), fmt(help.peakMB)],
  [`plenum run ${smallest}`, fmt(small.wallS), fmt(small.peakMB)],
]));

// ---- 2. scaling ---------------------------------------------------------------------------------

interface ScaleRow {
  shape: NetworkShape; n: number; status: string; method: string;
  wallS: number; cpuS: number; solveS: number; steps: number; rhs: number; jacobians: number; lu: number; peakMB: number;
  netlistKB: number; anchor?: AnchorRun; anchorNote?: string;
}
const scale: ScaleRow[] = [];
log('\n## Scaling (whole process through the CLI; solve = the simulation inside it)');
for (const shape of shapes) {
  for (const n of sizes) {
    const file = join(work, `${shape}-${n}.yaml`);
    const json = join(work, `${shape}-${n}.json`);
    const text = netlistFor(shape, n);
    writeFileSync(file, text);
    const reps = n >= 10_000 ? 1 : repeat;
    const runs: CliRun[] = [];
    const anchors: AnchorRun[] = [];
    let anchorNote: string | undefined;
    for (let k = 0; k < reps; k++) {
      runs.push(runCli(['run', file, '-q', '--json', json], usage));
      if (shape === 'chain' && anchorNote === undefined) {
        const a = runAnchor(anchorScript, n);
        if (typeof a === 'string') anchorNote = a; else anchors.push(a);
      }
    }
    const r = best(runs);
    let parsed: { status: string; stats: { method: string; steps: number; rhs: number; jacobians: number; lu: number; wall_ms: number } } | undefined;
    try { parsed = JSON.parse(readFileSync(json, 'utf8')); } catch { parsed = undefined; }
    const st = parsed?.stats;
    const row: ScaleRow = {
      shape, n, status: parsed?.status ?? `exit ${r.exit}`, method: st?.method ?? '',
      wallS: r.wallS, cpuS: r.cpuS, solveS: st ? st.wall_ms / 1000 : Number.NaN,
      steps: st?.steps ?? Number.NaN, rhs: st?.rhs ?? Number.NaN, jacobians: st?.jacobians ?? Number.NaN, lu: st?.lu ?? Number.NaN,
      peakMB: r.peakMB, netlistKB: text.length / 1024,
      anchor: anchors.length ? anchors.reduce((a, b) => (b.solveS < a.solveS ? b : a)) : undefined, anchorNote,
    };
    if (!parsed) row.status = `no result (exit ${r.exit}): ${r.stderr.trim().split('\n').pop() ?? ''}`;
    scale.push(row);
    log(`  ${shape} ${n}: ${row.status}, wall ${fmt(row.wallS)} s, solve ${fmt(row.solveS)} s${row.anchor ? `, anchor ${fmt(row.anchor.solveS)} s` : ''}`);
  }
}
results.scaling = scale;
log('');
log(table(
  ['network', 'chambers', 'status', 'method', 'wall s', 'CPU s', 'solve s', 'SciPy solve s', 'steps', 'rhs', 'jacobians', 'LU', 'peak MB'],
  scale.map((r) => [r.shape, String(r.n), r.status, r.method, fmt(r.wallS), fmt(r.cpuS), fmt(r.solveS),
    r.anchor ? fmt(r.anchor.solveS) : r.shape === 'chain' ? (r.anchorNote ? 'n/a' : '–') : '', String(r.steps), String(r.rhs),
    String(r.jacobians), String(r.lu), fmt(r.peakMB)]),
));
if (scale.some((r) => r.anchorNote)) log(`anchor: ${scale.find((r) => r.anchorNote)!.anchorNote}`);

const exponents: { shape: string; from: number; to: number; wall: number; solve: number; anchor?: number }[] = [];
for (const shape of shapes) {
  const rows = scale.filter((r) => r.shape === shape);
  for (let k = 1; k < rows.length; k++) {
    const a = rows[k - 1], b = rows[k];
    exponents.push({
      shape, from: a.n, to: b.n,
      wall: growth(a.n, a.wallS, b.n, b.wallS),
      solve: growth(a.n, a.solveS, b.n, b.solveS),
      anchor: a.anchor && b.anchor ? growth(a.n, a.anchor.solveS, b.n, b.anchor.solveS) : undefined,
    });
  }
}
results.growthExponents = exponents;
log('\nGrowth exponents log(t2/t1)/log(n2/n1) (1 = linear):');
log(table(['network', 'sizes', 'whole process', 'solve', 'SciPy solve'],
  exponents.map((e) => [e.shape, `${e.from} → ${e.to}`, fmt(e.wall, 2), fmt(e.solve, 2), e.anchor === undefined ? '' : fmt(e.anchor, 2)])));

// ---- 3. stiff rig: explicit against Rosenbrock ----------------------------------------------------

log('\n## Stiff rig: rhs evaluations, explicit (odex) against Rosenbrock (RODAS)');
const stiff: { rig: string; odex: { rhs: number; steps: number; solveS: number; status: string }; rodas: { rhs: number; steps: number; solveS: number; status: string }; ratio: number }[] = [];
const stiffRigs: [string, string][] = [['chain of 100 (generated)', 'gen:chain:100'], ['networks/manifold-mixed.yaml', 'networks/manifold-mixed.yaml']];
for (const [label, src] of stiffRigs) {
  const one = (method: 'explicit' | 'implicit'): { rhs: number; steps: number; solveS: number; status: string } => {
    let file: string;
    if (src.startsWith('gen:')) {
      const [, shape, n] = src.split(':');
      file = join(work, `stiff-${method}.yaml`);
      writeFileSync(file, netlistFor(shape as NetworkShape, Number(n), { method }));
    } else {
      file = join(work, `stiff-${method}.yaml`);
      writeFileSync(file, readFileSync(join(ROOT, src), 'utf8').replace(/^simulate: \{/m, `simulate: { method: ${method},`));
    }
    const json = join(work, `stiff-${method}.json`);
    runCli(['run', file, '-q', '--json', json], usage);
    try {
      const d = JSON.parse(readFileSync(json, 'utf8'));
      return { rhs: d.stats.rhs, steps: d.stats.steps, solveS: d.stats.wall_ms / 1000, status: d.status };
    } catch {
      return { rhs: Number.NaN, steps: Number.NaN, solveS: Number.NaN, status: 'no result' };
    }
  };
  const odex = one('explicit');
  const rodas = one('implicit');
  stiff.push({ rig: label, odex, rodas, ratio: odex.rhs / rodas.rhs });
}
results.stiff = stiff;
log(table(['rig', 'odex rhs', 'odex steps', 'odex solve s', 'RODAS rhs', 'RODAS steps', 'RODAS solve s', 'rhs ratio'],
  stiff.map((s) => [s.rig, String(s.odex.rhs), String(s.odex.steps), fmt(s.odex.solveS), String(s.rodas.rhs), String(s.rodas.steps), fmt(s.rodas.solveS), fmt(s.ratio, 3)])));

// ---- 4. work–precision ----------------------------------------------------------------------------

log('\n## Work–precision: rigid tank through a laminar capillary (closed form), 900 s');
const wp = workPrecision([1e-4, 1e-5, 1e-6, 1e-7, 1e-8, 1e-9, 1e-10]);
results.workPrecision = wp;
log(table(['method', 'tolerance', 'max rel. error', 'steps', 'rhs', 'ms'],
  wp.map((r) => [r.method === 'implicit' ? 'RODAS' : 'odex', r.tolerance.toExponential(0), r.error.toExponential(2), String(r.steps), String(r.rhs), fmt(r.ms)])));

// ---- 5. LU crossover ---------------------------------------------------------------------------------

log(`\n## Dense against sparse LU (factor + solve of c·I − J, chain jacobian); the solver switches to sparse at n ≥ ${SPARSE_MIN_N}`);
const cross = luCrossover([8, 16, 24, 32, 48, 64, 96, 128, 256]);
results.luCrossover = cross;
log(table(['unknowns', 'nonzeros', 'dense µs', 'sparse µs'], cross.map((r) => [String(r.n), String(r.nnz), fmt(r.denseUs), fmt(r.sparseUs)])));

// ---- 6. targets ---------------------------------------------------------------------------------------

interface Target { target: string; measured: string; met: boolean | null; note?: string }
const targets: Target[] = [];
const chainAt = (n: number): ScaleRow | undefined => scale.find((r) => r.shape === 'chain' && r.n === n);
const c1k = chainAt(1000), c10k = chainAt(10_000);
const add = (target: string, value: number | undefined, limit: number, unit: string, note?: string): void => {
  const ok = value === undefined || !Number.isFinite(value) ? null : value <= limit;
  targets.push({ target, measured: value === undefined ? 'not run' : `${fmt(value)}${unit}`, met: ok, note });
};
add('chain of 1 000, 1 s with a valve opening: whole process < 1 s', c1k?.wallS, 1, ' s');
add('chain of 10 000: whole process < 8 s', c10k?.wallS, 8, ' s');
add('cost ratio 10 000 / 1 000 (whole process) ≤ 12', c1k && c10k ? c10k.wallS / c1k.wallS : undefined, 12, '');
add('cost ratio 10 000 / 1 000 (solve phase) ≤ 12', c1k && c10k ? c10k.solveS / c1k.solveS : undefined, 12, '');
add(`plenum run ${smallest} < 0.3 s`, small.wallS, 0.3, ' s');
for (const r of [c1k, c10k]) {
  if (!r) continue;
  if (r.anchor) add(`solve phase of the ${r.n} chain no slower than SciPy (${fmt(r.anchor.solveS)} s)`, r.solveS / r.anchor.solveS, 1, '× SciPy');
  else targets.push({ target: `solve phase of the ${r.n} chain no slower than SciPy`, measured: r.anchorNote ?? 'anchor not run', met: null });
}
for (const s of stiff) add(`RODAS ≥ 10× fewer rhs than odex on ${s.rig}`, s.rodas.rhs / s.odex.rhs, 0.1, ' of odex\'s rhs');
results.targets = targets;
results.loadAverageAtEnd = loadavg();
log('\n## Targets');
log(table(['target', 'measured', 'met'], targets.map((t) => [t.target, t.measured, t.met === null ? 'not measured' : t.met ? 'yes' : 'NO'])));
log(`\nload average at start ${startLoad.map((x) => x.toFixed(2)).join(' ')}, at end ${loadavg().map((x) => x.toFixed(2)).join(' ')} on ${cpus().length} cores: on a busy machine wall times rise; compare CPU times and ratios.`);
if (targets.some((t) => t.met === false)) log('Missed targets: see docs/performance.md ("Targets") for why.');

mkdirSync(dirname(out), { recursive: true });
writeFileSync(out, JSON.stringify(results, null, 2) + '\n');
log(`\nresults written to ${out}`);
