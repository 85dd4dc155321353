/**
 * `plenum report NETLIST --out FILE.html`: simulate and write one self-contained HTML report.
 * The netlist is read, simulated and the report made by the simulating thread (run-job.ts);
 * this thread prints the diagnostics and writes the report and the figures of `--plots DIR`
 * (plots.ts) together. Nothing is written when the netlist is invalid (exit 2); a run that
 * stops early still gets its report, saying so (exit 3).
 */
import { formatDiagnostic } from '../diag/diagnostic.js';
import { readText } from './study-io.js';
import { acceptLoaded, netlistFailed } from './loaded.js';
import { readNetlistFile, netlistName } from './netlist-file.js';
import { checkOutputPaths, checkPlotsDir, toStdout, UsageError } from './io.js';
import { progressLine, simulationProgress } from './progress.js';
import { writeWithPlots } from './plots.js';
import { interruptOnSigint, runnable, startSimulation } from './run-thread.js';

export interface ReportOptions {
  out?: string;
  /** Directory for one SVG file a figure. */
  plots?: string;
  quiet?: boolean;
  /** plenum's version, for the report's footer. */
  version?: string;
  /** Bench recordings to overlay (measured CSV). */
  data?: string[];
}

export async function reportCommand(file: string, opts: ReportOptions): Promise<number> {
  if (!opts.out) throw new UsageError('report needs --out FILE.html (where to write the report)');
  checkOutputPaths(file, { '--out': opts.out });
  // `--out -` writes the HTML to standard output (for a pipe); the summary then goes to stderr
  const log = toStdout({ '--out': opts.out }) ? process.stderr : process.stdout;
  if (opts.plots) checkPlotsDir(opts.plots);
  // Ctrl-C stops the run; the report then covers what was computed (exit 3)
  const stop = interruptOnSigint();
  try {
    // the netlist is read once, by the simulating thread (run-job.ts), which also makes the
    // report's parts that need the model (topology, wall curves, rest states, overlays)
    const text = readNetlistFile(file);
    if ('tooLarge' in text) return netlistFailed(file, [text.tooLarge]);
    // recordings are checked before anything runs: bad data is exit 2 with nothing written;
    // one that cannot be read is reported after the netlist's own diagnostics
    let recordings: { file: string; text: string }[] | undefined;
    let unreadable: unknown;
    try {
      recordings = opts.data?.map((d) => ({ file: d, text: readText(d, 'the recording') }));
    } catch (e) {
      unreadable = e;
    }
    const line = progressLine(opts.quiet);
    const started = startSimulation({ source: text.text, file: netlistName(file), make: { summary: !opts.quiet, html: { version: opts.version }, plots: Boolean(opts.plots) }, recordings }, stop, line.active ? (t, tEnd) => line.update(simulationProgress(t, tEnd)) : undefined);
    try {
      const loaded = await started.loaded();
      acceptLoaded(file, loaded);
      if (!loaded.ok) throw new Error('unreachable: acceptLoaded refuses an invalid netlist');
      if (unreadable) throw unreadable;
      if (loaded.recordingErrors?.length) {
        const n = loaded.recordingErrors.length;
        throw new UsageError(`${loaded.recordingErrors.map(formatDiagnostic).join('\n')}\n${n} error${n === 1 ? '' : 's'} in the recordings; nothing was written`);
      }
      for (const note of loaded.recordingNotes ?? []) process.stderr.write(`plenum: note: ${note}\n`);
      if (!runnable(loaded)) throw new Error('the worker refused the run without saying why');
    } catch (e) {
      await started.cancel();
      throw e;
    }
    const { verdict, texts, figures } = await started.result();
    const html = texts.html;
    if (html === undefined) throw new Error('the simulating thread sent no report');
    line.clear();
    if (texts.summary !== undefined) log.write(texts.summary);
    // `--out -`: the HTML goes to standard output (the summary went to stderr)
    if (opts.out === '-') process.stdout.write(html);
    const plots = writeWithPlots(opts.out === '-' ? [] : [{ path: opts.out, text: html, what: '--out' }], opts.plots, file, figures);
    if (!opts.quiet && opts.out !== '-') log.write(`\nreport written to ${opts.out}${plots ? `; ${plots} figures in ${opts.plots}` : ''}\n`);
    if (verdict.status === 'failed') {
      process.stderr.write(`plenum: the simulation stopped early at t = ${verdict.end.toPrecision(6)} s; the report covers the run up to then: ${verdict.message}\n`);
      return 3;
    }
    return verdict.passed ? 0 : 1;
  } finally {
    stop.dispose();
  }
}
