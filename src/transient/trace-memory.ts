/**
 * How much memory a run's sampled time history will take, estimated before the run, and the
 * refusal of a run that cannot fit. A valid 7 kB netlist (120 chambers in a chain sampled every
 * microsecond for a second) asked for a billion values and ran out of heap after minutes, taking
 * every other netlist of a `plenum check` with it; refused at once, the user learns what to
 * change.
 *
 * The estimate: samples × channels × bytes a value costs on its way through a run. A sample is
 * kept in growable arrays in the simulating thread (8 bytes a value, up to 1.5 times that while
 * an array grows) and copied once to the thread that writes the outputs; written as CSV each
 * value becomes some 20 characters of text, held as a string and again as bytes. The limit is
 * half the JavaScript heap, which leaves room for everything else a run holds.
 */
import { getHeapStatistics } from 'node:v8';
import type { Diagnostic } from '../diag/diagnostic.js';
import { NetworkSystem } from '../assemble/system.js';
import type { Model } from '../model/types.js';

/** Bytes a sampled value costs in the simulating thread and in its copy for the outputs. */
export const BYTES_PER_VALUE = 24;
/** Bytes a sampled value costs more when it is also written as CSV text. */
export const CSV_BYTES_PER_VALUE = 48;
/** Share of the heap the sampled history may take. */
const HEAP_SHARE = 0.5;
/** Number of samples when the netlist gives no `sample` (as in simulate). */
const DEFAULT_SAMPLES = 1000;
/** Channels an element has at most (a chamber: pressure, gauge, volume, mass, temperature, stretch). */
const MAX_CHANNELS_PER_ELEMENT = 8;

/** The memory the trace of a run takes, estimated: samples, channels and bytes. */
export interface TraceMemory { samples: number; channels: number; bytes: number; limit: number }

/** The heap limit of this thread, bytes. */
export function heapLimit(): number {
  return getHeapStatistics().heap_size_limit;
}

/**
 * Samples × channels of `model`'s run and the bytes they take (with `csv`: also written as CSV
 * text), against HEAP_SHARE of `heapBytes`. The channels are counted from the assembled
 * system only when a cheap upper bound does not already fit.
 */
export function traceMemory(model: Model, o: { csv?: boolean; heapBytes?: number } = {}): TraceMemory {
  const duration = model.simulate.duration;
  const samples = model.simulate.sample !== undefined ? Math.ceil(duration / model.simulate.sample - 1e-9) + 1 : DEFAULT_SAMPLES + 1;
  const perValue = BYTES_PER_VALUE + (o.csv ? CSV_BYTES_PER_VALUE : 0);
  const limit = HEAP_SHARE * (o.heapBytes ?? heapLimit());
  const elements = model.chambers.length + model.branches.length + model.reservoirs.length + model.feeds.length;
  const upper = samples * MAX_CHANNELS_PER_ELEMENT * elements * perValue;
  const channels = upper <= limit ? MAX_CHANNELS_PER_ELEMENT * elements : new NetworkSystem(model).channels().length;
  return { samples, channels, bytes: samples * channels * perValue, limit };
}

/** x rounded up to two significant digits. */
function roundUp(x: number): number {
  const e = 10 ** (Math.floor(Math.log10(x)) - 1);
  return Number((Math.ceil(x / e - 1e-9) * e).toPrecision(2));
}

/** The refusal of a run whose time history cannot fit in memory, or undefined when it fits. */
export function traceMemoryDiagnostic(model: Model, o: { csv?: boolean; heapBytes?: number } = {}): Diagnostic | undefined {
  const m = traceMemory(model, o);
  if (m.bytes <= m.limit) return undefined;
  const pos = model.simulate.samplePos ?? { file: model.doc.file, line: 0, column: 0, path: ['simulate'] };
  const fits = Math.floor(m.limit / (m.channels * (BYTES_PER_VALUE + (o.csv ? CSV_BYTES_PER_VALUE : 0))));
  const sample = model.simulate.duration / Math.max(fits - 1, 1);
  const mb = (b: number): string => `${Math.round(b / 1e6)} MB`;
  return {
    code: 'too-much-memory', severity: 'error', file: pos.file, line: pos.line, column: pos.column, path: pos.path,
    message: `the time history would hold ${m.samples} samples of ${m.channels} channels, about ${mb(m.bytes)}${o.csv ? ' with the CSV text' : ''}, more than the ${mb(m.limit)} it may take (half of this process's JavaScript heap)`,
    hint: `choose \`sample: ${sample < 1e-3 ? roundUp(sample).toExponential(1) : roundUp(sample)} s\` or longer (at most ${fits} samples), or split the network`,
  };
}
