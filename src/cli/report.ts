/**
 * `plenum report NETLIST --out FILE.html`: simulate and write one self-contained HTML report.
 * Also the writer of `--plots DIR` (one SVG file a figure), shared with `plenum run`.
 * Nothing is written when the netlist is invalid (exit 2); a run that stops early still gets
 * its report, saying so (exit 3).
 */
import { join } from 'node:path';
import { findEquilibria, formatDiagnostic, measuredOverlays, openDuringRun, reportFigures, reportHtml, reportInput, summaryText, type MeasuredOverlay, type Model, type RunResult } from '../index.js';
import { readText } from './study-io.js';
import { loadWithWarnings } from './load.js';
import { checkOutputPaths, checkPlotsDir, makePlotsDir, samePath, toStdout, UsageError, writeOutputs, type OutputFile } from './io.js';
import { progressLine, simulationProgress } from './progress.js';

export { checkPlotsDir };
import { interruptOnSigint, simulateInterruptibly } from './run-thread.js';

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

/**
 * The SVG files of the figures for `--plots DIR`, one a figure (none is written yet). The
 * netlist is never among them: a figure that would land on it is refused (exit 2).
 */
export function plotFiles(dir: string, netlist: string, model: Model, result: RunResult, measured?: MeasuredOverlay[]): OutputFile[] {
  const figures = reportFigures(reportInput(model, result, { measured }), { standalone: true });
  return figures.map((f) => {
    const path = join(dir, `${f.id}.svg`);
    if (samePath(path, netlist)) throw new UsageError(`refusing to overwrite the netlist ${netlist} with the figure ${path} (--plots ${dir}); choose another directory`);
    return { path, text: f.svg, what: '--plots' };
  });
}

/** Writes `files` and the figures of `--plots DIR` together (DIR is created if needed). */
export function writeWithPlots(files: OutputFile[], plots: string | undefined, netlist: string, model: Model, result: RunResult, measured?: MeasuredOverlay[]): number {
  const figures = plots ? plotFiles(plots, netlist, model, result, measured) : [];
  if (plots) makePlotsDir(plots);
  writeOutputs([...files, ...figures]);
  return figures.length;
}

/**
 * The equilibria for the pressure–volume chart (stable filled, unstable hollow). The report
 * is still written without them if the analysis fails: it is an addition, not the subject.
 */
/**
 * Chambers above which the report leaves the equilibria out: their stability is a dense
 * eigenvalue problem of the network's size (O(n³): some 10 s for 1 000 chambers, hours for
 * 10 000), and a pressure–volume chart of that many chambers is read for its envelope.
 */
const EQUILIBRIA_MAX_CHAMBERS = 150;

function restStates(model: Model, result: RunResult): { equilibria?: ReturnType<typeof findEquilibria>['equilibria']; equilibriaNote?: string; equilibriaGas?: 'start' | 'end' } {
  if (model.chambers.length > EQUILIBRIA_MAX_CHAMBERS) {
    return { equilibriaNote: `Equilibria are not marked for a network of more than ${EQUILIBRIA_MAX_CHAMBERS} chambers (this one has ${model.chambers.length}); \`plenum equilibria\` computes them.` };
  }
  try {
    // the gas the run ends with when it exchanged gas with reservoirs or feeds (as plenum
    // equilibria does by default): marks for the start's gas can lie far from the trajectory
    const end = openDuringRun(model) && result.status === 'completed';
    const masses = end ? model.chambers.map((c) => result.chambers[c.name]?.final.mass ?? c.m0) : undefined;
    return { equilibria: findEquilibria(model, { transient: false, gas: end ? 'end' : 'start', ...(masses ? { masses } : {}) }).equilibria, equilibriaGas: end ? 'end' : 'start' };
  } catch {
    return {};
  }
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
    const { model, warnings: netlistWarnings } = loadWithWarnings(file);
    // recordings are checked before anything runs: bad data is exit 2 with nothing written
    let measured: MeasuredOverlay[] | undefined;
    if (opts.data?.length) {
      const inputs = opts.data.map((d) => ({ file: d, text: readText(d, 'the recording') }));
      const o = measuredOverlays(model, inputs);
      if (!o.ok) {
        const n = o.diagnostics.length;
        throw new UsageError(`${o.diagnostics.map(formatDiagnostic).join('\n')}\n${n} error${n === 1 ? '' : 's'} in the recordings; nothing was written`);
      }
      measured = o.value.overlays;
      for (const note of o.value.notes) process.stderr.write(`plenum: note: ${note}\n`);
    }
    const line = progressLine(opts.quiet);
    const result = await simulateInterruptibly(model, stop, line.active ? (t, tEnd) => line.update(simulationProgress(t, tEnd)) : undefined);
    line.clear();
    if (!opts.quiet) log.write(summaryText(result));
    const html = reportHtml(reportInput(model, result, { version: opts.version, measured, netlistWarnings: netlistWarnings.map(formatDiagnostic), ...restStates(model, result) }));
    // `--out -`: the HTML goes to standard output (the summary went to stderr)
    if (opts.out === '-') process.stdout.write(html);
    const plots = writeWithPlots(opts.out === '-' ? [] : [{ path: opts.out, text: html, what: '--out' }], opts.plots, file, model, result, measured);
    if (!opts.quiet && opts.out !== '-') log.write(`\nreport written to ${opts.out}${plots ? `; ${plots} figures in ${opts.plots}` : ''}\n`);
    if (result.status === 'failed') {
      process.stderr.write(`plenum: the simulation stopped early at t = ${result.end.toPrecision(6)} s; the report covers the run up to then: ${result.message}\n`);
      return 3;
    }
    return result.expectations.every((e) => e.passed) ? 0 : 1;
  } finally {
    stop.dispose();
  }
}
