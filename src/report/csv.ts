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

export function traceCsv(trace: Trace): string {
  const head = ['time [s]', ...trace.channels.map((c) => `${c.key} [${c.unit}]`)].join(',');
  const lines = [head];
  for (let k = 0; k < trace.times.length; k++) {
    const row = [num(trace.times[k])];
    for (let c = 0; c < trace.channels.length; c++) row.push(num(trace.values[c][k]));
    lines.push(row.join(','));
  }
  return lines.join('\n') + '\n';
}
