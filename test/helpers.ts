/** Shared test helpers: load a netlist (from a file or a string) and run it. */
import { readFileSync } from 'node:fs';
import { expect } from 'vitest';
import { formatDiagnostic, loadModel, simulate, type Model, type RunResult } from '../src/index.js';

export function modelFromText(text: string, file = 'inline.yaml'): Model {
  const m = loadModel(text, file);
  if (!m.ok) throw new Error(m.diagnostics.map(formatDiagnostic).join('\n'));
  return m.value;
}

export function modelFromFile(path: string): Model {
  return modelFromText(readFileSync(path, 'utf8'), path);
}

/** Runs a model and checks what every transient must satisfy: completion and mass balance. */
export function runChecked(model: Model, driftLimit = 1e-9): RunResult {
  const r = simulate(model);
  expect(r.status, r.message).toBe('completed');
  expect(Math.abs(r.mass.drift), `mass drift ${r.mass.drift}`).toBeLessThan(driftLimit);
  return r;
}

/** Values of one trace channel. */
export function channel(r: RunResult, key: string): number[] {
  const i = r.trace.channels.findIndex((c) => c.key === key);
  if (i < 0) throw new Error(`no channel ${key}; have ${r.trace.channels.map((c) => c.key).join(', ')}`);
  return r.trace.values[i];
}

/** Linear interpolation of a channel at time t. */
export function at(r: RunResult, key: string, t: number): number {
  const v = channel(r, key);
  const ts = r.trace.times;
  let k = ts.findIndex((x) => x >= t);
  if (k < 0) return v[v.length - 1];
  if (k === 0) return v[0];
  const w = (t - ts[k - 1]) / (ts[k] - ts[k - 1]);
  return v[k - 1] + w * (v[k] - v[k - 1]);
}
