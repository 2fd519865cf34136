#!/usr/bin/python3
"""Reference fixtures for the Loopledger analysis engine, computed independently with SciPy.

How to regenerate (Debian: ``apt-get install python3-scipy``; written for SciPy 1.10 / NumPy 1.24, last run with the versions in the fixture's meta)::

    /usr/bin/python3 tests/reference/generate_analysis_fixtures.py

writes ``tests/reference/fixtures/analysis-cases.json`` (takes several minutes: the dead-time cases run a 50 000-step loop in Python). The spec
``tests/reference/analysis-reference.spec.ts`` runs the TypeScript engine on the same cases and
compares.

What is computed here, and how (independently of the TypeScript code):

* controller transfer functions expanded from the form definitions with numpy.polymul
  (ideal, series, parallel; derivative filter; set-point weights b on the proportional and c on
  the derivative term, the terms taken from the partial-fraction expansion of C(s));
* closed-loop polynomials; dead time replaced by the Padé approximant from
  scipy.interpolate.pade of the Taylor series of exp(-theta*s); poles and zeros by numpy.roots;
* step responses: delay-free loops with scipy.signal.lsim on a 40 001-point grid; loops with
  dead time with a fine-step simulation written here: plant and controller discretised with
  scipy.signal.cont2discrete (first-order hold), the controller output passed through a delay
  line of M samples (step h = theta/M, about tEnd/200 000);
* PV and MV of both tests at 41 probe times, and metrics, by linear interpolation on that dense grid (rise 10-90 %, peak, overshoot,
  undershoot, settling time as the last exit from the +-band tube, IAE/ISE/ITAE by the
  trapezoidal rule, peak MV);
* gain/phase crossings bracketed on a 40 000-point log grid and refined with
  scipy.optimize.brentq on the exact frequency response (exp(-j*w*theta)); Ms by
  scipy.optimize.minimize_scalar (bounded) around the grid minimum of |1 + L|.

All plants and settings are invented test data.
"""
import json
import math
import os

import numpy as np
import scipy
from scipy import linalg, optimize, signal
from scipy.interpolate import pade as scipy_pade

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, 'fixtures', 'analysis-cases.json')


def trim(p):
    p = np.atleast_1d(np.asarray(p, dtype=float))
    nz = np.nonzero(p)[0]
    return p[nz[0]:] if len(nz) else np.array([0.0])


def padd(a, b):
    return trim(np.polyadd(a, b))


def pmul(a, b):
    return trim(np.polymul(a, b))


