#!/usr/bin/env python3
"""Performance anchor for plenum's benchmark (`npm run bench` runs it side by side with plenum;
kept here so that the benchmark runs from a fresh clone).

It integrates the benchmark's chain (bench/networks.ts, chainNetlist) with SciPy's BDF on
plenum's own equations, written out in vectorised NumPy from plenum's sources:

- state: the gas mass of each chamber (kg), isothermal at the ambient 20 degC, as plenum;
- chambers: rigid 20 mL tanks and neo-Hookean pods (r0 15 mm, t0 1 mm, mu 0.3 MPa, start at
  stretch 1.05), each with the dead volume of half of every line at it (src/model/build.ts);
  a pod's volume is solved from its mass by Newton on (p_a + dp(V))(V + Vd) = m R T, warm-started
  from the last evaluation (src/elements/chamber.ts, src/model/volume.ts), with the slack branch
  below the unstretched volume (src/physics/wall.ts);
- lines (2 mm x 100 mm, smooth): src/physics/line-flow.ts: the compressible Hagen-Poiseuille
  closed form while laminar (X <= 64*2300), otherwise the Reynolds number of the blended
  friction law (src/physics/tube.ts: Haaland, C1 smoothstep 2300-4000) and the root of
  Psi(G) (isentropic entrance, isothermal flow with friction, choking at M = 1/sqrt(gamma));
  never above the ideal nozzle of the bore;
- the vent valve at the far end (orifice 0.5 mm, Cd 0.65, opening ramped 0 -> 1 over
  0.5-0.51 s, linear in dp above a pressure ratio of 0.999: src/physics/valve-flow.ts);
- tolerances as plenum's: rtol 1e-6, atol of every mass 1e-3*rtol*(largest initial mass)
  (src/assemble/system.ts); the run is integrated in the segments between the valve's ramp
  ends, where plenum's driver restarts its integrator too.

Usage: scipy-chain.py N [METHOD] [--final FILE]. Prints N, solve seconds, nfev, njev, status,
peak resident memory of the process (MB), CPU seconds of the process. With --final, writes the
final gauge pressures (Pa) as JSON, to check that both programs solve the same equations (the
benchmark compares them with plenum's). The benchmark runs it with OPENBLAS_NUM_THREADS=1 (and
the OpenMP/MKL equivalents), so that its linear algebra uses one core like plenum's.
"""
import json, math, resource, sys, time
import numpy as np
np.seterr(all="ignore")  # Psi and the friction law are evaluated at G = 0 on masked branches
from scipy.integrate import solve_ivp
from scipy.sparse import diags

args = [a for a in sys.argv[1:]]
final_file = None
if "--final" in args:
    i = args.index("--final"); final_file = args[i + 1]; del args[i:i + 2]
n = int(args[0]); method = args[1] if len(args) > 1 else "BDF"

# gas: air (src/physics/gas.ts), ambient 101.325 kPa, 20 degC
R = 8.314462618 / 28.9647e-3; GAMMA = 1.4; T = 293.15; PA = 101325.0
MU_G = 1.716e-5 * (T / 273.15) ** 1.5 * (273.15 + 110.4) / (T + 110.4)
RT = R * T
# chambers
pod = np.arange(n) % 2 == 1
R0, T0W, MU = 0.015, 0.001, 0.3e6
V0 = 4 / 3 * math.pi * R0 ** 3; VT = 20e-6
C_NH = 2 * MU * T0W / R0               # neo-Hookean: dp = C_NH (1/l - 1/l^7)
S_SLACK = C_NH * 6 / 3                 # d dp/dx at x = V/V0 = 1 (x = l^3)
BETA = S_SLACK / PA - 1
# lines: 2 mm x 100 mm, smooth
D, L = 0.002, 0.1
A = math.pi * D * D / 4
HALF = A * L / 2
dead = np.full(n, 2 * HALF); dead[0] = HALF; dead[-1] = HALF
K_LAM = math.pi * D ** 4 / (256 * MU_G * L * RT)   # laminar: mdot = K_LAM (p1^2 - p2^2)
RE_LAM, RE_TURB = 2300.0, 4000.0
HK = 1.8 / math.log(10)
FLUX_C = math.sqrt(GAMMA / RT)
R_CRIT = (2 / (GAMMA + 1)) ** (GAMMA / (GAMMA - 1))
# vent valve
A_V = math.pi / 4 * 0.0005 ** 2; CD_V = 0.65; R_LIN = 0.999


def dp_pod(V):
    """Gauge pressure of a pod and its slope dp/dV (elastic above V0, slack below)."""
    x = V / V0
    lam = np.cbrt(np.maximum(x, 1.0))
    im1 = 1 / lam; im7 = im1 ** 7
    dp_e = C_NH * (im1 - im7)
    dpdV_e = C_NH * (-im1 ** 2 + 7 * im7 * im1) * lam / (3 * V)
    y = 1 - x; q = 1 + BETA * y
    dp_s = -S_SLACK * y / q
    dpdV_s = S_SLACK / (V0 * q * q)
    el = x >= 1
    return np.where(el, dp_e, dp_s), np.where(el, dpdV_e, dpdV_s)


