#!/usr/bin/env python3
"""Independent reference values for plenum's equilibria analysis (test/verification/equilibria.test.ts).

Computed from the formulas alone, with NumPy/SciPy, not from plenum's code. Run
`python3 test/reference/equilibria.py` to regenerate test/reference/equilibria.json; the netlists
eq-*.yaml beside this script describe the same networks.

Model (isothermal, ideal gas, laminar compressible Hagen-Poiseuille lines, half of each line's
volume lumped into each end chamber):
  neo-Hookean sphere    dp = 2 mu t0/r0 (1/l - 1/l^7)                       (Treloar 1975)
  Mooney-Rivlin sphere  dp = 4 t0/r0 (C1 + C2 l^2)(1/l - 1/l^7)            (Ogden 1984)
  Gent sphere           dp = neo-Hookean / (1 - (2 l^2 + l^-4 - 3)/Jm)      (Gent 1996)
  V = 4/3 pi r0^3 l^3; linear wall V = V0 + C (p - pa); rigid V = V0
  m = p (V + Vd) / (R T)
  line: mdot = pi D^4 (p1^2 - p2^2) / (256 mu_gas L R T)

Equilibria of a closed group: one common pressure p with sum_i m_i(p) = M. Method here: for each
pressure on a fine grid, every stretch with dp(l) = p - pa is found as a real root of the
polynomial obtained by multiplying the membrane law by l^7 (l^9 for Gent), polished by Newton;
each root is labelled by the monotone segment it lies on (extrema of dp(l) found by brentq on
its derivative); for every combination of segments the sign changes of sum m - M along the grid
are refined with brentq. Open group (chambers joined to one reservoir): p = reservoir pressure.

Stability (Mueller & Strehlow, Rubber and Rubber Balloons, 2004): linearising the mass balance
with capacitances C_i = dm_i/dp = ((V_i + Vd_i) + p dV_i/dp)/(R T) and line conductances
G_ij = d mdot/d p_i = 2 k_ij p at equal pressures gives d(dm)/dt = -L diag(1/C) dm, L the
conductance-weighted Laplacian (plus the lines to reservoirs on its diagonal). For a closed
group the zero mode of mass conservation is removed by projecting onto the complement of
(1, ..., 1) (scipy.linalg.null_space); the growth rate is the largest real part of the rest.
For two chambers this is -G (1/C1 + 1/C2), which is also written out.
"""
import itertools, json, math, os
import numpy as np
from scipy.optimize import brentq
from scipy.linalg import null_space

R = 8.314462618 / 0.0289647
T = 293.15
PA = 101325.0
MU = 1.716e-5 * (T / 273.15) ** 1.5 * (273.15 + 110.4) / (T + 110.4)
HERE = os.path.dirname(os.path.abspath(__file__))


