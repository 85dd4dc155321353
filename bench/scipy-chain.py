#!/usr/bin/env python3
"""Performance anchor for plenum's benchmark (`npm run bench` runs it side by side with plenum;
kept here so that the benchmark runs from a fresh clone): a vectorised NumPy chain of N chambers (alternating rigid 20 mL tanks and
neo-Hookean pods r0 15 mm, t0 1 mm, mu 0.3 MPa) joined by laminar lines (2 mm x 100 mm), pods
starting at stretch 1.05 and tanks at ambient, isothermal, 1 s, SciPy BDF with a sparse jacobian
pattern. State: pressure for tanks, stretch for pods. Prints N, solve seconds, nfev, njev, status,
peak resident memory of the process (MB), CPU seconds of the process. The benchmark runs it with OPENBLAS_NUM_THREADS=1 (and
the OpenMP/MKL equivalents), so that its linear algebra uses one core like plenum's."""
import sys, time, math, resource
import numpy as np
from scipy.integrate import solve_ivp
from scipy.sparse import diags

R = 8.314462618 / 0.0289647; T = 293.15; pa = 101325.0
mu_g = 1.716e-5 * (T / 273.15) ** 1.5 * (273.15 + 110.4) / (T + 110.4)
n = int(sys.argv[1]); method = sys.argv[2] if len(sys.argv) > 2 else "BDF"
pod = np.arange(n) % 2 == 1
r0, t0, mu = 0.015, 0.001, 0.3e6; V0 = 4 / 3 * math.pi * r0**3; Vt = 20e-6
k = math.pi * 0.002**4 / (256 * mu_g * 0.1 * R * T)

def p_of(x):
    lam = np.where(pod, x, 1.0)
    return np.where(pod, pa + 2 * mu * t0 / r0 * (1 / lam - 1 / lam**7), x)

def dm_dx(x):
    lam = np.where(pod, x, 1.0)
    dp = 2 * mu * t0 / r0 * (1 / lam - 1 / lam**7); ddp = 2 * mu * t0 / r0 * (-1 / lam**2 + 7 / lam**8)
    pod_d = ((pa + dp) * 3 * lam**2 + ddp * lam**3) * V0 / (R * T)
    return np.where(pod, pod_d, Vt / (R * T))

def rhs(t, x):
    p = p_of(x); q = k * (p[:-1] ** 2 - p[1:] ** 2)
    mdot = np.zeros(n); mdot[:-1] -= q; mdot[1:] += q
    return mdot / dm_dx(x)

x0 = np.where(pod, 1.05, pa)
sp = diags([1.0, 1.0, 1.0], [-1, 0, 1], shape=(n, n))
t = time.perf_counter()
sol = solve_ivp(rhs, (0, 1), x0, method=method, rtol=1e-6, atol=np.where(pod, 1e-9, 1e-3),
                jac_sparsity=sp if method in ("BDF", "Radau") else None)
u = resource.getrusage(resource.RUSAGE_SELF)
print(n, round(time.perf_counter() - t, 3), sol.nfev, sol.njev, sol.status,
      round(u.ru_maxrss / 1024, 1), round(u.ru_utime + u.ru_stime, 3))
