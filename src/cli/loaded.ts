/**
 * Printing a netlist's diagnostics for a command, and the worker's reading of it (`plenum run`,
 * `plenum report`: run-job.ts) printed exactly as a reading on this thread would be. Light: no
 * reader, no model.
 */
import { formatDiagnostic, type Diagnostic } from '../diag/diagnostic.js';
import { UsageError } from './io.js';
import { netlistName } from './netlist-file.js';
import type { Loaded } from './run-protocol.js';

/** Diagnostics printed before the rest are only counted (a broken file can have thousands). */
const MAX_PRINTED = 50;

/** Prints diagnostics to stderr, at most MAX_PRINTED of them and then a count of the rest. */
export function printDiagnostics(ds: readonly Diagnostic[]): void {
  const shown = ds.slice(0, MAX_PRINTED).map(formatDiagnostic);
  if (ds.length > MAX_PRINTED) shown.push(`... and ${ds.length - MAX_PRINTED} more problems not shown`);
  if (shown.length) process.stderr.write(shown.join('\n') + '\n');
}

/** Prints an invalid netlist's diagnostics and throws the UsageError (exit 2) that ends the command. */
export function netlistFailed(file: string, errs: readonly Diagnostic[]): never {
  const n = errs.filter((d) => d.severity === 'error').length;
  printDiagnostics(errs);
  throw new UsageError(`${n} error${n === 1 ? '' : 's'} in ${netlistName(file)}; nothing was simulated or written`);
}

/**
 * The simulating side's reading of the netlist: diagnostics printed and a UsageError thrown
 * when it is invalid (or its history cannot be held with its CSV text), else its warnings
 * printed. Recordings (`report --data`) are the caller's.
 */
export function acceptLoaded(file: string, l: Loaded): void {
  if (!l.ok) netlistFailed(file, l.diagnostics);
  printDiagnostics(l.warnings);
  if (l.csvRefused) {
    process.stderr.write(formatDiagnostic(l.csvRefused) + '\n');
    throw new UsageError(`1 error in ${file}; nothing was simulated or written`);
  }
}
