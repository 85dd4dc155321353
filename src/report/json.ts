/** The machine-readable result exactly per the format contract (SI numbers). */
import type { RunResult } from '../transient/results.js';

export function resultJson(r: RunResult): string {
  const out = {
    format: r.format,
    status: r.status,
    message: r.message,
    end: r.end,
    stats: r.stats,
    chambers: r.chambers,
    lines: r.lines,
    valves: r.valves,
    ...r.sections,
    mass: r.mass,
    events: r.events,
    ...(r.events_omitted ? { events_omitted: r.events_omitted, event_counts: r.event_counts } : {}),
    warnings: r.warnings,
    expectations: r.expectations.map((e) => ({ name: e.name, passed: e.passed, actual: e.actual, message: e.message })),
    ...(r.fault ? { fault: r.fault } : {}),
    ...(r.outcomes ? { outcomes: r.outcomes } : {}),
    title: r.title,
    ...(r.description !== undefined ? { description: r.description } : {}),
    ambient: r.ambient,
  };
  // JSON has no Infinity/NaN: write them as null
  return JSON.stringify(out, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2) + '\n';
}
