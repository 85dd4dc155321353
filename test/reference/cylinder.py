#!/usr/bin/env python3
"""Independent reference solution for plenum's cylinder (test/verification/cylinder-reference.test.ts),
computed with SciPy (solve_ivp, Radau, rtol 1e-11) from the equations written out here, not from
plenum's code. Run `python3 test/reference/cylinder.py` to regenerate test/reference/cylinder-stroke.json;
cylinder-stroke.yaml beside this script describes the same network.

Network: a double-acting cylinder whose cap side is filled from a supply through a laminar line
and whose rod side vents to ambient through another; the supply drops to ambient pressure
(a 10 ms ramp) after the stroke, and the spring, the load and gravity retract the piston.

Model (adiabatic, ideal gas, uniform gas in each side):
  areas      A_c = pi D^2/4, A_r = pi (D^2 - d^2)/4
  volumes    V_c = Vd_c + A_c x,  V_r = Vd_r + A_r (s - x)     (Vd includes half of each line)
  pressures  p = m R T / V
  lines      mdot = pi D^4 (p1^2 - p2^2) / (256 mu(T_up) L R T_up)  (compressible Hagen-Poiseuille,
             laminar; the script asserts Re = 4 |mdot| / (pi D mu) < 2300 throughout)
  energy     m cv dT/dt = cp H_in - cv T m_in - R T m_out - p dV/dt   (Cengel & Boles, unsteady
             flow with boundary work), H_in = sum of mdot_in T_upstream
  piston     M dv/dt = F - friction,  dx/dt = v
             F = (p_c - pa) A_c - (p_r - pa) A_r - (F0 + k x) - F_load - M g sin(theta)
  friction   Karnopp (J. Dyn. Sys. Meas. Control 107 (1985) 100) with the zero-velocity band
             taken to zero by events: modes stuck (v = 0 while |F| <= Fs), sliding forwards or
             backwards (Fc s + c v); stuck -> sliding when |F| crosses Fs; sliding -> rest when
             v crosses 0 (then stuck if |F| <= Fs, else sliding the way F points)
  end stops  x = 0 and x = s: inelastic contact (v set to 0, the impact velocity recorded); held
             while side * F >= -Fs; released when side * F falls through -Fs
Constants: R = 8.314462618 / 0.0289647, gamma = 1.4, Sutherland mu for air (1.716e-5 Pa s,
273.15 K, S = 110.4 K), g = 9.80665 m/s^2.
"""
import json, math, os
import numpy as np
from scipy.integrate import solve_ivp

R = 8.314462618 / 0.0289647
GAMMA = 1.4
CV = R / (GAMMA - 1)
CP = GAMMA * CV
TA = 293.15
PA = 101325.0
G = 9.80665
HERE = os.path.dirname(os.path.abspath(__file__))


def mu(T):
    return 1.716e-5 * (T / 273.15) ** 1.5 * (273.15 + 110.4) / (T + 110.4)


# ---- the network (cylinder-stroke.yaml) ------------------------------------------------------
BORE, ROD, STROKE = 0.012, 0.005, 0.025
AC = math.pi * BORE ** 2 / 4
AR = math.pi * (BORE ** 2 - ROD ** 2) / 4
M = 0.2
K, F0 = 100.0, 2.0
LOAD = 3.0
FS, FC, CVISC = 4.0, 3.0, 10.0
THETA = math.radians(30)
GRAV = M * G * math.sin(THETA)
LINE_D, LINE_L = 0.4e-3, 1.5  # 0.4 mm x 1.5 m, both lines
HALF_LINE = math.pi * LINE_D ** 2 * LINE_L / 8
VD_C = 0.5e-6 + HALF_LINE
VD_R = 0.8e-6 + HALF_LINE
P_SUPPLY = PA + 2e5
T_DROP, T_RAMP = 3.0, 0.01
DURATION = 5.0


def supply(t):
    if t <= T_DROP:
        return P_SUPPLY
    if t >= T_DROP + T_RAMP:
        return PA
    return P_SUPPLY + (PA - P_SUPPLY) * (t - T_DROP) / T_RAMP


def line(p1, T1, p2, T2):
    """mass flow 1 -> 2 and the upstream temperature."""
    Tup = T1 if p1 >= p2 else T2
    q = math.pi * LINE_D ** 4 * (p1 * p1 - p2 * p2) / (256 * mu(Tup) * LINE_L * R * Tup)
    return q, Tup


max_re = [0.0]


def parts(t, y):
    mc, Tc, mr, Tr, x, v = y
    Vc = VD_C + AC * x
    Vr = VD_R + AR * (STROKE - x)
    pc = mc * R * Tc / Vc
    pr = mr * R * Tr / Vr
    F = (pc - PA) * AC - (pr - PA) * AR - (F0 + K * x) - LOAD - GRAV
    return Vc, Vr, pc, pr, F


