/**
 * `--plots DIR` of `plenum run` and `plenum report`: one SVG file a figure, written together
 * with the command's other outputs (whole or not at all). The figures are made where the model
 * and the result are (run-job.ts); this thread names and writes them.
 */
import { join } from 'node:path';
import { makePlotsDir, samePath, UsageError, writeOutputs, type OutputFile } from './io.js';

/** A figure as an SVG text. */
export interface FigureText { id: string; svg: string }

/**
 * The SVG files of the figures for `--plots DIR`, one a figure (none is written yet). The
 * netlist is never among them: a figure that would land on it is refused (exit 2).
 */
export function plotFiles(dir: string, netlist: string, figures: readonly FigureText[]): OutputFile[] {
  return figures.map((f) => {
    const path = join(dir, `${f.id}.svg`);
    if (samePath(path, netlist)) throw new UsageError(`refusing to overwrite the netlist ${netlist} with the figure ${path} (--plots ${dir}); choose another directory`);
    return { path, text: f.svg, what: '--plots' };
  });
}

/** Writes `files` and the figures of `--plots DIR` together (DIR is created if needed). */
export function writeWithPlots(files: OutputFile[], plots: string | undefined, netlist: string, figures: readonly FigureText[] | undefined): number {
  if (plots && !figures) throw new Error('--plots without the figures of the run');
  const svgs = plots && figures ? plotFiles(plots, netlist, figures) : [];
  if (plots) makePlotsDir(plots);
  writeOutputs([...files, ...svgs]);
  return svgs.length;
}
