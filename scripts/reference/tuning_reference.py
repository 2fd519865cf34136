#!/usr/bin/python3
"""Reference values for the tuning-rule part of the engine (conversions, ultimate data, tuning
rules, half rule, design by pole placement), computed with Debian's NumPy/SciPy
(/usr/bin/python3, SciPy 1.10.1) independently of the TypeScript code.

Run:  /usr/bin/python3 scripts/reference/tuning_reference.py
Writes src/lib/control/fixtures/tuning-reference.json.

Methods used here differ from the TypeScript ones where possible:
- ultimate data: dense frequency grid + numpy.unwrap to find the first −180° crossing, then
  scipy.optimize.brentq on Im G(jω) = 0; delay-free plants are also checked with numpy.roots
  of den + Ku·num (closed-loop poles on the imaginary axis);
- tuning rules: the published formulas, typed again from the cited papers' tables;
- half rule: applied to time constants taken from numpy.roots of the expanded polynomials;
- pole placement: coefficient matching solved as a linear system with numpy.linalg.solve, and
  the closed-loop poles from numpy.roots of the characteristic polynomial.
"""
import json
import math
import os

import numpy as np
import scipy
from scipy.optimize import brentq

OUT = os.path.join(os.path.dirname(__file__), '..', '..', 'src', 'lib', 'control', 'fixtures', 'tuning-reference.json')


def polyval_jw(p, w):
    return np.polyval(np.asarray(p, dtype=complex), 1j * w)


def ultimate(num, den, delay):
    """First crossing of the negative real axis by s0·G(jω); s0 = low-frequency sign."""
    num = np.trim_zeros(np.asarray(num, float), 'f')
    den = np.trim_zeros(np.asarray(den, float), 'f')
    nz = len(num) - len(np.trim_zeros(num, 'b'))
    dz = len(den) - len(np.trim_zeros(den, 'b'))
    s0 = np.sign(np.trim_zeros(num, 'b')[-1] / np.trim_zeros(den, 'b')[-1])

    def g(w):
        return s0 * polyval_jw(num, w) / polyval_jw(den, w) * np.exp(-1j * w * delay)

    w = np.logspace(-5, 4, 400001)
    ph = np.unwrap(np.angle(g(w)))
    asym = -(dz - nz) * math.pi / 2
    ph = ph + 2 * math.pi * round((asym - ph[0]) / (2 * math.pi))
    k = np.floor((ph + math.pi) / (2 * math.pi))
    idx = np.nonzero(np.diff(k))[0]
    if len(idx) == 0:
        return None
    i = idx[0]
    wu = brentq(lambda x: g(x).imag, w[i], w[i + 1], xtol=1e-15, rtol=4 * np.finfo(float).eps)
    gu = g(wu)
    assert gu.real < 0
    ku = s0 / abs(gu)
    return {'ku': ku, 'wu': wu, 'pu': 2 * math.pi / wu}


def fopdt_tf(k, tau, theta):
    return [k], [tau, 1.0], theta


def sopdt_tf(k, t1, t2, theta):
    return [k], list(np.polymul([t1, 1.0], [t2, 1.0])), theta


def ipdt_tf(kv, theta):
    return [kv], [1.0, 0.0], theta


# ---------------------------------------------------------------- conversions (sheet 3.1)
def series_to_ideal(kc, ti, td):
    return kc * (1 + td / ti), ti + td, ti * td / (ti + td)


w2_kp, w2_ti, w2_td = series_to_ideal(2 / 1.54, 2.0, 1.2)
conversions = {
    'w2Ideal': {'kp': w2_kp, 'ti': w2_ti, 'td': w2_td},
    'w2Parallel': {'kp': w2_kp, 'ki': w2_kp / w2_ti, 'kd': w2_kp * w2_td},
}

