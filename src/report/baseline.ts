/**
 * Baselines for regression tests: a compact, versioned JSON of one run (`plenum run --baseline`)
 * that `plenum diff` compares with another run. Also reads the other things `diff` accepts: a
 * CSV trace (`run --csv`) and a result JSON (`run --json`, summary only).
 *
 * Baseline format, version 1 (all numbers SI, 9 significant digits, non-finite as null):
 *
 *   { "plenum": "baseline", "version": 1, "netlist": "rig.yaml", "title": "...",
 *     "status": "completed", "end": 5, "digits": 9,
 *     "summary": { "chambers.cell_a.final.gauge": 15532.1442, "lines.crossover.regime": "laminar", ... },
 *     "time": [0, 0.005, ...],
 *     "channels": { "cell_a.pressure": { "unit": "Pa", "values": [...] }, ... } }
 *
 * Summary keys are the paths of the result JSON (`chambers.<name>.final.<quantity>`,
 * `chambers.<name>.peak.gauge`, `.peak.at`, `.least.gauge`, `.least.at`, `lines.<name>.peak_flow`,
 * `.peak_reynolds`, `.regime`, `valves.<name>.peak_flow`, `.choked`, `mass.initial`, `mass.final`,
 * `mass.through_boundaries`); their units follow from the last part of the key. The trace is
 * the sampled time history, one channel per line so that a text diff of two baselines reads well.
 * The same run always gives the same bytes.
 */
import type { RunResult } from '../transient/results.js';
import type { TraceFile } from '../transient/trace-diff.js';

export type { TraceFile } from '../transient/trace-diff.js';

export const BASELINE_VERSION = 1;
const DIGITS = 9;

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };

const UNIT_OF_LAST: Record<string, string> = {
  pressure: 'Pa', gauge: 'Pa', volume: 'm^3', mass: 'kg', temperature: 'K', stretch: '-',
  at: 's', peak_flow: 'kg/s', peak_reynolds: '-', initial: 'kg', final: 'kg', through_boundaries: 'kg',
  regime: '', choked: '', peak_mach: '-',
};

/** The unit of a summary key, from its last part. */
export function summaryUnit(key: string): string {
  const last = key.slice(key.lastIndexOf('.') + 1);
  return Object.hasOwn(UNIT_OF_LAST, last) ? UNIT_OF_LAST[last] : '-';
}

function round(x: number, digits = DIGITS): number | null {
  if (!Number.isFinite(x)) return null;
  if (x === 0) return 0;
  return Number(x.toPrecision(digits));
}

