#!/usr/bin/env python3
"""Independent reference values for lines that choke (physics/line-flow.ts) and for gases
through an air-rated valve, computed with SciPy from the equations written out here, not from
plenum's code. Run `python3 test/reference/choked_lines.py` to regenerate choked-lines.json.

1. Ideal nozzle, choked (Anderson, Modern Compressible Flow, ch. 5):
     mdot = A p0 sqrt(g/(R T0)) (2/(g+1))^((g+1)/(2(g-1)))
2. Fanno flow (adiabatic, friction; Shapiro 1953 ch. 6, Anderson ch. 3) entered through an
   isentropic entrance, Darcy f from Colebrook (1939) at Re = G D / mu(T0):
     f L*/D = (1 - M^2)/(g M^2) + (g+1)/(2g) ln[(g+1) M^2 / (2 + (g-1) M^2)]
     p/p* = (1/M) sqrt((g+1)/(2 + (g-1) M^2));  choked when the exit reaches M = 1
3. plenum's law, written out independently: isentropic entrance to M1, then isothermal flow
   with friction at T1 (Shapiro ch. 6): p1^2 - p2^2 = G^2 R T1 [f L/D + 2 ln(p1/p2)], choked at
   p2* = G sqrt(R T1) (M2 = 1/sqrt(g)); Darcy f from Haaland (1983) as plenum (turbulent only).
4. A rigid 1 L receiver at 6 bar gauge, isothermal, vented through a 4 mm x 1 m line: pressure
   history with law 3 and, for comparison, with Fanno flow (2), solve_ivp Radau rtol 1e-11.
   Half of the line's volume is added to the receiver, as plenum lumps it.
5. Choked mass-flow ratio of helium to air through one effective area:
     sqrt(g2/R2) psi(g2) / (sqrt(g1/R1) psi(g1)),  psi(g) = (2/(g+1))^((g+1)/(2(g-1)))
"""
import json, math, os
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

RU = 8.314462618
R = RU / 0.0289647
G_AIR = 1.4
T0 = 293.15
PA = 101325.0
MU = 1.716e-5 * (T0 / 273.15) ** 1.5 * (273.15 + 110.4) / (T0 + 110.4)
HERE = os.path.dirname(os.path.abspath(__file__))
g = G_AIR
k = (g - 1) / 2
n = (g + 1) / (2 * (g - 1))


def colebrook(Re):
    if Re < 2300:
        return 64 / Re
    x = 8.0
    for _ in range(200):
        x = -2 * math.log10(2.51 * x / Re)
    return 1 / (x * x)


def haaland(Re):
    return 1 / (1.8 * math.log10(6.9 / Re)) ** 2


def flux(M, p0):
    """Isentropic mass flux at Mach M from stagnation (p0, T0)."""
    return p0 * math.sqrt(g / (R * T0)) * M * (1 + k * M * M) ** (-n)


def M_of_G(G, p0, Mmax=1.0):
    return brentq(lambda M: flux(M, p0) - G, 0, Mmax, xtol=1e-16, rtol=1e-15)


def nozzle(p0, D):
    return math.pi * D * D / 4 * flux(1.0, p0)


def fanno_lstar(M):
    return (1 - M * M) / (g * M * M) + (g + 1) / (2 * g) * math.log((g + 1) * M * M / (2 + (g - 1) * M * M))


def p_over_pstar(M):
    return 1 / M * math.sqrt((g + 1) / (2 + (g - 1) * M * M))


def fanno_flow(p0, pb, D, L):
    A = math.pi * D * D / 4
    fLD = lambda G: colebrook(G * D / MU) * L / D
    Gmax = flux(1.0, p0)
    Gc = brentq(lambda G: fanno_lstar(M_of_G(G, p0)) - fLD(G), 1e-9 * Gmax, Gmax * (1 - 1e-13), xtol=1e-14)

    def exit_p(G):
        M1 = M_of_G(G, p0)
        p1 = p0 * (1 + k * M1 * M1) ** (-g / (g - 1))
        F2 = fanno_lstar(M1) - fLD(G)
        M2 = 1.0 if F2 <= 0 else brentq(lambda M: fanno_lstar(M) - F2, M1, 1, xtol=1e-16)
        return p1 * p_over_pstar(M2) / p_over_pstar(M1)
    if exit_p(Gc) >= pb:
        return Gc * A, True
    return brentq(lambda G: exit_p(G) - pb, 1e-12 * Gmax, Gc, xtol=1e-14) * A, False


