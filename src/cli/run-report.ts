/**
 * The parts of `plenum run --plots` and `plenum report` that need the model, made in the
 * simulating thread (run-job.ts, which loads this module only for them): the overlays of bench
 * recordings, the equilibria marked on the pressure–volume chart, the HTML report and the
 * figures.
 */
import { findEquilibria, openDuringRun } from '../equilibria/equilibria.js';
import type { Model } from '../model/types.js';
import { reportHtml } from '../report/html.js';
import { reportFigures } from '../report/plots.js';
import { reportInput, type MeasuredOverlay, type ReportInputOptions } from '../transient/report-input.js';
import type { RunResult } from '../transient/results.js';

export { measuredOverlays } from '../studies/measured-overlay.js';

/**
 * Chambers above which the report leaves the equilibria out: their stability is a dense
 * eigenvalue problem of the network's size (O(n³): some 10 s for 1 000 chambers, hours for
 * 10 000), and a pressure–volume chart of that many chambers is read for its envelope.
 */
const EQUILIBRIA_MAX_CHAMBERS = 150;

/**
 * The equilibria for the pressure–volume chart (stable filled, unstable hollow). The report
 * is still written without them if the analysis fails: it is an addition, not the subject.
 */
export function restMarks(model: Model, result: RunResult): Pick<ReportInputOptions, 'equilibria' | 'equilibriaNote' | 'equilibriaGas'> {
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

export interface ReportRequest {
  measured: MeasuredOverlay[] | undefined;
  /** The HTML report, with plenum's version for its footer. */
  html?: { version?: string } | undefined;
  /** The figures of --plots. */
  plots?: boolean | undefined;
  /** The netlist's warnings, formatted, for the report's warnings section. */
  netlistWarnings: string[];
}

/** The HTML report and the figures of --plots, from the model and its run. */
export function reportTexts(model: Model, result: RunResult, r: ReportRequest): { html?: string; figures?: { id: string; svg: string }[] } {
  const input = reportInput(model, result, { measured: r.measured });
  const out: { html?: string; figures?: { id: string; svg: string }[] } = {};
  if (r.html) out.html = reportHtml({ ...input, ...restMarks(model, result), version: r.html.version, netlistWarnings: r.netlistWarnings });
  // the figures of --plots are the report's without its rest states
  if (r.plots) out.figures = reportFigures(input, { standalone: true }).map((f) => ({ id: f.id, svg: f.svg }));
  return out;
}
