/**
 * CSV trace: `time [s]`, then `<name>.<quantity> [unit]`, one row per sample, SI units.
 * Numbers are printed with 12 significant digits (round-trippable enough for comparisons,
 * and deterministic: the same run gives the same bytes).
 */
import type { Trace } from '../transient/results.js';

function num(x: number): string {
  if (!Number.isFinite(x)) return '';
  if (x === 0) return '0';
  return String(Number(x.toPrecision(12)));
}

/** The header line of the CSV trace (no line break). */
export function csvHeader(channels: readonly { key: string; unit: string }[]): string {
  return ['time [s]', ...channels.map((c) => `${c.key} [${c.unit}]`)].join(',');
}

/** One row of the CSV trace (no line break): the time, then every channel's value. */
export function csvRow(t: number, values: ArrayLike<number>): string {
  let s = num(t);
  for (let c = 0; c < values.length; c++) s += `,${num(values[c])}`;
  return s;
}

export function traceCsv(trace: Trace): string {
  const lines = [csvHeader(trace.channels)];
  const row = new Float64Array(trace.channels.length);
  for (let k = 0; k < trace.times.length; k++) {
    for (let c = 0; c < trace.channels.length; c++) row[c] = trace.values[c][k];
    lines.push(csvRow(trace.times[k], row));
  }
  return lines.join('\n') + '\n';
}
