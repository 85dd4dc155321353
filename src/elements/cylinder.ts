/**
 * Cylinder: a piston moving a load between two end stops, with a gas volume on each side.
 *
 * States: the gas mass of the cap side m_c [+ its temperature T_c when not isothermal], the
 * same for the rod side when double-acting, the position x (m), the velocity v (m/s), and the
 * energy W (J) that friction and the stops have dissipated (a quadrature, for the energy
 * balance and the reports). Each side's volume follows the piston, V_c = V0c + A_c·x and
 * V_r = V0r + A_r·(s − x) (physics/piston.ts), so its pressure is p = m·R·T/V and its energy
 * equation carries the boundary work p·V̇ (physics/energy.ts, κ = 0: the gas does not move
 * the wall, the piston does).
 *
 * Discrete state (changed only by located events, so the right-hand side is smooth between
 * them and the integrator never chatters):
 * - `stop` −1 at the retracted stop, +1 at full stroke, 0 inside. At a stop x and v are frozen.
 *   Contact is inelastic: the event sets v = 0 and x exactly on the stop, records the impact
 *   velocity and adds ½·M·v² to W. The piston stays while the force pushes into the stop or
 *   pulls it away by no more than static friction (physics/piston.ts `heldAtStop`).
 * - `slide` inside the stroke: 0 stuck (x, v frozen; friction balances the force), ±1 sliding
 *   (Karnopp's model with its zero-velocity band taken to zero by events, physics/friction.ts).
 *   Without Coulomb friction the piston is never stuck inside the stroke (slide stays +1 and
 *   friction is viscous only).
 * Event functions (g, counted when rising through zero unless said otherwise):
 *   halt        s·v, falling           sliding with Coulomb friction: v reaches 0
 *   release+    F − F_s − δ            stuck, or at the retracted stop: breaks away outwards
 *   release−    −F − F_s − δ           stuck, or at full stroke: breaks away inwards
 *   full        x − s                  moving: reaches full stroke
 *   retracted   −x                     moving: reaches the retracted stop
 * and −1 when not applicable. Past a surface (x beyond a stop, v through zero while sliding) the
 * mechanical state is held until the event is applied, so that a large step cannot cross a
 * surface and come back unseen. δ is a dead band of 1e-10 of p_a·A_c, so that a piston resting
 * at a balance (F = 0 exactly, frictionless) is released by the first force that builds up
 * (an event function starting at exactly 0 would hide its crossing).
 */
import type { Gas } from '../physics/gas.js';
import { gasTemperatureRate, type EnergyInflow } from '../physics/energy.js';
import { hasCoulomb, modeAtRest, slidingFriction, type SlideMode } from '../physics/friction.js';
import { capVolume, heldAtStop, pistonForce, rodVolume } from '../physics/piston.js';
import type { CylinderModel } from '../model/cylinder.js';

/**
 * How far past a surface the state is held: 1e-6 of the stroke (in m, and in m/s for the
 * velocity), far above the increments of difference quotients (√eps of the state's scale) and
 * far below anything a user reads (25 nm on a 25 mm stroke).
 */
const OVERSHOOT = 1e-6;

/** Release dead band relative to p_a·A_c (see the file comment). */
const RELEASE_BAND = 1e-10;

export type CylinderEventKind = 'halt' | 'release+' | 'release-' | 'full' | 'retracted';
export const CYLINDER_EVENTS: readonly CylinderEventKind[] = ['halt', 'release+', 'release-', 'full', 'retracted'];

/** Where the piston is: −1 at the retracted stop, +1 at full stroke, 0 inside. */
export type StopSide = -1 | 0 | 1;

/** One mode change, for the summaries. */
export interface PistonRecord {
  t: number;
  what: 'start' | 'stick' | 'impact';
  /** Position at the change, m. */
  x: number;
  /** Impact velocity (signed, m/s) for an impact; direction (±1) for a start. */
  value: number;
  /** The stop of an impact: +1 full stroke, −1 retracted. */
  stop?: StopSide;
}

/** A completed stroke: from leaving one stop to reaching the other. */
export interface Stroke { direction: 'extend' | 'retract'; started: number; reached: number; time: number; impact_velocity: number }

/** The mechanical states of one evaluation. */
export interface PistonStateView { x: number; v: number }

