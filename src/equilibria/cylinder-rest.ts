/**
 * Rest positions of cylinders and their stability with the load's dynamics.
 *
 * Each side of a cylinder is, at rest (valves as the analysis sets them):
 * - open: joined through conducting lines and valves to reservoirs of one pressure, which it
 *   then holds whatever the piston does (the steady limit of the flow);
 * - sealed: joined to no reservoir, alone or with rigid chambers; its gas (mass m, from the
 *   start or the end of the run) follows the polytrope p·(V(x) + V_rigid)^n = const through the
 *   state it had, n = γ for heat: adiabatic, n = 1 otherwise (isothermal at the start
 *   temperature, or at ambient for heat: exchange, where the gas ends at ambient);
 * - not analysed: joined to compliant chambers, to reservoirs of different pressures, or to the
 *   other side; the cylinder is then reported without a rest position.
 * The net force F(x) (physics/piston.ts, friction excluded) is sampled over the stroke and its
 * sign changes refined by bisection: each root is a rest position. A stop is a rest position
 * when F pushes into it. An interior root is statically stable when the stiffness
 * K = −dF/dx > 0; with the load's dynamics M·ẍ + c·ẋ + K·x = 0 its eigenvalues are
 * s = (−c ± √(c² − 4MK))/(2M): stable (damped) for c > 0, undamped (marginal) for c = 0. Static
 * friction widens every rest position into a band where |F| ≤ F_s; the band around each root
 * is reported.
 *
 * References: the gas spring rate n·p·A²/V (any fluid-power text, from memory); the
 * mass–spring–damper eigenvalues (any vibrations text).
 */
import type { Model } from '../model/types.js';
import type { CylinderModel } from '../model/cylinder.js';
import { capVolume, pistonForce, rodVolume } from '../physics/piston.js';

/** Samples of F over the stroke when bracketing roots. */
const SAMPLES = 400;

export interface CylinderRest {
  cylinder: string;
  /** How each side was treated. */
  sides: { cap: string; rod?: string };
  /** Rest positions, ascending; empty when not analysed. */
  rests: {
    position: number;
    where: 'inside' | 'retracted stop' | 'full stroke';
    stable: boolean;
    /** −dF/dx at the rest position, N/m (inside only). */
    stiffness: number | null;
    /** Natural frequency √(K/M), rad/s, and damping ratio c/(2√(K·M)) (inside, K > 0). */
    omega: number | null;
    damping: number | null;
    eigenvalues: { re: number; im: number }[];
    /** Positions over which static friction can hold the piston around this rest, m. */
    friction_band: [number, number] | null;
  }[];
  note?: string;
}

type Side = { kind: 'open'; p: number; what: string } | { kind: 'sealed'; c: number; n: number; Vextra: number; what: string } | { kind: 'none'; what: string };

/** Whether a branch passes gas at rest: lines always; valves by their opening at the end of the schedule. */
function conducts(model: Model, k: number, valves: 'open' | 'closed' | 'end'): boolean {
  const b = model.branches[k];
  const op = b.valve?.operation;
  if (!op) return true;
  if (op.kind === 'relief') return false;
  if (op.kind === 'check') return true;
  // a regulator and a controlled valve pass gas as their law sets
  if (op.kind === 'regulator' || op.kind === 'driven') return true;
  if (valves === 'open') return true;
  if (valves === 'closed') return false;
  const last = op.steps.length ? op.steps[op.steps.length - 1].open : op.initially;
  return last > 0;
}

function sideOf(model: Model, j: number, side: 'cap' | 'rod', valves: 'open' | 'closed' | 'end', mass: number, T: number): Side {
  const c = model.cylinders[j];
  const key = (n: Model['branches'][number]['from']): string => (n.kind === 'port' ? `p${n.index}.${n.side}` : `${n.kind[0]}${n.index}`);
  const start = `p${j}.${side}`;
  const seen = new Set([start]);
  const queue = [start];
  const reservoirs = new Set<number>();
  const chambers: number[] = [];
  let other = false;
  while (queue.length) {
    const here = queue.shift()!;
    model.branches.forEach((b, k) => {
      if (!conducts(model, k, valves)) return;
      const a = key(b.from), z = key(b.to);
      if (a !== here && z !== here) return;
      const there = a === here ? b.to : b.from;
      const id = a === here ? z : a;
      if (seen.has(id)) return;
      seen.add(id);
      if (there.kind === 'reservoir') { reservoirs.add(there.index); return; }
      if (there.kind === 'port') other = true;
      else chambers.push(there.index);
      queue.push(id);
    });
  }
  if (other) return { kind: 'none', what: 'joined to another cylinder side' };
  const pressures = new Set([...reservoirs].map((r) => model.reservoirs[r].pressure.at(model.simulate.duration)));
  if (pressures.size > 1) return { kind: 'none', what: 'joined to reservoirs of different pressures' };
  if (pressures.size === 1) {
    const p = [...pressures][0];
    return { kind: 'open', p, what: `open to ${[...reservoirs].map((r) => model.reservoirs[r].name).join(', ')}` };
  }
  if (chambers.some((i) => !model.chambers[i].wall.rigid)) return { kind: 'none', what: 'joined to a compliant chamber' };
  const Vextra = chambers.reduce((s, i) => s + model.chambers[i].wall.V0 + model.chambers[i].deadVolume, 0);
  const V0 = (side === 'cap' ? capVolume(c.geometry, c.x0) : rodVolume(c.geometry, c.x0)) + Vextra;
  const n = model.heat === 'adiabatic' ? model.gas.gamma : 1;
  const m = mass + chambers.reduce((s, i) => s + model.chambers[i].m0, 0);
  const p0 = (m * model.gas.R * T) / V0;
  return { kind: 'sealed', c: p0 * V0 ** n, n, Vextra, what: chambers.length ? `sealed with ${chambers.map((i) => model.chambers[i].name).join(', ')}` : 'sealed' };
}