def controller_tfs(c):
    """Return (nc, nr, dc, terms) with C = nc/dc (feedback) and Cr = nr/dc (set-point)."""
    typ = c['type']
    form = c.get('form', 'ideal')
    kp = c['kp']
    n = c.get('n')
    b = c.get('b', 1.0)
    cw = c.get('c', 0.0)
    has_i = typ in ('PI', 'PID')
    has_d = typ in ('PD', 'PID')
    if form == 'parallel':
        ki = c.get('ki', 0.0) if has_i else 0.0
        kd = c.get('kd', 0.0) if has_d else 0.0
        tf = (kd / kp / n) if (has_d and n) else 0.0
        # kp + ki/s + kd s/(tf s + 1)
        parts = [([kp], [1.0])]
        if has_i:
            parts.append(([ki], [1.0, 0.0]))
        if has_d:
            parts.append(([kd, 0.0], [tf, 1.0] if tf > 0 else [1.0]))
    else:
        ti = c.get('ti') if has_i else None
        td = c.get('td', 0.0) if has_d else 0.0
        tf = (td / n) if (has_d and n and td > 0) else 0.0
        dfilt_num = [td, 0.0]
        dfilt_den = [tf, 1.0] if tf > 0 else [1.0]
        if form == 'ideal':
            parts = [([kp], [1.0])]
            if has_i:
                parts.append(([kp / ti], [1.0, 0.0]))
            if has_d:
                parts.append((list(np.multiply(kp, dfilt_num)), dfilt_den))
        else:  # series: kp (1 + 1/(ti s)) (1 + td s/(tf s + 1))
            inum, iden = ([ti, 1.0], [ti, 0.0]) if has_i else ([1.0], [1.0])
            dnum = padd(pmul(dfilt_den, [1.0]), dfilt_num) if has_d else np.array([1.0])
            dden = dfilt_den if has_d else [1.0]
            parts = [(list(kp * pmul(inum, dnum)), list(pmul(iden, dden)))]
    # Sum of the parts over a common denominator.
    num, den = np.array([0.0]), np.array([1.0])
    for pn, pd in parts:
        num = padd(pmul(num, pd), pmul(pn, den))
        den = pmul(den, pd)
    # Normalise the denominator to the engine's form: s^(I) * (tf s + 1)^(D filtered).
    dc = np.array([1.0])
    if has_i and (form != 'parallel' or c.get('ki', 0.0) != 0.0):
        dc = pmul(dc, [1.0, 0.0])
    if has_d and tf > 0:
        dc = pmul(dc, [tf, 1.0])
    # num/den equals nc/dc: nc = num * dc / den (exact polynomial division).
    nc, rem = np.polydiv(pmul(num, dc), den)
    assert np.allclose(rem, 0, atol=1e-9 * max(1, np.max(np.abs(num)))), rem
    nc = trim(nc)
    # Parallel terms P + I/s + D s/(tf s + 1) from the partial-fraction expansion of C(s).
    I = 0.0
    if dc[-1] == 0:  # integrator: I = lim s C(s) = nc(0) / (dc(s)/s)(0)
        I = np.polyval(nc, 0.0) / np.polyval(np.polydiv(dc, [1.0, 0.0])[0], 0.0)
    D = 0.0
    if has_d and tf > 0:
        # Residue at s = -1/tf: C(s)(tf s + 1) at s = -1/tf equals D*(-1/tf).
        s0 = -1.0 / tf
        rest = np.polydiv(dc, [tf, 1.0])[0]
        D = -tf * np.polyval(nc, s0) / np.polyval(rest, s0)
    elif has_d:
        # Ideal derivative: D = lim C(s)/s as s -> infinity (leading coefficients).
        D = nc[0] / dc[0] if len(nc) - len(dc) == 1 else 0.0
    # P = C(s) - I/s - D s/(tf s + 1) evaluated at any s (use s = 1).
    s1 = 1.0
    Ds = D * s1 / (tf * s1 + 1.0)
    P = np.polyval(nc, s1) / np.polyval(dc, s1) - (I / s1 if dc[-1] == 0 else 0.0) - Ds
    # Set-point path: Cr = C - (1 - b) P - (1 - c) D s/(tf s + 1).
    corr_num = padd(pmul([(1 - b) * P], dc), pmul(pmul([(1 - cw) * D, 0.0], np.polydiv(dc, [tf, 1.0])[0] if tf > 0 else dc), [1.0]))
    nr = padd(nc, -corr_num)
    return nc, trim(nr), dc, {'P': P, 'I': I, 'D': D, 'tf': tf}


def pade_tf(theta, order):
    if theta == 0:
        return np.array([1.0]), np.array([1.0])
    # Pade approximant of exp(-x) in the scaled variable x = theta*s (well conditioned), then
    # x^j -> theta^j s^j.
    coeffs = [(-1.0) ** k / math.factorial(k) for k in range(2 * order + 1)]
    p, q = scipy_pade(coeffs, order)  # poly1d, highest power first
    scale = lambda c: np.array([v * theta ** (len(c) - 1 - i) for i, v in enumerate(c)])
    return scale(p.coeffs), scale(q.coeffs)


def closed_loop(case, pade_order):
    ng, dg, theta = trim(case['plant']['num']), trim(case['plant']['den']), case['plant'].get('delay', 0.0)
    nc, nr, dc, terms = controller_tfs(case['controller'])
    pn, pd = pade_tf(theta, pade_order) if theta > 0 else (np.array([1.0]), np.array([1.0]))
    loop_num, loop_den = pmul(nc, ng), pmul(dc, dg)
    char = padd(pmul(loop_den, pd), pmul(loop_num, pn))
    ry = pmul(pmul(nr, ng), pn)
    exact_char = padd(loop_den, loop_num)
    exact_ry = pmul(nr, ng)
    exact_dy = pmul(ng, dc)
    return dict(ng=ng, dg=dg, theta=theta, nc=nc, nr=nr, dc=dc, terms=terms, char=char, ry=ry,
                loop_num=loop_num, loop_den=loop_den, exact_char=exact_char, exact_ry=exact_ry, exact_dy=exact_dy)


