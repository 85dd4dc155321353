/**
 * A proportional pressure-reducing valve (a regulator with droop) and a delivery curve of a
 * compressor or pump.
 *
 * Regulator. The valve senses its downstream gauge pressure p and sets its opening
 *   x = clamp((set − p)/band, 0, 1):
 * fully open at p ≤ set − band, shut at p ≥ set (lock-up), linear in between. The opening
 * scales the valve's rating (ISO 6358 conductance or orifice area) like any valve opening. A
 * relieving regulator also vents downstream gas to ambient through its own rating at the
 * opening clamp((p − set)/band, 0, 1): the mirror image above the set pressure. With a lag
 * (`time-constant` τ), the position z ∈ [−1, 1] (z > 0 supply side open, z < 0 vent open)
 * follows ż = (z*(p) − z)/τ with z* = clamp((set − p)/band, −1 or 0, 1).
 *
 * Droop. When the supply side is choked (p ≤ b·p_supply), the flow through the valve is
 * proportional to its opening, q = x·q_max with q_max the choked flow at full opening, so the
 * steady downstream pressure under a draw q lies on the droop line
 *   p = set − band·q/q_max      (0 ≤ q ≤ q_max),
 * the static characteristic of a direct-acting proportional regulator (common practice;
 * Beater, Pneumatic Drives, Springer 2007, ch. 5 describes pressure control valves,
 * from memory). Away from choking the opening still follows the same law, but the flow at a
 * given opening also depends on the pressure ratio, and the line curves.
 *
 * Delivery curve. A compressor or pump delivers q(p) against the pressure p of the chamber it
 * fills, a measured table: linear between rows, held at the first row's flow below it, and
 * falling linearly from the last row to zero at the shut-off pressure (the last abscissa, with
 * zero flow). Above the shut-off it delivers nothing (it does not draw gas back).
 */

/** Clamp to [lo, hi]. */
function clamp(x: number, lo: number, hi: number): number {
  return x < lo ? lo : x > hi ? hi : x;
}

/** Opening 0..1 of the supply side at downstream gauge pressure p (Pa), set (Pa gauge) and band (Pa). */
export function regulatorOpening(p: number, set: number, band: number): number {
  return clamp((set - p) / band, 0, 1);
}

/** Opening 0..1 of a relieving regulator's vent at downstream gauge pressure p. */
export function ventOpening(p: number, set: number, band: number): number {
  return clamp((p - set) / band, 0, 1);
}

/** Target position z* ∈ [−1, 1] of a regulator (negative: venting), see the header. */
export function regulatorPosition(p: number, set: number, band: number, relieving: boolean): number {
  return clamp((set - p) / band, relieving ? -1 : 0, 1);
}

/** The droop line: steady downstream gauge pressure at a draw q of a regulator whose full-open flow is qMax. */
export function droopPressure(q: number, qMax: number, set: number, band: number): number {
  return set - (band * q) / qMax;
}

/**
 * Delivered flow at pressure p from a curve (pressures strictly increasing, the last with zero
 * flow: the shut-off). Writes the slope dq/dp into `slope[0]` when given.
 */
export function curveFlow(p: number, P: ArrayLike<number>, Q: ArrayLike<number>, slope?: Float64Array): number {
  const n = P.length;
  if (p <= P[0]) {
    if (slope) slope[0] = 0;
    return Q[0];
  }
  if (p >= P[n - 1]) {
    if (slope) slope[0] = 0;
    return Q[n - 1];
  }
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (P[mid] <= p) lo = mid;
    else hi = mid;
  }
  const s = (Q[hi] - Q[lo]) / (P[hi] - P[lo]);
  if (slope) slope[0] = s;
  return Q[lo] + s * (p - P[lo]);
}
