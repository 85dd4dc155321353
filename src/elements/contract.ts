/**
 * The element contract: what every element kind (chamber, reservoir, line, valve, valve in a
 * line, feed, and the kinds to come) gives the assembler (assemble/system.ts), which owns the
 * state layout and loops over elements without knowing any kind by name. In the spirit of a
 * circuit simulator's device models: an element declares its state slots, reserves its
 * jacobian entries once at setup, and adds its rhs and jacobian contributions at every load
 * into the assembled arrays, never allocating there.
 *
 * Gas nodes. Elements that are gas volumes (chambers; reservoirs as boundaries) register a node
 * in the node table (`Nodes`, assemble/nodes.ts) and write its pressure p, temperature T and
 * volume V in `evaluate`; elements between nodes (lines, valves) read them there. Mass moves
 * only through `Nodes.transfer`, which subtracts at one slot and adds the same number at
 * another, so the sum of the mass slots is an exact invariant of the rhs.
 *
 * The passes, in element order (nodes are created first, so they evaluate first):
 *   evaluate(t, y)   what others read: node p, T, V; a branch's flow        (once per (t, y))
 *   load(dydt)       rhs contributions: transfers, own rows
 *   settle(y, dydt)  rows that need every transfer first (a chamber's energy balance)
 * and for the jacobian ∂f/∂y, after an rhs at the same point:
 *   prepareJacobian  a node's pressure partials and row weights into the node table
 *   loadJacobian     contributions (a branch: `Nodes.transferJacobian`)
 *   settleJacobian   own entries that need the whole inflow first
 * Entries are reserved in `reserveJacobian`, called twice: first to collect the pattern (the
 * returned positions are −1), then to hand out each entry's position in the value array.
 *
 * Events are data (`ElementEvent`): a function of the state whose sign change matters, its
 * direction, and what firing does; `fire` returns true when the rhs changed (the integrator
 * restarts) and false when the event is only logged. Observables are channels
 * `<name>.<quantity>` with SI units, written by `observe`, and summaries (`ElementSummary`) that
 * the run result, its JSON and the printed table take whole.
 */
import type { Gas } from '../physics/gas.js';
import type { Model } from '../model/types.js';
import type { Nodes } from './nodes.js';

/** One state slot of an element. */
export interface StateSlot {
  /** Short name (`m`, `T`, `h`, `store`): layout listings and messages. */
  name: string;
  /** SI unit. */
  unit: string;
  /**
   * Scale of the absolute tolerance: atol = rtol × scale, or `mass` for masses, whose scale is
   * 1e-3 of the largest mass a gas node holds at the start.
   */
  scale: number | 'mass';
  /** Conservation: `held` gas mass in the network, or a boundary `store` (−mass given). */
  mass?: 'held' | 'store';
}

/** A channel of the time history: `<name>.<quantity>` and its SI unit. */
export interface Channel { key: string; unit: string }

/** An entry of the run log; `warning` marks one the run repeats among its warnings. */
export interface LoggedEvent { t: number; what: string; kind: string; element: string; warning?: boolean }

/** Where elements log (the system's bounded EventLog, or any array). */
export interface EventSink { push(e: LoggedEvent): unknown }

/** A state event an element declares. */
export interface ElementEvent {
  /** Kind of event (`relief`, `check`, `extremum`, `limit-pressure`, ...), as logged. */
  readonly kind: string;
  /** Name of the element it belongs to. */
  readonly element: string;
  /** The event function g(t, y) at the evaluated point (a sign change is an event). */
  value(): number;
  /** +1: only upward crossings count, −1 only downward, 0 both. */
  direction(): number;
  /**
   * Applies the event at t; true when the rhs changed (the integrator must restart). `y` is the
   * state at the event, which an event may change (a piston stopping at its end stop); the
   * integration restarts from it.
   */
  fire(t: number, rising: boolean, log: EventSink, y?: Float64Array): boolean;
  /** Sets the mode the event controls as it stands at the start (after an evaluation). */
  settle?(t: number, log: EventSink): void;
  /**
   * True for an event that only logs (an extremum passed, a limit exceeded): firing it never
   * changes the rhs, so the driver neither restarts nor shortens the step for it, and counts
   * rather than logs its repetitions when it chatters.
   */
  readonly logsOnly?: boolean;
}

