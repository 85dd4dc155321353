/** Reads a netlist file for a command: diagnostics printed, exit 2 on any error. */
import { formatDiagnostic, loadModel, type Diagnostic, type Model } from '../index.js';
import { UsageError } from './io.js';
import { netlistName, readNetlistFile } from './netlist-file.js';

export { readNetlistFile };

/** Diagnostics printed before the rest are only counted (a broken file can have thousands). */
const MAX_PRINTED = 50;

/** Prints diagnostics to stderr, at most MAX_PRINTED of them and then a count of the rest. */
function printDiagnostics(ds: readonly Diagnostic[]): void {
  const shown = ds.slice(0, MAX_PRINTED).map(formatDiagnostic);
  if (ds.length > MAX_PRINTED) shown.push(`... and ${ds.length - MAX_PRINTED} more problems not shown`);
  if (shown.length) process.stderr.write(shown.join('\n') + '\n');
}

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
  if (!m.ok) {
    const errs = m.diagnostics;
    const n = errs.filter((d) => d.severity === 'error').length;
    printDiagnostics(errs);
    throw new UsageError(`${n} error${n === 1 ? '' : 's'} in ${netlistName(file)}; nothing was simulated or written`);
  }
  printDiagnostics(m.warnings);
  return { model: m.value, warnings: m.warnings };
}
