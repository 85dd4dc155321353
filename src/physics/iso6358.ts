/**
 * Flow-rate characteristic of a pneumatic component per ISO 6358-1:2013, in the form given by
 * Beater, Pneumatic Drives, Springer 2007, eq. 5.1 (the subsonic index m is from memory):
 *   choked, r = p2/p1 ≤ b:   qm = C ρ0 p1 √(T0/T1)
 *   subsonic, b < r ≤ 1:     qm = C ρ0 p1 √(T0/T1) · [1 − ((r − b)/(1 − b))²]^m
 * C sonic conductance m³/(s·Pa), b critical pressure ratio, m subsonic index (0.5 by default),
 * ρ0 = 1.185 kg/m³ and T0 = 293.15 K (the standard reference atmosphere, ISO 8778), p Pa
 * absolute, T1 upstream temperature K, qm kg/s (one-way: 0 for p2 ≥ p1).
 *
 * References: ISO 6358-1:2013; Beater, Pneumatic Drives, 2007, §5.1, eq. 5.1.
 */
import { ANR, ISO6358_RHO0 } from './gas.js';

/** Reference temperature of the characteristic, K. */
export const ISO6358_T0 = ANR.temperature;

export function iso6358MassFlow(p1: number, p2: number, T1: number, C: number, b: number, m = 0.5): number {
  if (!(p2 < p1)) return 0;
  const choked = C * ISO6358_RHO0 * p1 * Math.sqrt(ISO6358_T0 / T1);
  const r = p2 / p1;
  if (r <= b) return choked;
  const z = (r - b) / (1 - b);
  return choked * Math.pow(1 - z * z, m);
}
