/** A problem found in user input. User errors are values, never exceptions. */
export type Severity = 'error' | 'warning';

export interface Diagnostic {
  /** Stable machine-readable code, e.g. `unknown-key`, `unit-dimension`. */
  code: string;
  severity: Severity;
  message: string;
  file: string;
  /** 1-based; 0 when the position is unknown. */
  line: number;
  column: number;
  /** Path in the netlist, e.g. ["chambers", "cell_a", "wall", "radius"]. */
  path: (string | number)[];
  hint?: string;
}

export type Result<T> = { ok: true; value: T; warnings: Diagnostic[] } | { ok: false; diagnostics: Diagnostic[] };

/** `file:line:column: error [code] message (at a.b.c)\n  hint: ...` */
export function formatDiagnostic(d: Diagnostic): string {
  const where = d.line > 0 ? `${d.file}:${d.line}:${d.column}` : d.file;
  const path = d.path.length ? ` (at ${d.path.join('.')})` : '';
  const hint = d.hint ? `\n  hint: ${d.hint}` : '';
  return `${where}: ${d.severity} [${d.code}] ${d.message}${path}${hint}`;
}
