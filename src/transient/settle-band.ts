/**
 * What "settled within a band" means, for the run's outcome (outcome.ts) and for `settles:`
 * expectations (expectations.ts) alike: a signal q (a chamber's absolute pressure or volume)
 * is within band b of its final value q_end when
 *
 *   |q(t) − q_end| ≤ b · max(E, F·|q_end|),   E = max over the run |q − q_end|,
 *
 * relative to the signal's own excursion E (the settling-time convention of a step response),
 * with an absolute floor of F = 0.1 % of the final value (about 100 Pa for a pressure near
 * ambient), so that a chamber that hardly moves is not held to a band of round-off.
 *
 * References: Ogata, Modern Control Engineering, 5th ed., §5-3 (settling time to a band of the
 * step's size; from memory).
 */

/** The floor of the excursion, as a fraction of the final value. */
export const EXCURSION_FLOOR = 1e-3;

/** The scale a band is a fraction of: the excursion, or the floor if that is larger. */
export function bandScale(excursion: number, final: number): number {
  return Math.max(excursion, EXCURSION_FLOOR * Math.abs(final));
}
