/**
 * Bench recordings beside a simulation, outside calibration: the overlay of `plenum report
 * --data` (each measured channel with the simulated values at its reading times, from the
 * dense output) and the measured side of `plenum diff` (a recording as a trace, compared with a
 * simulated trace at the reading times only, on the channels it recorded).
 */
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { NetworkSystem } from '../assemble/system.js';
import type { Model } from '../model/types.js';
import type { MeasuredOverlay } from '../transient/report-input.js';
import type { TraceFile } from '../transient/trace-diff.js';
import { simulate } from '../transient/transient.js';
import { checkSeries, readMeasuredCsv, type MeasuredSeries } from './bench-series.js';

/** SI unit of a channel as plenum writes it in its CSV. */
const SI_UNIT: Record<string, string> = { pressure: 'Pa', gauge: 'Pa', volume: 'm^3', mass: 'kg', temperature: 'K', flow: 'kg/s', position: 'm', velocity: 'm/s', force: 'N' };

/**
 * Reads recordings against a model (probes must exist, times must overlap the run) and
 * simulates once per recording to read the channels at its reading times. Conditions written
 * in a recording (`# set PATH = VALUE`) are not applied: the overlay is of the netlist as written;
 * `notes` says so.
 */
export function measuredOverlays(model: Model, inputs: readonly { text: string; file: string }[]): Result<{ overlays: MeasuredOverlay[]; notes: string[] }> {
  const keys = new NetworkSystem(model).channels().map((c) => c.key);
  const errors: Diagnostic[] = [];
  const series: MeasuredSeries[] = [];
  const notes: string[] = [];
  for (const d of inputs) {
    const s = readMeasuredCsv(d.text, d.file, model.pa);
    if (!s.ok) { errors.push(...s.diagnostics); continue; }
    const problems = checkSeries(s.value, keys, model.simulate.duration);
    if (problems.length) { errors.push(...problems); continue; }
    if (s.value.overrides.length) notes.push(`${d.file} was recorded with ${s.value.overrides.map((o) => `${o.path} = ${o.value}`).join(', ')}; the report shows the netlist as written`);
    series.push(s.value);
  }
  if (errors.length) return { ok: false, diagnostics: errors };
  const overlays: MeasuredOverlay[] = [];
  for (const s of series) {
    const idx = Array.from(s.times.keys()).filter((k) => s.times[k] >= 0 && s.times[k] <= model.simulate.duration);
    const times = idx.map((k) => s.times[k]);
    const r = simulate(model, { probe: { times, keys: s.columns.map((c) => c.key) } });
    s.columns.forEach((c, j) => overlays.push({ file: s.file, key: c.key, times, values: idx.map((k) => c.values[k]), simulated: Array.from(r.probed![j]) }));
  }
  return { ok: true, value: { overlays, notes }, warnings: [] };
}

/** A recording as a trace for `plenum diff` (SI, as plenum's CSV). Ambient converts `.pressure [... gauge]` columns. */
export function measuredTrace(text: string, file: string, ambient: number): Result<TraceFile> {
  const s = readMeasuredCsv(text, file, ambient);
  if (!s.ok) return s;
  const v = s.value;
  return {
    ok: true,
    value: {
      kind: 'measured', file, times: Array.from(v.times), end: v.times[v.times.length - 1],
      channels: v.columns.map((c) => ({ key: c.key, unit: SI_UNIT[c.key.slice(c.key.lastIndexOf('.') + 1)] ?? '-' })),
      values: v.columns.map((c) => Array.from(c.values)), summary: [],
    },
    warnings: [],
  };
}

/**
 * A simulated trace restricted to a recording's channels and read (linearly between samples)
 * at its reading times inside the run, and the recording cut to the run's time, so that `diff`
 * compares where and what was measured.
 */
export function alignToMeasured(sim: TraceFile, measured: TraceFile): { sim: TraceFile; measured: TraceFile } {
  const end = sim.times[sim.times.length - 1];
  const times = measured.times.filter((t) => t >= sim.times[0] && t <= end);
  const channels = sim.channels.filter((c) => measured.channels.some((m) => m.key === c.key));
  const values = channels.map((c) => {
    const v = sim.values[sim.channels.indexOf(c)];
    let k = 0;
    return times.map((t) => {
      while (k + 1 < sim.times.length && sim.times[k + 1] <= t) k++;
      if (k + 1 >= sim.times.length || sim.times[k] === t) return v[k];
      const w = (t - sim.times[k]) / (sim.times[k + 1] - sim.times[k]);
      return v[k] + w * (v[k + 1] - v[k]);
    });
  });
  const keep = measured.times.map((t, k) => k).filter((k) => measured.times[k] >= sim.times[0] && measured.times[k] <= end);
  return {
    sim: { ...sim, times, channels, values, summary: [], end: times[times.length - 1] },
    measured: { ...measured, times: keep.map((k) => measured.times[k]), values: measured.values.map((v) => keep.map((k) => v[k])), end: times[times.length - 1] },
  };
}