def complex_list(z):
    return [{'re': float(np.real(v)), 'im': float(np.imag(v))} for v in z]


# ---------------------------------------------------------------- time responses

def simulate_delay(cl, case, t_end, steps=50000):
    """Fine-step simulation with a delay line on the plant input (see module docstring)."""
    theta = cl['theta']
    h_target = t_end / float(steps)
    M = max(1, int(math.ceil(theta / h_target)))
    h = theta / M
    N = int(math.ceil(t_end / h)) + 1
    A, B, C, D = signal.tf2ss(cl['ng'], cl['dg'])
    Ad, Bd, Cd, Dd, _ = signal.cont2discrete((A, B, C, D), h, method='foh')
    terms = cl['terms']
    ideal = terms['D'] != 0 and terms['tf'] == 0
    ctrl = case['controller']
    b, cw = ctrl.get('b', 1.0), ctrl.get('c', 0.0)
    if ideal:
        # Proper parts: feedback P + I/s, set-point bP + I/s; derivative -D*ydot (+ c*D*rdot impulse).
        P, I, Dg = terms['P'], terms['I'], terms['D']
        fb_num, fb_den = ([P, I], [1.0, 0.0]) if I != 0 else ([P], [1.0])
        sp_num, sp_den = ([b * P, I], [1.0, 0.0]) if I != 0 else ([b * P], [1.0])
    else:
        fb_num, fb_den = cl['nc'], cl['dc']
        sp_num, sp_den = cl['nr'], cl['dc']

    def disc(num, den, method):
        num = trim(num)
        if len(trim(den)) == 1:
            return None, float(num[0] / trim(den)[0])
        a, bb, c, d = signal.tf2ss(num, den)
        ad, bd, cd, dd, _ = signal.cont2discrete((a, bb, c, d), h, method=method)
        return (ad, bd, cd, dd), None

    # The feedback path sees the continuous PV (first-order hold); the set-point path sees a
    # constant step for t >= 0, for which the zero-order hold is exact.
    fb, fb_gain = disc(fb_num, fb_den, 'foh')
    sp, sp_gain = disc(sp_num, sp_den, 'zoh')
    results = {}
    for kind in ('setpoint', 'disturbance'):
        r = 1.0 if kind == 'setpoint' else 0.0
        dist = 0.0 if kind == 'setpoint' else 1.0
        xi = np.zeros((A.shape[0], 1))
        xf = np.zeros((fb[0].shape[0], 1)) if fb else None
        xr = np.zeros((sp[0].shape[0], 1)) if sp else None
        U = np.zeros(N)
        Y = np.zeros(N)
        uprev_r = 0.0
        for k in range(N):
            v = (U[k - M] if k - M >= 0 else 0.0) + (dist if k - M >= 0 else 0.0)
            if ideal and cw != 0 and k == M and kind == 'setpoint':
                # Impulse c*D*delta(t - theta) on the plant input: state jump B*c*D (x and xi alike).
                xi = xi + B * (cw * Dg)
            y = float(Cd @ xi + Dd * v)
            Y[k] = y
            # Controller output at t_k.
            if sp is not None:
                ur = float(sp[2] @ xr + sp[3] * r)
            else:
                ur = sp_gain * r
            if fb is not None:
                uf = float(fb[2] @ xf + fb[3] * y)
            else:
                uf = fb_gain * y
            u = ur - uf
            if ideal:
                # Derivative of the sampled PV by a backward difference, so a jump of the PV (from
                # an impulse into the plant) acts as the impulse -D*jump it is, spread over one step.
                ydot = (y - Y[k - 1]) / h if k > 0 else 0.0
                u -= Dg * ydot
            U[k] = u
            if abs(y) > 1e9:
                Y = Y[:k + 1]
                U = U[:k + 1]
                break
            # Advance (first-order hold: the state form of cont2discrete takes the current input).
            xi = Ad @ xi + Bd * v
            if fb is not None:
                xf = fb[0] @ xf + fb[1] * y
            if sp is not None:
                xr = sp[0] @ xr + sp[1] * r
        t = np.arange(len(Y)) * h
        results[kind] = (t, Y, U)
    return results, h


