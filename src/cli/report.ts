/**
 * `plenum report NETLIST --out FILE.html`: simulate and write one self-contained HTML report.
 * Also the writer of `--plots DIR` (one SVG file a figure), shared with `plenum run`.
 * Nothing is written when the netlist is invalid (exit 2); a run that stops early still gets
 * its report, saying so (exit 3).
 */
import { join } from 'node:path';
import { findEquilibria, formatDiagnostic, measuredOverlays, reportFigures, reportHtml, reportInput, summaryText, type MeasuredOverlay, type Model, type RunResult } from '../index.js';
import { readText } from './study-io.js';
import { loadOrExit } from './load.js';
import { checkOutputPaths, checkPlotsDir, makePlotsDir, samePath, UsageError, writeOutputs, type OutputFile } from './io.js';

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

function restStates(model: Model): { equilibria?: ReturnType<typeof findEquilibria>['equilibria']; equilibriaNote?: string } {
  if (model.chambers.length > EQUILIBRIA_MAX_CHAMBERS) {
    return { equilibriaNote: `Equilibria are not marked for a network of more than ${EQUILIBRIA_MAX_CHAMBERS} chambers (this one has ${model.chambers.length}); \`plenum equilibria\` computes them.` };
  }
  try {
    return { equilibria: findEquilibria(model, { transient: false }).equilibria };
  } catch {
    return {};
  }
}

export async function reportCommand(file: string, opts: ReportOptions): Promise<number> {
  if (!opts.out) throw new UsageError('report needs --out FILE.html (where to write the report)');
  if (opts.out === '-') throw new UsageError('--out needs a file name: the report is a file to open in a browser');
  checkOutputPaths(file, { '--out': opts.out });
  if (opts.plots) checkPlotsDir(opts.plots);
  // Ctrl-C stops the run; the report then covers what was computed (exit 3)
  const stop = interruptOnSigint();
  try {
    const model = loadOrExit(file);
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
    const tty = Boolean(process.stderr.isTTY) && !process.env.CI;
    const result = await simulateInterruptibly(model, stop, tty
      ? (t, tEnd) => process.stderr.write(`\r  simulating: t = ${t.toPrecision(4)} s of ${tEnd} s (${Math.floor((100 * t) / tEnd)} %)   `)
      : undefined);
    if (tty) process.stderr.write('\r\x1b[K');
    if (!opts.quiet) process.stdout.write(summaryText(result));
    const html = reportHtml(reportInput(model, result, { version: opts.version, measured, ...restStates(model) }));
    const plots = writeWithPlots([{ path: opts.out, text: html, what: '--out' }], opts.plots, file, model, result, measured);
    if (!opts.quiet) process.stdout.write(`\nreport written to ${opts.out}${plots ? `; ${plots} figures in ${opts.plots}` : ''}\n`);
    if (result.status === 'failed') {
      process.stderr.write(`plenum: the simulation stopped early at t = ${result.end.toPrecision(6)} s; the report covers the run up to then: ${result.message}\n`);
      return 3;
    }
    return result.expectations.every((e) => e.passed) ? 0 : 1;
  } finally {
    stop.dispose();
  }
}
