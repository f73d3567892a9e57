"""Benchmark: the large-signal disk model, one run, figures side by side.

Times `tubefuncs.physics.largesignal.model.solve` (no cache) on the invented
six-cavity S-band tube of the demo station budget (290 kV, 1.75 uperv,
6 mm beam in a 9.5 mm tunnel) at default accuracy:

- one operating point (target <= 0.2 s median on a 2-core machine);
- a 21-point transfer curve solved as one batch (target <= 3x one point);
- the saturation search (TUBE_SATURATED_POWER: three batches);

then prints the agreement figures of the model: low-drive gain against
TUBE_SMALL_SIGNAL_GAIN for 2-, 4- and 6-cavity tubes across +-4 MHz, the
energy balance at and past saturation, convergence with disks and steps, and
Webster's ballistic peak.  Not a unit test: run
``python tests/benchmarks/bench_largesignal.py`` (``PYTHONPATH=.`` from the
repository root).
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

import numpy as np
from scipy import special

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from test_largesignal import I0, V0, A, B, F, demo_table  # noqa: E402

from tubefuncs.physics import gain  # noqa: E402
from tubefuncs.physics.largesignal import Accuracy, model, results  # noqa: E402

TARGET_POINT_S = 0.2
TARGET_CURVE_RATIO = 3.0


def _median_s(fn, repeats):
    fn()  # warm-up
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def run(repeats: int = 7, verbose: bool = True) -> dict:
    table = demo_table(6)
    drives = np.logspace(0.0, 3.0, 21)
    one = _median_s(lambda: model.solve(F, V0, I0, B, A, table, 300.0), repeats)
    curve = _median_s(lambda: model.solve(F, V0, I0, B, A, table, drives), repeats)
    def saturate():
        results._CACHE.clear()  # time the three batches, not the cache
        results.saturation(F, V0, I0, B, A, table)

    sat = _median_s(saturate, max(3, repeats // 2))
    out = {"point_s": one, "curve_s": curve, "curve_ratio": curve / one,
           "saturation_s": sat, "saturation_ratio": sat / one}

    # agreement with the small-signal model at low drive
    worst = {}
    for n in (2, 4, 6):
        t = demo_table(n)
        f = F + np.linspace(-4e6, 4e6, 9)
        ss = gain.small_signal_gain(f, V0, I0, B, A, t)
        p = 1e-3 * 10 ** (-(ss.max() - 50) / 10)
        r = model.solve(f, V0, I0, B, A, t, p)
        worst[n] = float(np.max(np.abs(10 * np.log10(r.load_power[-1] / p) - ss)))
    out["small_signal_db"] = worst

    # energy balance
    p = np.array([100.0, 400.0, 1000.0])
    r = model.solve(F, V0, I0, B, A, table, p)
    bal = (r.kinetic_loss + r.input_power - r.wall_power.sum(0) - r.load_power.sum(0))
    out["energy_rel"] = float(np.max(np.abs(bal)) / (V0 * I0))

    # convergence at the saturation drive
    s = results.saturation(F, V0, I0, B, A, table)
    base = float(s.power)
    fine = float(model.solve(F, V0, I0, B, A, table, s.drive,
                             accuracy=Accuracy(disks=96, harmonics=24, gap_steps=64.0,
                                               drift_steps_plasma=96.0)).load_power[-1])
    out["p_sat_MW"] = base / 1e6
    out["eff_sat"] = base / (V0 * I0)
    out["gain_sat_db"] = float(10 * np.log10(base / s.drive))
    out["convergence_rel"] = abs(base - fine) / fine

    # Webster's ballistic peak, 2 I0 max J1 = 1.1638 I0
    tab = np.array([[0.0, F, 50, 3000, 150, 0.018], [5.0, F, 1e-9, 3000, 20, 0.018]])
    r = model.solve(F, V0, 1e-6, B, A, tab, 1.3e3, accuracy=Accuracy(drift_steps_wave=0.25),
                    record=True)
    out["webster_peak"] = float(np.nanmax(r.harmonic_current[:, 0]) / 1e-6)
    out["webster_exact"] = float(2 * special.j1(1.8411837813406593))

    if verbose:
        print("large-signal disk model, invented 6-cavity S-band tube, default accuracy")
        print(f"  one operating point        {one * 1e3:8.1f} ms  (target <= "
              f"{TARGET_POINT_S * 1e3:.0f} ms: {'met' if one <= TARGET_POINT_S else 'MISSED'})")
        print(f"  21-point transfer curve    {curve * 1e3:8.1f} ms  = {curve / one:5.2f} x one "
              f"point (target <= {TARGET_CURVE_RATIO:g}x: "
              f"{'met' if curve / one <= TARGET_CURVE_RATIO else 'MISSED'})")
        print(f"  saturation search          {sat * 1e3:8.1f} ms  = {sat / one:5.2f} x one point")
        print(f"  saturated power {out['p_sat_MW']:.2f} MW, efficiency {out['eff_sat']:.3f}, "
              f"gain at saturation {out['gain_sat_db']:.1f} dB")
        print("  low-drive gain - TUBE_SMALL_SIGNAL_GAIN, worst over 9 frequencies +-4 MHz: "
              + ", ".join(f"{n} cav {d:.3f} dB" for n, d in worst.items()))
        print(f"  energy balance (at/past saturation) {out['energy_rel']:.2e} of V0 I0")
        print("  P_sat change 48 -> 96 disks, 16 -> 24 harmonics, steps x2: "
              f"{out['convergence_rel']:.2e}")
        print(f"  Webster peak |I1|/I0 {out['webster_peak']:.4f} (2 max J1 = "
              f"{out['webster_exact']:.4f})")
    return out


if __name__ == "__main__":
    run()