def simulate_delay_free(cl, t_end, npts=40001):
    t = np.linspace(0.0, t_end, npts)  # explicit fine grid (signal.step's default grid is too coarse)
    char = cl['exact_char']
    out = {}
    for kind, ynum, unum in (('setpoint', cl['exact_ry'], pmul(cl['nr'], cl['dg'])),
                             ('disturbance', cl['exact_dy'], -pmul(cl['nc'], cl['ng']))):
        _, y, _ = signal.lsim((ynum, char), np.ones_like(t), t)
        if len(trim(unum)) <= len(char):
            _, u, _ = signal.lsim((unum, char), np.ones_like(t), t)
        else:
            u = None
        out[kind] = (t, y, u)
    return out


def first_reach(t, y, level, sign):
    s = sign * (y - level)
    if s[0] >= 0:
        return float(t[0])
    idx = np.nonzero(s >= 0)[0]
    if len(idx) == 0:
        return None
    k = idx[0] - 1
    return float(t[k] + (t[k + 1] - t[k]) * (0 - s[k]) / (s[k + 1] - s[k]))


def refine_peak(t, y, k):
    if 0 < k < len(y) - 1:
        t0, t1, t2 = t[k - 1:k + 2]
        y0, y1, y2 = y[k - 1:k + 2]
        denom = (y0 - 2 * y1 + y2)
        if denom != 0:
            off = 0.5 * (y0 - y2) / denom
            if abs(off) <= 1:
                return float(y1 - 0.25 * (y0 - y2) * off), float(t1 + off * (t1 - t0))
    return float(y[k]), float(t[k])


def last_exit(t, y, level, half):
    out = np.abs(y - level) > half
    idx = np.nonzero(out)[0]
    if len(idx) == 0:
        return 0.0
    k = idx[-1]
    if k == len(y) - 1:
        return None
    bound = level + half if y[k] > level else level - half
    return float(t[k] + (t[k + 1] - t[k]) * (bound - y[k]) / (y[k + 1] - y[k]))


def step_metrics(t, y, u, final, band):
    e = 1.0 - y
    m = {
        'iae': float(np.trapz(np.abs(e), t)),
        'ise': float(np.trapz(e * e, t)),
        'itae': float(np.trapz(t * np.abs(e), t)),
        'finalValue': final,
        'steadyStateError': 1.0 - final,
    }
    if u is not None:
        k = int(np.argmax(np.abs(u)))
        m['peakMv'] = float(u[k])
    sign = 1.0 if final > 0 else -1.0
    t10 = first_reach(t, y, 0.1 * final, sign)
    t90 = first_reach(t, y, 0.9 * final, sign)
    m['riseTime'] = None if (t10 is None or t90 is None) else t90 - t10
    k = int(np.argmax(sign * y))
    pv, pt = refine_peak(t, y, k)
    m['peak'], m['peakTime'] = pv, pt
    m['overshootPercent'] = max(0.0, 100.0 * (sign * pv - abs(final)) / abs(final))
    m['undershootPercent'] = max(0.0, -100.0 * float(np.min(sign * y)) / abs(final))
    m['settlingTime'] = last_exit(t, y, final, band * abs(final))
    return m


def disturbance_metrics(t, y, u, final):
    k = int(np.argmax(np.abs(y)))
    m = {'iae': float(np.trapz(np.abs(y), t)), 'finalValue': final}
    pv, pt = refine_peak(t, y if y[k] >= 0 else -y, k)
    m['peak'] = pv if y[k] >= 0 else -pv
    m['peakTime'] = pt
    if u is not None:
        m['peakMv'] = float(u[int(np.argmax(np.abs(u)))])
    return m


# ---------------------------------------------------------------- frequency domain

def loop_value(cl, w):
    s = 1j * np.asarray(w)
    return np.polyval(cl['loop_num'], s) / np.polyval(cl['loop_den'], s) * np.exp(-s * cl['theta'])


