/**
 * `npm run bench`: speed and scale of plenum, and the SciPy anchor side by side.
 *
 *   npm run bench                          # everything, sizes 10 … 10 000, results in bench/results.json
 *   npm run bench -- --quick               # sizes up to 1 000, fewer repeats
 *   npm run bench -- --out /tmp/r.json --sizes 10,100,1000 --shapes chain --repeat 5
 *
 * Sections:
 * 1. Cold start: `plenum --help` and `plenum run` of a small example (networks/cushion-settle.yaml:
 *    two chambers, one line, 8 s).
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
 * 6. Rest analyses at scale: `plenum trace` of 200 linear chambers, `plenum equilibria` of 200
 *    spheres under its time budget (bench/analyses.ts).
 * 7. The targets: met or missed, each with the measured number.
 *
 * Wall times on a shared machine are noisy: each configuration runs `--repeat` times (default
 * 3, once for 10 000 chambers) and the fastest run is reported; the load average is recorded.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, tmpdir, totalmem } from 'node:os';
import { dirname, join } from 'node:path';
import { SPARSE_MIN_N } from '../src/solve/iteration-matrix.js';
import { analysesAtScale, analysesTable } from './analyses.js';
import { luCrossover, workPrecision } from './in-process.js';
import { compareIntegrators } from './integrators.js';
import { ANCHOR_ENV, fmt, growth, runAnchor, runCli, table, type AnchorRun, type CliRun } from './measure.js';
import { parallelSpeedups } from './parallel.js';
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
const shapes = (option('shapes') === 'none' ? [] : (option('shapes') ?? 'chain,grid,star').split(',')) as NetworkShape[];
const repeat = Number(option('repeat') ?? (quick ? 2 : 3));
const anchorScript = option('anchor') ?? join(ROOT, 'bench', 'scipy-chain.py');
const sideSizes = (option('side-sizes') ?? (quick ? '1000' : '1000,10000,30000')).split(',').map(Number);
const methods = (option('methods') ?? 'auto,implicit,explicit').split(',') as Method[];
for (const m of methods) if (!['auto', 'implicit', 'explicit'].includes(m)) throw new Error(`unknown method ${m}`);
for (const n of sideSizes) if (!Number.isInteger(n) || n < 2) throw new Error(`bad size ${n}`);
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
  options: { sizes, shapes, repeat, quick, sideSizes, methods },
  anchorEnvironment: ANCHOR_ENV,
};

function readJson(file: string): { status: string; stats: { method: string; steps: number; rhs: number; jacobians: number; lu: number; wall_ms: number } } | undefined {
  try { return JSON.parse(readFileSync(file, 'utf8')); } catch { return undefined; }
}

function best(runs: CliRun[]): CliRun {
  return runs.reduce((a, b) => (b.wallS < a.wallS ? b : a));
}

// ---- 1. cold start ----------------------------------------------------------------------------

log('\n## Cold start');
// a fixed small netlist (the smallest file is not the smallest run: a short wave-line example
// has hundreds of segments and events)
const smallest = 'networks/cushion-settle.yaml';
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

type Method = 'auto' | 'implicit' | 'explicit';

interface ScaleRow {
  shape: NetworkShape; n: number; status: string; method: string;
  wallS: number; cpuS: number; solveS: number; steps: number; rhs: number; jacobians: number; lu: number; peakMB: number;
  netlistKB: number;
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
    for (let k = 0; k < reps; k++) runs.push(runCli(['run', file, '-q', '--json', json], usage));
    const r = best(runs);
    let parsed: { status: string; stats: { method: string; steps: number; rhs: number; jacobians: number; lu: number; wall_ms: number } } | undefined;
    try { parsed = JSON.parse(readFileSync(json, 'utf8')); } catch { parsed = undefined; }
    const st = parsed?.stats;
    const row: ScaleRow = {
      shape, n, status: parsed?.status ?? `exit ${r.exit}`, method: st?.method ?? '',
      wallS: r.wallS, cpuS: r.cpuS, solveS: st ? st.wall_ms / 1000 : Number.NaN,
      steps: st?.steps ?? Number.NaN, rhs: st?.rhs ?? Number.NaN, jacobians: st?.jacobians ?? Number.NaN, lu: st?.lu ?? Number.NaN,
      peakMB: r.peakMB, netlistKB: text.length / 1024,
    };
    if (!parsed) row.status = `no result (exit ${r.exit}): ${r.stderr.trim().split('\n').pop() ?? ''}`;
    scale.push(row);
    log(`  ${shape} ${n}: ${row.status}, wall ${fmt(row.wallS)} s, solve ${fmt(row.solveS)} s`);
  }
}
results.scaling = scale;
log('');
log(table(
  ['network', 'chambers', 'status', 'method', 'wall s', 'CPU s', 'solve s', 'steps', 'rhs', 'jacobians', 'LU', 'peak MB'],
  scale.map((r) => [r.shape, String(r.n), r.status, r.method, fmt(r.wallS), fmt(r.cpuS), fmt(r.solveS),
    String(r.steps), String(r.rhs), String(r.jacobians), String(r.lu), fmt(r.peakMB)]),
));

const exponents: { shape: string; from: number; to: number; wall: number; solve: number }[] = [];
for (const shape of shapes) {
  const rows = scale.filter((r) => r.shape === shape);
  for (let k = 1; k < rows.length; k++) {
    const a = rows[k - 1], b = rows[k];
    exponents.push({
      shape, from: a.n, to: b.n,
      wall: growth(a.n, a.wallS, b.n, b.wallS),
      solve: growth(a.n, a.solveS, b.n, b.solveS),
    });
  }
}
results.growthExponents = exponents;
log('\nGrowth exponents log(t2/t1)/log(n2/n1) (1 = linear):');
log(table(['network', 'sizes', 'whole process', 'solve'],
  exponents.map((e) => [e.shape, `${e.from} → ${e.to}`, fmt(e.wall, 2), fmt(e.solve, 2)])));

// ---- 2b. side by side with SciPy: the chain, each method, up to 30 000 chambers ------------------

interface SideRow {
  n: number; method: Method; status: string; chosen: string;
  wallS: number; cpuS: number; solveS: number; peakMB: number; steps: number; rhs: number; jacobians: number;
  anchor?: AnchorRun; anchorNote?: string;
  /** Largest difference of a chamber's final gauge pressure between plenum and the anchor, relative to the largest final gauge pressure. */
  agreement?: number;
}
const side: SideRow[] = [];
/** Final gauge pressures of a plenum JSON in chain order (c0, c1, …). */
function finalGauges(file: string, n: number): number[] | undefined {
  try {
    const j = JSON.parse(readFileSync(file, 'utf8')) as { chambers: Record<string, { final: { gauge: number } }> };
    return Array.from({ length: n }, (_, i) => j.chambers[`c${i}`].final.gauge);
  } catch { return undefined; }
}
function agreement(a: number[] | undefined, b: number[] | undefined): number | undefined {
  if (!a || !b || a.length !== b.length) return undefined;
  let d = 0, s = 0;
  for (let i = 0; i < a.length; i++) { d = Math.max(d, Math.abs(a[i] - b[i])); s = Math.max(s, Math.abs(b[i])); }
  return d / s;
}
log('\n## Side by side with SciPy (chain; SciPy BDF with one BLAS thread, run alternately with plenum)');
for (const n of sideSizes) {
  const reps = n >= 10_000 ? 1 : repeat;
  const files = new Map<Method, string>();
  for (const m of methods) {
    const f = join(work, `side-${m}-${n}.yaml`);
    writeFileSync(f, netlistFor('chain', n, { method: m }));
    files.set(m, f);
  }
  const runs = new Map<Method, { run: CliRun; json: ReturnType<typeof readJson>; gauges?: number[] }[]>(methods.map((m) => [m, []]));
  const anchors: AnchorRun[] = [];
  let anchorNote: string | undefined;
  for (let k = 0; k < reps; k++) {
    for (const m of methods) {
      const json = join(work, `side-${m}-${n}.json`);
      rmSync(json, { force: true });
      const run = runCli(['run', files.get(m)!, '-q', '--json', json], usage, 1_800_000);
      runs.get(m)!.push({ run, json: readJson(json), gauges: finalGauges(json, n) });
    }
    if (anchorNote === undefined) {
      const a = runAnchor(anchorScript, n, join(work, `anchor-${n}.json`));
      if (typeof a === 'string') anchorNote = a; else anchors.push(a);
    }
  }
  const anchor = anchors.length ? anchors.reduce((a, b) => (b.wallS < a.wallS ? b : a)) : undefined;
  for (const m of methods) {
    const all = runs.get(m)!;
    const b = all.reduce((x, y) => (y.run.wallS < x.run.wallS ? y : x));
    const st = b.json?.stats;
    const row: SideRow = {
      n, method: m, status: b.json?.status ?? `no result (exit ${b.run.exit})`, chosen: st?.method ?? '',
      wallS: b.run.wallS, cpuS: b.run.cpuS, solveS: st ? st.wall_ms / 1000 : Number.NaN, peakMB: b.run.peakMB,
      steps: st?.steps ?? Number.NaN, rhs: st?.rhs ?? Number.NaN, jacobians: st?.jacobians ?? Number.NaN,
      anchor, anchorNote, agreement: agreement(b.gauges, anchor?.finalGauge),
    };
    side.push(row);
    log(`  ${n} ${m}: ${row.status} (${row.chosen}), wall ${fmt(row.wallS)} s, solve ${fmt(row.solveS)} s${anchor ? `; SciPy wall ${fmt(anchor.wallS)} s, solve ${fmt(anchor.solveS)} s` : ''}`);
  }
}
results.sideBySide = side.map(({ anchor, ...r }) => ({ ...r, anchor: anchor && { ...anchor, finalGauge: undefined } }));
log('');
log(table(
  ['chambers', 'method', 'status', 'plenum wall s', 'plenum CPU s', 'plenum solve s', 'SciPy wall s', 'SciPy CPU s', 'SciPy solve s', 'wall ratio', 'CPU ratio', 'solve ratio', 'plenum peak MB', 'SciPy peak MB', 'steps', 'rhs', 'jacobians', 'final pressures differ by'],
  side.map((r) => [String(r.n), r.method === 'auto' ? `auto (${r.chosen})` : r.method, r.status, fmt(r.wallS), fmt(r.cpuS), fmt(r.solveS),
    r.anchor ? fmt(r.anchor.wallS) : 'n/a', r.anchor ? fmt(r.anchor.cpuS) : 'n/a', r.anchor ? fmt(r.anchor.solveS) : 'n/a',
    r.anchor ? `${fmt(r.wallS / r.anchor.wallS)}×` : '', r.anchor ? `${fmt(r.cpuS / r.anchor.cpuS)}×` : '', r.anchor ? `${fmt(r.solveS / r.anchor.solveS)}×` : '',
    fmt(r.peakMB), r.anchor ? fmt(r.anchor.peakMB) : '', String(r.steps), String(r.rhs), String(r.jacobians), fmt(r.agreement, 2)]),
));
if (side.some((r) => r.anchorNote)) log(`anchor: ${side.find((r) => r.anchorNote)!.anchorNote}`);
log(`Same equations: largest difference of a final gauge pressure between plenum and SciPy, relative to the largest: ${side.map((r) => `${r.n} ${r.method} ${fmt(r.agreement, 2)}`).join(', ')}`);
const sideExponents: { method: string; from: number; to: number; wall: number; cpu: number; solve: number }[] = [];
const firstLast = sideSizes.length > 1 ? [[sideSizes[0], sideSizes[sideSizes.length - 1]]] : [];
const pairs = [...sideSizes.slice(1).map((n, k) => [sideSizes[k], n]), ...(sideSizes.length > 2 ? firstLast : [])];
for (const [a, b] of pairs) {
  for (const m of methods) {
    const ra = side.find((r) => r.n === a && r.method === m), rb = side.find((r) => r.n === b && r.method === m);
    if (ra && rb) sideExponents.push({ method: m, from: a, to: b, wall: growth(a, ra.wallS, b, rb.wallS), cpu: growth(a, ra.cpuS, b, rb.cpuS), solve: growth(a, ra.solveS, b, rb.solveS) });
  }
  const ra = side.find((r) => r.n === a && r.anchor)?.anchor, rb = side.find((r) => r.n === b && r.anchor)?.anchor;
  if (ra && rb) sideExponents.push({ method: 'SciPy BDF', from: a, to: b, wall: growth(a, ra.wallS, b, rb.wallS), cpu: growth(a, ra.cpuS, b, rb.cpuS), solve: growth(a, ra.solveS, b, rb.solveS) });
}
results.sideBySideExponents = sideExponents;
if (sideExponents.length) {
  log('\nGrowth exponents on the chain (1 = linear):');
  log(table(['method', 'sizes', 'whole process (wall)', 'whole process (CPU)', 'solve'], sideExponents.map((e) => [e.method, `${e.from} → ${e.to}`, fmt(e.wall, 2), fmt(e.cpu, 2), fmt(e.solve, 2)])));
}

