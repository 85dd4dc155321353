/**
 * `plenum run NETLIST`: simulate, print a summary, write CSV/JSON.
 *
 * Only light modules are imported up front: the worker thread is started on the netlist text
 * first, and the reader, the model and the reports are loaded while it starts (for a small
 * netlist the start-up is most of the run; docs/dev-performance.md).
 */
import { rmSync } from 'node:fs';
import type { RunResult } from '../transient/results.js';
import { checkOutputPaths, checkPlotsDir, samePath, stagingPath, toStdout, UsageError, type OutputFile } from './io.js';
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
  // a CSV file is written by the simulating thread as the samples are taken, into the temporary
  // file that is renamed into place with the other outputs (csv-file.ts); standard output, a
  // device or a pipe gets the text at the end
  const csvTemp = opts.csv && opts.csv !== '-' ? stagingPath(opts.csv, '--csv') : undefined;
  const keepTrace = Boolean((opts.csv && !csvTemp) || opts.plots || opts.baseline);
  const started = 'text' in text ? startSimulation(text.text, netlistName(file), stop, progress, keepTrace, csvTemp) : undefined;
  let handedOver = false;
  // a second Ctrl-C ends the process at once: the partial CSV must not be left behind
  const onExit = (): void => { if (csvTemp) rmSync(csvTemp, { force: true }); };
  if (csvTemp) process.once('exit', onExit);
  try {
    let model;
    try {
      const { loadOrExit } = await import('./load.js');
      model = loadOrExit(file, text);
      if (opts.csv && !csvTemp) {
        // the CSV text of the history costs memory too: refuse what cannot be written
        const { formatDiagnostic, traceMemoryDiagnostic } = await import('../index.js');
        const d = traceMemoryDiagnostic(model, { csv: true });
        if (d) {
          process.stderr.write(formatDiagnostic(d) + '\n');
          throw new UsageError(`1 error in ${file}; nothing was simulated or written`);
        }
      }
    } catch (e) {
      await started?.cancel();
      throw e;
    }
    const result = await (started ? started.result(model) : simulateInterruptibly(model, stop, progress));
    line.clear();
    const { baselineJson, resultJson, summaryText, traceCsv } = await import('../index.js');

    const stdoutTaken = toStdout({ '--csv': opts.csv, '--json': opts.json, '--baseline': opts.baseline });
    if (!opts.quiet) (stdoutTaken ? process.stderr : process.stdout).write(summaryText(result));
    // every output is made first and written together: a failure leaves none of them written
    const files: OutputFile[] = [];
    let stdout: string | undefined;
    const add = (path: string | undefined, make: () => string, what: string): void => {
      if (!path) return;
      if (path === '-') stdout = make(); else files.push({ path, text: make(), what });
    };
    add(opts.json, () => resultJson(result), '--json');
    if (csvTemp) files.push({ path: opts.csv!, staged: csvTemp, what: '--csv' });
    else add(opts.csv, () => traceCsv(result.trace), '--csv');
    add(opts.baseline, () => baselineJson(result), '--baseline');
    handedOver = true; // writeOutputs removes the staged file if anything fails
    (await import('./report.js')).writeWithPlots(files, opts.plots, file, model, result);
    if (stdout !== undefined) process.stdout.write(stdout);
    return finish(result, opts);
  } finally {
    process.off('exit', onExit);
    if (csvTemp && !handedOver) rmSync(csvTemp, { force: true });
  }
}

function finish(result: RunResult, opts: RunOptions): number {
  if (result.status === 'failed') {
    const written = [opts.json, opts.csv, opts.baseline].some((o) => o && o !== '-') ? '; the results up to then were written' : '';
    process.stderr.write(`plenum: the simulation stopped early at t = ${result.end.toPrecision(6)} s${written}: ${result.message}\n`);
    return 3;
  }
  return result.expectations.every((e) => e.passed) ? 0 : 1;
}