def margins(cl, grid_points=40000):
    rts = [abs(z) for z in np.concatenate([np.roots(cl['loop_num']), np.roots(cl['loop_den'])]) if abs(z) > 0]
    corners = rts + ([1.0 / cl['theta']] if cl['theta'] > 0 else [])
    if not corners:
        corners = [1.0]
    wlo = min(corners) * 1e-3
    whi = 100.0 * max(rts) if rts else 100.0 * max(corners)
    if cl['theta'] > 0:
        whi = max(whi, 10.0 / cl['theta'])
    w = np.logspace(np.log10(wlo), np.log10(whi), grid_points)
    s = 1j * w
    rat = np.polyval(cl['loop_num'], s) / np.polyval(cl['loop_den'], s)
    ph = np.unwrap(np.angle(rat)) - w * cl['theta']
    lm = np.log(np.abs(rat))

    def phase_at(x, i):
        v = np.polyval(cl['loop_num'], 1j * x) / np.polyval(cl['loop_den'], 1j * x)
        return ph[i] + w[i] * cl['theta'] + np.angle(v / rat[i]) - x * cl['theta']

    def logmag(x):
        v = np.polyval(cl['loop_num'], 1j * x) / np.polyval(cl['loop_den'], 1j * x)
        return float(np.log(np.abs(v)))

    gains, phases = [], []
    for i in range(len(w) - 1):
        if (lm[i] > 0) != (lm[i + 1] > 0):
            x = optimize.brentq(logmag, w[i], w[i + 1], xtol=1e-15, rtol=1e-15)
            pm = math.degrees(math.remainder(phase_at(x, i) + math.pi, 2 * math.pi))
            gains.append((x, pm))
        u0, u1 = (ph[i] + math.pi) / (2 * math.pi), (ph[i + 1] + math.pi) / (2 * math.pi)
        for k in range(int(math.floor(min(u0, u1))) + 1, int(math.floor(max(u0, u1))) + 1):
            target = 2 * math.pi * k - math.pi
            x = optimize.brentq(lambda x: phase_at(x, i) - target, w[i], w[i + 1], xtol=1e-15, rtol=1e-15)
            phases.append((x, 1.0 / math.exp(logmag(x))))
    out = {}
    if phases:
        x, gm = min(phases, key=lambda p: abs(math.log(p[1])))
        out.update(gainMargin=gm, phaseCrossover=x)
        out['phaseCrossingsBelow'] = [{'w': p[0], 'gainMargin': p[1]} for p in sorted(phases)[:3]]
    else:
        out.update(gainMargin=None, phaseCrossover=None, phaseCrossingsBelow=[])
    if gains:
        x, pm = min(gains, key=lambda g: abs(g[1]))
        out.update(phaseMargin=pm, gainCrossover=x)
        pos = [math.radians(g[1]) / g[0] for g in gains]
        out['delayMargin'] = min(pos) if all(p > 0 for p in pos) else None
    else:
        out.update(phaseMargin=None, gainCrossover=None, delayMargin=None)
    dist = np.abs(1 + loop_value(cl, w))
    i = int(np.argmin(dist))
    lo, hi = np.log(w[max(0, i - 1)]), np.log(w[min(len(w) - 1, i + 1)])
    res = optimize.minimize_scalar(lambda x: float(np.abs(1 + loop_value(cl, np.exp(x)))), bounds=(lo, hi), method='bounded',
                                   options={'xatol': 1e-12})
    out['ms'] = 1.0 / float(res.fun)
    out['msFrequency'] = float(np.exp(res.x))
    if len(cl['loop_den']) > len(cl['loop_num']) and res.fun > 1.0:
        # |S(jw)| -> 1 as w -> infinity for a strictly proper loop: the supremum is 1, not attained.
        out['ms'] = 1.0
        out['msFrequency'] = None
    return out


# ---------------------------------------------------------------- cases (invented)

def fopdt(k, tau, theta):
    return {'num': [k], 'den': [tau, 1.0], 'delay': theta}


def lags(taus, k=1.0, theta=0.0, num=None):
    den = np.array([1.0])
    for t in taus:
        den = np.polymul(den, [t, 1.0])
    return {'num': list(num) if num is not None else [k], 'den': [float(c) for c in den], 'delay': theta}


