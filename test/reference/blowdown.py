#!/usr/bin/env python3
"""An independent bench recording for the calibration check: a rigid receiver blowing down to
ambient through a sharp orifice, computed with SciPy from the equations written out here (not
from plenum's code), sampled with seeded Gaussian noise, written in plenum's measured
CSV form. Run `python3 test/reference/blowdown.py` to regenerate test/reference/blowdown.csv;
test/reference/blowdown.yaml is the same rig with the discharge coefficient left to calibrate.

Model (isothermal receiver, ideal gas):
  dp/dt = -(R T / V) mdot(p)
  mdot = Cd A p sqrt(gamma/(R T)) (2/(gamma+1))^((gamma+1)/(2(gamma-1)))            r = pa/p <= r*
  mdot = Cd A p sqrt(2 gamma/((gamma-1) R T) (r^(2/gamma) - r^((gamma+1)/gamma)))   r > r*
  r* = (2/(gamma+1))^(gamma/(gamma-1))
(isentropic nozzle flow: Anderson, Modern Compressible Flow, 3rd ed., ch. 5, as in
docs/references.md). Constants: R = 8.314462618/0.0289647 J/(kg K), gamma = 1.4,
T = 293.15 K, pa = 101325 Pa. Rig: V = 1 L, orifice 2 mm, Cd = 0.72, start 600 kPa gauge,
4 s (choked to about 2.9 s, subsonic after), sampled at 0.05 s. Noise: sd 0.3 kPa, numpy default_rng(16).
"""
import math, os
import numpy as np
from scipy.integrate import solve_ivp

R = 8.314462618 / 0.0289647
GAMMA = 1.4
T = 293.15
PA = 101325.0
V = 1e-3
D = 2e-3
CD = 0.72
P0 = 600e3 + PA
NOISE = 300.0
HERE = os.path.dirname(os.path.abspath(__file__))


def mdot(p):
    A = math.pi * D ** 2 / 4
    if p <= PA:
        return 0.0  # (only ever seen by a trial stage of the integrator)
    r = PA / p
    rstar = (2 / (GAMMA + 1)) ** (GAMMA / (GAMMA - 1))
    if r <= rstar:
        return CD * A * p * math.sqrt(GAMMA / (R * T)) * (2 / (GAMMA + 1)) ** ((GAMMA + 1) / (2 * (GAMMA - 1)))
    return CD * A * p * math.sqrt(2 * GAMMA / ((GAMMA - 1) * R * T) * (r ** (2 / GAMMA) - r ** ((GAMMA + 1) / GAMMA)))


def main():
    times = np.round(np.arange(0, 4.0 + 1e-9, 0.05), 10)
    sol = solve_ivp(lambda t, y: [-(R * T / V) * mdot(y[0])], (0, 4.0), [P0], method='DOP853',
                    rtol=1e-11, atol=1e-6, t_eval=times)
    rng = np.random.default_rng(16)
    gauge = sol.y[0] - PA + rng.normal(0, NOISE, len(times))
    lines = ['# Independent reference recording (synthetic, made by test/reference/blowdown.py with SciPy):',
             f'# rigid 1 L receiver, 2 mm orifice, Cd = {CD}, isothermal, from 600 kPa gauge; noise sd 0.3 kPa.',
             'time [s],receiver.gauge [kPa]']
    lines += [f'{t:.2f},{g / 1000:.4f}' for t, g in zip(times, gauge)]
    with open(os.path.join(HERE, 'blowdown.csv'), 'w') as f:
        f.write('\n'.join(lines) + '\n')


if __name__ == '__main__':
    main()
