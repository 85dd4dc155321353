/**
 * Text from a netlist (or a file name) on its way to a terminal or a CI log. YAML escapes let a
 * title or a misspelt key carry control characters (`"\e[2J"`, `"\r"`) and line breaks followed
 * by CI workflow commands (`"\n::warning file=...::"`); printed raw they would drive the
 * terminal or the CI runner. Every such string is printed through `printable`, and very long
 * ones (an 8 MB unknown key) through `clip`.
 */

/**
 * C0 controls (line breaks and tabs too), DEL, C1 controls, the Unicode line and paragraph
 * separators and the bidirectional overrides and isolates (which reorder what a reader sees).
 */
const UNPRINTABLE = /[\u0000-\u001f\u007f-\u009f\u2028\u2029\u202a-\u202e\u2066-\u2069]/g;

const escape = (ch: string): string => {
  const c = ch.charCodeAt(0);
  if (ch === '\n') return '\\n';
  if (ch === '\r') return '\\r';
  if (ch === '\t') return '\\t';
  return c <= 0xff ? `\\x${c.toString(16).padStart(2, '0')}` : `\\u${c.toString(16).padStart(4, '0')}`;
};

/**
 * `s` with every control character written as an escape (`\x1b`, `\n`), and a leading `::`
 * (the start of a CI workflow command) broken up, so that it prints as one inert line.
 */
export function printable(s: string): string {
  const out = String(s).replace(UNPRINTABLE, escape);
  return out.startsWith('::') ? `\\x3a${out.slice(1)}` : out;
}

/** `s` shortened to about `max` characters, saying how long it was. */
export function clip(s: string, max: number): string {
  if (s.length <= max) return s;
  return `${s.slice(0, max)}… (${s.length} characters)`;
}

/** Characters of a name or key shown in a message; the rest is counted. */
export const NAME_SHOWN = 60;
/** Characters of a message or hint kept in a diagnostic. */
export const MESSAGE_SHOWN = 1000;

/**
 * Everything except line breaks and tabs escaped, as `printable`, but for whole lines of
 * output that the program composed (a CR at the very start, and an erase-line right after it,
 * are the progress display's own and kept).
 */
export function printableOutput(s: string): string {
  if (!/[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u2028\u2029\u202a-\u202e\u2066-\u2069]/.test(s)) return s;
  const lead = /^\r(\x1b\[K)?/.exec(s)?.[0] ?? '';
  return lead + s.slice(lead.length).replace(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u2028\u2029\u202a-\u202e\u2066-\u2069]/g, escape);
}