/** A summary of one element for the run result, e.g. `chambers.cell_a` or `valves.v1`. */
export interface ElementSummary {
  /** Section of the result: `chambers`, `lines`, `valves`, or a new kind's own. */
  section: string;
  name: string;
  /** Called at every sample and step end after `observe` wrote `row`. */
  track(t: number, row: Float64Array): void;
  /** The summary at the end (`end`: the channel row at the last state). */
  result(end: Float64Array): Record<string, unknown>;
  /** Warnings from what it tracked (a chamber near vacuum). */
  warnings?(): string[];
  /**
   * Changes it saw while tracking (a line starting or stopping to choke), as entries of the run's
   * event list; the run merges them with the log in time order. Their times are those of the
   * sample or step end at which the change was first seen.
   */
  seen?(): { t: number; what: string }[];
  /** Its row in the printed table, as (column, text) pairs (default: the result's fields flattened). */
  row?(result: Record<string, unknown>): [string, string][];
}

/** Hands out jacobian entries (see the file comment): −1 while the pattern is collected. */
export interface JacobianReserve {
  entry(row: number, col: number): number;
  /** The block of a transfer between two nodes; a handle for `Nodes.transferJacobian`. */
  link(from: number, to: number): number;
}

/** What element constructors get from the assembler. */
export interface Assembly {
  readonly model: Model;
  readonly gas: Gas;
  /** Ambient pressure (Pa abs) and temperature (K). */
  readonly pa: number;
  readonly Ta: number;
  /** Reserves consecutive state slots; returns the first. */
  slots(list: StateSlot[]): number;
  /** The node table and the conserving transfer helper. */
  readonly nodes: Nodes;
  /** The run's tolerances (atol filled once the layout is complete). */
  readonly tolerances: { rtol: number; atol: Float64Array };
}

export interface Element {
  readonly name: string;
  /** Which kind, for messages (`chamber`, `line`, ...). */
  readonly kind: string;
  /** Called once every node is registered and the node table allocated (a node sets its rows and columns). */
  expose?(): void;
  /** Start values of its slots. */
  initial?(y: Float64Array): void;
  evaluate?(t: number, y: Float64Array): void;
  load?(dydt: Float64Array): void;
  settle?(y: Float64Array, dydt: Float64Array): void;
  reserveJacobian?(r: JacobianReserve): void;
  prepareJacobian?(y: Float64Array, f: Float64Array, values: Float64Array): void;
  loadJacobian?(t: number, values: Float64Array): void;
  settleJacobian?(y: Float64Array, f: Float64Array, values: Float64Array): void;
  /** Times where its rhs has a kink or jump (the driver restarts there). */
  breakpoints?(): number[];
  /** Logs what happens at a breakpoint t (a schedule starting or ending a ramp). */
  atBreakpoint?(t: number, log: EventSink): void;
  /** False when its rhs depends on t explicitly somewhere in [t0, t1]. */
  timeInvariant?(t0: number, t1: number): boolean;
  events?(): ElementEvent[];
  /**
   * A discrete mode that changes the rhs and may be set from outside (a relief valve's
   * open state, set by the equilibria): part of the evaluation memo's key.
   */
  mode?(): number;
  channels?(): Channel[];
  /** Writes its channels' values at the evaluated point from out[k]; returns the next k. */
  observe?(y: Float64Array, out: Float64Array, k: number): number;
  summaries?(column: (key: string) => number): ElementSummary[];
  /**
   * True for an element that reserves its jacobian pattern but loads no values (a wave line):
   * the system then takes the whole jacobian by coloured differences over the pattern.
   */
  readonly numericJacobian?: boolean;
  /**
   * True when it reserves no jacobian entries for its states and their couplings (a controller,
   * a regulator's lag): the assembler then differences the whole right-hand side for the
   * jacobian instead of assembling it (fine for the small networks such elements sit in).
   */
  readonly differenced?: boolean;
}