class Sphere:
    def __init__(self, law, r0, t0, **k):
        self.law, self.r0, self.t0, self.k = law, r0, t0, k
        self.V0 = 4 / 3 * math.pi * r0 ** 3
        self.lock = math.inf
        if law == 'gent':
            Jm = k['Jm']
            self.lock = brentq(lambda l: 2 * l * l + l ** -4 - 3 - Jm, 1.0001, 100)
        # extrema of dp(l): sign changes of the derivative on a fine grid, refined
        hi = min(self.lock * (1 - 1e-6), 60.0)
        ls = np.geomspace(1.0, hi, 20001)
        d = np.array([self.ddp(l) for l in ls])
        self.ext = []
        for i in range(len(ls) - 1):
            if d[i] == 0 or d[i] * d[i + 1] < 0:
                self.ext.append(brentq(self.ddp, ls[i], ls[i + 1], xtol=1e-15))

    def dp(self, l):
        k = self.t0 / self.r0
        g = 1 / l - l ** -7
        if self.law == 'nh':
            return 2 * self.k['mu'] * k * g
        if self.law == 'mr':
            return 4 * k * (self.k['c1'] + self.k['c2'] * l * l) * g
        D = 1 - (2 * l * l + l ** -4 - 3) / self.k['Jm']
        return 2 * self.k['mu'] * k * g / D

    def ddp(self, l, h=1e-7):
        return (self.dp(l * (1 + h)) - self.dp(l * (1 - h))) / (2 * l * h)

    def poly(self, g):
        """Coefficients (highest first) of a polynomial whose roots l > 1 solve dp(l) = g."""
        k = self.t0 / self.r0
        if self.law == 'nh':
            c = 2 * self.k['mu'] * k
            return [g, -c, 0, 0, 0, 0, 0, c]                          # g l^7 - c l^6 + c
        if self.law == 'mr':
            c1, c2 = 4 * k * self.k['c1'], 4 * k * self.k['c2']
            return [c2, -g, c1, 0, 0, 0, -c2, 0, -c1]                 # c2 l^8 - g l^7 + c1 l^6 - c2 l^2 - c1
        c, Jm = 2 * self.k['mu'] * k, self.k['Jm']
        return [-2 * g, 0, g * (Jm + 3), -c * Jm, 0, 0, -g, 0, 0, c * Jm]  # -2g l^9 + g(Jm+3) l^7 - cJm l^6 - g l^3 + cJm

    def stretches(self, g):
        """Every (segment, l) with dp(l) = g > 0, l > 1, below the Gent lock."""
        out = []
        for r in np.roots(self.poly(g)):
            if abs(r.imag) > 1e-6 * abs(r) or r.real <= 1 + 1e-12 or r.real >= self.lock:
                continue
            l = r.real
            for _ in range(5):  # Newton polish on the law itself
                f = self.dp(l) - g
                d = self.ddp(l)
                if d == 0:
                    break
                l -= f / d
            if l <= 1 or l >= self.lock or abs(self.dp(l) - g) > 1e-9 * max(g, 1):
                continue
            seg = sum(1 for e in self.ext if e < l)
            if not any(s == seg and abs(x - l) < 1e-9 for s, x in out):
                out.append((seg, l))
        return sorted(out)

    def volume(self, l):
        return self.V0 * l ** 3

    def dVdp(self, l):
        return 3 * self.V0 * l * l / self.ddp(l)


class Rigid:
    def __init__(self, V0):
        self.V0 = V0
        self.ext = []


class Linear:
    def __init__(self, V0, C):
        self.V0, self.C = V0, C
        self.ext = []


def states(w, p):
    """(segment, V, dV/dp, stretch or None) for each volume chamber w can take at pressure p."""
    if isinstance(w, Rigid):
        return [(0, w.V0, 0.0, None)]
    if isinstance(w, Linear):
        return [(0, w.V0 + w.C * (p - PA), w.C, None)]
    return [(s, w.volume(l), w.dVdp(l), l) for s, l in w.stretches(p - PA)]


def dead_volumes(n, lines):
    Vd = [0.0] * n
    for (i, j, D, L) in lines:
        half = math.pi * D * D * L / 8
        Vd[i] += half
        if j >= 0:
            Vd[j] += half
    return Vd


def start_mass(w, start, Vd):
    kind, val = start
    if kind == 'stretch':
        V = w.volume(val)
        p = PA + w.dp(val)
    else:  # pressure (gauge), rigid or linear
        p = PA + val
        V = w.V0 if isinstance(w, Rigid) else w.V0 + w.C * val
    return p * (V + Vd) / (R * T)


def jacobian(n, lines, p, C):
    """d(dm)/dt = J dm at equal pressure p (lines to a reservoir have j = -1)."""
    L = np.zeros((n, n))
    for (i, j, D, Ln) in lines:
        G = 2 * math.pi * D ** 4 / (256 * MU * Ln * R * T) * p
        L[i, i] += G
        if j >= 0:
            L[j, j] += G
            L[i, j] -= G
            L[j, i] -= G
    return -L @ np.diag(1 / np.array(C))


