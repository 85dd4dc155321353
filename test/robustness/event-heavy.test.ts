/**
 * Event-heavy runs stay usable (docs/robustness.md, "Events"): a chattering relief valve
 * switches thousands of times; the result keeps the first 500 and the last 500 events in full
 * and counts every event by element and kind, in the JSON, the summary table and the report,
 * and the charts draw any number of events without overflowing the call stack.
 */
import { describe, expect, it } from 'vitest';
import { reportFigures, reportHtml, reportInput, resultJson, summaryText } from '../../src/index.js';
import { modelFromText, runChecked } from '../helpers.js';

/** A 5 mL pocket fed from 600 kPa gauge, with a relief valve of 1 kPa band much larger than its feed. */
const CHATTER = `format: 1
title: chattering relief valve
chambers:
  pocket: { wall: rigid, volume: 5 mL, start: { pressure: 0 kPa gauge } }
reservoirs:
  supply: { pressure: 600 kPa gauge }
valves:
  feed: { from: supply, to: pocket, orifice: 1 mm, discharge-coefficient: 0.6, initially: open }
  relief:
    from: pocket
    to: ambient
    orifice: 4 mm
    discharge-coefficient: 0.6
    relief: { opens-above: 200 kPa gauge, reseats-below: 199 kPa gauge }
simulate: { duration: 0.12 s, sample: 1 ms }
`;

describe('a chattering relief valve', () => {
  const model = modelFromText(CHATTER, 'chatter.yaml');
  const r = runChecked(model);
  const counts = r.event_counts ?? [];
  const relief = counts.find((c) => c.element === 'relief' && c.kind === 'relief');

  it('keeps the first 500 and the last 500 events and counts all of them', () => {
    expect(r.status).toBe('completed');
    expect(r.events).toHaveLength(1000);
    expect(r.events_omitted).toBeGreaterThan(500);
    expect(relief?.count).toBe(1000 + r.events_omitted!);
    // in time order, the last ones near the end of the run
    for (let i = 1; i < r.events.length; i++) expect(r.events[i].t).toBeGreaterThanOrEqual(r.events[i - 1].t);
    expect(r.events[999].t).toBe(relief!.last);
    expect(r.events[0].t).toBe(relief!.first);
  });

  it('the outcome counts every opening, not only the ones kept', () => {
    const o = r.outcomes!.find((g) => g.chambers.includes('pocket'))!;
    expect(o.outcome).toBe('oscillating');
    const opened = Number(/opened (\d+) times/.exec(o.evidence)![1]);
    expect(opened).toBeGreaterThanOrEqual(Math.floor(relief!.count / 2));
  });

  it('JSON, table and report carry the counts', () => {
    const j = JSON.parse(resultJson(r));
    expect(j.events).toHaveLength(1000);
    expect(j.events_omitted).toBe(r.events_omitted);
    expect(j.event_counts).toEqual(counts);
    expect(summaryText(r)).toContain(`events by element: relief relief ${relief!.count}`);
    expect(reportHtml(reportInput(model, r))).toContain(`${r.events_omitted} more events between the first 500 and the last 500 are not listed`);
  });

  it('the charts draw 200 000 events without overflowing the call stack', () => {
    const many = { ...r, events: Array.from({ length: 200_000 }, (_, i) => ({ t: (i / 200_000) * 0.12, what: 'relief valve relief opens' })) };
    const figures = reportFigures(reportInput(model, many), { standalone: true });
    expect(figures.some((f) => f.svg.includes('event-lines'))).toBe(true);
  });
});
