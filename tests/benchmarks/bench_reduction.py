"""Benchmark: vectorised reduction factor against a per-point brentq loop.

Times `tubefuncs.physics.plasma.reduction_factor` on n random beams (one numpy
call) and the same eigenvalue relation solved point by point with
`scipy.optimize.brentq` in a Python loop.  The loop is timed on a subset
(2000 points by default) and scaled to n points; the output says so.  Target:
the vectorised call at least 50 times faster.  Not a unit test: run
``python tests/benchmarks/bench_reduction.py`` from the repository root.
"""

from __future__ import annotations

import math
import time

import numpy as np
from scipy import constants as sc
from scipy import special
from scipy.optimize import brentq

from tubefuncs.physics import plasma

TARGET_SPEEDUP = 50.0
V_REST = sc.m_e * sc.c**2 / sc.e
J01 = float(special.jn_zeros(0, 1)[0])


def random_beams(n, seed=2024):
    """Klystron-like inputs of our own choosing: f, V0, b, a (SI)."""
    rng = np.random.default_rng(seed)
    frequency = 10 ** rng.uniform(math.log10(3e8), math.log10(1.2e10), n)
    voltage = 10 ** rng.uniform(math.log10(5e3), math.log10(6e5), n)
    beam_radius = 10 ** rng.uniform(math.log10(5e-4), math.log10(1.5e-2), n)
    tunnel_radius = beam_radius / rng.uniform(0.3, 1.0, n)
    return frequency, voltage, beam_radius, tunnel_radius


def reduction_one(frequency, voltage, beam_radius, tunnel_radius):
    """The same relation for one point, solved with brentq (scalar scipy.special calls)."""
    t = voltage / V_REST
    x = 2.0 * math.pi * frequency * beam_radius / (sc.c * math.sqrt(t * (t + 2.0)))
    ratio = tunnel_radius / beam_radius
    y = x * ratio
    q = math.exp(-2.0 * x * (ratio - 1.0)) * special.k0e(y) / special.i0e(y)
    num = x * (special.i1e(x) * q + special.k1e(x))
    den = max(special.k0e(x) - special.i0e(x) * q, 0.0)
    if den == 0.0:
        return x / math.hypot(x, J01)
    u = brentq(lambda s: s * special.j1(s) * den - num * special.j0(s), 0.0, J01,
               xtol=1e-14, rtol=1e-13)
    return x / math.hypot(x, u)


def run(n=10**6, loop_points=2000, repeat=3):
    """Time both methods; return a dict of timings, the speed-ups and the agreement.

    Each method is timed ``repeat`` times and the best run kept, in wall-clock time and
    in CPU time of this process.  The headline speed-up uses CPU time, which other
    programs running on the same machine disturb less; both are returned and printed.
    """
    f, v, b, a = random_beams(n)
    plasma.reduction_factor(f[:10], v[:10], b[:10], a[:10])  # warm-up
    vector_wall, vector_cpu = _best(lambda: plasma.reduction_factor(f, v, b, a), repeat)

    m = min(loop_points, n)
    looped = np.empty(m)

    def loop():
        for k in range(m):
            looped[k] = reduction_one(f[k], v[k], b[k], a[k])

    loop_wall, loop_cpu = _best(loop, repeat)
    scale = n / m
    vector_subset = plasma.reduction_factor(f[:m], v[:m], b[:m], a[:m])
    result = {
        "n": n,
        "vectorised_wall_s": vector_wall,
        "vectorised_cpu_s": vector_cpu,
        "loop_points_timed": m,
        "loop_subset_wall_s": loop_wall,
        "loop_subset_cpu_s": loop_cpu,
        "loop_scaled_wall_s": loop_wall * scale,
        "loop_scaled_cpu_s": loop_cpu * scale,
        "speedup": loop_cpu * scale / vector_cpu,
        "speedup_wall": loop_wall * scale / vector_wall,
        "target_speedup": TARGET_SPEEDUP,
        "max_rel_difference": float(np.max(np.abs(vector_subset / looped - 1.0))),
    }
    print(f"reduction_factor, one vectorised call over {n} points (best of {repeat}): "
          f"{vector_cpu:.3f} s CPU, {vector_wall:.3f} s wall "
          f"({vector_cpu / n * 1e9:.0f} ns per point)")
    print(f"brentq loop timed on {m} points (best of {repeat}): {loop_cpu:.3f} s CPU "
          f"({loop_cpu / m * 1e6:.1f} us per point); scaled to {n} points: "
          f"{loop_cpu * scale:.1f} s CPU, {loop_wall * scale:.1f} s wall")
    verdict = "meets" if result["speedup"] >= TARGET_SPEEDUP else "MISSES"
    print(f"speed-up {result['speedup']:.0f}x in CPU time ({verdict} the "
          f"{TARGET_SPEEDUP:.0f}x target), {result['speedup_wall']:.0f}x in wall time; "
          f"largest relative difference on the timed subset: "
          f"{result['max_rel_difference']:.1e}")
    return result


def _best(func, repeat):
    """Best (wall, CPU) seconds over ``repeat`` calls of ``func``."""
    wall, cpu = math.inf, math.inf
    for _ in range(repeat):
        w0, c0 = time.perf_counter(), time.process_time()
        func()
        wall = min(wall, time.perf_counter() - w0)
        cpu = min(cpu, time.process_time() - c0)
    return wall, cpu


if __name__ == "__main__":
    run()
