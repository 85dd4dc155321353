/**
 * `plenum run NETLIST`: simulate, print a summary, write CSV/JSON.
 *
 * Only light modules are imported here: the worker thread is started on the netlist text at
 * once (for a small netlist the start-up is most of the run; docs/dev-performance.md). The
 * netlist is read once, by the worker (run-job.ts), which also makes the output texts; this
 * thread prints its diagnostics or warnings and writes the texts, and never holds a syntax
 * tree, a model or a result.
 */
import { rmSync } from 'node:fs';
import { checkOutputPaths, checkPlotsDir, samePath, stagingPath, toStdout, UsageError, type OutputFile } from './io.js';
import { acceptLoaded, netlistFailed } from './loaded.js';
import { netlistName, readNetlistFile } from './netlist-file.js';
import { writeWithPlots } from './plots.js';
import { progressLine, simulationProgress } from './progress.js';
import type { Verdict } from './run-protocol.js';
import { interruptOnSigint, runnable, startSimulation, type Interrupter } from './run-thread.js';

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
  // The text is read once here (a netlist from a pipe, `-` or /dev/stdin, cannot be read
  // twice) and handed to the worker, which alone reads it as a netlist
  const text = readNetlistFile(file);
  if ('tooLarge' in text) return netlistFailed(file, [text.tooLarge]);
  // a CSV file is written by the simulating thread as the samples are taken, into the temporary
  // file that is renamed into place with the other outputs (csv-file.ts); standard output, a
  // device or a pipe gets the text at the end
  const csvTemp = opts.csv && opts.csv !== '-' ? stagingPath(opts.csv, '--csv') : undefined;
  const stdoutTaken = toStdout({ '--csv': opts.csv, '--json': opts.json, '--baseline': opts.baseline });
  // the texts are made by the simulating thread (run-job.ts); this one writes them together
  const started = startSimulation({
    source: text.text, file: netlistName(file), csvPath: csvTemp,
    make: { summary: !opts.quiet, json: Boolean(opts.json), csv: Boolean(opts.csv && !csvTemp), baseline: Boolean(opts.baseline), plots: Boolean(opts.plots) },
  }, stop, progress);
  let handedOver = false;
  // a second Ctrl-C ends the process at once: the partial CSV must not be left behind
  const onExit = (): void => { if (csvTemp) rmSync(csvTemp, { force: true }); };
  if (csvTemp) process.once('exit', onExit);
  try {
    try {
      const loaded = await started.loaded();
      acceptLoaded(file, loaded);
      if (!runnable(loaded)) throw new Error('the worker refused the run without saying why');
    } catch (e) {
      await started.cancel();
      throw e;
    }
    const { verdict, texts, figures } = await started.result();
    line.clear();
    if (texts.summary !== undefined) (stdoutTaken ? process.stderr : process.stdout).write(texts.summary);
    // every output is made first and written together: a failure leaves none of them written
    const files: OutputFile[] = [];
    let stdout: string | undefined;
    const add = (path: string | undefined, text: string | undefined, what: string): void => {
      if (!path || text === undefined) return;
      if (path === '-') stdout = text; else files.push({ path, text, what });
    };
    add(opts.json, texts.json, '--json');
    if (csvTemp) files.push({ path: opts.csv!, staged: csvTemp, what: '--csv' });
    else add(opts.csv, texts.csv, '--csv');
    add(opts.baseline, texts.baseline, '--baseline');
    handedOver = true; // writeOutputs removes the staged file if anything fails
    writeWithPlots(files, opts.plots, file, figures);
    if (stdout !== undefined) process.stdout.write(stdout);
    return finish(verdict, opts);
  } finally {
    process.off('exit', onExit);
    if (csvTemp && !handedOver) rmSync(csvTemp, { force: true });
  }
}

function finish(result: Verdict, opts: RunOptions): number {
  if (result.status === 'failed') {
    const written = [opts.json, opts.csv, opts.baseline].some((o) => o && o !== '-') ? '; the results up to then were written' : '';
    process.stderr.write(`plenum: the simulation stopped early at t = ${result.end.toPrecision(6)} s${written}: ${result.message}\n`);
    return 3;
  }
  return result.passed ? 0 : 1;
}
