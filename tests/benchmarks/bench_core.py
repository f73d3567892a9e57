"""Core speed figures, measured side by side in one run (not a unit test).

1. Closed-form physics functions over 10^6 points against a bare numpy
   expression of the same formula (target <= 1.5x).
2. A scalar worksheet call with unit text (target <= 30 us median).

Run: ``python tests/benchmarks/bench_core.py``.
"""

from __future__ import annotations

import statistics
import sys
import time

import numpy as np
from scipy import constants as sc
from scipy import special

import tubefuncs
from tubefuncs.worksheet import call

REST = sc.m_e * sc.c**2 / sc.e
P01 = special.jn_zeros(0, 1)[0]
SIGMA = 58e6


def best_of(fn, repeat=7):
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def bare_velocity(v):
    t = v / REST
    return sc.c * np.sqrt(t * (t + 2.0)) / (t + 1.0)


def cases(n):
    rng = np.random.default_rng(1)
    volts = rng.uniform(1e3, 5e5, n)
    freq = rng.uniform(1e8, 2e10, n)
    length = rng.uniform(1e-3, 5e-2, n)
    radius = rng.uniform(5e-3, 0.2, n)
    current = rng.uniform(0.1, 300.0, n)
    xb = rng.uniform(0.0, 3.0, n)
    width = 72.136e-3
    f_wg = rng.uniform(2.2e9, 3.9e9, n)
    dist = rng.uniform(1e3, 4e7, n)
    dia = rng.uniform(0.5, 20.0, n)

    def bare_wg(f):
        fc = sc.c / (2 * width)
        b = 34.036e-3
        rs = np.sqrt(np.pi * f * sc.mu_0 / SIGMA)
        r = (fc / f) ** 2
        alpha = rs / (b * np.sqrt(sc.mu_0 / sc.epsilon_0) * np.sqrt(1 - r)) * (
            1 + 2 * b / width * r)
        return alpha * 1.0 * 20 / np.log(10)

    return [
        ("velocity", lambda: tubefuncs.velocity(volts), lambda: bare_velocity(volts)),
        ("perveance", lambda: tubefuncs.perveance(current, volts),
         lambda: current / volts**1.5),
        ("transit_angle", lambda: tubefuncs.transit_angle(freq, length, volts),
         lambda: 2 * np.pi * freq * length / bare_velocity(volts)),
        ("gap_coupling (gridded)", lambda: tubefuncs.gap_coupling(freq, length, volts),
         lambda: np.sinc(freq * length / bare_velocity(volts))),
        ("pillbox_freq", lambda: tubefuncs.pillbox_freq(radius),
         lambda: P01 * sc.c / (2 * np.pi * radius)),
        ("skin_depth", lambda: tubefuncs.skin_depth(freq),
         lambda: 1 / np.sqrt(np.pi * freq * sc.mu_0 * SIGMA)),
        ("harmonic_current", lambda: tubefuncs.harmonic_current(current, xb),
         lambda: 2 * current * np.abs(special.j1(xb))),
        ("fspl", lambda: tubefuncs.fspl(freq, dist),
         lambda: 20 * np.log10(4 * np.pi * dist * freq / sc.c)),
        ("dish_gain", lambda: tubefuncs.dish_gain(freq, dia),
         lambda: 10 * np.log10(0.6 * (np.pi * dia * freq / sc.c) ** 2)),
        ("waveguide_loss", lambda: tubefuncs.waveguide_loss(f_wg, width, 34.036e-3, 1.0),
         lambda: bare_wg(f_wg)),
    ]


def closed_form(n=10**6):
    rows = []
    for label, ours, bare in cases(n):
        np.testing.assert_allclose(ours(), bare(), rtol=1e-9, atol=1e-12)  # same numbers
        t_ours, t_bare = best_of(ours), best_of(bare)
        rows.append((label, t_ours, t_bare, t_ours / t_bare))
    return rows


def scalar_call(repeat=2000):
    args = ("2.998 GHz", "12 mm", "80 kV")
    call("TUBE_TRANSIT_ANGLE", *args)
    samples = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        call("TUBE_TRANSIT_ANGLE", *args)
        samples.append(time.perf_counter() - t0)
    return statistics.median(samples)


def run(n=10**6):
    print(f"Closed-form functions over {n:,} points: ours vs bare numpy (target <= 1.5x)")
    rows = closed_form(n)
    for label, t_ours, t_bare, ratio in rows:
        print(f"  {label:24s} {t_ours * 1e3:8.2f} ms  {t_bare * 1e3:8.2f} ms  {ratio:5.2f}x")
    worst = max(r[3] for r in rows)
    print(f"  worst ratio {worst:.2f}x")
    med = scalar_call()
    print(f"Scalar worksheet call =TUBE_TRANSIT_ANGLE(\"2.998 GHz\", \"12 mm\", \"80 kV\"): "
          f"median {med * 1e6:.1f} us (target <= 30 us)")
    return {"closed_form": rows, "worst_ratio": worst, "scalar_call_s": med}


if __name__ == "__main__":
    run(int(sys.argv[1]) if len(sys.argv) > 1 else 10**6)
