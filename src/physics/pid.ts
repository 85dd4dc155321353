/**
 * The PI/PID control law, continuous and sampled, with output limits and anti-windup.
 *
 * Error e = r − y (set point r, measure y). Output
 *   v = kp·e + I + D,   u = clamp(v, u_min, u_max),
 * with the integral part I (in output units) and a derivative on the measure (no kick when the
 * set point steps), filtered by a first-order lag of time constant Tf:
 *   ẏf = (y − yf)/Tf,   D = −kd·(y − yf)/Tf   (= −kd·ẏf, i.e. −kd·s/(1 + Tf·s) applied to y).
 * Integral, two anti-windup schemes:
 *   clamping (conditional integration): İ = ki·e, except once the output has saturated with
 *     the error driving it further (v past u_max with ki·e > 0, past u_min with ki·e < 0): then
 *     İ = 0 until the error stops driving it (ki·e changes sign). Judged by v alone, freezing
 *     and integrating would alternate along v = u_max (a sliding mode); the mode keeps one
 *     decision until the error turns, in the continuous and the sampled law alike;
 *   back-calculation: İ = ki·e + (u − v)/Tt (tracking time Tt), which bleeds the integral back
 *     while saturated.
 * The saturation state is a mode ('free' | 'high' | 'low') that the simulation switches by
 * events where v crosses a limit, so that within a step the law is smooth; in mode 'free' the
 * unclamped v is used.
 *
 * Sampled controller (period Ts, zero-order hold): at each sample k, with e_k and y_k,
 *   D_k = (Tf·D_{k−1} − kd·(y_k − y_{k−1}))/(Tf + Ts)      (backward difference of the filtered derivative),
 *   v_k = kp·e_k + I_k + D_k,   u_k = clamp(v_k),
 *   I_{k+1} = I_k + Ts·ki·e_k + (back-calculation: Ts·(u_k − v_k)/Tt; clamping: no update while
 *             in a saturated mode, entered and left as in the continuous law),
 * and u_k is held until the next sample.
 *
 * Start: I(0) = u0 (the controller's `initially`), the output at zero error.
 *
 * References: Åström & Hägglund, Advanced PID Control, ISA 2006, §3.3 (derivative filter,
 * derivative on the measure), §3.5 (windup: back-calculation, tracking time √(Ti·Td),
 * conditional integration), §13 (sampled PID, backward differences; section numbers from
 * memory).
 */

export interface PidLaw {
  kp: number;
  ki: number;
  kd: number;
  /** Derivative filter time constant Tf (s). */
  tf: number;
  umin: number;
  umax: number;
  antiWindup: 'clamping' | 'back-calculation';
  /** Tracking time Tt (s) for back-calculation. */
  tt: number;
}

export type PidMode = 'free' | 'high' | 'low';

/** Unclamped output v for error e, measure y, integral I and filtered measure yf. */
export function pidRaw(law: PidLaw, e: number, y: number, I: number, yf: number): number {
  const D = law.kd !== 0 ? (-law.kd * (y - yf)) / law.tf : 0;
  return law.kp * e + I + D;
}

/** The output in a mode: v itself while free, the limit while saturated. */
export function pidOutput(law: PidLaw, v: number, mode: PidMode): number {
  return mode === 'high' ? law.umax : mode === 'low' ? law.umin : v;
}

/** The mode the unclamped output v calls for. */
export function pidModeOf(law: PidLaw, v: number): PidMode {
  return v > law.umax ? 'high' : v < law.umin ? 'low' : 'free';
}

/** İ (output units per second) in a mode. */
export function integralRate(law: PidLaw, e: number, v: number, mode: PidMode): number {
  const u = pidOutput(law, v, mode);
  if (law.antiWindup === 'back-calculation') return law.ki * e + (mode === 'free' ? 0 : (u - v) / law.tt);
  const push = law.ki * e;
  if ((mode === 'high' && push > 0) || (mode === 'low' && push < 0)) return 0;
  return push;
}

/** ẏf of the derivative filter (0 when there is no derivative action). */
export function filterRate(law: PidLaw, y: number, yf: number): number {
  return law.kd !== 0 ? (y - yf) / law.tf : 0;
}

/** State of a sampled controller between samples. */
export interface SampledPid {
  I: number;
  D: number;
  /** Measure at the previous sample (NaN before the first). */
  yPrev: number;
  /** Output held until the next sample. */
  u: number;
  /** Saturation mode under clamping. */
  mode?: PidMode;
}

/** One sample at error e and measure y, period ts: sets the held output and advances I and D. */
export function pidSample(law: PidLaw, s: SampledPid, e: number, y: number, ts: number): void {
  if (law.kd !== 0 && Number.isFinite(s.yPrev)) s.D = (law.tf * s.D - law.kd * (y - s.yPrev)) / (law.tf + ts);
  const v = law.kp * e + s.I + s.D;
  const u = v > law.umax ? law.umax : v < law.umin ? law.umin : v;
  s.u = u;
  s.yPrev = y;
  if (law.antiWindup === 'back-calculation') {
    s.I += ts * (law.ki * e + (u - v) / law.tt);
    return;
  }
  const push = law.ki * e;
  let mode = s.mode ?? 'free';
  if ((mode === 'high' && push <= 0) || (mode === 'low' && push >= 0)) mode = 'free';
  if (mode === 'free' && v >= law.umax && push > 0) mode = 'high';
  else if (mode === 'free' && v <= law.umin && push < 0) mode = 'low';
  s.mode = mode;
  if (mode === 'free') s.I += ts * push;
}
