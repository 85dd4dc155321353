/** `plenum trace NETLIST --vary PARAM --from A --to B`: branches of equilibria by continuation. */
import { traceBranchesCsv, traceEquilibria, traceJson, traceText, type ValveState } from '../index.js';
import { loadOrExit } from './load.js';
import { checkOutputPaths, emitOutputs, UsageError } from './io.js';
import { readMaxWall, refuseLargeGroup } from './equilibria.js';

/**
 * Largest group of joined chambers `plenum trace` follows: every point of a branch needs Newton
 * solves (sparse from 32 chambers) and a growth rate, from a certified sparse eigenvalue solve
 * where the jacobian allows it and else a dense eigenvalue problem of the group's size (200
 * linear chambers: 1.3 s of CPU for a branch of 24 points; groups past a pressure maximum take
 * the dense path, O(n³) a point).
 */
export const MAX_TRACE_CHAMBERS = 500;

export interface TraceCliOptions {
  vary?: string;
  from?: string;
  to?: string;
  valves?: string;
  csv?: string;
  json?: string;
  step?: string;
  starts?: string;
  maxWall?: string;
  quiet?: boolean;
}

const VALVES: readonly ValveState[] = ['open', 'closed', 'end'];

function positive(text: string | undefined, what: string, integer: boolean): number | undefined {
  if (text === undefined) return undefined;
  const x = Number(text);
  if (!Number.isFinite(x) || x < 0 || (integer && !Number.isInteger(x)) || (!integer && x === 0)) {
    throw new UsageError(`${what} must be ${integer ? 'a whole number' : 'a positive number'}, not \`${text}\``);
  }
  return x;
}

export function traceCommand(file: string, opts: TraceCliOptions): number {
  if (!opts.vary || opts.from === undefined || opts.to === undefined) {
    throw new UsageError('trace needs --vary PARAM --from A --to B, e.g. --vary chambers.cell_a.thickness --from "1.2 mm" --to "1.8 mm"');
  }
  const valves = (opts.valves ?? 'end') as ValveState;
  if (!VALVES.includes(valves)) throw new UsageError(`--valves must be one of ${VALVES.join(', ')}, not \`${opts.valves}\``);
  checkOutputPaths(file, { '--csv': opts.csv, '--json': opts.json });
  const maxStep = positive(opts.step, '--step', false);
  const interior = positive(opts.starts, '--starts', true);
  const maxWall = readMaxWall(opts.maxWall);
  const model = loadOrExit(file);
  refuseLargeGroup(model, file, MAX_TRACE_CHAMBERS, 'plenum trace',
    'each point of a branch is a dense Newton solve and eigenvalue problem that grow with the cube of that number');
  const r = traceEquilibria(model, { vary: opts.vary, from: opts.from, to: opts.to, valves, maxStep, interior, maxWall });
  if (!r.ok) throw new UsageError(`${r.message}\n  hint: ${r.hint}`);
  const toStdout = opts.csv === '-' || opts.json === '-';
  if (!opts.quiet) (toStdout ? process.stderr : process.stdout).write(traceText(r.value));
  emitOutputs([
    { path: opts.json, text: () => traceJson(r.value), what: '--json' },
    { path: opts.csv, text: () => traceBranchesCsv(r.value), what: '--csv' },
  ]);
  return r.value.status === 'ok' ? 0 : 3;
}