def isothermal_flow(p0, pb, D, L):
    """Law 3 for turbulent flow (Re >= 4000, weight 1)."""
    A = math.pi * D * D / 4
    Mcap = 1 / math.sqrt(g)

    def state(G):
        M1 = M_of_G(G, p0, Mcap)
        e = 1 + k * M1 * M1
        T1 = T0 / e
        p1 = p0 * e ** (-g / (g - 1))
        return p1, T1
    fLD = lambda G: haaland(G * D / MU) * L / D
    # choked: the exit at p2* = G sqrt(R T1)
    def choke(G):
        p1, T1 = state(G)
        c2 = G * G * R * T1
        ps = math.sqrt(c2)
        return p1 * p1 - ps * ps - c2 * (fLD(G) + 2 * math.log(p1 / ps))
    Gtop = flux(Mcap, p0) * (1 - 1e-13)
    Gc = brentq(choke, 1e-6 * Gtop, Gtop, xtol=1e-14, rtol=1e-15)
    p1, T1 = state(Gc)
    if pb <= Gc * math.sqrt(R * T1):
        return Gc * A, True, 1 / math.sqrt(g)

    def sub(G):
        p1, T1 = state(G)
        return p1 * p1 - pb * pb - G * G * R * T1 * (fLD(G) + 2 * math.log(p1 / pb))
    G = brentq(sub, 1e-9 * Gc, Gc, xtol=1e-14, rtol=1e-15)
    p1, T1 = state(G)
    return G * A, False, G * math.sqrt(R * T1) / (pb * math.sqrt(g))


def blowdown(law, V, p0, D, L, times):
    """Rigid receiver, isothermal at T0, vented to ambient through a line."""
    def rhs(t, y):
        p = y[0] * R * T0 / V
        if p <= PA * (1 + 1e-9):
            return [0.0]
        return [-law(p, PA, D, L)[0]]
    m0 = p0 * V / (R * T0)
    sol = solve_ivp(rhs, (0, times[-1]), [m0], method='Radau', rtol=1e-11, atol=1e-16, t_eval=times)
    return [float(m * R * T0 / V) for m in sol.y[0]]


def psi(gam):
    return (2 / (gam + 1)) ** ((gam + 1) / (2 * (gam - 1)))


def main():
    p0 = 701.325e3
    D = 4e-3
    out = {'p0': p0, 'pb': PA, 'T0': T0, 'D': D, 'nozzle': nozzle(p0, D), 'lines': []}
    for L in (0.01, 0.1, 1.0, 10.0, 100.0):
        mf, cf = fanno_flow(p0, PA, D, L)
        mi, ci, Mi = isothermal_flow(p0, PA, D, L)
        out['lines'].append({'L': L, 'fanno': mf, 'fanno_choked': cf, 'isothermal': mi, 'isothermal_choked': ci, 'isothermal_mach': Mi})
    # subsonic exits: one line, back pressures from choked to nearly equal
    out['back'] = []
    for pb in (300e3, 450e3, 550e3, 650e3, 690e3):
        mi, ci, Mi = isothermal_flow(p0, pb, D, 1.0)
        out['back'].append({'L': 1.0, 'pb': pb, 'isothermal': mi, 'isothermal_choked': ci, 'isothermal_mach': Mi})
    times = [0.05, 0.1, 0.2, 0.4, 0.8, 1.5]
    V = 1e-3 + math.pi * D * D * 1.0 / 8
    out['blowdown'] = {
        'V': V, 'p0': p0, 'D': D, 'L': 1.0, 'times': times,
        'isothermal': blowdown(isothermal_flow, V, p0, D, 1.0, times),
        'fanno': blowdown(fanno_flow, V, p0, D, 1.0, times),
    }
    R_he = RU / 4.002602e-3
    out['helium_ratio'] = math.sqrt((5 / 3) / R_he) * psi(5 / 3) / (math.sqrt(1.4 / R) * psi(1.4))
    with open(os.path.join(HERE, 'choked-lines.json'), 'w') as fh:
        json.dump(out, fh, indent=1)
    print(json.dumps(out, indent=1))


if __name__ == '__main__':
    main()