// ---- 2c. the stiff integrators in process: RODAS against NDF/BDF --------------------------------

log('\n## Stiff integrators in process: RODAS against NDF/BDF (src/solve/bdf.ts, keeping its jacobian); CPU ms of the solve, best of 2');
const integratorRows = [];
for (const shape of ['chain', 'grid', 'star', 'relief'] as NetworkShape[]) {
  for (const n of quick || shape === 'relief' ? [1000] : [1000, 10_000]) {
    for (const r of compareIntegrators(n, 2, shape)) integratorRows.push({ shape, n, method: r.method, steps: r.steps, rejected: r.rejected, rhs: r.rhs, jacobians: r.jacobians, lu: r.lu, cpuMs: r.ms });
  }
}
results.integrators = integratorRows;
log(table(['network', 'chambers', 'method', 'steps', 'rejected', 'rhs', 'jacobians', 'LU', 'CPU ms'],
  integratorRows.map((r) => [r.shape, String(r.n), r.method, String(r.steps), String(r.rejected), String(r.rhs), String(r.jacobians), String(r.lu), fmt(r.cpuMs)])));

// ---- 2d. parallel speed-up of sweep and check ----------------------------------------------------

log('\n## Parallel speed-up: --jobs 2 against --jobs 1 (whole process, best of the rounds, run alternately)');
const par = parallelSpeedups(work, quick ? 2 : 3);
results.parallel = par;
log(table(['command', 'work', '--jobs 1 s', '--jobs 2 s', 'speed-up', 'CPU s (jobs 1 / jobs 2)'],
  par.map((p) => [p.command, p.work, fmt(p.oneS), fmt(p.twoS), `${fmt(p.speedup)}×`, `${fmt(p.oneCpuS)} / ${fmt(p.twoCpuS)}`])));

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

