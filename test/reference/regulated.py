#!/usr/bin/env python3
"""Independent reference transients of a regulated supply filling a chamber, computed with
SciPy (solve_ivp, Radau, rtol 1e-11) from the equations written out here, not from plenum's
code. Run `python3 test/reference/regulated.py` to regenerate test/reference/regulated*.json;
test/reference/regulated.yaml (and regulated-lag.yaml) describe the same networks.

Model (isothermal, ideal gas):
  supply reservoir p_s = 600 kPa gauge; ambient 101.325 kPa, 293.15 K
  regulator supply -> tank: ISO 6358-1 rating C = 0.8 L/(s*bar), b = 0.4, m = 0.5, scaled by
    the opening x: q = x C rho0 p_s [1 - ((r - b)/(1 - b))^2]^0.5 for r = p/p_s > b, choked
    below (rho0 = 1.185 kg/m3, T = T0 so no temperature factor); linear patch above r = 0.999
    (plenum's documented choice; not reached here); no reverse flow.
  opening x = clamp((set - p_gauge)/band, 0, 1), set = 300 kPa gauge, band = 40 kPa;
    with a lag tau: z' = (clamp((set - p_gauge)/band, 0, 1) - z)/tau, x = z, z(0) = the law at t = 0.
  rigid tank V = 1 L plus half the capillary's volume; capillary to ambient D = 0.3 mm,
    L = 2 m, laminar compressible Hagen-Poiseuille q = pi D^4 (p^2 - pa^2)/(256 mu L R T)
    (Re stays below 2300: checked).
"""
import json, math, os
import numpy as np
from scipy.integrate import solve_ivp

R = 8.314462618 / 0.0289647
T = 293.15
PA = 101325.0
MU = 1.716e-5 * (T / 273.15) ** 1.5 * (273.15 + 110.4) / (T + 110.4)
RHO0 = 1.185
HERE = os.path.dirname(os.path.abspath(__file__))

PS = PA + 600e3
C, B, M = 0.8e-8, 0.4, 0.5
SET, BAND = 300e3, 40e3
D, L = 0.3e-3, 2.0
V = 1e-3 + math.pi * D * D * L / 8
R_LIN = 0.999


def iso(p1, p2, Cx):
    r = p2 / p1
    if r <= B:
        return Cx * RHO0 * p1
    return Cx * RHO0 * p1 * (1 - ((r - B) / (1 - B)) ** 2) ** M


def valve(p1, p2, x):
    if x <= 0 or p2 >= p1:
        return 0.0
    r = p2 / p1
    if r <= R_LIN:
        return iso(p1, p2, C * x)
    return iso(p1, R_LIN * p1, C * x) * (1 - r) / (1 - R_LIN)


def law(p):
    return min(1.0, max(0.0, (SET - (p - PA)) / BAND))


def capillary(p):
    return math.pi * D ** 4 * (p * p - PA * PA) / (256 * MU * L * R * T)


def run(name, tau, duration, times):
    p0 = PA
    m0 = p0 * V / (R * T)

    def rhs(t, y):
        p = y[0] * R * T / V
        x = y[1] if tau > 0 else law(p)
        dm = valve(PS, p, x) - capillary(p)
        dz = (law(p) - y[1]) / tau if tau > 0 else 0.0
        return [dm, dz]

    sol = solve_ivp(rhs, (0, duration), [m0, law(p0)], method='Radau', rtol=1e-11, atol=[1e-15, 1e-12], t_eval=times)
    assert sol.status == 0, sol.message
    gauge = [float(m * R * T / V - PA) for m in sol.y[0]]
    out = {'name': name, 'times': list(times), 'chambers': {'tank': {'gauge': gauge, 'mass': [float(m) for m in sol.y[0]]}}}
    if tau > 0:
        out['regulator_opening'] = [float(z) for z in sol.y[1]]
    re = 4 * capillary(max(gauge) + PA) / (math.pi * D * MU)
    assert re < 2300, re
    with open(os.path.join(HERE, f'{name}.json'), 'w') as f:
        json.dump(out, f, indent=1)
    print(name, 'final gauge', round(gauge[-1], 3), 'peak Re', round(re, 1))


if __name__ == '__main__':
    ts = list(np.linspace(0, 2, 81))
    run('regulated', 0.0, 2, ts)
    run('regulated-lag', 0.05, 2, ts)
