/** Reads and builds a netlist in one go (the library's `loadModel`; light enough for the run worker). */
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { readNetlist } from '../netlist/read.js';
import { buildModel } from './build.js';
import type { Model } from './types.js';

/** Reads and builds in one go; diagnostics from both stages, warnings kept. */
export function loadModel(source: string, file: string): Result<Model> {
  const doc = readNetlist(source, file);
  if (!doc.ok) return doc;
  const model = buildModel(doc.value);
  if (!model.ok) return model;
  const warnings: Diagnostic[] = [...doc.warnings, ...model.warnings];
  return { ok: true, value: model.value, warnings };
}
