/** `plenum merge A.json B.json ... --json OUT`: joins the shards of a study into the whole study. */
import { readInputFile } from './netlist-file.js';
import { formatDiagnostic } from '../diag/diagnostic.js';
import { mergeSweeps, parseSweepJson, sweepCsv, sweepJson, sweepSummaryText, type SweepResult } from '../index.js';
import { checkOutputPaths, emitOutputs, UsageError } from './io.js';

export interface MergeCliOptions { json?: string; csv?: string; quiet?: boolean }

export function mergeCommand(files: string[], opts: MergeCliOptions): number {
  checkOutputPaths(files, { '--csv': opts.csv, '--json': opts.json });
  const parts: { file: string; result: SweepResult }[] = [];
  for (const file of files) {
    const text = readInputFile(file, 'the shard');
    const r = parseSweepJson(text, file);
    if (!r.ok) throw new UsageError(r.diagnostics.map(formatDiagnostic).join('\n'));
    parts.push({ file, result: r.value });
  }
  const merged = mergeSweeps(parts);
  if (!merged.ok) throw new UsageError(`${merged.diagnostics.map(formatDiagnostic).join('\n')}\nnothing was written`);
  const toStdout = opts.json === '-' || opts.csv === '-';
  if (!opts.quiet) (toStdout ? process.stderr : process.stdout).write(sweepSummaryText(merged.value));
  emitOutputs([
    { path: opts.json, text: () => sweepJson(merged.value), what: '--json' },
    { path: opts.csv, text: () => sweepCsv(merged.value), what: '--csv' },
  ]);
  return 0;
}
