/**
 * Distribution functions for fit statistics: log-gamma, the regularised incomplete beta
 * function, and Student's t distribution and its quantile (for confidence intervals).
 *
 * References: C. Lanczos, SIAM J. Numer. Anal. Ser. B 1 (1964) 86, with the g = 7, n = 9
 * coefficients in common use (e.g. Press et al., Numerical Recipes, 3rd ed., §6.1, gives a
 * similar set; these are from memory and checked in the tests against exact values);
 * Press et al., Numerical Recipes, 3rd ed. 2007, §6.4 (incomplete beta by its continued
 * fraction, evaluated with the modified Lentz method, §5.2) and §6.14 (Student's t:
 * P(|T| > t) = I_{ν/(ν+t²)}(ν/2, 1/2)); Abramowitz & Stegun, Handbook of Mathematical
 * Functions, 1964, 26.5.8 and Table 26.10 (t quantiles).
 */

const LANCZOS_G = 7;
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313,
  -176.61502916214059, 12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6,
  1.5056327351493116e-7,
];
const HALF_LOG_2PI = 0.5 * Math.log(2 * Math.PI);
/** Continued-fraction iterations and tolerance (relative), and Lentz's tiny number. */
const CF_MAX = 300;
const CF_EPS = 1e-16;
const CF_TINY = 1e-300;

/** ln Γ(x) for x > 0 (reflection below 1/2). */
export function logGamma(x: number): number {
  if (!(x > 0)) return NaN;
  if (x < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - logGamma(1 - x);
  const z = x - 1;
  let a = LANCZOS[0];
  for (let i = 1; i < LANCZOS.length; i++) a += LANCZOS[i] / (z + i);
  const t = z + LANCZOS_G + 0.5;
  return HALF_LOG_2PI + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

/** The continued fraction of I_x(a, b), good for x < (a + 1)/(a + b + 2) (NR §6.4). */
function betaFraction(a: number, b: number, x: number): number {
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < CF_TINY) d = CF_TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= CF_MAX; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < CF_TINY) d = CF_TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < CF_TINY) c = CF_TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < CF_TINY) d = CF_TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < CF_TINY) c = CF_TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) <= CF_EPS) break;
  }
  return h;
}

/** The regularised incomplete beta function I_x(a, b), 0 ≤ x ≤ 1, a, b > 0. */
export function incompleteBeta(x: number, a: number, b: number): number {
  if (!(x >= 0 && x <= 1) || !(a > 0) || !(b > 0)) return NaN;
  if (x === 0 || x === 1) return x;
  const front = Math.exp(logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x));
  if (x < (a + 1) / (a + b + 2)) return (front * betaFraction(a, b, x)) / a;
  return 1 - (front * betaFraction(b, a, 1 - x)) / b;
}

/** P(T ≤ t) for Student's t with ν > 0 degrees of freedom. */
export function studentCdf(t: number, nu: number): number {
  if (!(nu > 0) || Number.isNaN(t)) return NaN;
  if (!Number.isFinite(t)) return t > 0 ? 1 : 0;
  const tail = 0.5 * incompleteBeta(nu / (nu + t * t), nu / 2, 0.5);
  return t > 0 ? 1 - tail : tail;
}

/**
 * The quantile t with P(T ≤ t) = p, for 0 < p < 1 and ν > 0: bracketing, then bisection on
 * the CDF to round-off (the CDF is monotone, so this cannot fail).
 */
export function studentQuantile(p: number, nu: number): number {
  if (!(p > 0 && p < 1) || !(nu > 0)) return NaN;
  if (p === 0.5) return 0;
  if (p < 0.5) return -studentQuantile(1 - p, nu);
  let lo = 0;
  let hi = 1;
  while (studentCdf(hi, nu) < p) {
    lo = hi;
    hi *= 2;
    if (hi > 1e300) return Infinity;
  }
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (mid === lo || mid === hi) break;
    if (studentCdf(mid, nu) < p) lo = mid; else hi = mid;
  }
  return 0.5 * (lo + hi);
}
