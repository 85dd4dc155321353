/**
 * `plenum check NETLIST...`: simulates many netlists in one process (worker threads, one per
 * core), prints one line per expectation and a tally, optionally writes JUnit XML and CI log
 * annotations. Lines come out in the order the netlists were given, whatever finishes first.
 *
 * Exit code, most severe first: 2 a netlist is invalid (or bad usage), else 3 a simulation
 * could not complete, else 1 an expectation failed, else 0. Invalid input outranks a failed
 * simulation because nothing about it was tested at all; a failed simulation outranks a failed
 * expectation because its expectations were never judged.
 */
import { existsSync, readdirSync, statSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { globSync } from 'tinyglobby';
import { formatDiagnostic } from '../diag/diagnostic.js';
import { junitXml, type NetlistCheck } from '../report/junit.js';
import { heapLimit } from '../transient/trace-memory.js';
import { checkNetlist, internalError, NEXT, outOfMemory, STOP, type CheckMessage, type CheckWorkerData } from './check-one.js';
import { checkOutputPaths, emit, samePath, toStdout, UsageError } from './io.js';
import { printable, printableOutput } from '../diag/text.js';

export interface CheckOptions { junit?: string; annotations?: boolean; jobs?: string; quiet?: boolean }

/** Where the bundled worker entry sits relative to this code (dist/ chunk or dist/cli/). */
function workerFile(): string | undefined {
  for (const rel of ['./cli/check-worker.js', './check-worker.js']) {
    const p = fileURLToPath(new URL(rel, import.meta.url));
    if (existsSync(p)) return p;
  }
  return undefined;
}

/** Characters that make an argument a glob pattern (when no file has that very name). */
const GLOB_MAGIC = /[*?[\]{}]/;

/**
 * A directory stands for the netlists in it (*.yaml, *.yml, sorted); a quoted glob pattern
 * (`'networks/*.yaml'`, or with `**` for every depth) for the files it matches, sorted, as a shell would
 * expand it (tinyglobby, so that Windows shells and quoted patterns in CI scripts work the same);
 * duplicates are dropped. A pattern that matches nothing is a usage error.
 */
function expand(args: string[]): string[] {
  const out: string[] = [];
  const push = (f: string): void => { if (!out.some((o) => samePath(o, f))) out.push(f); };
  for (const a of args) {
    let dir = false;
    let exists = false;
    try { const st = statSync(a); exists = true; dir = st.isDirectory(); } catch { /* reported when read */ }
    if (!exists && GLOB_MAGIC.test(a)) {
      const matched = globSync(a, { onlyFiles: true, expandDirectories: false, dot: false }).sort();
      if (!matched.length) throw new UsageError(`${a}: no file matches this pattern`);
      for (const f of matched) push(f);
      continue;
    }
    if (!dir) { push(a); continue; }
    const inside = readdirSync(a).filter((f) => /\.ya?ml$/i.test(f)).sort();
    if (!inside.length) throw new UsageError(`${a}: the directory holds no netlists (*.yaml)`);
    for (const f of inside) push(join(a, f));
  }
  return out;
}

function parseJobs(text: string | undefined, n: number): number {
  if (text === undefined) return Math.max(1, Math.min(availableParallelism(), n));
  const j = Number(text);
  if (!Number.isInteger(j) || j < 1) throw new UsageError(`--jobs must be a whole number ≥ 1, not \`${text}\``);
  return Math.min(j, n);
}

/** Diagnostics printed (and annotated) per netlist; the rest are counted. */
const MAX_DIAGNOSTICS = 50;

// ---- CI log annotations (the `::error file=…::message` workflow-command syntax) ----------------

const escData = (s: string): string => printableOutput(s.replace(/%/g, '%25').replace(/\r/g, '%0D').replace(/\n/g, '%0A'));
const escProp = (s: string): string => escData(s).replace(/:/g, '%3A').replace(/,/g, '%2C');

function annotation(level: 'error' | 'warning', file: string, line: number, column: number, title: string, message: string): string {
  const pos = line > 0 ? `,line=${line},col=${column}` : '';
  return `::${level} file=${escProp(file)}${pos},title=${escProp(title)}::${escData(message)}`;
}

function annotations(c: NetlistCheck): string[] {
  const out: string[] = [];
  for (const d of c.diagnostics.slice(0, MAX_DIAGNOSTICS)) out.push(annotation(d.severity, d.file, d.line, d.column, `plenum: ${d.code}`, `${d.message}${d.hint ? ` (hint: ${d.hint})` : ''}`));
  if (c.status === 'failed') out.push(annotation('error', c.file, 0, 0, 'plenum: simulation did not complete', c.message));
  for (const e of c.expectations) if (!e.passed) out.push(annotation('error', e.file, e.line, e.column, `expectation failed: ${e.name}`, e.message));
  for (const w of c.warnings) out.push(annotation('warning', c.file, 0, 0, 'plenum: warning', w));
  return out;
}

// ---- the report -------------------------------------------------------------------------------

function lines(c: NetlistCheck, quiet: boolean): string[] {
  const out: string[] = [];
  const where = (x: { file: string; line: number; column: number }): string => `${x.file}:${x.line}:${x.column}`;
  const shown = c.diagnostics.slice(0, MAX_DIAGNOSTICS);
  const more = c.diagnostics.length - shown.length;
  if (c.status === 'invalid') {
    out.push(`ERROR ${c.file}  invalid netlist: ${c.message}`);
    for (const d of shown) out.push(...formatDiagnostic(d).split('\n').map((l) => `      ${l}`));
    if (more > 0) out.push(`      ... and ${more} more problems not shown`);
    return out;
  }
  if (!quiet) for (const d of shown) out.push(`warn  ${formatDiagnostic(d).replace(/\n\s*/g, ' ')}`);
  if (!quiet && more > 0) out.push(`warn  ${c.file}  ... and ${more} more warnings not shown`);
  if (c.status === 'failed') {
    out.push(`ERROR ${c.file}  ${c.message}`);
    if (!quiet) for (const u of c.unjudged) out.push(`skip  ${where(u)}  ${u.name} — not judged: the simulation did not complete`);
    return out;
  }
  for (const e of c.expectations) {
    if (e.passed && quiet) continue;
    out.push(`${e.passed ? 'pass' : 'FAIL'}  ${where(e)}  ${e.name} — ${e.message}`);
  }
  if (!quiet) {
    if (!c.expectations.length) out.push(`note  ${c.file}  simulated to the end; it has no expectations`);
    for (const w of c.warnings) out.push(`warn  ${c.file}  ${w}`);
  }
  return out;
}

function plural(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`;
}

/** The exit code for a set of outcomes (see the module comment for the order). */
export function checkExitCode(checks: NetlistCheck[]): number {
  if (checks.some((c) => c.status === 'invalid')) return 2;
  if (checks.some((c) => c.status === 'failed')) return 3;
  if (checks.some((c) => c.expectations.some((e) => !e.passed))) return 1;
  return 0;
}

function tally(checks: NetlistCheck[], jobs: number, seconds: number): string {
  const all = checks.flatMap((c) => c.expectations);
  const failed = all.filter((e) => !e.passed).length;
  const invalid = checks.filter((c) => c.status === 'invalid').length;
  const stopped = checks.filter((c) => c.status === 'failed').length;
  const unjudged = checks.reduce((s, c) => s + c.unjudged.length, 0);
  const judged = `${all.length - failed} passed, ${failed} failed${unjudged ? `, ${unjudged} not judged` : ''}`;
  const trouble = `${plural(invalid, 'invalid netlist')}, ${plural(stopped, 'simulation')} did not complete`;
  return `check: ${plural(all.length + unjudged, 'expectation')} in ${plural(checks.length, 'netlist')}: ${judged}; ${trouble} (${plural(jobs, 'job')}, ${seconds.toFixed(2)} s)`;
}

/**
 * Heap of a check worker, MB: this process's own heap limit (so a worker may use as much as
 * a lone run), or PLENUM_CHECK_WORKER_HEAP_MB (for tests of a worker that runs out).
 */
function workerHeapMb(): number {
  const env = Number(process.env.PLENUM_CHECK_WORKER_HEAP_MB);
  return Number.isFinite(env) && env >= 16 ? env : Math.round(heapLimit() / 1024 / 1024);
}

// ---- running --------------------------------------------------------------------------------

export type Deliver = (index: number, check: NetlistCheck) => void;

/**
 * Checks the netlists on the main thread and on `workers` worker threads at once. All take
 * the next index from a shared counter; the main thread starts at once while the workers load,
 * so a short list is not slower than running alone.
 */
export async function runAll(files: string[], workers: number, entry: string | undefined, control: SharedArrayBuffer, deliver: Deliver): Promise<void> {
  const ctl = new Int32Array(control);
  let done = 0;
  let finished: () => void = () => undefined;
  const allDone = new Promise<void>((resolve) => { finished = resolve; });
  const settle = (index: number, check: NetlistCheck): void => {
    deliver(index, check);
    if (++done === files.length) finished();
  };
  // each worker gets a heap limit of its own: a netlist that exhausts it ends that worker
  // (ERR_WORKER_OUT_OF_MEMORY), not the process, and becomes an error case; without one, V8
  // aborts the whole process (exit 134) and every other netlist's result is lost
  const resourceLimits = { maxOldGenerationSizeMb: workerHeapMb() };
  for (let k = 0; k < workers && entry; k++) {
    const w = new Worker(entry, { workerData: { files, control } satisfies CheckWorkerData, resourceLimits });
    let current = -1;
    let started = 0;
    w.on('message', (m: CheckMessage) => {
      if (m.kind === 'start') { current = m.index; started = performance.now(); return; }
      current = -1;
      settle(m.index, m.check);
    });
    // a worker that dies takes only its current netlist with it; the others carry on
    const lost = (why: unknown): void => {
      if (current < 0) return;
      const i = current;
      current = -1;
      const oom = (why as NodeJS.ErrnoException)?.code === 'ERR_WORKER_OUT_OF_MEMORY';
      settle(i, oom ? outOfMemory(files[i], resourceLimits.maxOldGenerationSizeMb, (performance.now() - started) / 1000) : internalError(files[i], why, (performance.now() - started) / 1000));
    };
    w.on('error', lost);
    w.on('exit', (code) => { if (code !== 0) lost(new Error(`worker thread exited with code ${code}`)); });
  }
  const interrupt = (): string | null => (Atomics.load(ctl, STOP) ? 'interrupted (Ctrl-C)' : null);
  for (let i = Atomics.add(ctl, NEXT, 1); i < files.length; i = Atomics.add(ctl, NEXT, 1)) {
    const started = performance.now();
    let check: NetlistCheck;
    try {
      check = checkNetlist(files[i], interrupt);
    } catch (e) {
      check = internalError(files[i], e, (performance.now() - started) / 1000);
    }
    settle(i, check);
    // let worker results print and Ctrl-C register between netlists
    await new Promise((resolve) => setImmediate(resolve));
  }
  await allDone;
}

export async function checkCommand(args: string[], opts: CheckOptions): Promise<number> {
  const started = performance.now();
  const files = expand(args);
  if (!files.length) throw new UsageError('no netlists given');
  // with the JUnit report on standard output (`--junit -`) the lines and the tally go to stderr
  const log = toStdout({ '--junit': opts.junit }) ? process.stderr : process.stdout;
  if (opts.junit && opts.junit !== '-' && files.some((f) => samePath(f, opts.junit!))) throw new UsageError(`refusing to overwrite the netlist ${opts.junit} with the JUnit report`);
  checkOutputPaths(files, { '--junit': opts.junit });
  const entry = workerFile();
  const jobs = entry ? parseJobs(opts.jobs, files.length) : 1;
  const quiet = Boolean(opts.quiet);

  const control = new SharedArrayBuffer(8);
  const onSigint = (): void => { Atomics.store(new Int32Array(control), STOP, 1); };
  process.on('SIGINT', onSigint);

  // results arrive in any order; print them in the order given
  const results: (NetlistCheck | undefined)[] = files.map(() => undefined);
  let printed = 0;
  const deliver: Deliver = (index, check) => {
    results[index] = check;
    while (printed < files.length && results[printed]) {
      const c = results[printed]!;
      const text = [...lines(c, quiet).map(printable), ...(opts.annotations ? annotations(c) : [])];
      if (text.length) log.write(text.join('\n') + '\n');
      printed++;
    }
  };
  try {
    await runAll(files, jobs - 1, entry, control, deliver);
  } finally {
    process.off('SIGINT', onSigint);
  }

  const checks = results as NetlistCheck[];
  log.write(tally(checks, jobs, (performance.now() - started) / 1000) + '\n');
  if (opts.junit) emit(opts.junit, junitXml(checks), '--junit');
  return checkExitCode(checks);
}
