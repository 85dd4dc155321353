/** `plenum sweep NETLIST --vary PATH=VALUES ...`: a parameter study, in parallel, with a summary. */
import { formatDiagnostic } from '../diag/diagnostic.js';
import { runSweep, type Shard } from '../studies/sweep.js';
import { sweepCsv, sweepJson, sweepSummaryText } from '../studies/sweep-report.js';
import { checkOutputPaths, emitOutputs, toStdout, UsageError } from './io.js';
import { progressLine } from './progress.js';
import { readInputFile } from './netlist-file.js';

export interface SweepCliOptions {
  vary: string[];
  samples?: string;
  seed?: string;
  jobs?: string;
  shard?: string;
  json?: string;
  csv?: string;
  quiet?: boolean;
}

function wholeNumber(text: string | undefined, option: string, min: number): number | undefined {
  if (text === undefined) return undefined;
  if (!/^\d+$/.test(text.trim()) || !Number.isSafeInteger(Number(text)) || Number(text) < min) {
    throw new UsageError(`${option} ${text}: expected a whole number of at least ${min}`);
  }
  return Number(text);
}

function parseShard(text: string | undefined): Shard | undefined {
  if (text === undefined) return undefined;
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  if (!m) throw new UsageError(`--shard ${text}: expected K/N, e.g. --shard 2/4`);
  const index = Number(m[1]);
  const count = Number(m[2]);
  if (!(count >= 1 && index >= 1 && index <= count)) throw new UsageError(`--shard ${text}: K must be 1..N, e.g. --shard 2/4`);
  return { index, count };
}

export async function sweepCommand(file: string, opts: SweepCliOptions): Promise<number> {
  checkOutputPaths(file, { '--csv': opts.csv, '--json': opts.json });
  const stdoutTaken = toStdout({ '--csv': opts.csv, '--json': opts.json });
  const samples = wholeNumber(opts.samples, '--samples', 1);
  const seed = wholeNumber(opts.seed, '--seed', 0);
  const jobs = wholeNumber(opts.jobs, '--jobs', 1);
  const shard = parseShard(opts.shard);
  const source = readInputFile(file, 'the netlist');

  const line = progressLine(opts.quiet);
  const r = await runSweep({
    source, file, vary: opts.vary, samples, seed, jobs, shard,
    progress: line.active ? (done, total) => line.update(`  cases: ${done} of ${total}`) : undefined,
  });
  line.clear();
  if (!r.ok) {
    const n = r.diagnostics.filter((d) => d.severity === 'error').length;
    throw new UsageError(`${r.diagnostics.map(formatDiagnostic).join('\n')}\n${n} error${n === 1 ? '' : 's'}; nothing was run or written`);
  }
  for (const w of r.warnings) process.stderr.write(formatDiagnostic(w) + '\n');
  const result = r.value;
  const bad = result.cases.filter((c) => c.status !== 'completed');
  if (bad.length) {
    const first = bad[0];
    process.stderr.write(`plenum: ${bad.length} of ${result.cases.length} cases did not complete (they count as outcomes); the first, case ${first.index} (${first.params.map((p) => `${p.path} = ${p.text}`).join(', ')}): ${first.status}: ${first.message.split('\n')[0]}\n`);
  }
  if (!opts.quiet) (stdoutTaken ? process.stderr : process.stdout).write(sweepSummaryText(result));
  emitOutputs([
    { path: opts.json, text: () => sweepJson(result), what: '--json' },
    { path: opts.csv, text: () => sweepCsv(result), what: '--csv' },
  ]);
  return 0;
}
