/**
 * The sampled trace of a run, stored as it is taken: one preallocated Float64Array a recorded
 * channel (sized for the sample grid, doubled should events add samples) and one for the
 * times; no per-sample objects. Only the channels asked for are recorded: every channel for a
 * trace that is written (CSV, plots, baselines, the library's default), or just those the
 * run's own analyses read (each chamber's pressure, volume and gauge for the outcome
 * classification and the studies) when the trace itself is not wanted. The columns can be
 * read while the run goes on (`count`, `column`), e.g. by a streaming writer.
 */
import type { Trace } from './results.js';

export type Recorded = 'all' | 'outcomes';

/** Channel keys the run's own analyses read (outcome.ts, studies/sweep-case.ts). */
export function outcomeKeys(chambers: readonly string[]): Set<string> {
  const keys = new Set<string>();
  for (const n of chambers) for (const q of ['pressure', 'volume', 'gauge']) keys.add(`${n}.${q}`);
  return keys;
}

export class SampleStore {
  /** Indices of the recorded channels among all channels. */
  readonly recorded: Int32Array;
  private times: Float64Array;
  private cols: Float64Array[];
  private n = 0;

  constructor(readonly channels: { key: string; unit: string }[], expected: number, keep: (key: string) => boolean) {
    const idx: number[] = [];
    channels.forEach((c, i) => { if (keep(c.key)) idx.push(i); });
    this.recorded = Int32Array.from(idx);
    const cap = Math.max(2, Math.ceil(expected));
    this.times = new Float64Array(cap);
    this.cols = idx.map(() => new Float64Array(cap));
  }

  get count(): number {
    return this.n;
  }

  /** Samples of recorded channel j (j indexes `recorded`) taken so far: a view, valid until the next add. */
  column(j: number): Float64Array {
    return this.cols[j].subarray(0, this.n);
  }

  /** Appends the sample at t from a full row of channel values. */
  add(t: number, row: Float64Array): void {
    if (this.n === this.times.length) this.grow();
    const k = this.n++;
    this.times[k] = t;
    const { recorded, cols } = this;
    for (let j = 0; j < recorded.length; j++) cols[j][k] = row[recorded[j]];
  }

  private grow(): void {
    const cap = 2 * this.times.length;
    const more = (a: Float64Array): Float64Array => { const b = new Float64Array(cap); b.set(a); return b; };
    this.times = more(this.times);
    this.cols = this.cols.map(more);
  }

  /** The trace of the run: every channel listed, values for the recorded ones (empty for the others). */
  trace(): Trace {
    const values: number[][] = this.channels.map(() => []);
    this.recorded.forEach((c, j) => { values[c] = Array.from(this.column(j)); });
    return { channels: this.channels, times: Array.from(this.times.subarray(0, this.n)), values };
  }
}
