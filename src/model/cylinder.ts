/**
 * Cylinders: a netlist entry turned into frozen SI geometry, load, friction and start state.
 * The dead volume of each side includes half of every line attached to it (the same lumping
 * as for chambers). Problems only the start state shows (a start pressure that needs more
 * gas than plenum accepts) are diagnostics at the start key.
 */
import type { Diagnostic } from '../diag/diagnostic.js';
import type { Gas } from '../physics/gas.js';
import type { FrictionLaw } from '../physics/friction.js';
import { capVolume, gravityForce, pistonGeometry, rodVolume, type PistonGeometry, type PistonLoad } from '../physics/piston.js';
import type { CylinderSpec, PortStartSpec, SourcePos, TimeSeries } from '../netlist/types.js';
import { MAX_GAS_PRESSURE } from '../units/pressure.js';

/** The gas of one side at the start. */
export interface SideStart { m0: number; T0: number; p0: number }

export interface CylinderModel {
  name: string;
  geometry: PistonGeometry;
  load: PistonLoad;
  friction: FrictionLaw;
  /** External load opposing extension (N) as a function of time; null: none. */
  force: TimeSeries | null;
  doubleActing: boolean;
  /** Start position, m (the piston starts at rest). */
  x0: number;
  cap: SideStart;
  /** null for a single-acting cylinder (rod side open to ambient). */
  rod: SideStart | null;
  /** h·A (W/K) of each side for heat: exchange; 0 otherwise. */
  heatTransfer: number;
  spec: CylinderSpec;
}

function diag(pos: SourcePos, code: string, message: string, hint: string): Diagnostic {
  return { code, severity: 'error', message, file: pos.file, line: pos.line, column: pos.column, path: pos.path, hint };
}

function sideStart(s: PortStartSpec, V: number, gas: Gas, Ta: number, pos: SourcePos, side: string, errs: Diagnostic[]): SideStart | null {
  const T0 = s.temperature ?? Ta;
  const m0 = s.by === 'mass' ? s.value : (s.value * V) / (gas.R * T0);
  const p0 = (m0 * gas.R * T0) / V;
  if (!(p0 <= MAX_GAS_PRESSURE)) {
    errs.push(diag(pos, 'start-range', `the ${side} side would start at ${(p0 / 1e6).toPrecision(4)} MPa absolute, above ${MAX_GAS_PRESSURE / 1e6} MPa`, 'check the start value and its unit'));
    return null;
  }
  return { m0, T0, p0 };
}

/**
 * Builds a cylinder. `lumped` is the tubing volume attached to each side (m³), `heat` the
 * netlist's heat model.
 */
export function buildCylinder(c: CylinderSpec, lumped: { cap: number; rod: number }, gas: Gas, pa: number, Ta: number,
  heat: 'isothermal' | 'adiabatic' | 'exchange', errs: Diagnostic[]): CylinderModel | null {
  const doubleActing = c.rod !== undefined;
  const geometry = pistonGeometry(c.bore, c.rod ?? 0, c.stroke, c.deadVolume.cap + lumped.cap, doubleActing ? c.deadVolume.rod + lumped.rod : 0);
  const load: PistonLoad = {
    mass: c.movingMass,
    springRate: c.spring.rate,
    springPreload: c.spring.preload,
    gravity: gravityForce(c.movingMass, c.angle),
  };
  const x0 = c.start.position;
  const startPos = (side: string): SourcePos => c.fieldPos[`start.${side}`] ?? c.fieldPos['start.position'] ?? c.pos;
  const cap = sideStart(c.start.cap, capVolume(geometry, x0), gas, Ta, startPos('cap'), 'cap', errs);
  const rod = doubleActing ? sideStart(c.start.rod ?? { by: 'pressure', value: pa }, rodVolume(geometry, x0), gas, Ta, startPos('rod'), 'rod', errs) : null;
  if (!cap || (doubleActing && !rod)) return null;
  return {
    name: c.name,
    geometry,
    load,
    friction: { ...c.friction },
    force: c.force ?? null,
    doubleActing,
    x0,
    cap,
    rod,
    heatTransfer: heat === 'exchange' ? c.heatTransfer ?? 0 : 0,
    spec: c,
  };
}
