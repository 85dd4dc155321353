/**
 * Measuring helpers for the benchmark: run the bundled CLI as a child process (whole-process
 * wall time, CPU time and peak memory), run the SciPy anchor, growth exponents, tables.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { pathToFileURL } from 'node:url';

const ROOT = join(import.meta.dirname, '..');
const HOOK = pathToFileURL(join(import.meta.dirname, 'rss-hook.mjs')).href;

export interface CliRun {
  exit: number | null;
  /** Whole process: start-up, reading, solving, writing. */
  wallS: number;
  /** User + system CPU of the whole process (all threads). */
  cpuS: number;
  /** Peak resident memory of the process, MB. */
  peakMB: number;
  stdout: string;
  stderr: string;
}

/** Runs `node bin/plenum ...args` from the repository root, with the usage hook preloaded. */
export function runCli(args: string[], usageFile: string, timeoutMs = 600_000): CliRun {
  rmSync(usageFile, { force: true });
  const t0 = performance.now();
  const r = spawnSync(process.execPath, ['--import', HOOK, 'bin/plenum', ...args], {
    cwd: ROOT,
    encoding: 'utf8',
    timeout: timeoutMs,
    maxBuffer: 256 * 1024 * 1024,
    env: { ...process.env, PLENUM_BENCH_USAGE: usageFile, CI: '1' },
  });
  const wallS = (performance.now() - t0) / 1000;
  let cpuS = Number.NaN;
  let peakMB = Number.NaN;
  if (existsSync(usageFile)) {
    const u = JSON.parse(readFileSync(usageFile, 'utf8')) as { maxRSS: number; userCPUTime: number; systemCPUTime: number };
    cpuS = (u.userCPUTime + u.systemCPUTime) / 1e6;
    peakMB = u.maxRSS / 1024;
  }
  return { exit: r.status, wallS, cpuS, peakMB, stdout: r.stdout ?? '', stderr: r.stderr ?? '' };
}

export interface AnchorRun {
  n: number;
  /** solve_ivp alone, timed inside the script. */
  solveS: number;
  /** The whole python3 process: start-up, imports, set-up, solve. */
  wallS: number;
  nfev: number; njev: number; status: number;
  /** Peak resident memory of the python3 process, MB. */
  peakMB: number;
  /** User + system CPU of the whole python3 process. */
  cpuS: number;
  /** Final gauge pressure of each chamber (Pa), in chain order, when asked for. */
  finalGauge?: number[];
}

/** One BLAS/OpenMP thread for the anchor: on a busy host a threaded BLAS made SciPy's BDF 5× slower. */
export const ANCHOR_ENV = { OPENBLAS_NUM_THREADS: '1', OMP_NUM_THREADS: '1', MKL_NUM_THREADS: '1' };

/**
 * The SciPy anchor on a chain of n (solve time printed by the script, whole process timed here),
 * or why it could not run. With `finalFile`, the script also writes its final gauge pressures
 * there (read into `finalGauge`), to check that it solved the same equations as plenum.
 */
export function runAnchor(script: string, n: number, finalFile?: string): AnchorRun | string {
  const t0 = performance.now();
  const r = spawnSync('python3', [script, String(n), ...(finalFile ? ['BDF', '--final', finalFile] : [])], { encoding: 'utf8', timeout: 1_800_000, env: { ...process.env, ...ANCHOR_ENV } });
  const wallS = (performance.now() - t0) / 1000;
  if (r.error) return `python3 not runnable: ${r.error.message}`;
  if (r.status !== 0) return `anchor failed: ${(r.stderr || r.stdout).trim().split('\n').pop()}`;
  const f = r.stdout.trim().split(/\s+/).map(Number);
  if (f.length < 7 || f.some((x) => !Number.isFinite(x))) return `unexpected anchor output: ${r.stdout.trim()}`;
  const finalGauge = finalFile && existsSync(finalFile) ? (JSON.parse(readFileSync(finalFile, 'utf8')) as { gauge: number[] }).gauge : undefined;
  return { n: f[0], solveS: f[1], wallS, nfev: f[2], njev: f[3], status: f[4], peakMB: f[5], cpuS: f[6], ...(finalGauge ? { finalGauge } : {}) };
}

/** log(t2/t1)/log(n2/n1): 1 means linear growth. */
export function growth(n1: number, t1: number, n2: number, t2: number): number {
  return Math.log(t2 / t1) / Math.log(n2 / n1);
}

export function median(xs: number[]): number {
  const s = xs.filter(Number.isFinite).sort((a, b) => a - b);
  if (s.length === 0) return Number.NaN;
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/** Fixed-point or scientific text for a table cell. */
export function fmt(x: number | undefined, digits = 3): string {
  if (x === undefined || !Number.isFinite(x)) return '–';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e5 || a < 1e-3) return x.toExponential(Math.max(0, digits - 1));
  return Number(x.toPrecision(digits)).toString();
}

/** A plain-text table (also valid Markdown). */
export function table(head: string[], rows: string[][]): string {
  const w = head.map((h, j) => Math.max(h.length, ...rows.map((r) => r[j].length)));
  const line = (cells: string[]): string => `| ${cells.map((c, j) => c.padEnd(w[j])).join(' | ')} |`;
  return [line(head), `| ${w.map((x) => '-'.repeat(x)).join(' | ')} |`, ...rows.map(line)].join('\n');
}
