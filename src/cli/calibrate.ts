/**
 * `plenum calibrate NETLIST --data bench.csv --free PATH[=LOW..HIGH] ...`: fits netlist
 * parameters to measured time series. Exit 0 fitted (and the calibrated netlist passes its
 * expectations), 1 fitted but an expectation of the calibrated netlist fails, 2 bad netlist,
 * data or options (nothing written), 3 the fit did not converge or the model could not be
 * simulated (the best values found are still reported and written).
 */
import { formatDiagnostic } from '../diag/diagnostic.js';
import { calibrate, calibratedNetlist, calibrationJson, calibrationText, loadModel, residualCsv, simulate } from '../index.js';
import { checkOutputPaths, samePath, UsageError, writeOutput } from './io.js';
import { progressLine, readText, wholeNumber } from './study-io.js';

export interface CalibrateCliOptions {
  data: string[];
  free: string[];
  sigma: string[];
  json?: string;
  residuals?: string;
  writeNetlist?: string;
  jobs?: string;
  maxIterations?: string;
  quiet?: boolean;
}

/** `FILE` or `FILE;PATH=VALUE;PATH=VALUE`. */
function splitData(arg: string): { file: string; overrides: string[] } {
  const [file, ...rest] = arg.split(';');
  return { file: file.trim(), overrides: rest.map((s) => s.trim()).filter((s) => s !== '') };
}

export async function calibrateCommand(file: string, opts: CalibrateCliOptions): Promise<number> {
  if (!opts.data.length) throw new UsageError('calibrate needs --data FILE.csv (a bench recording)');
  if (!opts.free.length) throw new UsageError('calibrate needs --free PATH[=LOW..HIGH] (what to fit)');
  const data = opts.data.map(splitData);
  checkOutputPaths(file, { '--json': opts.json, '--residuals': opts.residuals, '--write-netlist': opts.writeNetlist });
  for (const d of data) {
    for (const [option, out] of Object.entries({ '--json': opts.json, '--residuals': opts.residuals, '--write-netlist': opts.writeNetlist })) {
      if (out && out !== '-' && samePath(out, d.file)) throw new UsageError(`refusing to overwrite the recording ${d.file} with ${option}`);
    }
  }
  if ([opts.json, opts.residuals, opts.writeNetlist].filter((o) => o === '-').length > 1) throw new UsageError('only one output can go to standard output (-)');
  const jobs = wholeNumber(opts.jobs, '--jobs', 1);
  const maxIterations = wholeNumber(opts.maxIterations, '--max-iterations', 1);
  const source = readText(file, 'the netlist');
  const inputs = data.map((d) => ({ file: d.file, overrides: d.overrides, text: readText(d.file, 'the recording') }));
  const progress = progressLine(Boolean(opts.quiet));
  const r = await calibrate({
    source, file, free: opts.free, data: inputs, sigma: opts.sigma, jobs, maxIterations,
    progress: progress ? (k, what) => progress(`  ${what}: ${k} simulations`) : undefined,
  });
  progress?.('');
  if (!r.ok) {
    const n = r.diagnostics.filter((d) => d.severity === 'error').length;
    throw new UsageError(`${r.diagnostics.map(formatDiagnostic).join('\n')}\n${n} error${n === 1 ? '' : 's'}; nothing was fitted or written`);
  }
  const rep = r.value;
  const toStdout = [opts.json, opts.residuals, opts.writeNetlist].includes('-');
  if (!opts.quiet) (toStdout ? process.stderr : process.stdout).write(calibrationText(rep));
  const write = (path: string | undefined, text: string, what: string): void => {
    if (!path) return;
    if (path === '-') process.stdout.write(text); else writeOutput(path, text, what);
  };
  const netlistText = calibratedNetlist(source, rep);
  write(opts.json, calibrationJson(rep), '--json');
  write(opts.residuals, residualCsv(rep), '--residuals');
  write(opts.writeNetlist, netlistText, '--write-netlist');
  if (rep.status !== 'converged') {
    process.stderr.write(`plenum: ${rep.message}\n`);
    return 3;
  }
  // the calibrated netlist against its own expectations
  const m = loadModel(netlistText, opts.writeNetlist && opts.writeNetlist !== '-' ? opts.writeNetlist : file);
  if (!m.ok) return 3;
  if (!m.value.expect.length) return 0;
  const run = simulate(m.value);
  const failed = run.expectations.filter((e) => !e.passed);
  if (!opts.quiet && run.expectations.length) {
    (toStdout ? process.stderr : process.stdout).write(`\nthe calibrated netlist's expectations: ${run.expectations.length - failed.length} of ${run.expectations.length} pass${failed.map((e) => `\n  FAIL ${e.name}: ${e.message}`).join('')}\n`);
  }
  if (run.status !== 'completed') return 3;
  return failed.length ? 1 : 0;
}
