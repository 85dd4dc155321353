/**
 * Channel values at given times, read from the integrator's dense output inside each step
 * (the driver's `onStep` hook), so that a comparison with measurements at arbitrary times is
 * not limited by the output grid and adds no interpolation error of its own.
 *
 * Where a time falls on the boundary of two step pieces (an event, a breakpoint), the later
 * piece's value is kept: the value just after a jump, as the expectations do.
 */
import type { DenseOutput } from '../solve/types.js';
import type { ChannelSource } from './expectations.js';

export interface ProbeRequest {
  /** Times, ascending, s. */
  times: ArrayLike<number>;
  /** Channel keys `<name>.<quantity>` (as in the CSV trace). */
  keys: readonly string[];
}

export class TimeProbe {
  /** values[c][k]: channel keys[c] at times[k] (NaN where the run did not reach times[k]). */
  readonly values: Float64Array[];
  private readonly cols: number[];
  private readonly y: Float64Array;
  private readonly row: Float64Array;
  private next = 0;

  constructor(private readonly req: ProbeRequest, private readonly src: ChannelSource) {
    this.cols = req.keys.map((k) => {
      const c = src.keys.get(k);
      if (c === undefined) throw new Error(`TimeProbe: no channel ${k}`);
      return c;
    });
    this.values = req.keys.map(() => new Float64Array(req.times.length).fill(Number.NaN));
    this.y = new Float64Array(src.n);
    this.row = new Float64Array(src.width);
  }

  /** One accepted step piece [tOld, tNew] with its dense output. */
  readonly step = (tOld: number, tNew: number, dense: DenseOutput): void => {
    const ts = this.req.times;
    // a time on the boundary with the previous piece is read again (the value after a jump)
    while (this.next > 0 && ts[this.next - 1] >= tOld) this.next--;
    while (this.next < ts.length && ts[this.next] < tOld) this.next++;
    for (; this.next < ts.length && ts[this.next] <= tNew; this.next++) {
      const t = ts[this.next];
      dense(t, this.y);
      this.src.observe(t, this.y, this.row);
      for (let c = 0; c < this.cols.length; c++) this.values[c][this.next] = this.row[this.cols[c]];
    }
  };
}
