/**
 * Segments of wave lines and the check of lumped lines against wave travel times.
 *
 * A lumped line is one resistance: it passes a change of pressure from end to end at once. A
 * pressure wave needs L/c to travel it (c = √(γ R T), Kinsler et al., Fundamentals of
 * Acoustics, 4th ed., ch. 5); when that time is not small against how fast the netlist's valves
 * move, the lumped line misses the delay and the ringing. The check: L/c above a tenth of the
 * fastest valve ramp (`over` > 0 in any schedule) warns, naming the line and suggesting
 * `model: wave`. Instant steps (`over: 0`) are not counted: every line would warn.
 *
 * Default segments of a wave line: enough that a segment's travel time Δx/c is at most a
 * quarter of the fastest valve ramp, N ≥ 4 L/(c·t_ramp), and never fewer than 20 (the error
 * of the quarter-wave frequency at 20 segments is below 0.5 %, docs/wave-lines.md); at most
 * 400 (a run with more would be slow; set `segments` to go further).
 */
import type { NetlistDoc } from '../netlist/types.js';
import type { Gas } from '../physics/gas.js';

export const MIN_SEGMENTS = 20;
export const MAX_DEFAULT_SEGMENTS = 400;

/** Speed of sound √(γ R T), m/s. */
export function soundSpeed(gas: Gas, T: number): number {
  return Math.sqrt(gas.gamma * gas.R * T);
}

/** The fastest valve ramp of the netlist (s), or Infinity when no valve ramps. */
export function fastestValveRamp(doc: NetlistDoc): number {
  let t = Infinity;
  for (const v of doc.valves) {
    if (v.operation.kind !== 'schedule') continue;
    for (const s of v.operation.steps) if (s.over > 0 && s.over < t) t = s.over;
  }
  return t;
}

/** Default segment count for a wave line of length L (m) at sound speed c (m/s). */
export function defaultSegments(L: number, c: number, tRamp: number): number {
  const n = Number.isFinite(tRamp) ? Math.ceil((4 * L) / (c * tRamp)) : 0;
  return Math.min(MAX_DEFAULT_SEGMENTS, Math.max(MIN_SEGMENTS, n));
}
