/**
 * `plenum run NETLIST`: simulate, print a summary, write CSV/JSON.
 *
 * Only light modules are imported up front: the worker thread is started on the netlist text
 * first, and the reader, the model and the reports are loaded while it starts (for a small
 * netlist the start-up is most of the run; docs/dev-performance.md).
 */
import { checkOutputPaths, checkPlotsDir, emit, samePath, toStdout, UsageError } from './io.js';
import { netlistName, readNetlistFile } from './netlist-file.js';
import { progressLine, simulationProgress } from './progress.js';
import { interruptOnSigint, simulateInterruptibly, startSimulation, type Interrupter } from './run-thread.js';

export interface RunOptions { csv?: string; json?: string; quiet?: boolean; /** Directory for one SVG file a figure. */ plots?: string; /** Compact trace and summary for `plenum diff`. */ baseline?: string }

export async function runCommand(file: string, opts: RunOptions): Promise<number> {
  for (const out of [opts.csv, opts.json, opts.baseline]) {
    if (out && out !== '-' && samePath(out, file)) throw new UsageError(`refusing to overwrite the netlist ${file} with an output file`);
  }
  toStdout({ '--csv': opts.csv, '--json': opts.json, '--baseline': opts.baseline });
  checkOutputPaths(file, { '--csv': opts.csv, '--json': opts.json, '--baseline': opts.baseline });
  if (opts.plots) checkPlotsDir(opts.plots);
  // Ctrl-C is caught from here on: during the run it stops the simulation, which then
  // writes what it has (exit 3); see run-thread.ts
  const stop = interruptOnSigint();
  try {
    return await simulateAndWrite(file, opts, stop);
  } finally {
    stop.dispose();
  }
}

async function simulateAndWrite(file: string, opts: RunOptions, stop: Interrupter): Promise<number> {
  const line = progressLine(opts.quiet);
  const progress = line.active ? (t: number, tEnd: number): void => line.update(simulationProgress(t, tEnd)) : undefined;
  // The worker starts on the text while this thread reads it too (see startSimulation). The
  // text is read once: a netlist from a pipe (`-`, /dev/stdin) cannot be read twice.
  const text = readNetlistFile(file);
  const keepTrace = Boolean(opts.csv || opts.plots || opts.baseline);
  const started = 'text' in text ? startSimulation(text.text, netlistName(file), stop, progress, keepTrace) : undefined;
  let model;
  try {
    const { loadOrExit } = await import('./load.js');
    model = loadOrExit(file, text);
  } catch (e) {
    started?.cancel();
    throw e;
  }
  const result = await (started ? started.result(model) : simulateInterruptibly(model, stop, progress));
  line.clear();
  const { baselineJson, resultJson, summaryText, traceCsv } = await import('../index.js');

  const stdoutTaken = toStdout({ '--csv': opts.csv, '--json': opts.json, '--baseline': opts.baseline });
  if (!opts.quiet) (stdoutTaken ? process.stderr : process.stdout).write(summaryText(result));
  if (opts.json) emit(opts.json, resultJson(result), '--json');
  if (opts.csv) emit(opts.csv, traceCsv(result.trace), '--csv');
  if (opts.baseline) emit(opts.baseline, baselineJson(result), '--baseline');
  if (opts.plots) (await import('./report.js')).writePlots(opts.plots, model, result);
  if (result.status === 'failed') {
    const written = [opts.json, opts.csv, opts.baseline].some((o) => o && o !== '-') ? '; the results up to then were written' : '';
    process.stderr.write(`plenum: the simulation stopped early at t = ${result.end.toPrecision(6)} s${written}: ${result.message}\n`);
    return 3;
  }
  return result.expectations.every((e) => e.passed) ? 0 : 1;
}