export class CylinderState {
  readonly coulomb: boolean;
  /** Release dead band, N. */
  readonly band: number;
  stop: StopSide = 0;
  slide: SlideMode = 1;
  /** Mode changes so far, in time order. */
  readonly records: PistonRecord[] = [];
  /** Completed strokes so far; a stroke counts from the last start off one stop to the other stop. */
  readonly strokes: Stroke[] = [];
  /** The last start off a stop, while the piston is on its way. */
  private leftStop: { t: number; from: StopSide } | null = null;
  /** Speed at the latest impact, m/s (0 before any). */
  private lastImpact = 0;
  // results of the last `evaluate` (SI)
  pc = 0;
  pr = 0;
  Vc = 0;
  Vr = 0;
  /** Net force towards extension, friction excluded, N. */
  F = 0;
  /** Friction force against +x, N. */
  friction = 0;
  /** ẋ and v̇ of the current mode. */
  dx = 0;
  dv = 0;
  private readonly inflow: EnergyInflow = { mIn: 0, mOut: 0, hIn: 0, hA: 0, Ta: 0 };

  constructor(readonly c: CylinderModel, readonly gas: Gas, readonly pa: number) {
    this.coulomb = hasCoulomb(c.friction);
    this.band = RELEASE_BAND * pa * c.geometry.capArea;
  }

  /** Pressures, volumes, forces and the mechanical rates at (t, states). */
  evaluate(t: number, mc: number, Tc: number, mr: number, Tr: number, x: number, v: number): void {
    const c = this.c;
    const R = this.gas.R;
    this.Vc = capVolume(c.geometry, x);
    this.pc = (mc * R * Tc) / this.Vc;
    if (c.doubleActing) {
      this.Vr = rodVolume(c.geometry, x);
      this.pr = (mr * R * Tr) / this.Vr;
    } else {
      this.Vr = 0;
      this.pr = this.pa;
    }
    const load = c.force ? c.force.at(t) : 0;
    this.F = pistonForce(c.geometry, c.load, this.pc, this.pr, this.pa, x, load);
    if (this.stop !== 0 || (this.coulomb && this.slide === 0)) {
      this.dx = 0;
      this.dv = 0;
      this.friction = this.F; // a stop or static friction takes the whole force
      return;
    }
    this.friction = this.coulomb ? slidingFriction(c.friction, this.slide, v) : c.friction.viscous * v;
    const s = c.geometry.stroke;
    const xb = OVERSHOOT * s;
    if ((this.coulomb && this.slide * v < -xb) || x > s + xb || x < -xb) {
      // well past an event surface (v through 0 while sliding, x through a stop), where only a
      // trial step or the inside of a step before the event is located can be: the state is
      // held there, so that the event function keeps its sign to the end of the step and the
      // crossing is found even when the continued motion would have crossed back within it.
      // Just past the surface (within the band) the motion continues smoothly, so that
      // difference quotients of the jacobian taken at a surface see the motion, not the hold.
      this.dx = 0;
      this.dv = 0;
      return;
    }
    this.dx = v;
    this.dv = (this.F - this.friction) / c.load.mass;
  }

  /** Power dissipated by friction (W) in the current mode: friction·v ≥ 0 while moving. */
  get dissipation(): number {
    return this.dx === 0 ? 0 : this.friction * this.dx;
  }

  /**
   * Ṫ of one side given its flows: the energy equation with the piston's boundary work
   * (V̇ = A_c·ẋ for the cap, −A_r·ẋ for the rod side).
   */
  temperatureRate(side: 'cap' | 'rod', m: number, T: number, mIn: number, mOut: number, hIn: number, Ta: number): number {
    const f = this.inflow;
    f.mIn = mIn; f.mOut = mOut; f.hIn = hIn; f.hA = this.c.heatTransfer; f.Ta = Ta;
    const g = this.c.geometry;
    const cap = side === 'cap';
    return gasTemperatureRate(this.gas, m, T, cap ? this.pc : this.pr, 0, cap ? g.capArea * this.dx : -g.annulusArea * this.dx, f);
  }

  /** Value of event function `kind` after `evaluate` at position x and velocity v. */
  eventValue(kind: CylinderEventKind, x: number, v: number): number {
    const moving = this.stop === 0 && !(this.coulomb && this.slide === 0);
    const Fs = this.c.friction.static + this.band;
    switch (kind) {
      case 'halt':
        return moving && this.coulomb ? this.slide * v : 1;
      case 'release+':
        return this.stop === -1 || (this.stop === 0 && !moving) ? this.F - Fs : -1;
      case 'release-':
        return this.stop === 1 || (this.stop === 0 && !moving) ? -this.F - Fs : -1;
      case 'full':
        return moving ? x - this.c.geometry.stroke : -1;
      case 'retracted':
        return moving ? -x : -1;
    }
  }

