/** `plenum equilibria NETLIST`: every rest state, its stability, and where the transient goes. */
import { equilibriaJson, equilibriaText, findEquilibria, type GasSource, type Model, type ValveState } from '../index.js';
import { loadOrExit } from './load.js';
import { checkOutputPaths, emitOutputs, UsageError } from './io.js';
import { parseQuantity } from '../units/quantity.js';

export interface EquilibriaCliOptions {
  valves?: string;
  gas?: string;
  json?: string;
  transient?: boolean;
  maxCombinations?: string;
  maxWall?: string;
  quiet?: boolean;
}

/** `--max-wall`: a time with its unit ("45 s", "2 min") or a bare number of seconds; undefined when not given. */
export function readMaxWall(text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const bare = Number(text);
  const r = Number.isFinite(bare) && text.trim() !== '' ? { ok: true as const, value: bare } : parseQuantity(text, 'time');
  if (!r.ok || !(r.value > 0)) throw new UsageError(`--max-wall must be a positive time such as "30 s" or "2 min", not \`${text}\``);
  return r.value;
}

const VALVES: readonly ValveState[] = ['open', 'closed', 'end'];
const GAS: readonly GasSource[] = ['start', 'end'];

/**
 * Largest group of joined chambers `plenum equilibria` analyses. Each equilibrium's stability
 * is a dense eigenvalue problem of its group's size, O(n³): about 15 s at 1 000 chambers here,
 * some two minutes at 2 000, hours at 10 000. Above the limit the command says so at once.
 */
export const MAX_GROUP_CHAMBERS = 2000;

/** Refuses, as a usage error, a network whose largest joined group exceeds `limit` chambers. */
export function refuseLargeGroup(model: Model, file: string, limit: number, command: string, cost: string): void {
  const wave = model.branches.find((b) => b.line?.wave);
  if (wave) throw new UsageError(`${file}: line ${wave.name} is a wave line, which ${command} does not analyse yet (its segment states have no rest-state treatment); make it \`model: lumped\` for the rest-state analysis: at rest a line carries no wave`);
  const largest = largestJoinedGroup(model);
  if (largest <= limit) return;
  throw new UsageError(`${file}: ${largest} chambers are joined in one group; ${cost}, and ${command} takes groups of up to ${limit} chambers; analyse a part of the network in a netlist of its own`);
}

/** Chambers in the largest set joined by lines and valves (whatever the valves' state). */
export function largestJoinedGroup(model: Model): number {
  const parent = model.chambers.map((_, i) => i);
  const root = (i: number): number => { while (parent[i] !== i) { parent[i] = parent[parent[i]]; i = parent[i]; } return i; };
  for (const b of model.branches) {
    if (b.from.kind === 'chamber' && b.to.kind === 'chamber') parent[root(b.from.index)] = root(b.to.index);
  }
  const size = new Map<number, number>();
  for (let i = 0; i < parent.length; i++) size.set(root(i), (size.get(root(i)) ?? 0) + 1);
  return Math.max(0, ...size.values());
}

export function equilibriaCommand(file: string, opts: EquilibriaCliOptions): number {
  const valves = (opts.valves ?? 'end') as ValveState;
  if (!VALVES.includes(valves)) throw new UsageError(`--valves must be one of ${VALVES.join(', ')}, not \`${opts.valves}\``);
  // default: the end of the run for a network open to reservoirs or feeds (findEquilibria)
  const gas = (opts.gas ?? (opts.transient === false ? 'start' : undefined)) as GasSource | undefined;
  if (gas !== undefined && !GAS.includes(gas)) throw new UsageError(`--gas must be start or end, not \`${opts.gas}\``);
  if (gas === 'end' && opts.transient === false) throw new UsageError('--gas end needs the transient; drop --no-transient');
  let maxCombinations: number | undefined;
  if (opts.maxCombinations !== undefined) {
    maxCombinations = Number(opts.maxCombinations);
    if (!Number.isInteger(maxCombinations) || maxCombinations < 1) throw new UsageError(`--max-combinations must be a positive whole number, not \`${opts.maxCombinations}\``);
  }
  const maxWall = readMaxWall(opts.maxWall);
  checkOutputPaths(file, { '--json': opts.json });
  const model = loadOrExit(file);
  refuseLargeGroup(model, file, MAX_GROUP_CHAMBERS, 'plenum equilibria',
    'the stability of its equilibria is a dense eigenvalue problem that grows with the cube of that number (about two minutes at the limit)');
  const result = findEquilibria(model, { valves, gas, transient: opts.transient !== false, maxCombinations, maxWall });
  if (!opts.quiet) (opts.json === '-' ? process.stderr : process.stdout).write(equilibriaText(result));
  emitOutputs([{ path: opts.json, text: () => equilibriaJson(result), what: '--json' }]);
  return result.status === 'ok' ? 0 : 3;
}
