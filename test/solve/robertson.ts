// Robertson's chemical kinetics (Hairer & Wanner, Solving ODEs II, 2nd ed., §IV.1): the rhs
// shared by the integrators' stiff tests.
export function robertsonRhs(_t: number, y: Float64Array, d: Float64Array): void {
  const a = 0.04 * y[0], b = 1e4 * y[1] * y[2], c = 3e7 * y[1] * y[1];
  d[0] = -a + b;
  d[1] = a - b - c;
  d[2] = c;
}
