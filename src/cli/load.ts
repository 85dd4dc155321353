/** Reads a netlist file for a command: diagnostics printed, exit 2 on any error. */
import type { Diagnostic } from '../diag/diagnostic.js';
import type { Model } from '../model/types.js';
import { loadModel } from '../transient/load.js';
import { netlistFailed, printDiagnostics } from './loaded.js';
import { netlistName, readNetlistFile } from './netlist-file.js';

export { readNetlistFile };

/**
 * Reads (unless the caller already did: a pipe can be read only once), checks and builds a
 * netlist; prints its warnings; on any error prints the diagnostics and throws a UsageError.
 */
export function loadOrExit(file: string, read: ReturnType<typeof readNetlistFile> = readNetlistFile(file)): Model {
  return loadWithWarnings(file, read).model;
}

/** loadOrExit, also giving back the netlist's warnings (for reports that show them). */
export function loadWithWarnings(file: string, read: ReturnType<typeof readNetlistFile> = readNetlistFile(file)): { model: Model; warnings: Diagnostic[] } {
  const m = 'text' in read ? loadModel(read.text, netlistName(file)) : { ok: false as const, diagnostics: [read.tooLarge] };
  if (!m.ok) netlistFailed(file, m.diagnostics);
  printDiagnostics(m.warnings);
  return { model: m.value, warnings: m.warnings };
}
