/** `plenum equilibria NETLIST`: every rest state, its stability, and where the transient goes. */
import { equilibriaJson, equilibriaText, findEquilibria, type GasSource, type ValveState } from '../index.js';
import { loadOrExit } from './load.js';
import { samePath, UsageError, writeAtomic } from './io.js';

export interface EquilibriaCliOptions {
  valves?: string;
  gas?: string;
  json?: string;
  transient?: boolean;
  maxCombinations?: string;
  quiet?: boolean;
}

const VALVES: readonly ValveState[] = ['open', 'closed', 'end'];
const GAS: readonly GasSource[] = ['start', 'end'];

export function equilibriaCommand(file: string, opts: EquilibriaCliOptions): number {
  const valves = (opts.valves ?? 'end') as ValveState;
  if (!VALVES.includes(valves)) throw new UsageError(`--valves must be one of ${VALVES.join(', ')}, not \`${opts.valves}\``);
  const gas = (opts.gas ?? 'start') as GasSource;
  if (!GAS.includes(gas)) throw new UsageError(`--gas must be start or end, not \`${opts.gas}\``);
  if (gas === 'end' && opts.transient === false) throw new UsageError('--gas end needs the transient; drop --no-transient');
  let maxCombinations: number | undefined;
  if (opts.maxCombinations !== undefined) {
    maxCombinations = Number(opts.maxCombinations);
    if (!Number.isInteger(maxCombinations) || maxCombinations < 1) throw new UsageError(`--max-combinations must be a positive whole number, not \`${opts.maxCombinations}\``);
  }
  if (opts.json && opts.json !== '-' && samePath(opts.json, file)) throw new UsageError(`refusing to overwrite the netlist ${file} with an output file`);
  const model = loadOrExit(file);
  const result = findEquilibria(model, { valves, gas, transient: opts.transient !== false, maxCombinations });
  if (!opts.quiet) (opts.json === '-' ? process.stderr : process.stdout).write(equilibriaText(result));
  if (opts.json) {
    const text = equilibriaJson(result);
    if (opts.json === '-') process.stdout.write(text); else writeAtomic(opts.json, text);
  }
  return result.status === 'ok' ? 0 : 3;
}
