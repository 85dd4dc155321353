/**
 * `--plots DIR` of `plenum run` and `plenum report`: one SVG file a figure, written together
 * with the command's other outputs (whole or not at all). Made from the report's input, which
 * the simulating side assembles where the model is (run-job.ts).
 */
import { join } from 'node:path';
import { reportFigures } from '../report/plots.js';
import type { ReportInput } from '../transient/report-input.js';
import { makePlotsDir, samePath, UsageError, writeOutputs, type OutputFile } from './io.js';

/**
 * The SVG files of the figures for `--plots DIR`, one a figure (none is written yet). The
 * netlist is never among them: a figure that would land on it is refused (exit 2).
 */
export function plotFiles(dir: string, netlist: string, input: ReportInput): OutputFile[] {
  const figures = reportFigures(input, { standalone: true });
  return figures.map((f) => {
    const path = join(dir, `${f.id}.svg`);
    if (samePath(path, netlist)) throw new UsageError(`refusing to overwrite the netlist ${netlist} with the figure ${path} (--plots ${dir}); choose another directory`);
    return { path, text: f.svg, what: '--plots' };
  });
}

/** Writes `files` and the figures of `--plots DIR` (from `input`) together (DIR is created if needed). */
export function writeWithPlots(files: OutputFile[], plots: string | undefined, netlist: string, input: ReportInput | undefined): number {
  if (plots && !input) throw new Error('--plots without the report input of the run');
  const figures = plots && input ? plotFiles(plots, netlist, input) : [];
  if (plots) makePlotsDir(plots);
  writeOutputs([...files, ...figures]);
  return figures.length;
}