# ---------------------------------------------------------------- ultimate data
ult = {}
ult['fopdt'] = ultimate(*fopdt_tf(1.2, 4.0, 0.8))
ult['fopdtNegative'] = ultimate(*fopdt_tf(-0.6, 12.0, 3.0))
ult['sopdt'] = ultimate(*sopdt_tf(2.0, 5.0, 2.0, 1.0))
ult['sopdtEqual'] = ultimate(*sopdt_tf(0.8, 3.0, 3.0, 0.25))
ult['ipdt'] = ultimate(*ipdt_tf(0.5, 2.0))
# Ogata's ZN example plant 1/(s(s+1)(s+5)), delay-free
w7_den = list(np.polymul(np.polymul([1.0, 0.0], [1.0, 1.0]), [1.0, 5.0]))
ult['ogata'] = ultimate([1.0], w7_den, 0.0)
cl = np.polyadd(w7_den, [ult['ogata']['ku']])
ult['ogataClosedLoopPoles'] = sorted([[float(r.real), float(r.imag)] for r in np.roots(cl)])
# rational plants with delay: lead/lag and an underdamped pair
rat1_num = [0.5, 1.0]
rat1_den = list(np.polymul(np.polymul([2.0, 1.0], [1.0, 1.0]), [0.3, 1.0]))
ult['rationalLead'] = {'num': rat1_num, 'den': rat1_den, 'delay': 0.4, **ultimate(rat1_num, rat1_den, 0.4)}
rat2_num = [1.5]
rat2_den = [1.0, 0.4, 1.0]
ult['rationalUnderdamped'] = {'num': rat2_num, 'den': rat2_den, 'delay': 0.5, **ultimate(rat2_num, rat2_den, 0.5)}

# ---------------------------------------------------------------- tuning rules, FOPDT K=1.2, τ=4, θ=0.8
K, T, L = 1.2, 4.0, 0.8
a = K * L / T
r = L / T
fo = {}
fo['zn-step'] = {'P': [1 / a, None, None], 'PI': [0.9 / a, L / 0.3, None], 'PID': [1.2 / a, 2 * L, 0.5 * L]}
ku, pu = ult['fopdt']['ku'], ult['fopdt']['pu']
fo['zn-ultimate'] = {'P': [0.5 * ku, None, None], 'PI': [0.45 * ku, pu / 1.2, None], 'PID': [0.6 * ku, pu / 2, pu / 8]}
g = T / (K * L)
fo['cohen-coon'] = {
    'P': [g * (1 + r / 3), None, None],
    'PI': [g * (0.9 + r / 12), L * (30 + 3 * r) / (9 + 20 * r), None],
    'PD': [g * (1.25 + r / 6), None, L * (6 - 2 * r) / (22 + 3 * r)],
    'PID': [g * (4 / 3 + r / 4), L * (32 + 6 * r) / (13 + 8 * r), 4 * L / (11 + 2 * r)],
}
fo['chr-setpoint-0'] = {'P': [0.3 / a, None, None], 'PI': [0.35 / a, 1.2 * T, None], 'PID': [0.6 / a, T, 0.5 * L]}
fo['chr-setpoint-20'] = {'P': [0.7 / a, None, None], 'PI': [0.6 / a, T, None], 'PID': [0.95 / a, 1.4 * T, 0.47 * L]}
fo['chr-load-0'] = {'P': [0.3 / a, None, None], 'PI': [0.6 / a, 4 * L, None], 'PID': [0.95 / a, 2.4 * L, 0.42 * L]}
fo['chr-load-20'] = {'P': [0.7 / a, None, None], 'PI': [0.7 / a, 2.3 * L, None], 'PID': [1.2 / a, 2 * L, 0.42 * L]}
lam = 0.8
fo['imc'] = {
    # Rivera et al. 1986 PI row: delay left out of the controller model (Kc K = τ/λ, Ti = τ)
    'PI': [T / (K * lam), T, None],
    'PID': [(2 * T + L) / (K * (2 * lam + L)), T + L / 2, T * L / (2 * T + L)],
}
tc = L
fo['simc'] = {'PI': [T / (K * (tc + L)), min(T, 4 * (tc + L)), None]}
lam_l = T
fo['lambda'] = {
    'PI': [T / (K * (lam_l + L)), T, None],
    'PID': [(2 * T + L) / (K * (2 * lam_l + L)), T + L / 2, T * L / (2 * T + L)],
}
fo['amigo'] = {
    'PI': [0.15 / K + (0.35 - L * T / (L + T) ** 2) * T / (K * L), 0.35 * L + 13 * L * T ** 2 / (T ** 2 + 12 * L * T + 7 * L ** 2), None],
    'PID': [(0.2 + 0.45 * T / L) / K, L * (0.4 * L + 0.8 * T) / (L + 0.1 * T), 0.5 * L * T / (0.3 * L + T)],
}
fo['tyreus-luyben'] = {'PI': [ku / 3.2, 2.2 * pu, None], 'PID': [ku / 2.2, 2.2 * pu, pu / 6.3]}

