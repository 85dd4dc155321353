/**
 * `loadModel`: read, check and build a netlist in one go, refusing a run whose sampled history
 * cannot fit in memory. Here rather than in index.ts so that the worker threads (run, check)
 * load only what a run needs, not the whole library.
 */
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { readNetlist } from '../netlist/read.js';
import { buildModel } from '../model/build.js';
import type { Model } from '../model/types.js';
import { traceMemoryDiagnostic } from './trace-memory.js';

/** Reads and builds in one go; diagnostics from both stages, warnings kept. */
export function loadModel(source: string, file: string): Result<Model> {
  return loadModelFor(source, file);
}

/**
 * loadModel with the memory refusal judged against `heapBytes` rather than this thread's heap:
 * a worker that reads the netlist for the main thread (run, report) judges it as the main
 * thread would, so the diagnostics are the same wherever the netlist is read.
 */
export function loadModelFor(source: string, file: string, heapBytes?: number): Result<Model> {
  const doc = readNetlist(source, file);
  if (!doc.ok) return doc;
  const model = buildModel(doc.value);
  if (!model.ok) return model;
  // a run whose sampled history cannot fit in memory is refused before it starts
  const memory = traceMemoryDiagnostic(model.value, heapBytes !== undefined ? { heapBytes } : {});
  if (memory) return { ok: false, diagnostics: [memory] };
  const warnings: Diagnostic[] = [...doc.warnings, ...model.warnings];
  return { ok: true, value: model.value, warnings };
}
