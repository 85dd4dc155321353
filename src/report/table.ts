/** The terminal summary a person reads after `plenum run`. */
import type { RunResult } from '../transient/results.js';
import { keepLargest } from '../transient/select.js';
import { display } from '../units/display.js';
import { printable } from '../diag/text.js';

function table(head: string[], rows: string[][]): string {
  const w = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const line = (cells: string[]): string => cells.map((c, i) => (i === 0 ? c.padEnd(w[i]) : c.padStart(w[i]))).join('  ').trimEnd();
  return [line(head), line(w.map((n) => '-'.repeat(n))), ...rows.map(line)].join('\n');
}

/**
 * Rows a summary table shows at most. A large network (a cushion array, a skin of cells) would
 * print thousands; the table then shows the elements with the largest swing (pressure, flow)
 * in netlist order and counts the rest, which --json and --csv carry.
 */
export const MAX_TABLE_ROWS = 40;

/** The entries with the largest `size` (a non-finite one counts as largest), at most MAX_TABLE_ROWS, in order. */
function largest<T>(entries: [string, T][], size: (x: T) => number): [string, T][] {
  return keepLargest(entries, ([, x]) => { const v = size(x); return Number.isFinite(v) ? v : Infinity; }, MAX_TABLE_ROWS);
}

/** The line after a table that shows a selection. */
function more(shown: number, total: number, what: string, by: string): string[] {
  return shown < total ? [`... ${total - shown} more ${what} not shown (the ${shown} shown have the largest ${by}; all are in --json and --csv)`] : [];
}

/** Names in a sentence: all of a few, the first and last of many. */
export function nameList(names: string[]): string {
  return names.length <= 12 ? names.join(', ') : `${names.slice(0, 3).join(', ')} … ${names[names.length - 1]} (${names.length} chambers)`;
}

/** A summary's fields flattened to `a.b` keys and printed values (numbers to 4 digits). */
export function flatFields(s: Record<string, unknown>, prefix = ''): [string, string][] {
  const out: [string, string][] = [];
  for (const [k, v] of Object.entries(s)) {
    if (v !== null && typeof v === 'object') out.push(...flatFields(v as Record<string, unknown>, `${prefix}${k}.`));
    else out.push([`${prefix}${k}`, typeof v === 'number' ? (Number.isFinite(v) ? String(+v.toPrecision(4)) : '-') : typeof v === 'boolean' ? (v ? 'yes' : 'no') : String(v)]);
  }
  return out;
}

