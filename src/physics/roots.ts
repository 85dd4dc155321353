/**
 * Safeguarded scalar root finding on a bracket (Brent's method: inverse quadratic
 * interpolation and secant steps, falling back to bisection so the bracket always shrinks).
 *
 * References: R. P. Brent, Algorithms for Minimization without Derivatives, Prentice-Hall 1973,
 * ch. 4 (zeroin); Press et al., Numerical Recipes, 3rd ed., §9.3.
 */

const EPS = Number.EPSILON;

/**
 * A root of f in [a, b], given f(a) = fa and f(b) = fb of opposite signs (or one of them 0).
 * Stops when the bracket is below 4·ε·|x| + absTol wide, i.e. at full double precision with the
 * default absTol = 0. Returns NaN when [a, b] is not a bracket.
 */
export function brent(
  f: (x: number) => number, a: number, b: number, fa: number, fb: number, absTol = 0, maxIter = 200,
): number {
  if (fa === 0) return a;
  if (fb === 0) return b;
  if ((fa > 0) === (fb > 0)) return Number.NaN;
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let i = 0; i < maxIter; i++) {
    if ((fb > 0) === (fc > 0)) {
      c = a; fc = fa; d = b - a; e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b; b = c; c = a;
      fa = fb; fb = fc; fc = fa;
    }
    const tol = 2 * EPS * Math.abs(b) + 0.5 * absTol;
    const xm = 0.5 * (c - b);
    if (Math.abs(xm) <= tol || fb === 0) return b;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * xm * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * xm * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q; else p = -p;
      if (2 * p < Math.min(3 * xm * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = xm;
        e = d;
      }
    } else {
      d = xm;
      e = d;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : xm > 0 ? tol : -tol;
    fb = f(b);
  }
  return b;
}
