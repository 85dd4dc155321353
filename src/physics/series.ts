/**
 * Two flow restrictions in series with no volume between them (a valve inside a line): the
 * intermediate pressure pMid makes the two flows equal, first(pA, pMid) = second(pMid, pB).
 * Each restriction's flow is increasing in its upstream and decreasing in its downstream
 * pressure, so h(pMid) = first(pA, pMid) − second(pMid, pB) is decreasing and has one root
 * between pA and pB; Brent's method finds it to full double precision. The returned flow is the
 * mean of the two (they agree to round-off). p Pa absolute, ṁ kg/s positive A → B.
 *
 * References: Brent, Algorithms for Minimization without Derivatives, 1973, ch. 4 (roots.ts).
 */
import { brent } from './roots.js';

export interface SeriesFlow {
  /** kg/s, positive A → B. */
  mdot: number;
  /** Pressure between the two restrictions, Pa absolute. */
  pMid: number;
}

export function seriesFlow(
  pA: number, pB: number,
  first: (p1: number, p2: number) => number,
  second: (p1: number, p2: number) => number,
): SeriesFlow {
  if (pA === pB) return { mdot: 0.5 * (first(pA, pA) + second(pB, pB)), pMid: pA };
  const h = (p: number): number => first(pA, p) - second(p, pB);
  // h(pB) = first(pA, pB) and h(pA) = −second(pA, pB) have opposite signs (or one is 0).
  const pMid = brent(h, pA, pB, h(pA), h(pB));
  if (Number.isNaN(pMid)) return { mdot: Number.NaN, pMid: Number.NaN };
  return { mdot: 0.5 * (first(pA, pMid) + second(pMid, pB)), pMid };
}