export function summaryText(r: RunResult): string {
  const out: string[] = [];
  out.push(`${printable(r.title)}  (${printable(r.file)})`);
  out.push(`${r.status === 'completed' ? 'completed' : 'FAILED'}: ${r.message}`);
  out.push(`solver ${r.stats.method}: ${r.stats.steps} steps (${r.stats.rejected} rejected), ${r.stats.rhs} rhs, ${r.stats.jacobians} jacobians, ${r.stats.wall_ms} ms`);
  out.push('');
  const chAll = Object.entries(r.chambers);
  const ch = largest(chAll, (c) => c.peak.gauge - c.least.gauge);
  if (ch.length) {
    out.push(table(
      ['chamber', 'final gauge', 'volume', 'stretch', 'mass', 'temp', 'peak gauge', 'at', 'least gauge', 'at'],
      ch.map(([n, c]) => [
        n,
        display(c.final.gauge, 'gauge').replace(' gauge', ''),
        display(c.final.volume, 'volume'),
        c.final.stretch !== undefined ? display(c.final.stretch, 'stretch') : '-',
        display(c.final.mass, 'mass'),
        display(c.final.temperature, 'temperature'),
        display(c.peak.gauge, 'gauge').replace(' gauge', ''),
        display(c.peak.at, 'time'),
        display(c.least.gauge, 'gauge').replace(' gauge', ''),
        display(c.least.at, 'time'),
      ]),
    ));
    out.push(...more(ch.length, chAll.length, 'chambers', 'pressure swing'));
    out.push('(pressures in kPa gauge)');
    out.push('');
  }
  const lnAll = Object.entries(r.lines);
  const ln = largest(lnAll, (l) => Math.abs(l.peak_flow));
  if (ln.length) {
    out.push(table(['line', 'peak flow (+ from→to)', 'peak Re', 'regime', 'peak Mach', 'choked'],
      ln.map(([n, l]) => [n, display(l.peak_flow, 'flow'), display(l.peak_reynolds, 'reynolds'), l.regime, l.peak_mach.toFixed(2), l.choked ? 'yes' : 'no'])));
    out.push(...more(ln.length, lnAll.length, 'lines', 'peak flow'));
    out.push('');
  }
  const vlAll = Object.entries(r.valves);
  const vl = largest(vlAll, (v) => Math.abs(v.peak_flow));
  if (vl.length) {
    const opening = (v: (typeof vl)[number][1]): string => (v.opening ? `${Math.round(100 * v.opening.min)}–${Math.round(100 * v.opening.max)} %, ${Math.round(100 * v.opening.final)} % at end` : '');
    out.push(table(['valve', 'peak flow (+ from→to)', 'choked', 'opening'], vl.map(([n, v]) => [n, display(v.peak_flow, 'flow'), v.choked ? 'yes' : 'no', opening(v)])));
    out.push(...more(vl.length, vlAll.length, 'valves', 'peak flow'));
    out.push('');
  }
  for (const [section, entries] of Object.entries(r.sections ?? {})) {
    // kinds beyond chambers, lines and valves: their summary fields as given, SI numbers
    const given = r.rows?.[section];
    const all = Object.entries(entries).map(([n, s]) => [n, given?.[n] ?? flatFields(s)] as [string, [string, string][]]);
    const rows = all.slice(0, MAX_TABLE_ROWS);
    if (!rows.length) continue;
    out.push(table([section.replace(/s$/, ''), ...rows[0][1].map(([k]) => k)], rows.map(([n, f]) => [n, ...f.map(([, v]) => v)])));
    out.push(...more(rows.length, all.length, section, 'place in the netlist'));
    if (!r.rows?.[section]) out.push('(SI units)');
    out.push('');
  }
  if (r.events.length) {
    out.push('events:');
    const shown = r.events.slice(0, 40);
    for (const e of shown) out.push(`  ${display(e.t, 'time').padStart(10)}  ${e.what}`);
    const more = r.events.length - shown.length + (r.events_omitted ?? 0);
    if (more > 0) out.push(`  ... and ${more} more (see --json)`);
    if (r.events_omitted) {
      const top = [...(r.event_counts ?? [])].sort((a, b) => b.count - a.count).slice(0, 5);
      out.push(`  events by element: ${top.map((c) => `${c.element || 'schedules'} ${c.kind} ${c.count}`).join(', ')}${(r.event_counts?.length ?? 0) > top.length ? ', ...' : ''}`);
    }
    out.push('');
  }
  const m = r.mass;
  out.push(`mass: initial ${display(m.initial, 'mass')}, final ${display(m.final, 'mass')}, in through boundaries ${display(m.through_boundaries, 'mass')}, drift ${m.drift.toExponential(1)}`);
  for (const o of r.outcomes ?? []) {
    const when = o.outcome === 'settled' ? ` within ${o.band * 100} % by ${display(o.settling_time ?? 0, 'time')}`
      : o.outcome === 'diverging' ? ` (growth ≈ ${o.growth_rate?.toPrecision(3)} 1/s)`
        : o.outcome === 'oscillating' ? ` (period ≈ ${display(o.period ?? 0, 'time')})` : '';
    out.push(`outcome: ${nameList(o.chambers)} (${o.closed ? 'closed' : 'open'}): ${o.outcome === 'moving' ? 'still moving at the end' : o.outcome}${when}`);
  }
  for (const w of r.warnings) out.push(`warning: ${w}`);
  if (r.expectations.length) {
    out.push('');
    const pass = r.expectations.filter((e) => e.passed).length;
    for (const e of r.expectations) out.push(`  ${e.passed ? 'pass' : 'FAIL'}  ${printable(e.name)}: ${printable(e.message)}${e.passed ? '' : `  (${e.file}:${e.line}:${e.column})`}`);
    out.push(`expectations: ${pass} passed, ${r.expectations.length - pass} failed`);
  }
  return out.join('\n') + '\n';
}
