/** A problem found in user input. User errors are values, never exceptions. */
import { clip, MESSAGE_SHOWN, NAME_SHOWN, printable } from './text.js';

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

/**
 * `file:line:column: error [code] message (at a.b.c)\n  hint: ...`, with any control character
 * of the input escaped and long names clipped (src/diag/text.ts).
 */
export function formatDiagnostic(d: Diagnostic): string {
  const b = boundDiagnostic(d);
  const file = printable(b.file);
  const where = b.line > 0 ? `${file}:${b.line}:${b.column}` : file;
  const path = b.path.length ? ` (at ${printable(b.path.join('.'))})` : '';
  const hint = b.hint ? `\n  hint: ${printable(b.hint)}` : '';
  return `${where}: ${b.severity} [${b.code}] ${printable(b.message)}${path}${hint}`;
}

/**
 * A diagnostic of bounded size: its message and hint clipped to MESSAGE_SHOWN characters and
 * each element of its path to NAME_SHOWN, so an 8 MB key yields a line, not 16 MB, wherever the
 * diagnostic goes (terminal, JSON, JUnit).
 */
export function boundDiagnostic(d: Diagnostic): Diagnostic {
  const long = d.message.length > MESSAGE_SHOWN || (d.hint?.length ?? 0) > MESSAGE_SHOWN
    || d.path.some((p) => typeof p === 'string' && p.length > NAME_SHOWN);
  if (!long) return d;
  return {
    ...d,
    message: clip(d.message, MESSAGE_SHOWN),
    path: d.path.map((p) => (typeof p === 'string' ? clip(p, NAME_SHOWN) : p)),
    ...(d.hint !== undefined ? { hint: clip(d.hint, MESSAGE_SHOWN) } : {}),
  };
}
