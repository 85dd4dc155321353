/**
 * Shape-preserving piecewise cubic Hermite interpolation (PCHIP).
 *
 * Knot slopes: 0 where the data turn (neighbouring secants of opposite sign or one zero),
 * otherwise the weighted harmonic mean of the neighbouring secants, which never exceeds three
 * times either secant. Every interval's slope ratios α = d_k/δ_k, β = d_{k+1}/δ_k then lie in
 * [0, 3]², inside the Fritsch–Carlson monotonicity region, so the interpolant is monotone on
 * every interval where the data are and has no overshoot: extrema sit at data points.
 *
 * References: Fritsch & Carlson, SIAM J. Numer. Anal. 17 (1980) 238 (monotonicity conditions);
 * Fritsch & Butland, SIAM J. Sci. Stat. Comput. 5 (1984) 300 (harmonic-mean slopes); Moler,
 * Numerical Computing with MATLAB, 2004, §3.4 (three-point shape-preserving end slopes).
 */

export interface Pchip {
  x: Float64Array;
  y: Float64Array;
  /** Knot slopes dy/dx. */
  d: Float64Array;
}

/** Weighted harmonic mean of secants s0 (interval h0, left) and s1 (interval h1, right); 0 at a turn. */
export function pchipInteriorSlope(h0: number, s0: number, h1: number, s1: number): number {
  if (!(s0 * s1 > 0)) return 0;
  const w1 = 2 * h1 + h0;
  const w2 = h1 + 2 * h0;
  return (w1 + w2) / (w1 / s0 + w2 / s1);
}

/** Three-point end slope at the end with interval h0 / secant s0, next interval h1 / secant s1. */
function endSlope(h0: number, s0: number, h1: number, s1: number): number {
  const d = ((2 * h0 + h1) * s0 - h0 * s1) / (h0 + h1);
  if (Math.sign(d) !== Math.sign(s0)) return 0;
  if (Math.sign(s0) !== Math.sign(s1) && Math.abs(d) > Math.abs(3 * s0)) return 3 * s0;
  return d;
}

/** Builds the interpolant of (x, y), x strictly increasing, n ≥ 2. */
export function makePchip(xs: ArrayLike<number>, ys: ArrayLike<number>): Pchip {
  const n = xs.length;
  const x = Float64Array.from(xs);
  const y = Float64Array.from(ys);
  const d = new Float64Array(n);
  const h = new Float64Array(n - 1);
  const s = new Float64Array(n - 1);
  for (let k = 0; k < n - 1; k++) {
    h[k] = x[k + 1] - x[k];
    s[k] = (y[k + 1] - y[k]) / h[k];
  }
  if (n === 2) {
    d[0] = d[1] = s[0];
  } else {
    for (let k = 1; k < n - 1; k++) d[k] = pchipInteriorSlope(h[k - 1], s[k - 1], h[k], s[k]);
    d[0] = endSlope(h[0], s[0], h[1], s[1]);
    d[n - 1] = endSlope(h[n - 2], s[n - 2], h[n - 3], s[n - 3]);
  }
  return { x, y, d };
}

/** Value and slope at t inside [x0, xn] (caller handles the outside); writes out.p, out.dpdV. */
export function pchipEval(c: Pchip, t: number, out: { p: number; dpdV: number }): void {
  const { x, y, d } = c;
  let lo = 0;
  let hi = x.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (x[mid] <= t) lo = mid; else hi = mid;
  }
  const h = x[hi] - x[lo];
  const u = (t - x[lo]) / h;
  const u2 = u * u;
  const u3 = u2 * u;
  out.p = (2 * u3 - 3 * u2 + 1) * y[lo] + (u3 - 2 * u2 + u) * h * d[lo]
    + (3 * u2 - 2 * u3) * y[hi] + (u3 - u2) * h * d[hi];
  out.dpdV = (6 * u2 - 6 * u) * (y[lo] - y[hi]) / h + (3 * u2 - 4 * u + 1) * d[lo] + (3 * u2 - 2 * u) * d[hi];
}
