/**
 * Stability of a group's rest state: the state vector at rest and the linearisation of the
 * group's coordinates (stability.ts).
 */
import type { RestGroup, RestSetup } from './rest.js';
import { rightmostStability } from './rightmost.js';
import { stabilityAt, type Linearisation, type Stability, type StabilityVerdict } from './stability.js';

// ---- stability of a group's rest state ---------------------------------------------------

/** State vector with the given chamber masses (temperatures at rest, hysteresis on inflation). */
export function restState(setup: RestSetup, masses: ArrayLike<number>): Float64Array {
  const { sys } = setup;
  const y = sys.initialState();
  for (let i = 0; i < setup.chambers.length; i++) {
    y[sys.mIdx[i]] = masses[i];
    if (sys.TIdx[i] >= 0) y[sys.TIdx[i]] = setup.model.Ta;
  }
  return y;
}

/** The linearisation of a group at rest with the given masses for its chambers (others as in `base`). */
export function groupLinearisation(setup: RestSetup, g: RestGroup, groupMasses: ArrayLike<number>, base: ArrayLike<number>): Linearisation {
  const { sys, model } = setup;
  const all = Float64Array.from(base);
  g.chambers.forEach((c, i) => { all[c] = groupMasses[i]; });
  const y = restState(setup, all);
  const coords: number[] = [];
  const scales: number[] = [];
  const massScale = g.chambers.reduce((a, c) => a + all[c], 0) / g.chambers.length;
  for (const c of g.chambers) { coords.push(sys.mIdx[c]); scales.push(massScale); }
  const massCoords = coords.map((_, i) => i);
  if (model.heat === 'exchange') {
    for (const c of g.chambers) {
      if (sys.TIdx[c] >= 0 && model.chambers[c].heatTransfer > 0) { coords.push(sys.TIdx[c]); scales.push(model.Ta); }
    }
  }
  return { t: setup.t, y, coords, scales, conserved: g.kind === 'closed' ? [massCoords] : [] };
}

/** Stability of a group at rest with the given masses for its chambers (others as in `base`). */
export function groupStability(setup: RestSetup, g: RestGroup, groupMasses: ArrayLike<number>, base: ArrayLike<number>): Stability {
  return stabilityAt(setup.sys, groupLinearisation(setup, g, groupMasses, base));
}

/**
 * The growth rate and verdict of a group at rest, by the certified sparse rightmost eigenvalue
 * (rightmost.ts) near `hint`, the growth rate of a nearby state; by the dense eigenvalues when
 * that cannot certify it. Only what a traced point reports: no eigenvalue list, no time constant.
 */
export function groupGrowth(setup: RestSetup, g: RestGroup, groupMasses: ArrayLike<number>, base: ArrayLike<number>, hint: number): { growth_rate: number | null; stability: StabilityVerdict } {
  const L = groupLinearisation(setup, g, groupMasses, base);
  const fast = rightmostStability(setup.sys, L, hint);
  if (fast) return fast;
  const st = stabilityAt(setup.sys, L);
  return { growth_rate: st.growth_rate, stability: st.stability };
}