# IPDT Kv = 0.5, θ = 2
Kv, th = 0.5, 2.0
ip = {}
kui, pui, wui = ult['ipdt']['ku'], ult['ipdt']['pu'], ult['ipdt']['wu']
ip['zn-step'] = {'P': [1 / (Kv * th), None, None], 'PI': [0.9 / (Kv * th), th / 0.3, None], 'PID': [1.2 / (Kv * th), 2 * th, 0.5 * th]}
ip['zn-ultimate'] = {'P': [0.5 * kui, None, None], 'PI': [0.45 * kui, pui / 1.2, None], 'PID': [0.6 * kui, pui / 2, pui / 8]}
ip['simc'] = {'PI': [1 / (Kv * (th + th)), 4 * (th + th), None]}
ip['amigo'] = {'PI': [0.35 / (Kv * th), 13.4 * th, None], 'PID': [0.45 / (Kv * th), 8 * th, 0.5 * th]}
lam_i = 2 * th
ip['lambda'] = {'PI': [(2 * lam_i + th) / (Kv * (lam_i + th) ** 2), 2 * lam_i + th, None]}
ip['tyreus-luyben'] = {'PI': [kui / 3.2, 2.2 * pui, None], 'PID': [0.46 * kui, 2.2 * pui, 1 / wui]}

# SOPDT K = 2, τ1 = 5, τ2 = 2, θ = 1: SIMC PID (series) and half-rule FOPDT (τ = 6, θ = 2)
so = {}
k2, t1, t2, th2 = 2.0, 5.0, 2.0, 1.0
tc2 = th2
so['simc'] = {
    'PIDseries': [t1 / (k2 * (tc2 + th2)), min(t1, 4 * (tc2 + th2)), t2],
    'PIDideal': list(series_to_ideal(t1 / (k2 * (tc2 + th2)), min(t1, 4 * (tc2 + th2)), t2)),
}
tf_, lf_ = t1 + t2 / 2, th2 + t2 / 2
so['halfRuleFopdt'] = {'tau': tf_, 'theta': lf_}
so['zn-step'] = {'PID': [1.2 / (k2 * lf_ / tf_), 2 * lf_, 0.5 * lf_]}
kus, pus = ult['sopdt']['ku'], ult['sopdt']['pu']
so['zn-ultimate'] = {'PID': [0.6 * kus, pus / 2, pus / 8]}

# ---------------------------------------------------------------- half rule (Skogestad 2003)
def half_rule(lags, rhp_zero_tcs, delay, h=0.0):
    lags = sorted(lags, reverse=True)
    extra = delay + sum(rhp_zero_tcs) + h / 2
    fopdt = {'tau': lags[0] + (lags[1] / 2 if len(lags) > 1 else 0.0),
             'theta': extra + (lags[1] / 2 if len(lags) > 1 else 0.0) + sum(lags[2:])}
    sopdt = None
    if len(lags) >= 2:
        sopdt = {'tau1': lags[0], 'tau2': lags[1] + (lags[2] / 2 if len(lags) > 2 else 0.0),
                 'theta': extra + (lags[2] / 2 if len(lags) > 2 else 0.0) + sum(lags[3:])}
    return fopdt, sopdt


def poly_from_time_constants(tcs, sign=1.0):
    p = np.array([1.0])
    for t in tcs:
        p = np.polymul(p, [sign * t, 1.0])
    return p