// ---- 6. rest analyses at scale ----------------------------------------------------------------------------

log('\n## Rest analyses at scale (whole process through the CLI; bench/analyses.ts)');
const analyses = analysesAtScale(work, usage, repeat);
results.analyses = analyses;
log(analysesTable(analyses));

// ---- 7. targets ---------------------------------------------------------------------------------------

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
const sideAt = (n: number, m: Method): SideRow | undefined => side.find((r) => r.n === n && r.method === m);
for (const m of ['auto', 'implicit'] as Method[]) {
  for (const n of sideSizes.filter((x) => x >= 10_000)) {
    const r = sideAt(n, m);
    if (r?.anchor) {
      add(`${m}: whole process of the ${n} chain ≤ 1.5× SciPy BDF's whole process (wall, ${fmt(r.anchor.wallS)} s)`, r.wallS / r.anchor.wallS, 1.5, '×');
      add(`${m}: whole process of the ${n} chain ≤ 1.5× SciPy BDF's whole process (CPU, ${fmt(r.anchor.cpuS)} s)`, r.cpuS / r.anchor.cpuS, 1.5, '×');
    }
  }
  for (const n of sideSizes.filter((x) => x >= 1000)) {
    const r = sideAt(n, m);
    if (r?.anchor) add(`${m}: solve phase of the ${n} chain ≤ SciPy BDF's solve (${fmt(r.anchor.solveS)} s)`, r.solveS / r.anchor.solveS, 1, '×');
    else if (r) targets.push({ target: `${m}: solve phase of the ${n} chain ≤ SciPy BDF's solve`, measured: r.anchorNote ?? 'anchor not run', met: null });
  }
}
for (const e of sideExponents.filter((x) => x.method !== 'SciPy BDF' && x.from === sideSizes[0] && x.to === sideSizes[sideSizes.length - 1])) {
  add(`${e.method}: growth exponent of the whole process ${e.from} → ${e.to} chambers ≤ 1.0 (wall)`, e.wall, 1, '');
  add(`${e.method}: growth exponent of the whole process ${e.from} → ${e.to} chambers ≤ 1.0 (CPU)`, e.cpu, 1, '');
  add(`${e.method}: growth exponent of the solve phase ${e.from} → ${e.to} chambers ≤ 1.0`, e.solve, 1, '');
}
{
  const r = sideAt(10_000, 'auto');
  if (r) add('peak memory of `plenum run` on the 10 000 chain ≤ 300 MB', r.peakMB, 300, ' MB');
}
for (const p of par) {
  targets.push({ target: `${p.command} --jobs 2 ≥ 1.7× faster than --jobs 1 on 2 idle cores (${p.work})`, measured: `${fmt(p.speedup)}×`, met: Number.isFinite(p.speedup) ? p.speedup >= 1.7 : null, note: 'meaningful only on an idle machine: see the load average' });
}
{
  const trace = analyses[0];
  add('`plenum trace` of 200 linear chambers (one branch, 24 points) ≤ 2 s (whole process)', trace.wallS, 2, ' s');
  const eq = analyses[analyses.length - 1];
  // the budget counts from the start of the analysis; the process adds its start-up and output
  targets.push({ target: '`plenum equilibria` of 200 spheres ends within its time budget (30 s, + 1 s for start-up and output)', measured: `${fmt(eq.wallS)} s (${eq.result})`, met: eq.exit === 0 && eq.wallS <= 31 });
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