V_warm = V0 * 1.05 ** 3 * np.ones(int(pod.sum()))


def pressures(m):
    """Absolute pressure of every chamber from its mass."""
    global V_warm
    p = m * RT / (VT + dead)
    mp = m[pod] * RT; Vd = dead[pod]; V = V_warm.copy()
    for _ in range(100):
        dp, dpdV = dp_pod(V)
        F = (PA + dp) * (V + Vd) - mp
        dF = dpdV * (V + Vd) + PA + dp
        step = F / dF
        V = V - step
        if np.all(np.abs(step) <= 1e-14 * V):
            break
    V_warm = V
    p[pod] = PA + dp_pod(V)[0]
    return p


def friction(Re):
    """Blended Darcy friction factor f and F = f Re^2 with dF/dRe (src/physics/tube.ts), smooth tube."""
    Ac = 6.9 / Re
    inv = -HK * np.log(Ac); ft = 1 / (inv * inv)
    dinv = HK * 6.9 / (Ac * Re * Re); dft = -2 * ft * dinv / inv
    Ft = ft * Re * Re; dFt = dft * Re * Re + 2 * ft * Re
    s = np.clip((Re - RE_LAM) / (RE_TURB - RE_LAM), 0, 1)
    w = s * s * (3 - 2 * s); dw = 6 * s * (1 - s) / (RE_TURB - RE_LAM)
    Fl = 64 * Re
    f = (1 - w) * 64 / Re + w * ft
    F = (1 - w) * Fl + w * Ft
    dF = (1 - w) * 64 + w * dFt + dw * (Ft - Fl)
    return f, F, dF


def reynolds(X):
    """Re with f(Re) Re^2 = X, X > 64*2300: Newton from a fixed-point start, bracketed."""
    Re = np.sqrt(X / 0.03)
    inv = -HK * np.log(6.9 / Re)
    Re = np.maximum(np.sqrt(X * inv * inv), RE_LAM * 1.0001)
    lo = np.full_like(X, RE_LAM); hi = np.full_like(X, np.inf)
    for _ in range(200):
        _, F, dF = friction(Re)
        g = F - X
        hi = np.where(g > 0, Re, hi); lo = np.where(g < 0, Re, lo)
        nxt = Re - g / dF
        ok = (nxt > lo) & (nxt < hi)
        nxt = np.where(ok, nxt, np.where(np.isfinite(hi), 0.5 * (lo + hi), 2 * Re))
        done = np.abs(nxt - Re) <= 1e-10 * nxt
        Re = nxt
        if np.all(done):
            break
    return Re


def inlet_mach(g, w):
    """M with M (1 + w k M^2)^(-e) = g on the subsonic branch (line-flow.ts, inletMach); NaN beyond."""
    k = 0.5 * (GAMMA - 1); e = (GAMMA + 1) / (2 * (GAMMA - 1))
    ww = np.maximum(w, 1e-300)
    hi = 1 / np.sqrt(ww * GAMMA)
    beyond = (w > 0) & (g > hi * (1 + ww * k * hi * hi) ** (-e))
    lo = g.copy(); M = g.copy()
    for _ in range(100):
        ee = 1 + w * k * M * M
        r = M * ee ** (-e) - g
        lo = np.where(r < 0, M, lo); hi = np.where(r > 0, M, hi)
        dq = (1 - w * M * M) * ee ** (-e - 1)
        nxt = M - r / dq
        nxt = np.where((nxt > lo) & (nxt < hi), nxt, 0.5 * (lo + hi))
        done = (np.abs(nxt - M) <= 1e-15 * nxt) | (r == 0)
        M = np.where(r == 0, M, nxt)
        if np.all(done):
            break
    M = np.where(w == 0, g, M)
    return np.where(beyond, np.nan, M)


def psi(G, p0, pb):
    """Psi(G) of line-flow.ts: positive below the line's flow, negative above it."""
    Re = G * D / MU_G
    f, _, _ = friction(Re)
    s = np.clip((Re - RE_LAM) / (RE_TURB - RE_LAM), 0, 1)
    w = s * s * (3 - 2 * s)
    M1 = inlet_mach(G / (p0 * FLUX_C), w)
    e = 1 + 0.5 * (GAMMA - 1) * w * M1 * M1
    T1 = T / e
    p1 = p0 * e ** (-GAMMA / (GAMMA - 1))
    c2 = G * G * R * T1
    pe = np.maximum(pb, np.sqrt(w) * np.sqrt(c2))
    val = (p1 - pe) * (p1 + pe) - c2 * (f * (L / D) + 2 * w * np.log(p1 / pe))
    val = np.where(np.isnan(M1), -p0 * p0, val)
    return np.where(G <= 0, (p0 - pb) * (p0 + pb), val)


def nozzle(p0, pb, Cd=1.0, area=A):
    r = pb / p0
    phi = np.maximum(r ** (2 / GAMMA) - r ** ((GAMMA + 1) / GAMMA), 0)
    sub = Cd * area * p0 * np.sqrt(2 * GAMMA / ((GAMMA - 1) * RT) * phi)
    choked = Cd * area * p0 * FLUX_C * (2 / (GAMMA + 1)) ** ((GAMMA + 1) / (2 * (GAMMA - 1)))
    return np.where(r <= R_CRIT, choked, sub)