# W1/W2: (−0.3s+1)(0.08s+1)/((2s+1)(s+1)(0.4s+1)(0.2s+1)(0.05s+1)^3)
e2_num = np.polymul([-0.3, 1.0], [0.08, 1.0])
e2_den = poly_from_time_constants([2.0, 1.0, 0.4, 0.2, 0.05, 0.05, 0.05])
den_roots = np.roots(e2_den)
num_roots = np.roots(e2_num)
lags = sorted([-1 / p.real for p in den_roots], reverse=True)
lhp = [-1 / z.real for z in num_roots if z.real < 0]
rhp = [1 / z.real for z in num_roots if z.real > 0]
# cancel the LHP zero 0.08 against the closest larger lag (0.2): lag 0.2 − 0.08
t0 = lhp[0]
tau0 = min(t for t in lags if t >= t0)
lags.remove(tau0)
lags.append(tau0 - t0)
f1, s1 = half_rule(lags, rhp, 0.0)
reduction = {
    'e2': {'num': list(e2_num), 'den': list(e2_den), 'fopdt': f1, 'sopdt': s1,
           'simcPiKc': f1['tau'] / (2 * f1['theta'])},
}
w3_den = poly_from_time_constants([1.0, 0.2])
reduction['w3'] = {'den': list(w3_den), 'fopdt': half_rule([1.0, 0.2], [], 0.0)[0]}
w4_den = poly_from_time_constants([1.0, 0.2, 0.04, 0.008])
f4, s4 = half_rule([1.0, 0.2, 0.04, 0.008], [], 0.0)
reduction['w4'] = {'den': list(w4_den), 'fopdt': f4, 'sopdt': s4}
w15_lags = [1.5, 0.8, 0.6, 0.3, 0.2]
f15, s15 = half_rule(w15_lags, [], 0.0)
reduction['w15'] = {'den': list(poly_from_time_constants(w15_lags)), 'fopdt': f15, 'sopdt': s15}


# ---------------------------------------------------------------- pole placement
def solve_design(bnum, aden, ctype, zeta, wn, extra=None):
    """Coefficient matching, solved linearly: unknowns (Kc, Ki, Kd[, p]) for the controller
    C(s) = (Kd s² + Kc s + Ki)/s (I present) or Kd s + Kc. Returns ideal Kc, Ti, Td and poles."""
    has_i = ctype in ('PI', 'PID')
    names = {'P': ['kc'], 'PI': ['kc', 'ki'], 'PD': ['kc', 'kd'], 'PID': ['kc', 'ki', 'kd']}[ctype]
    free_p = extra == 'free'
    nunk = len(names) + (1 if free_p else 0)
    base = np.polymul(aden, [1.0, 0.0]) if has_i else np.asarray(aden, float)
    order = len(base) - 1
    target2 = [1.0, 2 * zeta * wn, wn * wn]

    def char_minus_desired(x):
        vals = dict(zip(names, x[:len(names)]))
        cn = np.array([vals.get('kd', 0.0), vals.get('kc', 0.0), vals.get('ki', 0.0)]) if has_i \
            else np.array([vals.get('kd', 0.0), vals.get('kc', 0.0)])
        ch = np.polyadd(base, np.polymul(bnum, cn))
        ch = ch / ch[0] if abs(ch[0]) > 0 else ch
        if order == 1:
            desired = np.array([1.0, extra])  # single pole at −extra
        elif order == 2:
            desired = np.array(target2)
        else:
            p = x[-1] if free_p else extra
            desired = np.polymul(target2, [1.0, p])
        ch = np.concatenate([np.zeros(len(desired) - len(ch)), ch])
        return (ch - desired)[1:]

    # affine map: f(x) = f(0) + J x  (exact: the leading coefficient does not depend on the unknowns here)
    f0 = char_minus_desired(np.zeros(nunk))
    J = np.column_stack([char_minus_desired(np.eye(nunk)[i]) - f0 for i in range(nunk)])
    if J.shape[0] == J.shape[1]:
        x = np.linalg.solve(J, -f0)
    else:  # more equations than unknowns (P control): must be consistent
        x = np.linalg.lstsq(J, -f0, rcond=None)[0]
        assert np.allclose(J @ x + f0, 0, atol=1e-12)
    vals = dict(zip(names, x[:len(names)]))
    kc = vals['kc']
    out = {'kp': kc, 'ti': kc / vals['ki'] if 'ki' in vals else None, 'td': vals['kd'] / kc if 'kd' in vals else None}
    if free_p:
        out['extraPole'] = -x[-1]
    cn = np.array([vals.get('kd', 0.0), kc, vals.get('ki', 0.0)]) if has_i else np.array([vals.get('kd', 0.0), kc])
    ch = np.polyadd(base, np.polymul(bnum, cn))
    out['poles'] = sorted([[float(r.real), float(r.imag)] for r in np.roots(ch)])
    return out


