/**
 * How far each expectation of a run is from its limit, as a signed, normalised number: the
 * constraint of sizing (`plenum size`). Positive passes, negative fails, and a design with
 * `--margin 0.1` must have every margin ≥ 0.1.
 *
 * - `below L` / `above L`: (L − v)/s or (v − L)/s, with s = |L| (for pressures the limit's gauge
 *   value |L − p_a|: an engineer's 10 % on "below 170 kPa gauge" is 17 kPa, not 27 kPa of an
 *   absolute pressure);
 * - `near: { value: T, within: w }`: (w − |v − T|)/s with s = |T| (gauge for pressures), or w
 *   when T is zero: the distance to the nearer edge of the band in units of the target;
 * - `settles: { band: b }`: (b − d)/b, d the largest relative deviation after `within`.
 * When s would be zero (a limit of exactly zero) the distance is taken in SI units, unscaled.
 * A value that could not be evaluated (NaN) has margin −∞.
 */
import type { ExpectSpec } from '../netlist/types.js';

export function expectationMargin(spec: ExpectSpec, actual: number, pa: number): number {
  if (!Number.isFinite(actual)) return -Infinity;
  if (spec.kind === 'settles') return spec.band > 0 ? (spec.band - actual) / spec.band : -actual;
  const q = spec.probe.quantity;
  const pressure = q === 'pressure' || q === 'gauge';
  const v = q === 'gauge' ? actual + pa : actual;
  const scaleOf = (x: number): number => Math.abs(pressure ? x - pa : x);
  const cmp = spec.compare;
  if (cmp.kind === 'below' || cmp.kind === 'above') {
    const d = cmp.kind === 'below' ? cmp.value - v : v - cmp.value;
    const s = scaleOf(cmp.value);
    return s > 0 ? d / s : d;
  }
  const targetRef = q === 'gauge' ? cmp.value - pa : cmp.value;
  const tol = 'abs' in cmp.within ? cmp.within.abs : cmp.within.rel * Math.abs(targetRef);
  const d = tol - Math.abs(v - cmp.value);
  const s = scaleOf(cmp.value) || tol;
  return s > 0 ? d / s : d;
}