def line_flows(pA, pB):
    """Signed flow from end 1 to end 2 of every line (line-flow.ts, lineFlowInto)."""
    p0 = np.maximum(pA, pB); pb = np.minimum(pA, pB)
    dp2 = (p0 - pb) * (p0 + pb)
    X = dp2 * D ** 3 / (L * RT * MU_G * MU_G)
    m = K_LAM * dp2                         # laminar closed form
    # laminar exit past M = 1/sqrt(gamma): choked closed form (not reached in this chain)
    cs = math.sqrt(RT)
    G_lam = m / A
    kq = 64 * MU_G * L * RT / (D * D)
    G_ch = 2 * p0 * p0 / (kq + np.sqrt(kq * kq + 4 * RT * p0 * p0))
    m = np.where(pb < G_lam * cs, G_ch * A, m)
    tur = X > 64 * RE_LAM
    if np.any(tur):
        a0, b0 = p0[tur], pb[tur]
        Re = reynolds(X[tur])
        hi = Re * MU_G * math.pi * D / 4 / A
        fhi = psi(hi, a0, b0)
        for _ in range(60):
            grow = fhi >= 0
            if not np.any(grow):
                break
            hi = np.where(grow, 2 * hi, hi); fhi = np.where(grow, psi(hi, a0, b0), fhi)
        lo = np.zeros_like(hi); flo = psi(lo, a0, b0)
        # Illinois regula falsi to the precision of plenum's Brent (2 eps |G|)
        side = np.zeros_like(hi)
        G = hi
        for _ in range(200):
            G = (lo * fhi - hi * flo) / (fhi - flo)
            bad = ~((G > lo) & (G < hi))
            G = np.where(bad, 0.5 * (lo + hi), G)
            fG = psi(G, a0, b0)
            up = fG > 0          # root above G
            lo_new = np.where(up, G, lo); flo_new = np.where(up, fG, flo)
            hi_new = np.where(up, hi, G); fhi_new = np.where(up, fhi, fG)
            fhi_new = np.where(up & (side == 1), 0.5 * fhi_new, fhi_new)
            flo_new = np.where(~up & (side == -1), 0.5 * flo_new, flo_new)
            side = np.where(up, 1, -1)
            lo, flo, hi, fhi = lo_new, flo_new, hi_new, fhi_new
            if np.all((hi - lo <= 4 * 2.2e-16 * hi) | (fG == 0)):
                break
        m[tur] = G * A
    m = np.minimum(m, nozzle(p0, pb))
    return np.where(pA >= pB, m, -m)


def opening(t):
    return min(1.0, max(0.0, (t - 0.5) / 0.01))


def vent_flow(p, t):
    """Flow out of the last chamber to ambient (valve-flow.ts): orifice law, linear above r = 0.999."""
    x = opening(t)
    if x <= 0 or p == PA:
        return 0.0
    up, down = max(p, PA), min(p, PA)
    r = down / up
    law = lambda rr: float(nozzle(np.array([up]), np.array([rr * up]), CD_V, A_V * x)[0])
    q = law(r) if r <= R_LIN else law(R_LIN) * (1 - r) / (1 - R_LIN)
    return q if p > PA else -q


def rhs(t, m):
    p = pressures(m)
    q = line_flows(p[:-1], p[1:])
    dm = np.zeros(n); dm[:-1] -= q; dm[1:] += q
    dm[-1] -= vent_flow(p[-1], t)
    return dm


# initial masses: tanks at ambient, pods at stretch 1.05
Vp = np.where(pod, V0 * 1.05 ** 3, VT)
p_init = np.where(pod, PA + C_NH * (1 / 1.05 - 1 / 1.05 ** 7), PA)
m0 = p_init * (Vp + dead) / RT
rtol = 1e-6
atol = rtol * m0.max() * 1e-3
sp = diags([1.0, 1.0, 1.0], [-1, 0, 1], shape=(n, n))
t_start = time.perf_counter()
nfev = njev = 0; status = 0
y = m0
for a, b in ((0.0, 0.5), (0.5, 0.51), (0.51, 1.0)):
    sol = solve_ivp(rhs, (a, b), y, method=method, rtol=rtol, atol=atol,
                    jac_sparsity=sp if method in ("BDF", "Radau") else None)
    nfev += sol.nfev; njev += sol.njev; status = sol.status
    y = sol.y[:, -1]
    if status != 0:
        break
solve_s = time.perf_counter() - t_start
if final_file:
    with open(final_file, "w") as fh:
        json.dump({"n": n, "gauge": (pressures(y) - PA).tolist(), "mass": float(y.sum()), "mass0": float(m0.sum())}, fh)
u = resource.getrusage(resource.RUSAGE_SELF)
print(n, round(solve_s, 3), nfev, njev, status, round(u.ru_maxrss / 1024, 1), round(u.ru_utime + u.ru_stime, 3))
