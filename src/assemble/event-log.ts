/**
 * The events of a run, bounded: the first and the last of them in full, and a count of every
 * event by element, kind and wording. A chattering relief valve switches a million times in
 * ten seconds; keeping every entry cost 100 MB in memory and a 90 MB JSON, and the charts and
 * the report could not draw them. The counts keep what the summaries need (how often a valve
 * opened, and when first and last), whatever the number.
 */

import type { EventSink, LoggedEvent } from '../elements/contract.js';

/**
 * How often one element logged one kind of event with one wording, and when first and last;
 * `warning` as on the entries (the run repeats it among its warnings).
 */
export interface EventCount { element: string; kind: string; what: string; count: number; first: number; last: number; warning?: boolean }

/** Events kept in full at the start of a run, and at its end. */
export const EVENTS_KEPT_FIRST = 500;
export const EVENTS_KEPT_LAST = 500;

export class EventLog implements EventSink {
  private readonly head: LoggedEvent[] = [];
  /** The last EVENTS_KEPT_LAST events after the head, as a ring. */
  private readonly tail: LoggedEvent[] = [];
  private tailStart = 0;
  private readonly tally = new Map<string, EventCount>();
  /** Events logged in all. */
  total = 0;

  push(e: LoggedEvent): void {
    this.total++;
    const key = `${e.element}\u0000${e.kind}\u0000${e.what}`;
    const c = this.tally.get(key);
    if (c) {
      c.count++;
      c.last = e.t;
    } else {
      this.tally.set(key, { element: e.element, kind: e.kind, what: e.what, count: 1, first: e.t, last: e.t, ...(e.warning ? { warning: true } : {}) });
    }
    if (this.head.length < EVENTS_KEPT_FIRST) {
      this.head.push(e);
    } else if (this.tail.length < EVENTS_KEPT_LAST) {
      this.tail.push(e);
    } else {
      this.tail[this.tailStart] = e;
      this.tailStart = (this.tailStart + 1) % EVENTS_KEPT_LAST;
    }
  }

  /** The events kept, in time order: the first ones, then the last ones. */
  entries(): LoggedEvent[] {
    return [...this.head, ...this.tail.slice(this.tailStart), ...this.tail.slice(0, this.tailStart)];
  }

  /** Events logged but not kept (between the first and the last ones). */
  get omitted(): number {
    return this.total - this.head.length - this.tail.length;
  }

  /** Every event counted by element, kind and wording, in order of first occurrence. */
  counts(): EventCount[] {
    return [...this.tally.values()];
  }

  get length(): number {
    return this.head.length + this.tail.length;
  }

  filter(f: (e: LoggedEvent) => boolean): LoggedEvent[] {
    return this.entries().filter(f);
  }

  [Symbol.iterator](): Iterator<LoggedEvent> {
    return this.entries()[Symbol.iterator]();
  }
}