/** Flattens the summary part of a result (RunResult or its JSON) into `path → value`. */
function flatten(r: { chambers?: unknown; lines?: unknown; valves?: unknown; mass?: unknown }): [string, number | string | boolean][] {
  const out: [string, number | string | boolean][] = [];
  const walk = (prefix: string, v: unknown): void => {
    if (v === null || v === undefined) { out.push([prefix, Number.NaN]); return; }
    if (typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean') { out.push([prefix, v]); return; }
    if (typeof v === 'object' && !Array.isArray(v)) for (const [k, x] of Object.entries(v)) walk(`${prefix}.${k}`, x);
  };
  for (const section of ['chambers', 'lines', 'valves'] as const) {
    const s = r[section];
    if (s && typeof s === 'object') for (const [name, v] of Object.entries(s)) walk(`${section}.${name}`, v);
  }
  const m = r.mass as Record<string, unknown> | undefined;
  // drift is round-off (1e-15); comparing it would only compare noise
  if (m) for (const k of ['initial', 'final', 'through_boundaries']) if (k in m) walk(`mass.${k}`, m[k]);
  return out;
}

function line(key: string, value: Json): string {
  return `${JSON.stringify(key)}: ${JSON.stringify(value)}`;
}

/** The baseline of a run (see the module comment for the format). */
export function baselineJson(r: RunResult, netlist = r.file): string {
  const head: [string, Json][] = [
    ['plenum', 'baseline'], ['version', BASELINE_VERSION], ['netlist', netlist], ['title', r.title],
    ['status', r.status], ['end', round(r.end, 15)], ['digits', DIGITS],
  ];
  const summary = flatten(r).map(([k, v]) => `    ${line(k, typeof v === 'number' ? round(v) : v)}`);
  const channels = r.trace.channels.map((c, i) =>
    `    ${line(c.key, { unit: c.unit, values: r.trace.values[i].map((x) => round(x)) })}`);
  return [
    '{',
    ...head.map(([k, v]) => `  ${line(k, v)},`),
    `  "summary": {${summary.length ? `\n${summary.join(',\n')}\n  ` : ''}},`,
    `  "time": ${JSON.stringify(r.trace.times.map((t) => round(t, 15)))},`,
    `  "channels": {${channels.length ? `\n${channels.join(',\n')}\n  ` : ''}}`,
    '}',
    '',
  ].join('\n');
}

export type ReadTrace = { ok: true; value: TraceFile } | { ok: false; message: string };

const bad = (message: string): ReadTrace => ({ ok: false, message });

function num(v: unknown): number {
  return typeof v === 'number' ? v : Number.NaN;
}

function fromBaseline(j: Record<string, unknown>, file: string): ReadTrace {
  if (j.version !== BASELINE_VERSION) return bad(`${file}: baseline version ${String(j.version)} is not supported (this plenum reads version ${BASELINE_VERSION})`);
  const time = j.time;
  const ch = j.channels;
  const sum = j.summary;
  if (!Array.isArray(time) || !ch || typeof ch !== 'object' || !sum || typeof sum !== 'object') return bad(`${file}: not a complete baseline (needs time, channels and summary)`);
  const channels: TraceFile['channels'] = [];
  const values: number[][] = [];
  for (const [key, c] of Object.entries(ch as Record<string, unknown>)) {
    const cc = c as { unit?: unknown; values?: unknown };
    if (typeof cc?.unit !== 'string' || !Array.isArray(cc.values) || cc.values.length !== time.length) return bad(`${file}: channel ${key} is malformed (needs a unit and ${time.length} values)`);
    channels.push({ key, unit: cc.unit });
    values.push(cc.values.map(num));
  }
  const summary = Object.entries(sum as Record<string, unknown>).map(([key, v]) => ({
    key, unit: summaryUnit(key), value: typeof v === 'string' || typeof v === 'boolean' ? v : num(v),
  }));
  return {
    ok: true,
    value: {
      kind: 'baseline', file, netlist: typeof j.netlist === 'string' ? j.netlist : undefined,
      status: typeof j.status === 'string' ? j.status : undefined, end: typeof j.end === 'number' ? j.end : undefined,
      channels, times: time.map(num), values, summary,
    },
  };
}

function fromResult(j: Record<string, unknown>, file: string): ReadTrace {
  const summary = flatten(j).map(([key, value]) => ({ key, unit: summaryUnit(key), value }));
  return {
    ok: true,
    value: {
      kind: 'result', file, status: typeof j.status === 'string' ? j.status : undefined,
      end: typeof j.end === 'number' ? j.end : undefined, channels: [], times: [], values: [], summary,
    },
  };
}

function fromCsv(text: string, file: string): ReadTrace {
  const rows = text.split(/\r?\n/).filter((l) => l.length > 0);
  if (!rows.length) return bad(`${file}: empty file`);
  const head = rows[0].split(',');
  const cell = /^(.*\S)\s*\[(.*)\]$/;
  if (!/^time \[s\]$/.test(head[0].trim())) return bad(`${file}: not a plenum trace (the first column must be \`time [s]\`)`);
  const channels: TraceFile['channels'] = [];
  for (const h of head.slice(1)) {
    const m = cell.exec(h.trim());
    if (!m) return bad(`${file}: cannot read the column header \`${h}\` (expected \`name.quantity [unit]\`)`);
    channels.push({ key: m[1], unit: m[2] });
  }
  const times: number[] = [];
  const values: number[][] = channels.map(() => []);
  for (let r = 1; r < rows.length; r++) {
    const cells = rows[r].split(',');
    if (cells.length !== head.length) return bad(`${file}:${r + 1}: ${cells.length} values, the header has ${head.length} columns`);
    const t = Number(cells[0]);
    if (cells[0].trim() === '' || !Number.isFinite(t)) return bad(`${file}:${r + 1}: the time \`${cells[0]}\` is not a number`);
    if (times.length && t < times[times.length - 1]) return bad(`${file}:${r + 1}: times must not decrease`);
    times.push(t);
    for (let c = 0; c < channels.length; c++) {
      const s = cells[c + 1].trim();
      values[c].push(s === '' ? Number.NaN : Number(s));
    }
  }
  if (!times.length) return bad(`${file}: the trace has no rows`);
  return { ok: true, value: { kind: 'csv', file, end: times[times.length - 1], channels, times, values, summary: [] } };
}

/** Reads a baseline, a CSV trace or a result JSON (recognised by content). */
export function readTrace(text: string, file: string): ReadTrace {
  const s = text.replace(/^\uFEFF/, '').trimStart();
  if (s.startsWith('{')) {
    let j: unknown;
    try {
      j = JSON.parse(s);
    } catch (e) {
      return bad(`${file}: not valid JSON (${e instanceof Error ? e.message : String(e)})`);
    }
    const o = j as Record<string, unknown>;
    if (o && o.plenum === 'baseline') return fromBaseline(o, file);
    if (o && o.format === 1 && typeof o.chambers === 'object') return fromResult(o, file);
    return bad(`${file}: a JSON file that is neither a plenum baseline nor a plenum result`);
  }
  return fromCsv(s, file);
}
