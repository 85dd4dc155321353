/** `plenum merge A.json B.json ... --json OUT`: joins the shards of a study into the whole study. */
import { readFileSync } from 'node:fs';
import { formatDiagnostic } from '../diag/diagnostic.js';
import { mergeSweeps, parseSweepJson, sweepCsv, sweepJson, sweepSummaryText, type SweepResult } from '../index.js';
import { samePath, UsageError, writeAtomic } from './io.js';

export interface MergeCliOptions { json?: string; csv?: string; quiet?: boolean }

export function mergeCommand(files: string[], opts: MergeCliOptions): number {
  if (opts.csv === '-' && opts.json === '-') throw new UsageError('only one of --csv and --json can go to standard output (-)');
  for (const out of [opts.csv, opts.json]) {
    for (const f of files) if (out && out !== '-' && samePath(out, f)) throw new UsageError(`refusing to overwrite the shard ${f} with an output file`);
  }
  const parts: { file: string; result: SweepResult }[] = [];
  for (const file of files) {
    let text: string;
    try {
      text = readFileSync(file, 'utf8');
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      throw new UsageError(`${file}: cannot read the shard (${code === 'ENOENT' ? 'no such file' : code ?? String(e)})`);
    }
    const r = parseSweepJson(text, file);
    if (!r.ok) throw new UsageError(r.diagnostics.map(formatDiagnostic).join('\n'));
    parts.push({ file, result: r.value });
  }
  const merged = mergeSweeps(parts);
  if (!merged.ok) throw new UsageError(`${merged.diagnostics.map(formatDiagnostic).join('\n')}\nnothing was written`);
  const toStdout = opts.json === '-' || opts.csv === '-';
  if (!opts.quiet) (toStdout ? process.stderr : process.stdout).write(sweepSummaryText(merged.value));
  if (opts.json) {
    const text = sweepJson(merged.value);
    if (opts.json === '-') process.stdout.write(text); else writeAtomic(opts.json, text);
  }
  if (opts.csv) {
    const text = sweepCsv(merged.value);
    if (opts.csv === '-') process.stdout.write(text); else writeAtomic(opts.csv, text);
  }
  return 0;
}
