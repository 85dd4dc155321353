/**
 * JUnit XML for `plenum check`, the test-report format most CI systems read:
 * `testsuites` > one `testsuite` per netlist (name = the netlist's path) > one `testcase` per
 * expectation (classname from the netlist's path, unique per netlist; name = the expectation's
 * name, unique within the netlist). A failed expectation carries `<failure message="...">` with
 * the expected and actual values and where the expectation was written; an invalid netlist or a
 * simulation that could not complete is a testcase with `<error>` (and the expectations it
 * could not judge are `<skipped>`). Times are decimal seconds.
 *
 * Text is escaped (& < > " ') and characters that XML 1.0 does not allow (most C0 controls,
 * lone surrogates, U+FFFE/U+FFFF) are dropped, so any expectation name gives a well-formed file.
 */
import type { ExpectationResult } from '../transient/results.js';
import type { Diagnostic } from '../diag/diagnostic.js';

/** The outcome of checking one netlist (what `plenum check` reports and writes). */
export interface NetlistCheck {
  /** The netlist's path as given. */
  file: string;
  /**
   * completed: simulated to the end, expectations judged · invalid: not simulated (see
   * diagnostics) · failed: the simulation stopped before the end (expectations not judged).
   */
  status: 'completed' | 'invalid' | 'failed';
  /** Why it is invalid or failed; for a completed run the solver's closing message. */
  message: string;
  /** Errors (invalid netlist) and warnings found while reading. */
  diagnostics: Diagnostic[];
  expectations: ExpectationResult[];
  /** Expectations left unjudged because the simulation stopped early. */
  unjudged: { name: string; file: string; line: number; column: number }[];
  /** Warnings of the run (limits exceeded, mass drift). */
  warnings: string[];
  /** Wall time spent on this netlist (s). */
  seconds: number;
  /** Time simulated (s) and the integrator used, when it ran. */
  end?: number;
  method?: string;
}

// XML 1.0 Char production: #x9 | #xA | #xD | [#x20-#xD7FF] | [#xE000-#xFFFD] | [#x10000-#x10FFFF]
const NOT_XML_CHAR = /[^\t\n\r\u0020-\uD7FF\uE000-\uFFFD\u{10000}-\u{10FFFF}]/gu;
const ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&apos;', '\n': '&#10;', '\r': '&#13;', '\t': '&#9;' };

/** Element text: escaped, illegal characters dropped. */
export function xmlText(s: string): string {
  return s.replace(NOT_XML_CHAR, '').replace(/[&<>"']/g, (c) => ESCAPES[c]);
}

/** Attribute value: as text, and line breaks and tabs kept as character references. */
export function xmlAttr(s: string): string {
  return s.replace(NOT_XML_CHAR, '').replace(/[&<>"'\n\r\t]/g, (c) => ESCAPES[c]);
}

const secs = (s: number): string => (Number.isFinite(s) && s > 0 ? s.toFixed(3) : '0.000');

/** `networks/rig.yaml` → `networks.rig`, made unique among the suites. */
function classNames(files: string[]): string[] {
  const used = new Set<string>();
  return files.map((f) => {
    const base = f.replace(/\\/g, '/').replace(/^(\.\/)+/, '').replace(/\.ya?ml$/i, '').replace(/\//g, '.') || 'netlist';
    let name = base;
    for (let k = 2; used.has(name); k++) name = `${base}~${k}`;
    used.add(name);
    return name;
  });
}

interface Case { name: string; file?: string; line?: number; body: string; failures: number; errors: number; skipped: number }

function cases(c: NetlistCheck): Case[] {
  const out: Case[] = [];
  if (c.status === 'invalid') {
    const errs = c.diagnostics.filter((d) => d.severity === 'error');
    const text = errs.map((d) => `${d.line > 0 ? `${d.file}:${d.line}:${d.column}` : d.file}: ${d.message}${d.hint ? ` (hint: ${d.hint})` : ''}`).join('\n');
    out.push({
      name: '[netlist]', file: c.file, failures: 0, errors: 1, skipped: 0,
      body: `<error type="invalid-netlist" message="${xmlAttr(c.message)}">${xmlText(text || c.message)}</error>`,
    });
    return out;
  }
  if (c.status === 'failed') {
    out.push({
      name: '[simulation]', file: c.file, failures: 0, errors: 1, skipped: 0,
      body: `<error type="simulation-failed" message="${xmlAttr(c.message)}">${xmlText(`${c.file}: ${c.message}`)}</error>`,
    });
    for (const u of c.unjudged) {
      out.push({
        name: u.name, file: u.file, line: u.line, failures: 0, errors: 0, skipped: 1,
        body: `<skipped message="${xmlAttr('not judged: the simulation did not complete')}"/>`,
      });
    }
    return out;
  }
  for (const e of c.expectations) {
    const where = `${e.file}:${e.line}:${e.column}`;
    out.push({
      name: e.name, file: e.file, line: e.line, failures: e.passed ? 0 : 1, errors: 0, skipped: 0,
      body: e.passed ? '' : `<failure type="expectation" message="${xmlAttr(`${e.message} (${where})`)}">${xmlText(
        `${where}: expectation "${e.name}" failed\n${e.message}\nactual value (SI): ${Number.isFinite(e.actual) ? String(e.actual) : 'not a number'}`)}</failure>`,
    });
  }
  return out;
}

/** The JUnit XML document for a set of checked netlists, in the order given. */
export function junitXml(checks: NetlistCheck[], name = 'plenum check'): string {
  const classes = classNames(checks.map((c) => c.file));
  const total = { tests: 0, failures: 0, errors: 0, skipped: 0, time: 0 };
  const suites: string[] = [];
  checks.forEach((c, i) => {
    const cs = cases(c);
    // names must be unique within a class (some CI systems merge duplicates)
    const seen = new Set<string>();
    for (const k of cs) {
      let n = k.name;
      for (let j = 2; seen.has(n); j++) n = `${k.name} #${j}`;
      seen.add(n);
      k.name = n;
    }
    const sum = (f: (k: Case) => number): number => cs.reduce((s, k) => s + f(k), 0);
    const s = { tests: cs.length, failures: sum((k) => k.failures), errors: sum((k) => k.errors), skipped: sum((k) => k.skipped) };
    total.tests += s.tests; total.failures += s.failures; total.errors += s.errors; total.skipped += s.skipped; total.time += c.seconds;
    // the netlist's time is shared evenly so that the testcases add up to the suite
    const each = cs.length ? c.seconds / cs.length : 0;
    const lines = [`  <testsuite name="${xmlAttr(c.file)}" tests="${s.tests}" failures="${s.failures}" errors="${s.errors}" skipped="${s.skipped}" time="${secs(c.seconds)}">`];
    for (const k of cs) {
      const attrs = `classname="${xmlAttr(classes[i])}" name="${xmlAttr(k.name)}"${k.file ? ` file="${xmlAttr(k.file)}"` : ''}${k.line ? ` line="${k.line}"` : ''} time="${secs(each)}"`;
      lines.push(k.body ? `    <testcase ${attrs}>\n      ${k.body}\n    </testcase>` : `    <testcase ${attrs}/>`);
    }
    lines.push('  </testsuite>');
    suites.push(lines.join('\n'));
  });
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    `<testsuites name="${xmlAttr(name)}" tests="${total.tests}" failures="${total.failures}" errors="${total.errors}" skipped="${total.skipped}" time="${secs(total.time)}">`,
    ...suites,
    '</testsuites>',
    '',
  ].join('\n');
}
