#!/usr/bin/python3
"""The analysis benchmark's SciPy counterpart: the same work as one `analyze()` call of
scripts/bench-analysis.ts, done with Debian's SciPy (closed-loop polynomials with a Padé
approximant and numpy.roots; a 2000-step delay-line simulation with cont2discrete; step and
disturbance metrics; a 400-point frequency response with brentq-refined crossings and Ms), and a
40-case robustness envelope. Prints one JSON line with median times in milliseconds.

Run: /usr/bin/python3 tests/reference/bench_scipy.py  (called by scripts/bench-analysis.ts)
"""
import json
import os
import statistics
import sys
import time

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from generate_analysis_fixtures import (closed_loop, disturbance_metrics, lags, margins,  # noqa: E402
                                        simulate_delay, step_metrics)

PLANT = lags([1.0, 0.8, 0.5, 0.3], theta=0.4)
CONTROLLER = {'type': 'PID', 'kp': 1.8, 'ti': 2.4, 'td': 0.6, 'n': 10}
T_END = 22.0


def one_analysis(plant, controller):
    case = {'plant': plant, 'controller': controller}
    cl = closed_loop(case, 5)
    poles = np.roots(cl['char'])
    np.roots(cl['ry'])
    res, _ = simulate_delay(cl, case, T_END, steps=2000)
    t, y, u = res['setpoint']
    step_metrics(t, y, u, 1.0, 0.02)
    td, yd, ud = res['disturbance']
    disturbance_metrics(td, yd, ud, 0.0)
    margins(cl, grid_points=400)
    return poles


def median_ms(fn, repeat):
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append((time.perf_counter() - t0) * 1e3)
    return statistics.median(times)


def main():
    plant = {'num': [float(c) for c in PLANT['num']], 'den': [float(c) for c in PLANT['den']], 'delay': PLANT['delay']}
    one_analysis(plant, CONTROLLER)  # warm-up
    single = median_ms(lambda: one_analysis(plant, CONTROLLER), 15)

    def envelope():
        for g in (0.8, 0.9, 1.0, 1.1, 1.2):
            for d in (1.0, 1.5):
                for tc in (0.8, 0.9333, 1.0667, 1.2):
                    n = len(plant['den']) - 1
                    den = [c * tc ** (n - i) for i, c in enumerate(plant['den'])]
                    one_analysis({'num': [plant['num'][0] * g], 'den': den, 'delay': plant['delay'] * d}, CONTROLLER)

    env = median_ms(envelope, 1)
    print(json.dumps({'analysisMs': single, 'envelope40Ms': env}))


if __name__ == '__main__':
    main()
