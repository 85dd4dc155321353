/**
 * plenum as a library: read a netlist, build a model, simulate, and render results.
 *
 *   import { loadModel, simulate, resultJson } from 'plenum';
 *   const m = loadModel(text, 'rig.yaml');
 *   if (!m.ok) console.error(m.diagnostics.map(formatDiagnostic).join('\n'));
 *   else console.log(resultJson(simulate(m.value)));
 */
import type { Diagnostic, Result } from './diag/diagnostic.js';
import { readNetlist } from './netlist/read.js';
import { buildModel } from './model/build.js';
import type { Model } from './model/types.js';

export type { Diagnostic, Result } from './diag/diagnostic.js';
export { formatDiagnostic } from './diag/diagnostic.js';
export type { NetlistDoc } from './netlist/types.js';
export type { Model } from './model/types.js';
export type { RunResult, Trace, ExpectationResult } from './analysis/results.js';
export { readNetlist } from './netlist/read.js';
export { netlistJsonSchema } from './netlist/schema.js';
export { buildModel } from './model/build.js';
export { simulate, type SimulateOptions } from './analysis/transient.js';
export { resultJson } from './report/json.js';
export { traceCsv } from './report/csv.js';
export { summaryText } from './report/table.js';

/** Reads and builds in one go; diagnostics from both stages, warnings kept. */
export function loadModel(source: string, file: string): Result<Model> {
  const doc = readNetlist(source, file);
  if (!doc.ok) return doc;
  const model = buildModel(doc.value);
  if (!model.ok) return model;
  const warnings: Diagnostic[] = [...doc.warnings, ...model.warnings];
  return { ok: true, value: model.value, warnings };
}
