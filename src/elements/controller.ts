/**
 * A controller in the network: measures a probe, sets the opening of the valve it drives
 * (physics/pid.ts gives the law).
 *
 * Continuous: its states are the integral part I of the output and, with derivative action,
 * the filtered measure yf; both integrate with the network. The output is u = clamp(v) at every
 * instant. The saturation mode ('free' | 'high' | 'low') is a discrete state switched by two
 * events, and it decides the integral only under clamping: the mode turns 'high' when v rises
 * through u_max and I then stays frozen while the error pushes further (ki·e > 0); it returns to
 * 'free' when the error stops pushing (ki·e falls through 0), by which time v = kp·e + I is back
 * below the limit. Judging "saturated" from v alone would make I chatter along v = u_max (a
 * sliding mode: integrating pushes v over the limit, freezing lets kp·e pull it back), with an
 * event at every crossing. Under back-calculation the rhs is continuous in v and the mode only
 * follows v across the limits (events restart the integrator at the kink and log).
 *
 * Sampled (`sample: Ts`): the output is held between samples (zero-order hold); its states
 * are discrete (I, D, the previous measure) and change at the sample instants, which are
 * breakpoints of the run.
 *
 * Start: the integral part starts at the controller's `initially` (the output it would give at
 * zero error, as if it had been holding the plant before the run), yf(0) = y(0); an error at
 * t = 0 acts through kp at once (the proportional kick of a set-point step).
 */
import { filterRate, integralRate, pidRaw, pidSample, type PidLaw, type PidMode, type SampledPid } from '../physics/pid.js';
import type { ControllerModel } from '../model/types.js';

export class ControllerState {
  readonly law: PidLaw;
  readonly sampled: SampledPid | null;
  /** State slots of I and yf (−1 when absent), set by the assembler. */
  iIdx = -1;
  fIdx = -1;
  /** Last evaluation: measure, error, unclamped and clamped output. */
  y = 0;
  e = 0;
  v = 0;
  u = 0;
  /** Saturation mode, switched by events (see the header). */
  mode: PidMode = 'free';

  constructor(readonly c: ControllerModel) {
    const s = c.spec;
    this.law = { kp: s.kp, ki: s.ki, kd: s.kd, tf: s.filter, umin: s.limits.min, umax: s.limits.max, antiWindup: s.antiWindup, tt: s.tracking };
    this.sampled = s.sample !== undefined ? { I: 0, D: 0, yPrev: Number.NaN, u: s.initially } : null;
  }

  get continuous(): boolean {
    return this.sampled === null;
  }

  /** Number of state slots it needs. */
  get slots(): number {
    return this.continuous ? (this.law.kd !== 0 ? 2 : 1) : 0;
  }

  /** Sample times in (0, tEnd) of a sampled controller. */
  sampleTimes(tEnd: number): number[] {
    const ts = this.c.spec.sample;
    if (ts === undefined) return [];
    const out: number[] = [];
    for (let k = 1; k * ts < tEnd; k++) out.push(k * ts);
    return out;
  }

  /** Output at measure y and time t from the state vector (also keeps y, e, v, u). */
  output(t: number, y: number, state: Float64Array): number {
    this.y = y;
    this.e = this.c.spec.target.at(t) - y;
    if (this.sampled) {
      this.v = this.sampled.u;
      this.u = this.sampled.u;
      return this.u;
    }
    const I = state[this.iIdx];
    const yf = this.fIdx >= 0 ? state[this.fIdx] : y;
    this.v = pidRaw(this.law, this.e, y, I, yf);
    const L = this.law;
    this.u = this.v > L.umax ? L.umax : this.v < L.umin ? L.umin : this.v;
    return this.u;
  }

  /** Writes İ and ẏf for the last `output` (continuous only). */
  rates(state: Float64Array, dydt: Float64Array): void {
    if (!this.continuous) return;
    const L = this.law;
    if (L.antiWindup === 'back-calculation') {
      dydt[this.iIdx] = L.ki * this.e + (this.u - this.v) / L.tt;
    } else {
      dydt[this.iIdx] = integralRate(L, this.e, this.v, this.mode);
    }
    if (this.fIdx >= 0) dydt[this.fIdx] = filterRate(L, this.y, state[this.fIdx]);
  }

  /** Sets the start states for measure y0 at t = 0. */
  start(y0: number, state: Float64Array): void {
    if (this.sampled) {
      this.sampled.I = this.c.spec.initially;
      this.sampled.D = 0;
      this.sampled.yPrev = Number.NaN;
      this.sample(0, y0); // the first sample: u = initially
      return;
    }
    state[this.iIdx] = this.c.spec.initially;
    if (this.fIdx >= 0) state[this.fIdx] = y0;
  }

  /** A sample of a sampled controller at measure y, time t. */
  sample(t: number, y: number): void {
    if (!this.sampled) return;
    pidSample(this.law, this.sampled, this.c.spec.target.at(t) - y, y, this.c.spec.sample as number);
  }

  /** The mode at a state (the start, a rest state): saturated when v is past a limit (and, under clamping, the error pushes). */
  settle(): void {
    const L = this.law;
    const push = L.antiWindup === 'clamping' ? L.ki * this.e : 0;
    this.mode = this.v > L.umax && push >= 0 ? 'high' : this.v < L.umin && push <= 0 ? 'low' : 'free';
  }

  /**
   * The event of one limit: in its saturated mode, what ends it (ki·e under clamping, v − limit
   * under back-calculation); otherwise v − limit.
   */
  eventValue(which: 'high' | 'low'): number {
    const L = this.law;
    const limit = which === 'high' ? L.umax : L.umin;
    if (this.mode === which && L.antiWindup === 'clamping') return L.ki * this.e;
    return this.v - limit;
  }

  /** Direction of that event: into saturation outward, out of it back. */
  eventDirection(which: 'high' | 'low'): number {
    const inMode = this.mode === which;
    return which === 'high' ? (inMode ? -1 : 1) : (inMode ? 1 : -1);
  }

  /** Fires the event of one limit; returns whether the controller is now saturated there. */
  fire(which: 'high' | 'low'): boolean {
    this.mode = this.mode === which ? 'free' : which;
    return this.mode === which;
  }
}