def growth(J, closed):
    if closed:
        Q = null_space(np.ones((1, J.shape[0])))
        J = Q.T @ J @ Q
    ev = np.linalg.eigvals(J)
    return max(ev.real), sorted(ev.real, reverse=True)


def closed_group(names, walls, starts, lines, extra=None):
    n = len(walls)
    Vd = dead_volumes(n, lines)
    M = sum(start_mass(w, s, vd) for w, s, vd in zip(walls, starts, Vd))
    # every equilibrium has p > pa when M exceeds the gas all chambers hold at ambient, unstretched
    assert M > sum(PA * (w.V0 + vd) / (R * T) for w, vd in zip(walls, Vd)), 'the scan covers p > pa only'
    # top of the scan: above every extremum pressure, and above the pressure at which any chamber
    # with a branch rising without bound would hold all the gas by itself on that branch
    ptop = max([PA] + [PA + w.dp(e) for w in walls if isinstance(w, Sphere) for e in w.ext])
    for w, vd in zip(walls, Vd):
        if not states(w, PA * 50):
            continue
        top = lambda p: (max(s[1] for s in states(w, p)) + vd) * p / (R * T) - M
        lo = ptop * (1 + 1e-9)
        if top(lo) < 0:
            ptop = brentq(top, lo, PA * 50)
    ext_p = sorted({PA + w.dp(e) for w in walls if isinstance(w, Sphere) for e in w.ext})
    g = list(np.geomspace(1e-3, ptop - PA, 12000))
    for pe in ext_p:
        for k in range(2, 15):
            g += [pe - PA - (pe - PA) * 10 ** -k, pe - PA + (pe - PA) * 10 ** -k]
    grid = np.array(sorted(x for x in g if x > 0)) + PA

    def mass_on(combo, p):
        tot = 0.0
        for w, seg, vd in zip(walls, combo, Vd):
            ss = [s for s in states(w, p) if s[0] == seg]
            if not ss:
                return None
            tot += p * (ss[0][1] + vd) / (R * T)
        return tot - M

    segs = [list(range(len(w.ext) + 1)) if isinstance(w, Sphere) else [0] for w in walls]
    roots = []
    table = [[{s[0]: s for s in states(w, p)} for w in walls] for p in grid]
    for combo in itertools.product(*segs):
        prev = None
        for k, p in enumerate(grid):
            if all(c in table[k][i] for i, c in enumerate(combo)):
                f = sum(p * (table[k][i][c][1] + Vd[i]) / (R * T) for i, c in enumerate(combo)) - M
                if prev is not None and prev[1] * f < 0:
                    try:
                        r = brentq(lambda x: mass_on(combo, x), prev[0], p, xtol=1e-12, rtol=1e-15)
                        roots.append((r, combo))
                    except ValueError:
                        pass
                prev = (p, f)
            else:
                prev = None
    out = []
    for p, combo in sorted(roots):
        st = [[s for s in states(w, p) if s[0] == c][0] for w, c in zip(walls, combo)]
        C = [((s[1] + vd) + p * s[2]) / (R * T) for s, vd in zip(st, Vd)]
        J = jacobian(n, lines, p, C)
        gr, ev = growth(J, True)
        e = {'gauge': p - PA, 'segments': list(combo), 'growth_rate': gr, 'eigenvalues': ev, 'stable': bool(gr < 0),
             'chambers': {nm: {'volume': s[1], 'mass': p * (s[1] + vd) / (R * T), **({'stretch': s[3]} if s[3] else {})}
                          for nm, s, vd in zip(names, st, Vd)}}
        if n == 2:
            G = 2 * math.pi * lines[0][2] ** 4 / (256 * MU * lines[0][3] * R * T) * p
            e['formula_rate'] = -G * (1 / C[0] + 1 / C[1])
        out.append(e)
    return {'mass': M, 'count': len(out), 'equilibria': out}


