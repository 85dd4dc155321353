#!/usr/bin/env python3
"""Independent reference solutions for plenum's verification suite, computed with SciPy
(solve_ivp, Radau, rtol 1e-11) from the equations written out here, not from plenum's code.
Run `python3 test/reference/cases.py` to regenerate test/reference/*.json; the YAML netlists
beside this script describe the same networks.

Model (isothermal, ideal gas, laminar compressible Hagen-Poiseuille lines):
  state: gas mass m_i of each chamber (kg), incl. half of each attached line's volume (rigid)
  neo-Hookean sphere: p = pa + 2 mu t0/r0 (1/l - 1/l^7), V = 4/3 pi r0^3 l^3
  linear wall: V = V0 + C (p - pa);  rigid: V = V0
  line flow: mdot = pi D^4 (p1^2 - p2^2) / (256 mu_gas L R T)
Constants: R = 8.314462618 / 0.0289647, Sutherland mu(293.15 K) = 1.716e-5 ...
"""
import json, math, os
import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

R = 8.314462618 / 0.0289647
T = 293.15
PA = 101325.0
MU = 1.716e-5 * (T / 273.15) ** 1.5 * (273.15 + 110.4) / (T + 110.4)
HERE = os.path.dirname(os.path.abspath(__file__))


def sphere(r0, t0, mu):
    V0 = 4 / 3 * math.pi * r0 ** 3
    c = 2 * mu * t0 / r0
    def p_of_V(V):
        l = (V / V0) ** (1 / 3)
        return PA + c * (1 / l - 1 / l ** 7)
    return {'V0': V0, 'p': p_of_V, 'lo': V0, 'hi': 50 * V0, 'stretch': lambda V: (V / V0) ** (1 / 3)}


def linear(V0, C):
    return {'V0': V0, 'p': lambda V: PA + (V - V0) / C, 'lo': V0 - C * PA + 1e-15, 'hi': V0 + C * 50 * PA}


def rigid(V0):
    return {'V0': V0, 'rigid': True}


def volume(w, m, Vd):
    if w.get('rigid'):
        return w['V0']
    f = lambda V: w['p'](V) * (V + Vd) - m * R * T
    return brentq(f, w['lo'], w['hi'], xtol=1e-18, rtol=1e-15)


def pressure(w, m, V, Vd):
    return m * R * T / (w['V0'] + Vd) if w.get('rigid') else w['p'](V)


def run(name, walls, starts, lines, duration, times):
    """walls: list of wall dicts; starts: list of ('stretch'|'pressure', value);
    lines: list of (i, j, D, L) with j = -1 for ambient."""
    n = len(walls)
    Vd = [0.0] * n
    for (i, j, D, L) in lines:
        half = math.pi * D * D * L / 8
        Vd[i] += half
        if j >= 0:
            Vd[j] += half
    m0 = []
    for w, (kind, val), vd in zip(walls, starts, Vd):
        if kind == 'stretch':
            V = w['V0'] * val ** 3
            p = w['p'](V)
        else:
            p = val
            V = w['V0'] if w.get('rigid') else brentq(lambda V: w['p'](V) - p, w['lo'], w['V0'] * 1.38 ** 3 if 'stretch' in w else w['hi'])
        m0.append(p * (V + vd) / (R * T))

    def state(m):
        Vs = [volume(w, mi, vd) for w, mi, vd in zip(walls, m, Vd)]
        ps = [pressure(w, mi, V, vd) for w, mi, V, vd in zip(walls, m, Vs, Vd)]
        return Vs, ps

    def rhs(t, m):
        _, ps = state(m)
        dm = np.zeros(n)
        for (i, j, D, L) in lines:
            pj = PA if j < 0 else ps[j]
            q = math.pi * D ** 4 * (ps[i] ** 2 - pj ** 2) / (256 * MU * L * R * T)
            dm[i] -= q
            if j >= 0:
                dm[j] += q
        return dm

    sol = solve_ivp(rhs, (0, duration), m0, method='Radau', rtol=1e-11, atol=1e-16, t_eval=times, dense_output=False)
    assert sol.status == 0, sol.message
    out = {'name': name, 'times': list(times), 'chambers': {}}
    for k in range(n):
        out['chambers'][f'c{k}'] = {'gauge': [], 'volume': [], 'mass': []}
    for col in range(len(times)):
        m = sol.y[:, col]
        Vs, ps = state(m)
        for k in range(n):
            c = out['chambers'][f'c{k}']
            c['gauge'].append(ps[k] - PA)
            c['volume'].append(Vs[k])
            c['mass'].append(m[k])
    with open(os.path.join(HERE, f'{name}.json'), 'w') as f:
        json.dump(out, f, indent=1)
    print(name, 'final gauges', [round(out['chambers'][f'c{k}']['gauge'][-1], 3) for k in range(n)])


if __name__ == '__main__':
    ts = list(np.linspace(0, 20, 81))
    # two latex cells, one below and one past the maximum, joined by a capillary
    run('two-spheres', [sphere(0.02, 0.001, 0.3e6), sphere(0.02, 0.001, 0.3e6)],
        [('stretch', 1.2), ('stretch', 1.6)], [(0, 1, 0.6e-3, 0.5)], 20, ts)
    # a rigid tank, a neo-Hookean pod and a linear air spring in a chain, venting to ambient
    ts = list(np.linspace(0, 30, 121))
    run('chain-mixed', [rigid(0.2e-3), sphere(0.015, 0.0015, 0.4e6), linear(0.1e-3, 0.05e-3 / 100e3)],
        [('pressure', PA + 150e3), ('stretch', 1.1), ('pressure', PA)],
        [(0, 1, 0.3e-3, 0.8), (1, 2, 0.4e-3, 0.3), (2, -1, 0.3e-3, 2.0)], 30, ts)