CASES = [
    ('first-order-pi-ideal', {'num': [2.0], 'den': [5.0, 1.0]}, {'type': 'PI', 'kp': 1.5, 'ti': 4.0}),
    ('second-order-pid-filtered', lags([1.0, 2.0]), {'type': 'PID', 'kp': 3.0, 'ti': 2.5, 'td': 0.4, 'n': 10}),
    ('second-order-pid-ideal-derivative', lags([1.0, 2.0]), {'type': 'PID', 'kp': 3.0, 'ti': 2.5, 'td': 0.4}),
    ('third-order-pid-series-filtered', lags([1.0, 1.0, 1.0]), {'type': 'PID', 'form': 'series', 'kp': 1.2, 'ti': 2.2, 'td': 0.6, 'n': 8}),
    ('third-order-pid-parallel-filtered', lags([1.0, 1.0, 1.0]), {'type': 'PID', 'form': 'parallel', 'kp': 1.5, 'ki': 0.6, 'kd': 0.9, 'n': 12}),
    ('third-order-pd-series', lags([1.0, 1.0, 1.0]), {'type': 'PD', 'form': 'series', 'kp': 2.0, 'td': 0.5, 'n': 10}),
    ('fourth-order-p', lags([1.0, 0.5, 0.25, 0.125]), {'type': 'P', 'kp': 2.0}),
    ('rhp-zero-pi', {'num': [-0.5, 1.0], 'den': [2.0, 3.0, 1.0]}, {'type': 'PI', 'kp': 0.8, 'ti': 2.0}),
    ('lightly-damped-pid', {'num': [1.0], 'den': [1.0, 0.2, 1.0]}, {'type': 'PID', 'kp': 0.5, 'ti': 2.0, 'td': 0.5, 'n': 10}),
    ('integrating-pd', {'num': [1.0], 'den': [2.0, 1.0, 0.0]}, {'type': 'PD', 'kp': 1.0, 'td': 0.8, 'n': 10}),
    ('integrating-pi-type2', {'num': [0.5], 'den': [1.0, 1.0, 0.0]}, {'type': 'PI', 'kp': 0.3, 'ti': 10.0}),
    ('unstable-high-gain-p', lags([1.0, 1.0, 1.0]), {'type': 'P', 'kp': 10.0}),
    ('open-loop-unstable-pid', {'num': [1.0], 'den': [1.0, 1.5, -1.0]}, {'type': 'PID', 'kp': 5.0, 'ti': 2.0, 'td': 0.3, 'n': 10}),
    ('fifth-order-with-zero-pid-parallel', {'num': [1.0, 2.0], 'den': [float(c) for c in np.polymul(np.polymul([1.0, 2.0, 1.0], [1.0, 3.0]), np.polymul([0.5, 1.0], [0.2, 1.0]))]},
     {'type': 'PID', 'form': 'parallel', 'kp': 2.0, 'ki': 1.5, 'kd': 0.5, 'n': 10}),
    ('sixth-order-pi', lags([0.5] * 6), {'type': 'PI', 'kp': 0.6, 'ti': 2.5}),
    ('weights-pid-filtered', lags([1.0, 2.0]), {'type': 'PID', 'kp': 3.0, 'ti': 2.5, 'td': 0.4, 'n': 10, 'b': 0.5, 'c': 0.5}),
    ('biproper-plant-pi', {'num': [0.5, 1.0], 'den': [2.0, 1.0]}, {'type': 'PI', 'kp': 0.9, 'ti': 1.5}),
    ('type1-plant-p-standard-second-order', {'num': [4.0], 'den': [1.0, 2.0, 0.0]}, {'type': 'P', 'kp': 1.0}),
    ('lightly-damped-pd', {'num': [1.0], 'den': [1.0, 0.4, 4.0]}, {'type': 'PD', 'kp': 2.0, 'td': 0.3, 'n': 20}),
    ('negative-gain-pi', {'num': [-2.0], 'den': [3.0, 1.0]}, {'type': 'PI', 'kp': -0.8, 'ti': 3.0}),
    ('ideal-pid-derivative-on-error', {'num': [1.0], 'den': [1.0, 6.0, 5.0, 0.0]}, {'type': 'PID', 'kp': 18.0, 'ti': 1.405, 'td': 0.35124, 'c': 1.0}),
    ('p-weight-b', lags([2.0, 1.0]), {'type': 'PI', 'kp': 2.0, 'ti': 3.0, 'b': 0.0}),
    ('pi-parallel', lags([3.0, 0.5], k=2.0), {'type': 'PI', 'form': 'parallel', 'kp': 1.1, 'ki': 0.4}),
    ('pd-ideal-derivative', lags([2.0, 1.0, 0.5]), {'type': 'PD', 'kp': 1.5, 'td': 0.6}),
    ('pid-parallel-ideal-derivative', lags([2.0, 1.0, 0.5]), {'type': 'PID', 'form': 'parallel', 'kp': 1.5, 'ki': 0.5, 'kd': 0.8}),
    # With dead time.
    ('fopdt-pi-simc', fopdt(1.2, 4.0, 0.8), {'type': 'PI', 'kp': 2.0833333333333335, 'ti': 4.0}),
    ('fopdt-pi-amigo', fopdt(1.2, 4.0, 0.8), {'type': 'PI', 'kp': 1.00463, 'ti': 3.10609}),
    ('fopdt-pid-filtered', fopdt(1.2, 4.0, 0.8), {'type': 'PID', 'kp': 2.5, 'ti': 1.6, 'td': 0.4, 'n': 10}),
    ('fopdt-pid-ideal-derivative', fopdt(1.2, 4.0, 0.8), {'type': 'PID', 'kp': 2.5, 'ti': 1.6, 'td': 0.4}),
    ('sopdt-pid-series', lags([3.0, 1.0], theta=0.5), {'type': 'PID', 'form': 'series', 'kp': 2.0, 'ti': 3.0, 'td': 1.0, 'n': 10}),
    ('sopdt-pid-parallel', lags([3.0, 1.0], theta=0.5), {'type': 'PID', 'form': 'parallel', 'kp': 2.5, 'ki': 0.7, 'kd': 1.5, 'n': 10}),
    ('ipdt-pi-simc', {'num': [0.5], 'den': [1.0, 0.0], 'delay': 2.0}, {'type': 'PI', 'kp': 0.5, 'ti': 16.0}),
    ('ipdt-pid-filtered', {'num': [0.5], 'den': [1.0, 0.0], 'delay': 2.0}, {'type': 'PID', 'kp': 0.45, 'ti': 16.0, 'td': 1.0, 'n': 10}),
    ('underdamped-sopdt-pi', {'num': [2.0 * 2.25], 'den': [1.0, 0.9, 2.25], 'delay': 0.3}, {'type': 'PI', 'kp': 0.2, 'ti': 1.0}),
    ('delay-dominant-pi', fopdt(1.0, 1.0, 5.0), {'type': 'PI', 'kp': 0.2, 'ti': 1.5}),
    ('fopdt-unstable-p', fopdt(1.2, 4.0, 0.8), {'type': 'P', 'kp': 8.0}),
    ('rhp-zero-delay-pi', {'num': [-1.0, 1.0], 'den': [3.0, 4.0, 1.0], 'delay': 0.5}, {'type': 'PI', 'kp': 0.4, 'ti': 3.0}),
    ('fourth-order-delay-pid-filtered', lags([1.0, 0.8, 0.5, 0.3], theta=0.4), {'type': 'PID', 'kp': 1.8, 'ti': 2.4, 'td': 0.6, 'n': 10}),
    ('fifth-order-delay-pi', lags([2.0, 1.0, 0.5, 0.5, 0.2], k=1.5, theta=0.7), {'type': 'PI', 'kp': 0.5, 'ti': 3.0}),
    ('sixth-order-delay-p', lags([1.0, 0.8, 0.6, 0.4, 0.3, 0.2], k=0.8, theta=0.3), {'type': 'P', 'kp': 1.5}),
    ('fopdt-weights-pid', fopdt(1.2, 4.0, 0.8), {'type': 'PID', 'kp': 2.5, 'ti': 1.6, 'td': 0.4, 'n': 10, 'b': 0.6, 'c': 1.0}),
    ('integrating-delay-pd', {'num': [1.0], 'den': [1.0, 1.0, 0.0], 'delay': 0.2}, {'type': 'PD', 'kp': 0.8, 'td': 0.5, 'n': 10}),
    ('biproper-delay-pi', {'num': [0.5, 1.0], 'den': [2.0, 1.0], 'delay': 0.5}, {'type': 'PI', 'kp': 0.5, 'ti': 2.0}),
    ('small-delay-pi', fopdt(1.0, 10.0, 0.05), {'type': 'PI', 'kp': 5.0, 'ti': 8.0}),
    ('sixth-order-zeros-delay-pid', {'num': [float(c) for c in np.polymul([1.0, 1.0], [0.5, 1.0])], 'den': lags([3.0, 2.0, 1.0, 1.0, 0.5, 0.5])['den'], 'delay': 1.0},
     {'type': 'PID', 'kp': 1.0, 'ti': 4.0, 'td': 1.0, 'n': 8}),
    ('fopdt-ideal-derivative-on-error', fopdt(1.0, 3.0, 0.5), {'type': 'PID', 'kp': 2.0, 'ti': 2.0, 'td': 0.3, 'c': 1.0}),
    ('lightly-damped-delay-pi', {'num': [1.0], 'den': [1.0, 0.3, 1.0], 'delay': 0.2}, {'type': 'PI', 'kp': 0.15, 'ti': 1.0}),
    ('ipdt-p', {'num': [0.2], 'den': [1.0, 0.0], 'delay': 1.0}, {'type': 'P', 'kp': 2.0}),
    ('fopdt-pi-series', fopdt(0.8, 6.0, 1.5), {'type': 'PI', 'form': 'series', 'kp': 1.6, 'ti': 5.0}),
    ('fopdt-pd-parallel', fopdt(2.0, 5.0, 0.6), {'type': 'PD', 'form': 'parallel', 'kp': 1.2, 'kd': 1.0, 'n': 10}),
    ('sopdt-pid-series-ideal-derivative', lags([4.0, 1.5], k=0.7, theta=0.6), {'type': 'PID', 'form': 'series', 'kp': 1.5, 'ti': 4.0, 'td': 1.0}),
]