function pressureAt(s: Side, V: number): number {
  return s.kind === 'open' ? s.p : s.kind === 'sealed' ? s.c / (V + s.Vextra) ** s.n : Number.NaN;
}

function bisect(f: (x: number) => number, a: number, b: number): number {
  let fa = f(a);
  for (let i = 0; i < 200 && b - a > 1e-15 * Math.max(1, Math.abs(b)); i++) {
    const m = 0.5 * (a + b);
    const fm = f(m);
    if ((fm > 0) === (fa > 0)) { a = m; fa = fm; } else b = m;
  }
  return 0.5 * (a + b);
}

/** The band around x where |F| ≤ F_s, searched on the sample grid and refined at its edges. */
function frictionBand(F: (x: number) => number, x: number, s: number, Fs: number): [number, number] | null {
  if (Fs <= 0) return null;
  const edge = (dir: 1 | -1): number => {
    const step = s / SAMPLES;
    let a = x;
    for (;;) {
      const b = a + dir * step;
      if (b < 0 || b > s) return dir > 0 ? s : 0;
      if (Math.abs(F(b)) > Fs) return bisect((y) => Math.abs(F(y)) - Fs, Math.min(a, b), Math.max(a, b));
      a = b;
    }
  };
  return [edge(-1), edge(1)];
}

function restsOf(c: CylinderModel, F: (x: number) => number): CylinderRest['rests'] {
  const s = c.geometry.stroke;
  const M = c.load.mass;
  const cv = c.friction.viscous;
  const Fs = c.friction.static;
  const out: CylinderRest['rests'] = [];
  if (F(0) <= 0) out.push({ position: 0, where: 'retracted stop', stable: F(0) < 0 || F(s * 1e-9) <= 0, stiffness: null, omega: null, damping: null, eigenvalues: [], friction_band: null });
  let xa = 0, fa = F(0);
  for (let i = 1; i <= SAMPLES; i++) {
    const xb = (s * i) / SAMPLES;
    const fb = F(xb);
    if ((fa > 0 && fb < 0) || (fa < 0 && fb > 0)) {
      const x = bisect(F, xa, xb);
      const h = 1e-7 * s;
      const K = -(F(Math.min(s, x + h)) - F(Math.max(0, x - h))) / (Math.min(s, x + h) - Math.max(0, x - h));
      const disc = cv * cv - 4 * M * K;
      const eig = disc >= 0
        ? [{ re: (-cv + Math.sqrt(disc)) / (2 * M), im: 0 }, { re: (-cv - Math.sqrt(disc)) / (2 * M), im: 0 }]
        : [{ re: -cv / (2 * M), im: Math.sqrt(-disc) / (2 * M) }, { re: -cv / (2 * M), im: -Math.sqrt(-disc) / (2 * M) }];
      out.push({
        position: x, where: 'inside', stable: K > 0, stiffness: K,
        omega: K > 0 ? Math.sqrt(K / M) : null, damping: K > 0 ? cv / (2 * Math.sqrt(K * M)) : null,
        eigenvalues: eig, friction_band: frictionBand(F, x, s, Fs),
      });
    }
    xa = xb; fa = fb;
  }
  if (F(s) >= 0) out.push({ position: s, where: 'full stroke', stable: F(s) > 0 || F(s * (1 - 1e-9)) >= 0, stiffness: null, omega: null, damping: null, eigenvalues: [], friction_band: null });
  return out;
}

/**
 * Rest positions of every cylinder. `masses`: per cylinder the gas of each side (kg) to use
 * for sealed sides (the start or the end of the run).
 */
export function cylinderRests(model: Model, valves: 'open' | 'closed' | 'end', masses: { cap: number; rod: number }[]): CylinderRest[] {
  return model.cylinders.map((c, j) => {
    const T = (side: 'cap' | 'rod'): number => (model.heat === 'exchange' ? model.Ta : (side === 'cap' ? c.cap.T0 : c.rod?.T0 ?? model.Ta));
    const cap = sideOf(model, j, 'cap', valves, masses[j].cap, T('cap'));
    const rod = c.rod ? sideOf(model, j, 'rod', valves, masses[j].rod, T('rod')) : null;
    const sides = { cap: cap.what, ...(rod ? { rod: rod.what } : {}) };
    const bad = [cap, rod].find((x) => x?.kind === 'none');
    if (bad) return { cylinder: c.name, sides, rests: [], note: `not analysed: a side is ${bad.what}` };
    const load = c.force ? c.force.at(model.simulate.duration) : 0;
    const F = (x: number): number => pistonForce(c.geometry, c.load, pressureAt(cap, capVolume(c.geometry, x)),
      rod ? pressureAt(rod, rodVolume(c.geometry, x)) : model.pa, model.pa, x, load);
    return { cylinder: c.name, sides, rests: restsOf(c, F) };
  });
}
