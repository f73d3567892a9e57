"""Benchmark: small-signal gain sweep, 201 frequencies x 6 cavities.

Times `tubefuncs.physics.gain.small_signal_gain` on the invented 6-cavity table
of ``workbooks/examples/klystron_cavities.csv`` (90 kV, 27 A, 4 mm beam in a
6 mm tunnel), 201 frequencies from 2.95 to 3.05 GHz, one call per sweep.
Target: <= 5 ms per sweep (median of repeats).  Also prints the split between
the beam (reduction factor, plasma frequency) and the cavity chain, and the
ratio to a per-frequency Python loop over the same function, to show what the
vectorisation buys, and the cost of the cold-test option (resonance="cold") and of
the validity limits (`gain.cavity_limits`) as ratios to the plain sweep.
Not a unit test: run ``python tests/benchmarks/bench_gain.py``
with the package installed (or ``PYTHONPATH=.`` from the repository root).
"""

from __future__ import annotations

import statistics
import sys
import time

import numpy as np

from tubefuncs.physics import gain, plasma

TARGET_MS = 5.0
N_FREQ = 201
BEAM = (90e3, 27.0, 4e-3, 6e-3)  # V0 [V], I0 [A], beam radius [m], tunnel radius [m]
# position [m], f0 [Hz], R/Q [ohm], Q0, Qext (NaN = idle), gap [m]: same as the example CSV
CAVITIES = np.array([
    [0.000, 3.000e9, 95.0, 3200.0, 150.0, 0.011],
    [0.060, 2.975e9, 100.0, 600.0, np.nan, 0.010],
    [0.120, 3.018e9, 100.0, 600.0, np.nan, 0.010],
    [0.185, 3.037e9, 105.0, 2500.0, np.nan, 0.010],
    [0.275, 3.050e9, 110.0, 3000.0, np.nan, 0.010],
    [0.350, 3.000e9, 90.0, 3500.0, 30.0, 0.013],
])


def _median_ms(fn, repeats):
    fn()  # warm-up
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return 1e3 * statistics.median(times)


def run(repeats: int = 200, verbose: bool = True) -> dict:
    """Time the sweep; return the figures (ms) and whether the target is met."""
    f = np.linspace(2.95e9, 3.05e9, N_FREQ)
    sweep_ms = _median_ms(lambda: gain.small_signal_gain(f, *BEAM, CAVITIES), repeats)
    beam_ms = _median_ms(lambda: plasma.reduced_plasma_freq(f, BEAM[1], BEAM[0], *BEAM[2:]),
                         repeats)
    subset = f[::20]
    loop_ms = _median_ms(lambda: [gain.small_signal_gain(x, *BEAM, CAVITIES) for x in subset],
                         max(3, repeats // 20)) * N_FREQ / subset.size
    cold_ms = _median_ms(lambda: gain.small_signal_gain(f, *BEAM, CAVITIES, resonance="cold"),
                         max(3, repeats // 40))
    limits_ms = _median_ms(lambda: gain.cavity_limits(f, *BEAM, CAVITIES), max(3, repeats // 4))
    result = {"sweep_ms": sweep_ms, "beam_ms": beam_ms, "loop_ms": loop_ms,
              "cold_ms": cold_ms, "limits_ms": limits_ms, "ok": sweep_ms <= TARGET_MS}
    if verbose:
        print(f"small_signal_gain, {N_FREQ} frequencies x {len(CAVITIES)} cavities")
        print(f"  one vectorised sweep     {sweep_ms:8.3f} ms  (target <= {TARGET_MS:g} ms: "
              f"{'met' if result['ok'] else 'NOT met'})")
        print(f"    of which beam (f_q)    {beam_ms:8.3f} ms")
        print(f"  per-frequency loop       {loop_ms:8.3f} ms  (scaled from {subset.size} "
              f"points; {loop_ms / sweep_ms:.0f}x slower)")
        print(f"  cold-test frequencies    {cold_ms:8.3f} ms  ({cold_ms / sweep_ms:.0f}x the hot "
              "sweep: the beam susceptance's Hilbert quadrature)")
        print(f"  validity limits alone    {limits_ms:8.3f} ms  ({limits_ms / sweep_ms:.2f}x)")
    return result


if __name__ == "__main__":
    sys.exit(0 if run()["ok"] else 1)