def end_time(poles, theta, stable):
    re = np.real(poles)
    if stable:
        return float(theta + 8.0 / np.min(-re))
    return float(theta + 6.0 / max(np.max(re), 1e-3))


def main():
    pade_order = 5
    cases = []
    for name, plant, ctrl in CASES:
        plant = {'num': [float(c) for c in plant['num']], 'den': [float(c) for c in plant['den']], 'delay': float(plant.get('delay', 0.0))}
        case = {'name': name, 'plant': plant, 'controller': ctrl}
        cl = closed_loop(case, pade_order)
        poles = np.roots(cl['char'])
        zeros = np.roots(cl['ry']) if len(cl['ry']) > 1 else np.array([])
        stable = bool(np.all(np.real(poles) < -1e-10 * np.abs(poles)))
        if cl['theta'] > 0 and len(cl['loop_num']) == len(cl['loop_den']) and abs(cl['loop_num'][0] / cl['loop_den'][0]) >= 1:
            stable = False
        t_end = end_time(poles, cl['theta'], stable)
        lead = cl['char'][0]
        expected = {
            'tEnd': t_end,
            'closedLoop': {'num': list(cl['ry'] / lead), 'den': list(cl['char'] / lead), 'poles': complex_list(poles), 'zeros': complex_list(zeros), 'stable': stable},
        }
        final = float(np.polyval(cl['exact_ry'], 0) / np.polyval(cl['exact_char'], 0))
        dfinal = float(np.polyval(cl['exact_dy'], 0) / np.polyval(cl['exact_char'], 0))
        if stable:
            if cl['theta'] > 0:
                res, h = simulate_delay(cl, case, t_end)
                expected['simulationStep'] = h
            else:
                res = simulate_delay_free(cl, t_end)
            t, y, u = res['setpoint']
            ideal_impulse = cl['terms']['D'] != 0 and cl['terms']['tf'] == 0 and ctrl.get('c', 0.0) != 0
            m = step_metrics(t, y, None if ideal_impulse else u, final, 0.02)
            if ideal_impulse:
                m['peakMv'] = None
            expected['stepInfo'] = m
            td, yd, ud = res['disturbance']
            expected['disturbance'] = disturbance_metrics(td, yd, ud, dfinal)
            probe = np.linspace(0, t_end, 41)
            expected['samples'] = {
                't': list(probe),
                'y': list(np.interp(probe, t, y)),
                # MV of the set-point test (omitted with an impulse), PV and MV of the load test.
                'u': None if ideal_impulse else list(np.interp(probe, t, u)),
                'yd': list(np.interp(probe, td, yd)),
                'ud': list(np.interp(probe, td, ud)),
            }
        expected['margins'] = margins(cl)
        case['expected'] = expected
        cases.append(case)
        print(f"{name:40s} stable={stable} tEnd={t_end:.4g}")
    meta = {
        'generator': 'tests/reference/generate_analysis_fixtures.py',
        'scipy': scipy.__version__,
        'numpy': np.__version__,
        'padeOrder': pade_order,
        'settlingBand': 0.02,
    }
    os.makedirs(os.path.dirname(OUT), exist_ok=True)
    with open(OUT, 'w') as f:
        json.dump({'meta': meta, 'cases': cases}, f, indent=1)
    print('wrote', OUT, len(cases), 'cases')


if __name__ == '__main__':
    main()
