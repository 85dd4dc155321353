/**
 * Closed forms of linear control loops used by the verification tests (any control text,
 * e.g. Ogata, Modern Control Engineering, ch. 5 (second-order step response) and ch. 6
 * (Routh–Hurwitz criterion); from memory).
 *
 * Plant: a chamber of mass capacitance Cm = dm/dp (kg/Pa), linearised at rest, fed by a valve
 * whose flow is q_max·u (a choked valve: exactly linear in its opening u) and drained with
 * conductance G = ∂q_out/∂p:  Cm·δṗ = q_max·δu − G·δp.
 * PI controller u = kp·e + I, İ = ki·e, e = r − p.
 * Closed loop: Cm·s² + (G + q_max·kp)·s + q_max·ki = 0.
 */

/** exp(A t)·v for a 2×2 matrix A (row-major [a, b, c, d]) by the Cayley–Hamilton (Putzer) form. */
export function expm2(A: readonly number[], t: number, v: readonly number[]): [number, number] {
  const [a, b, c, d] = A;
  const s = (a + d) / 2;
  const disc = s * s - (a * d - b * c);
  const w = Math.sqrt(Math.abs(disc));
  // exp(At) = e^{st} [ f0 I + f1 (A − sI) ], f0 = cosh/cos(wt), f1 = sinh/sin(wt)/w (→ t at w = 0)
  let f0: number, f1: number;
  if (disc > 0) { f0 = Math.cosh(w * t); f1 = Math.sinh(w * t) / w; }
  else if (disc < 0) { f0 = Math.cos(w * t); f1 = Math.sin(w * t) / w; }
  else { f0 = 1; f1 = t; }
  const e = Math.exp(s * t);
  const x = (f0 + f1 * (a - s)) * v[0] + f1 * b * v[1];
  const y = f1 * c * v[0] + (f0 + f1 * (d - s)) * v[1];
  return [e * x, e * y];
}

export interface PiLoop { Cm: number; G: number; qMax: number; kp: number; ki: number }

/**
 * Pressure deviation δp(t) after the target steps by δ at t = 0 from rest (the integral part
 * holds the rest output u0: I(0) = u0, so the output kicks by kp·δ). States (δp, δI), δI = I − u0.
 */
export function piStep(L: PiLoop, delta: number, t: number): number {
  const { Cm, G, qMax, kp, ki } = L;
  // d/dt [x, z] = A [x, z] + f, x = δp, z = δI
  const A = [(-G - qMax * kp) / Cm, qMax / Cm, -ki, 0];
  // rest: x* = δ, z* = G·δ/q_max
  const xs = delta, zs = (G * delta) / qMax;
  const [dx] = expm2(A, t, [0 - xs, 0 - zs]);
  return xs + dx;
}

/** ζ and ωn of the closed loop (for test names and choosing gains). */
export function piDamping(L: PiLoop): { zeta: number; wn: number } {
  const wn = Math.sqrt((L.qMax * L.ki) / L.Cm);
  return { wn, zeta: (L.G + L.qMax * L.kp) / (L.Cm * 2 * wn) };
}

/** Routh–Hurwitz for a2 s² + a1 s + a0: stable iff all coefficients have one sign. */
export function hurwitz2(a2: number, a1: number, a0: number): boolean {
  return (a2 > 0 && a1 > 0 && a0 > 0) || (a2 < 0 && a1 < 0 && a0 < 0);
}

/** Routh–Hurwitz for a3 s³ + a2 s² + a1 s + a0 (a3 > 0): all positive and a2·a1 > a3·a0. */
export function hurwitz3(a3: number, a2: number, a1: number, a0: number): boolean {
  const s = Math.sign(a3);
  const [b3, b2, b1, b0] = [a3, a2, a1, a0].map((x) => x * s);
  return b3 > 0 && b2 > 0 && b1 > 0 && b0 > 0 && b2 * b1 > b3 * b0;
}
