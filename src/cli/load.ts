/** Reads a netlist file for a command: diagnostics printed, exit 2 on any error. */
import { readFileSync, statSync } from 'node:fs';
import { formatDiagnostic, loadModel, type Model } from '../index.js';
import { UsageError } from './io.js';

export function loadOrExit(file: string): Model {
  let text: string;
  try {
    if (statSync(file).isDirectory()) throw new UsageError(`${file}: is a directory, expected a netlist file (.yaml)`);
    text = readFileSync(file, 'utf8');
  } catch (e) {
    if (e instanceof UsageError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    throw new UsageError(`${file}: cannot read the netlist (${code === 'ENOENT' ? 'no such file' : code ?? String(e)})`);
  }
  const m = loadModel(text, file);
  if (!m.ok) {
    const errs = m.diagnostics;
    const n = errs.filter((d) => d.severity === 'error').length;
    process.stderr.write(errs.map(formatDiagnostic).join('\n') + '\n');
    throw new UsageError(`${n} error${n === 1 ? '' : 's'} in ${file}; nothing was simulated or written`);
  }
  for (const w of m.warnings) process.stderr.write(formatDiagnostic(w) + '\n');
  return m.value;
}