def rhs_for(mode):
    def rhs(t, y):
        mc, Tc, mr, Tr, x, v = y
        Vc, Vr, pc, pr, F = parts(t, y)
        q_in, T_in = line(supply(t), TA, pc, Tc)     # supply -> cap
        q_out, T_out = line(pr, Tr, PA, TA)          # rod -> ambient
        for q, T in ((q_in, T_in), (q_out, T_out)):
            max_re[0] = max(max_re[0], 4 * abs(q) / (math.pi * LINE_D * mu(T)))
        if mode in ('stuck', 'low', 'high'):
            dx, dv = 0.0, 0.0
        else:
            s = 1.0 if mode == 'fwd' else -1.0
            dx, dv = v, (F - (FC * s + CVISC * v)) / M
        # cap: inflow q_in (> 0 enters)
        mi, mo, hi = (q_in, 0.0, q_in * T_in) if q_in >= 0 else (0.0, -q_in, 0.0)
        dTc = (CP * hi - CV * Tc * mi - R * Tc * mo - pc * AC * dx) / (mc * CV)
        # rod: outflow q_out (> 0 leaves)
        mi, mo, hi = (0.0, q_out, 0.0) if q_out >= 0 else (-q_out, 0.0, -q_out * T_out)
        dTr = (CP * hi - CV * Tr * mi - R * Tr * mo + pr * AR * dx) / (mr * CV)
        return [q_in, dTc, -q_out, dTr, dx, dv]
    return rhs


def events_for(mode):
    evs = []
    def ev(f, direction):
        f.terminal = True
        f.direction = direction
        evs.append(f)
    if mode == 'stuck':
        ev(lambda t, y: parts(t, y)[4] - FS, 1)
        ev(lambda t, y: -parts(t, y)[4] - FS, 1)
    elif mode == 'low':
        ev(lambda t, y: parts(t, y)[4] - FS, 1)
    elif mode == 'high':
        ev(lambda t, y: -parts(t, y)[4] - FS, 1)
    elif mode == 'fwd':
        ev(lambda t, y: y[5], -1)
        ev(lambda t, y: y[4] - STROKE, 1)
    elif mode == 'bwd':
        ev(lambda t, y: -y[5], -1)
        ev(lambda t, y: y[4], -1)
    return evs


def at_rest(t, y, where):
    """mode of a piston at rest (v = 0): at a stop, held or released; inside, stuck or sliding."""
    F = parts(t, y)[4]
    if where == 'high':
        return 'high' if F >= -FS else 'bwd'
    if where == 'low':
        return 'low' if -F >= -FS else 'fwd'
    if abs(F) <= FS:
        return 'stuck'
    return 'fwd' if F > 0 else 'bwd'


def main():
    m0c = PA * VD_C / (R * TA)
    m0r = PA * (VD_R + AR * STROKE) / (R * TA)
    y = np.array([m0c, TA, m0r, TA, 0.0, 0.0])
    t = 0.0
    mode = at_rest(t, y, 'low')
    stops = [T_DROP, T_DROP + T_RAMP, DURATION]
    times = list(np.linspace(0, DURATION, 321))
    log = []
    samples = {}
    atol = [1e-16, 1e-9, 1e-16, 1e-9, 1e-14, 1e-13]
    while t < DURATION:
        t_stop = min(s for s in stops if s > t + 1e-15)
        want = [tt for tt in times if t <= tt <= t_stop and tt not in samples]
        sol = solve_ivp(rhs_for(mode), (t, t_stop), y, method='Radau', rtol=1e-11, atol=atol,
                        events=events_for(mode), dense_output=True)
        assert sol.status in (0, 1), sol.message
        t_end = sol.t[-1]
        for tt in want:
            if tt <= t_end:
                samples[tt] = sol.sol(tt).copy()
        y = sol.y[:, -1].copy()
        t = t_end
        if sol.status == 1:
            # which event fired
            k = next(i for i, te in enumerate(sol.t_events) if len(te))
            if mode == 'stuck' or mode in ('low', 'high'):
                F = parts(t, y)[4]
                mode = 'fwd' if F > 0 else 'bwd'
                log.append({'t': t, 'what': 'starts to move', 'direction': mode})
            elif k == 0:  # velocity reached zero while sliding
                y[5] = 0.0
                mode = at_rest(t, y, 'inside')
                log.append({'t': t, 'what': 'halts', 'then': mode})
            else:  # a stop
                side = 'high' if mode == 'fwd' else 'low'
                log.append({'t': t, 'what': 'impact', 'stop': side, 'velocity': float(y[5])})
                y[4] = STROKE if side == 'high' else 0.0
                y[5] = 0.0
                mode = at_rest(t, y, side)
    assert max_re[0] < 2300, max_re[0]
    out = {'name': 'cylinder-stroke', 'times': times, 'events': log, 'max_reynolds': max_re[0],
           'channels': {k: [] for k in ('c.position', 'c.velocity', 'c.cap.gauge', 'c.rod.gauge',
                                         'c.cap.temperature', 'c.rod.temperature', 'c.cap.mass', 'c.rod.mass')}}
    for tt in times:
        yy = samples[tt]
        _, _, pc, pr, _ = parts(tt, yy)
        ch = out['channels']
        ch['c.position'].append(yy[4]); ch['c.velocity'].append(yy[5])
        ch['c.cap.gauge'].append(pc - PA); ch['c.rod.gauge'].append(pr - PA)
        ch['c.cap.temperature'].append(yy[1]); ch['c.rod.temperature'].append(yy[3])
        ch['c.cap.mass'].append(yy[0]); ch['c.rod.mass'].append(yy[2])
    with open(os.path.join(HERE, 'cylinder-stroke.json'), 'w') as f:
        json.dump(out, f, indent=1)
    for e in log:
        print(e)
    print('max Re', round(max_re[0], 1), 'final x', out['channels']['c.position'][-1])


if __name__ == '__main__':
    main()