design = {}
# PI on K/(τs+1), K = 2, τ = 5, ζ = 0.7, ωn = 0.8
design['firstOrderPI'] = {'plant': {'k': 2.0, 'tau': 5.0}, 'zeta': 0.7, 'wn': 0.8,
                          **solve_design([2.0], [5.0, 1.0], 'PI', 0.7, 0.8)}
# P on K/(τs+1), K = 2, τ = 5, pole at −4/Ts with Ts = 2
design['firstOrderP'] = {'plant': {'k': 2.0, 'tau': 5.0}, 'settlingTime': 2.0,
                         **solve_design([2.0], [5.0, 1.0], 'P', 1.0, 1.0, extra=4 / 2.0)}
# second-order overdamped K/((τ1 s+1)(τ2 s+1))
so_den = list(np.polymul([4.0, 1.0], [1.0, 1.0]))
design['secondOrderPD'] = {'plant': {'k': 1.0, 'tau': 4.0, 'tau2': 1.0}, 'zeta': 0.6, 'wn': 2.0,
                           **solve_design([1.0], so_den, 'PD', 0.6, 2.0)}
so2_den = list(np.polymul([3.0, 1.0], [0.5, 1.0]))
design['secondOrderPI'] = {'plant': {'k': 1.5, 'tau': 3.0, 'tau2': 0.5}, 'zeta': 0.8, 'wn': 0.5,
                           **solve_design([1.5], so2_den, 'PI', 0.8, 0.5, extra='free')}
so3_den = list(np.polymul([2.0, 1.0], [0.5, 1.0]))
design['secondOrderP'] = {'plant': {'k': 1.0, 'tau': 2.0, 'tau2': 0.5}, 'zeta': 0.5,
                          'wn': (2.5 / 1.0) / (2 * 0.5),
                          **solve_design([1.0], so3_den, 'P', 0.5, 2.5 / (2 * 0.5))}
# standard second order K ωn²/(s² + 2ζ ωn s + ωn²): K = 2, ωn = 1.5, ζ = 0.3; target ζ = 0.7, ωn = 3, extra pole 5ζωn
wp, zp, kp_ = 1.5, 0.3, 2.0
design['standardPID'] = {'plant': {'k': kp_, 'wn': wp, 'zeta': zp}, 'zeta': 0.7, 'wn': 3.0, 'extraPoleFactor': 5,
                         **solve_design([kp_ * wp * wp], [1.0, 2 * zp * wp, wp * wp], 'PID', 0.7, 3.0, extra=5 * 0.7 * 3.0)}
# overshoot ↔ ζ (standard second-order formula)
design['overshoot'] = [{'percent': p, 'zeta': -math.log(p / 100) / math.sqrt(math.pi ** 2 + math.log(p / 100) ** 2)}
                       for p in (5.0, 9.47802, 16.3034, 20.0)]


def clean(o):
    if isinstance(o, dict):
        return {k: clean(v) for k, v in o.items()}
    if isinstance(o, (list, tuple)):
        return [clean(v) for v in o]
    if isinstance(o, (np.floating, float)):
        assert math.isfinite(float(o))
        return float(o)
    return o


result = {
    'generator': 'scripts/reference/tuning_reference.py',
    'numpy': np.__version__,
    'scipy': scipy.__version__,
    'conversions': conversions,
    'ultimate': ult,
    'tuning': {'fopdt': {'plant': {'k': K, 'tau': T, 'theta': L}, 'rules': fo},
               'ipdt': {'plant': {'k': Kv, 'theta': th}, 'rules': ip},
               'sopdt': {'plant': {'k': k2, 'tau': t1, 'tau2': t2, 'theta': th2}, 'rules': so}},
    'reduction': reduction,
    'design': design,
}
os.makedirs(os.path.dirname(OUT), exist_ok=True)
with open(OUT, 'w') as fh:
    json.dump(clean(result), fh, indent=1)
    fh.write('\n')
print('wrote', os.path.normpath(OUT))
