/**
 * The equilibria marked on a report's pressure–volume chart (stable filled, unstable hollow),
 * made where the model is (run-job.ts). The report is still written without them if the
 * analysis fails: it is an addition, not the subject.
 */
import { findEquilibria, openDuringRun } from '../equilibria/equilibria.js';
import type { Model } from '../model/types.js';
import type { ReportInputOptions } from '../transient/report-input.js';
import type { RunResult } from '../transient/results.js';

/**
 * Chambers above which the report leaves the equilibria out: their stability is a dense
 * eigenvalue problem of the network's size (O(n³): some 10 s for 1 000 chambers, hours for
 * 10 000), and a pressure–volume chart of that many chambers is read for its envelope.
 */
const EQUILIBRIA_MAX_CHAMBERS = 150;

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
