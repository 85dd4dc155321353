/**
 * `plenum run NETLIST`: simulate, print a summary, write CSV/JSON.
 *
 * Only light modules are imported up front: the worker thread is started on the netlist text
 * first, and the reader, the model and the reports are loaded while it starts (for a small
 * netlist the start-up is most of the run; docs/dev-performance.md).
 */
import { checkOutputPaths, checkPlotsDir, samePath, UsageError, writeOutput } from './io.js';
import { readNetlistFile } from './netlist-file.js';
import { interruptOnSigint, simulateHere, startSimulation, type Interrupter } from './run-thread.js';
import type { Model } from '../model/types.js';
import type { RunResult } from '../transient/results.js';

export interface RunOptions { csv?: string; json?: string; quiet?: boolean; /** Directory for one SVG file a figure. */ plots?: string; /** Compact trace and summary for `plenum diff`. */ baseline?: string }

export async function runCommand(file: string, opts: RunOptions): Promise<number> {
  for (const out of [opts.csv, opts.json, opts.baseline]) {
    if (out && out !== '-' && samePath(out, file)) throw new UsageError(`refusing to overwrite the netlist ${file} with an output file`);
  }
  if (opts.csv === '-' && opts.json === '-') throw new UsageError('only one of --csv and --json can go to standard output (-)');
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
  const tty = Boolean(process.stderr.isTTY) && !process.env.CI;
  const progress = tty
    ? (t: number, tEnd: number): void => { process.stderr.write(`\r  simulating: t = ${t.toPrecision(4)} s of ${tEnd} s (${Math.floor((100 * t) / tEnd)} %)   `); }
    : undefined;
  // The worker reads the netlist (the only reading) and reports back before it simulates
  // (see startSimulation); this thread reads it only when there is no bundled worker.
  const text = readNetlistFile(file);
  const keepTrace = Boolean(opts.csv || opts.plots || opts.baseline);
  const started = 'text' in text ? startSimulation(text.text, file, stop, progress, keepTrace, Boolean(opts.plots)) : undefined;
  let model: Model | undefined;
  let result: RunResult;
  if (started) {
    const { acceptLoaded } = await import('./load.js');
    const doc = acceptLoaded(file, await started.loaded());
    if (doc) {
      // the plots need the model: built here from the worker's checked document, not re-read
      const built = (await import('../model/build.js')).buildModel(doc);
      if (!built.ok) throw new Error('the checked netlist did not build on the main thread');
      model = built.value;
    }
    result = await started.result();
  } else {
    const { loadOrExit } = await import('./load.js');
    model = loadOrExit(file);
    result = await simulateHere(model, stop, progress);
  }
  if (tty) process.stderr.write('\r\x1b[K');
  const { baselineJson, resultJson, summaryText, traceCsv } = await import('../index.js');

  const toStdout = opts.json === '-' || opts.csv === '-';
  if (!opts.quiet) (toStdout ? process.stderr : process.stdout).write(summaryText(result));
  if (opts.json) {
    const text = resultJson(result);
    if (opts.json === '-') process.stdout.write(text); else writeOutput(opts.json, text, '--json');
  }
  if (opts.csv) {
    const text = traceCsv(result.trace);
    if (opts.csv === '-') process.stdout.write(text); else writeOutput(opts.csv, text, '--csv');
  }
  if (opts.baseline) writeOutput(opts.baseline, baselineJson(result), '--baseline');
  if (opts.plots && model) (await import('./report.js')).writePlots(opts.plots, model, result);
  if (result.status === 'failed') {
    const written = [opts.json, opts.csv, opts.baseline].some((o) => o && o !== '-') ? '; the results up to then were written' : '';
    process.stderr.write(`plenum: the simulation stopped early at t = ${result.end.toPrecision(6)} s${written}: ${result.message}\n`);
    return 3;
  }
  return result.expectations.every((e) => e.passed) ? 0 : 1;
}
