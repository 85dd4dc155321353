/** `plenum fit DATA.csv --wall LAW --radius R --thickness T`: fit a wall law to bench data. */
import { readInputFile } from './netlist-file.js';
import { formatDiagnostic } from '../diag/diagnostic.js';
import { FIT_LAWS, fitJson, fitResidualCsv, fitText, fitWall, readBenchCsv, type FitLaw } from '../index.js';
import { listChoices, didYouMean } from '../diag/did-you-mean.js';
import { parseAmbientPressure } from '../units/pressure.js';
import { parseQuantity } from '../units/quantity.js';
import { checkOutputPaths, emitOutputs, UsageError } from './io.js';

export interface FitCliOptions { wall: string; radius: string; thickness: string; ambient?: string; json?: string; csv?: string; quiet?: boolean }

function length(text: string, option: string): number {
  const q = parseQuantity(text, 'length');
  if (!q.ok) throw new UsageError(`${option} ${text}: ${q.message}\n  hint: ${q.hint}`);
  if (!(q.value > 0)) throw new UsageError(`${option} ${text}: must be greater than 0`);
  return q.value;
}

export function fitCommand(file: string, opts: FitCliOptions): number {
  checkOutputPaths([file], { '--csv': opts.csv, '--json': opts.json });
  if (!(FIT_LAWS as readonly string[]).includes(opts.wall)) {
    const hint = didYouMean(opts.wall, FIT_LAWS) ?? `choose ${listChoices(FIT_LAWS)}`;
    throw new UsageError(`--wall ${opts.wall}: not a wall law that can be fitted\n  hint: ${hint}`);
  }
  const radius = length(opts.radius, '--radius');
  const thickness = length(opts.thickness, '--thickness');
  let ambient = 101325;
  if (opts.ambient !== undefined) {
    const q = parseAmbientPressure(opts.ambient);
    if (!q.ok) throw new UsageError(`--ambient ${opts.ambient}: ${q.message}\n  hint: ${q.hint}`);
    ambient = q.value;
  }
  const text = readInputFile(file, 'the data');
  const data = readBenchCsv(text, file, { radius, ambient });
  if (!data.ok) {
    const n = data.diagnostics.length;
    throw new UsageError(`${data.diagnostics.map(formatDiagnostic).join('\n')}\n${n} problem${n === 1 ? '' : 's'} in ${file}; nothing was fitted`);
  }
  const report = fitWall(data.value, opts.wall as FitLaw, { radius, thickness }, file);
  if (!report.ok) throw new UsageError(report.diagnostics.map(formatDiagnostic).join('\n'));
  const r = report.value;
  // a law that does not describe the data is said on stderr too, whatever goes to stdout
  for (const w of r.warnings) process.stderr.write(`plenum: warning: ${w}\n`);
  const toStdout = opts.json === '-' || opts.csv === '-';
  if (!opts.quiet) (toStdout ? process.stderr : process.stdout).write(fitText(r));
  emitOutputs([
    { path: opts.json, text: () => fitJson(r), what: '--json' },
    { path: opts.csv, text: () => fitResidualCsv(r), what: '--csv' },
  ]);
  const converged = [r.inflation, r.deflation].every((f) => !f || f.converged);
  return converged ? 0 : 3;
}