  static direction(kind: CylinderEventKind): number {
    return kind === 'halt' ? -1 : 1;
  }

  /**
   * The mode of a piston at rest at position x (after `evaluate`): at a stop it is held or
   * released; inside the stroke, stuck or sliding (Karnopp), or free without Coulomb friction.
   */
  private rest(x: number): void {
    const s = this.c.geometry.stroke;
    const Fs = this.c.friction.static + this.band;
    const side: StopSide = x <= 0 ? -1 : x >= s ? 1 : 0;
    if (side !== 0) {
      if (heldAtStop(side, this.F, Fs)) {
        this.stop = side;
        return;
      }
      this.stop = 0;
      this.slide = side === 1 ? -1 : 1;
      return;
    }
    this.stop = 0;
    this.slide = this.coulomb ? modeAtRest({ ...this.c.friction, static: Fs }, this.F) : 1;
  }

  /** The mode at the start (the piston starts at rest), after `evaluate` at t = 0. */
  settle(t: number, x: number): void {
    this.rest(x);
    if (this.moving) this.record({ t, what: 'start', x, value: this.slide });
  }

  /** The latest completed stroke's duration (s, 0 before any) and the latest impact speed (m/s). */
  lastStroke(): { time: number; impact: number } {
    const s = this.strokes[this.strokes.length - 1];
    return { time: s ? s.time : 0, impact: this.lastImpact };
  }

  private record(r: PistonRecord): void {
    this.records.push(r);
    const s = this.c.geometry.stroke;
    if (r.what === 'start') {
      this.leftStop = r.x <= 0 ? { t: r.t, from: -1 } : r.x >= s ? { t: r.t, from: 1 } : null;
    } else if (r.what === 'stick') {
      this.leftStop = null;
    } else {
      this.lastImpact = Math.abs(r.value);
      if (this.leftStop && this.leftStop.from === -(r.stop as number)) {
        this.strokes.push({ direction: r.stop === 1 ? 'extend' : 'retract', started: this.leftStop.t, reached: r.t, time: r.t - this.leftStop.t, impact_velocity: r.value });
      }
      this.leftStop = null;
    }
  }

  get moving(): boolean {
    return this.stop === 0 && !(this.coulomb && this.slide === 0);
  }

  /**
   * Applies event `kind` at time t to the mechanical state `y` (x, v and the dissipated
   * energy W may change). Returns a sentence for the event log, or null.
   */
  fire(kind: CylinderEventKind, t: number, y: PistonStateView & { W: number }): string | null {
    const name = this.c.name;
    const s = this.c.geometry.stroke;
    const mm = (x: number): string => `${Number((x * 1000).toPrecision(4))} mm`;
    switch (kind) {
      case 'full':
      case 'retracted': {
        const side: StopSide = kind === 'full' ? 1 : -1;
        const v = y.v;
        y.W += 0.5 * this.c.load.mass * v * v;
        y.x = side === 1 ? s : 0;
        y.v = 0;
        this.record({ t, what: 'impact', x: y.x, value: v, stop: side });
        this.rest(y.x);
        const speed = `${Number(Math.abs(v).toPrecision(4))} m/s`;
        const where = side === 1 ? 'reaches full stroke' : 'reaches its retracted stop';
        const after = this.stop === side ? '' : ' and is pushed straight back';
        if (this.moving) this.record({ t, what: 'start', x: y.x, value: this.slide });
        return `cylinder ${name} ${where} at ${speed}${after}`;
      }
      case 'halt': {
        y.v = 0;
        this.rest(y.x);
        if (this.moving) {
          this.record({ t, what: 'start', x: y.x, value: this.slide });
          return `cylinder ${name} reverses at ${mm(y.x)}`;
        }
        this.record({ t, what: 'stick', x: y.x, value: 0 });
        return `cylinder ${name} sticks at ${mm(y.x)}`;
      }
      case 'release+':
      case 'release-': {
        const from = this.stop === 1 ? ' from full stroke' : this.stop === -1 ? ' from its retracted stop' : ` at ${mm(y.x)}`;
        this.stop = 0;
        this.slide = kind === 'release+' ? 1 : -1;
        this.record({ t, what: 'start', x: y.x, value: this.slide });
        return `cylinder ${name} starts to move${from}, ${kind === 'release+' ? 'extending' : 'retracting'}`;
      }
    }
  }
}