def open_group(names, walls, lines, p_res):
    """Chambers joined to one reservoir (line end j = -1): every chamber at p_res."""
    n = len(walls)
    Vd = dead_volumes(n, lines)
    options = [states(w, p_res) for w in walls]
    out = []
    for st in itertools.product(*options):
        C = [((s[1] + vd) + p_res * s[2]) / (R * T) for s, vd in zip(st, Vd)]
        J = jacobian(n, lines, p_res, C)
        gr, ev = growth(J, False)
        out.append({'gauge': p_res - PA, 'segments': [s[0] for s in st], 'growth_rate': gr, 'eigenvalues': ev, 'stable': bool(gr < 0),
                    'chambers': {nm: {'volume': s[1], 'mass': p_res * (s[1] + vd) / (R * T), **({'stretch': s[3]} if s[3] else {})}
                                 for nm, s, vd in zip(names, st, Vd)}})
    return {'count': len(out), 'equilibria': out}


def nh(r0, t0, mu):
    return Sphere('nh', r0, t0, mu=mu)


def mr(r0, t0, c1, c2):
    return Sphere('mr', r0, t0, c1=c1, c2=c2)


def gent(r0, t0, mu, Jm):
    return Sphere('gent', r0, t0, mu=mu, Jm=Jm)


if __name__ == '__main__':
    cases = {}
    # two latex cells past their pressure maximum, and before it (lines: from, to, D, L)
    cell = lambda: nh(0.02, 0.001, 0.3e6)
    cases['eq-two-cells-past'] = closed_group(['a', 'b'], [cell(), cell()], [('stretch', 1.55), ('stretch', 1.65)], [(0, 1, 0.5e-3, 0.5)])
    cases['eq-two-cells-before'] = closed_group(['a', 'b'], [cell(), cell()], [('stretch', 1.15), ('stretch', 1.25)], [(0, 1, 0.5e-3, 0.5)])
    # two Mooney-Rivlin pods with a pressure minimum (C2/C1 = 0.05), and a chain of three
    pod = lambda: mr(0.015, 0.0012, 0.2e6, 0.01e6)
    cases['eq-mr-pair'] = closed_group(['p1', 'p2'], [pod(), pod()], [('stretch', 1.3), ('stretch', 6.0)], [(0, 1, 0.6e-3, 0.4)])
    cases['eq-mr-chain'] = closed_group(['p1', 'p2', 'p3'], [pod(), pod(), pod()], [('stretch', 1.2), ('stretch', 5.5), ('stretch', 5.5)],
                                        [(0, 1, 0.6e-3, 0.4), (1, 2, 0.8e-3, 0.3)])
    # a rigid tank, a neo-Hookean cell, a Gent bladder and a linear air spring in a closed chain
    cases['eq-mixed'] = closed_group(['tank', 'cell', 'bladder', 'spring'],
                                     [Rigid(0.05e-3), nh(0.02, 0.001, 0.3e6), gent(0.01, 0.001, 0.6e6, 30.0), Linear(0.02e-3, 0.01e-3 / 100e3)],
                                     [('pressure', 30e3), ('stretch', 1.7), ('stretch', 1.4), ('pressure', 5e3)],
                                     [(0, 1, 0.6e-3, 0.5), (1, 2, 0.5e-3, 0.3), (2, 3, 0.7e-3, 0.4)])
    # two cells each held by a 15 kPa gauge reservoir and joined to each other
    cases['eq-open'] = open_group(['a', 'b'], [cell(), cell()], [(0, -1, 0.5e-3, 1.0), (1, -1, 0.4e-3, 1.0), (0, 1, 0.5e-3, 0.5)], PA + 15e3)
    with open(os.path.join(HERE, 'equilibria.json'), 'w') as f:
        json.dump(cases, f, indent=1)
    for k, v in cases.items():
        print(k, v['count'], [(round(e['gauge'], 2), e['segments'], e['stable'], f"{e['growth_rate']:.5g}") for e in v['equilibria']])
