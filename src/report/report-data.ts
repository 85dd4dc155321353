/**
 * Small readers over a ReportInput shared by the figures and the HTML: trace channels, the
 * style each chamber keeps everywhere, the flow paths shown, and the net mass each carried.
 */
import { traceChannel, type ReportInput } from '../transient/report-input.js';
import { styleAt, type SeriesStyle } from './svg-chart.js';

export interface FlowPath { name: string; channel: string; from: string; to: string; label: string }

/** Values of a trace channel, or undefined when the run did not record it. */
export function channel(input: ReportInput, key: string): number[] | undefined {
  return traceChannel(input.result.trace, key);
}

/** The style of each chamber, by its place in the netlist. */
export function chamberStyles(input: ReportInput): Map<string, SeriesStyle> {
  return new Map(input.topology.chambers.map((c, i) => [c.name, styleAt(i)] as const));
}

/** Flow paths shown: lines (with the valves inside them) and valves outside lines. */
export function flowPaths(input: ReportInput): FlowPath[] {
  const out: FlowPath[] = [];
  for (const l of input.topology.lines) {
    const label = l.valves.length ? `${l.name} + ${l.valves.join(' + ')}` : l.name;
    out.push({ name: l.name, channel: `${l.name}.flow`, from: l.from, to: l.to, label });
  }
  for (const v of input.topology.valves) {
    if (v.inLine) continue;
    out.push({ name: v.name, channel: `${v.name}.flow`, from: v.from, to: v.to, label: v.name });
  }
  return out;
}

/** ∫ flow dt over the recorded samples (trapezoidal rule), kg. */
export function integrate(times: ArrayLike<number>, flow: ArrayLike<number> | undefined): number {
  if (!flow) return 0;
  let s = 0;
  for (let k = 1; k < times.length; k++) {
    const a = flow[k - 1], b = flow[k];
    if (Number.isFinite(a) && Number.isFinite(b)) s += 0.5 * (a + b) * (times[k] - times[k - 1]);
  }
  return s;
}

/** Net mass each path carried over the run (kg, positive from → to), by path name. */
export function netTransfers(input: ReportInput): Map<string, number> {
  const out = new Map<string, number>();
  for (const p of flowPaths(input)) out.set(p.name, integrate(input.result.trace.times, channel(input, p.channel)));
  return out;
}
