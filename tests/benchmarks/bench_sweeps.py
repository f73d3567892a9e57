"""Sweeps on dask (tubefuncs.sweeps): overhead, process scaling, memory.

    python tests/benchmarks/bench_sweeps.py [--points 1000000] [--repeat 7]
                                            [--slow-points N] [--no-memory]

Measured side by side in one run (the machine is shared: each time is the best
of ``--repeat`` runs, the two sides interleaved):

1. closed form, 10^6 points (a 1000 x 1000 grid of frequency and beam voltage):
   ``run_sweep`` in memory (inputs generated, domains checked, the result
   table built) on the local threaded scheduler and serially, against one bare
   numpy call of the same physics function on ready-made input arrays;
   target: API / bare <= 1.3.
2. a large-signal sweep (TUBE_OUTPUT_POWER when the catalogue has it, else the
   slowest catalogue function available: TUBE_SMALL_SIGNAL_GAIN with a cavity
   table drawn per tube, one worksheet call per point) on the local
   multiprocessing scheduler with 2 worker processes against 1 (process
   start-up included, as a user meets it); target: speed-up >= 1.7 (the
   machine has 2 cores, shared).
3. memory: peak RSS (``ru_maxrss``) of a sweep written to a folder at 10^5
   and 10^6 points, each in its own child process.

Figures are printed, not asserted.
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402

CAVITIES = [[0.000, 3.000e9, 95, 3200, 150, 0.011],
            [0.060, 2.975e9, 100, 600, None, 0.010],
            [0.120, 3.018e9, 100, 600, None, 0.010],
            [0.185, 3.037e9, 105, 2500, None, 0.010],
            [0.275, 3.050e9, 110, 3000, None, 0.010],
            [0.350, 3.000e9, 90, 3500, 30, 0.013]]   # the invented demo klystron


def grid_raw(function, fixed, steps):
    return {"sweep": {"mode": "grid"}, "results": {"y": {"function": function}},
            "fixed": fixed,
            "grid": {"frequency": {"from": "2.9 GHz", "to": "3.1 GHz", "steps": steps},
                     "voltage": {"from": "60 kV", "to": "120 kV", "steps": steps}}}


def _best_pair(fa, fb, repeat):
    ta, tb = [], []
    for _ in range(repeat):
        t = time.perf_counter()
        fa()
        ta.append(time.perf_counter() - t)
        t = time.perf_counter()
        fb()
        tb.append(time.perf_counter() - t)
    return min(ta), min(tb)


def closed_form(points: int, repeat: int) -> None:
    import tubefuncs
    from tubefuncs.sweeps import build_study, run_sweep

    steps = int(round(points ** 0.5))
    f = np.repeat(np.linspace(2.9e9, 3.1e9, steps), steps)
    v = np.tile(np.linspace(60e3, 120e3, steps), steps)
    cases = [
        ("TUBE_TRANSIT_ANGLE", {"length": "12 mm"},
         lambda f, v: tubefuncs.transit_angle(f, 12e-3, v)),
        ("TUBE_GAP_COUPLING", {"gap_length": "10 mm", "beam_radius": "4 mm",
                               "tunnel_radius": "6 mm"},
         lambda f, v: tubefuncs.gap_coupling(f, 10e-3, v, 4e-3, 6e-3)),
    ]
    print(f"1. closed form, {steps * steps:,} points, best of {repeat} (target API/bare <= 1.3)")
    for name, fixed, kernel in cases:
        def bare(kernel=kernel):
            return kernel(f, v)

        study = build_study(grid_raw(name, fixed, steps))
        got = run_sweep(study, scheduler="sync", summary=False).table.column("y").to_numpy()
        same = np.array_equal(got, bare())
        for sched in ("threads", "sync"):
            def api(study=study, sched=sched):
                run_sweep(study, scheduler=sched, summary=False)

            t_api, t_bare = _best_pair(api, bare, repeat)
            print(f"   {name:<20} {sched:<8} API {t_api * 1e3:7.1f} ms   bare numpy "
                  f"{t_bare * 1e3:7.1f} ms   ratio {t_api / t_bare:5.2f}   "
                  f"(identical values: {same})")

        def bare_with_inputs(kernel=kernel):
            kernel(np.repeat(np.linspace(2.9e9, 3.1e9, steps), steps),
                   np.tile(np.linspace(60e3, 120e3, steps), steps))

        def api_threads(study=study):
            run_sweep(study, scheduler="threads", summary=False)

        t_api, t_bare = _best_pair(api_threads, bare_with_inputs, repeat)
        print(f"   {name:<20} (bare numpy building its input grid too: {t_bare * 1e3:6.1f} ms; "
              f"API threads {t_api * 1e3:6.1f} ms; ratio {t_api / t_bare:5.2f})")


def slow_study(points: int):
    from tubefuncs.catalogue import lookup
    from tubefuncs.sweeps import build_study

    fixed = {"frequency": "3.0 GHz", "beam_radius": "4 mm", "tunnel_radius": "6 mm",
             "cavities": CAVITIES}
    tol = {"voltage": {"nominal": "90 kV", "normal": "0.3 kV"},
           "current": {"nominal": "27 A", "uniform": "0.2 A"},
           "cavities.frequency": {"normal": "1 MHz"}}
    if lookup("TUBE_OUTPUT_POWER") is not None:
        name = "TUBE_OUTPUT_POWER"
        fixed["drive_power"] = "1 W"
    else:
        name = "TUBE_SMALL_SIGNAL_GAIN"
    raw = {"sweep": {"mode": "sample", "points": points, "seed": 5},
           "results": {"y": {"function": name}}, "fixed": fixed, "tolerance": tol}
    return name, build_study(raw)


def processes(points: int | None, repeat: int) -> None:
    from tubefuncs.sweeps import run_sweep

    name, probe = slow_study(20)
    t = time.perf_counter()
    run_sweep(probe, scheduler="sync", summary=False)
    per_point = (time.perf_counter() - t) / 20
    if points is None:
        points = max(40, int(round(12.0 / per_point)))      # about 12 s serial
    name, study = slow_study(points)
    print(f"2. {name}, {points:,} tubes ({per_point * 1e3:.2f} ms a point serially), "
          f"{study.n_chunks} chunks, local processes (target 2 vs 1 >= 1.7)")
    t1, t2 = _best_pair(lambda: run_sweep(study, scheduler="processes", workers=1),
                        lambda: run_sweep(study, scheduler="processes", workers=2),
                        max(1, repeat // 3))
    a = run_sweep(study, scheduler="processes", workers=2, summary=False).table
    b = run_sweep(study, scheduler="sync", summary=False).table
    print(f"   local scheduler (pool start-up included): 1 process {t1:6.2f} s   "
          f"2 processes {t2:6.2f} s   speed-up {t1 / t2:4.2f}   (rows equal a serial run: "
          f"{a.equals(b)}; cores {os.cpu_count()}, load {os.getloadavg()[0]:.1f})")
    from distributed import Client, LocalCluster

    times = {}
    for n in (1, 2):
        with LocalCluster(n_workers=n, threads_per_worker=1, processes=True,
                          host="127.0.0.1", dashboard_address="127.0.0.1:0") as lc, Client(lc) as c:
            run_sweep(slow_study(2)[1], scheduler=c)                 # warm the workers
            best = float("inf")
            for _ in range(max(1, repeat // 3)):
                t = time.perf_counter()
                table = run_sweep(study, scheduler=c, summary=False).table
                best = min(best, time.perf_counter() - t)
            times[n] = (best, table.equals(b))
    print(f"   dask.distributed LocalCluster (workers started): 1 worker process "
          f"{times[1][0]:6.2f} s   2 worker processes {times[2][0]:6.2f} s   speed-up "
          f"{times[1][0] / times[2][0]:4.2f}   (rows equal a serial run: "
          f"{times[1][1] and times[2][1]}; load {os.getloadavg()[0]:.1f})")


def _child_memory(points: int, folder: str) -> None:
    from tubefuncs.sweeps import build_study, run_sweep

    steps = int(round(points ** 0.5))
    study = build_study(grid_raw("TUBE_TRANSIT_ANGLE", {"length": "12 mm"}, steps),
                        chunk=20_000)
    import threading

    import psutil

    me = psutil.Process()
    before = me.memory_info().rss / 2**20
    high = [before]
    done = threading.Event()

    def sample():                      # the resident set during the sweep, every 5 ms
        while not done.wait(0.005):
            high[0] = max(high[0], me.memory_info().rss / 2**20)

    sampler = threading.Thread(target=sample)
    sampler.start()
    t = time.perf_counter()
    run_sweep(study, folder, scheduler="threads", xlsx=False)
    seconds = time.perf_counter() - t
    done.set()
    sampler.join()
    print(json.dumps({"points": steps * steps, "rss_before_mb": before,
                      "sweep_high_mb": high[0],
                      "peak_rss_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024,
                      "seconds": seconds}))


def memory() -> None:
    print("3. memory, sweep written to a folder (Parquet + CSV + summary), "
          "each size in its own process")
    for points in (100_000, 1_000_000):
        with tempfile.TemporaryDirectory() as tmp:
            out = subprocess.run([sys.executable, __file__, "--child-memory", str(points),
                                  os.path.join(tmp, "out")], capture_output=True, text=True,
                                 env=dict(os.environ, PYTHONPATH=str(ROOT)), check=True)
            r = json.loads(out.stdout.strip().splitlines()[-1])
            print(f"   {r['points']:>9,} points: peak RSS (ru_maxrss) {r['peak_rss_mb']:5.0f} MB; "
                  f"resident set before the sweep {r['rss_before_mb']:4.0f} MB, highest during "
                  f"it {r['sweep_high_mb']:4.0f} MB; {r['seconds']:5.1f} s")


def run(points: int = 1_000_000, repeat: int = 7, slow_points=None, with_memory=True) -> None:
    closed_form(points, repeat)
    processes(slow_points, repeat)
    if with_memory:
        memory()


def main(argv=None) -> int:
    p = argparse.ArgumentParser()
    p.add_argument("--points", type=int, default=1_000_000)
    p.add_argument("--repeat", type=int, default=7)
    p.add_argument("--slow-points", type=int, default=None)
    p.add_argument("--no-memory", action="store_true")
    p.add_argument("--child-memory", nargs=2, metavar=("POINTS", "FOLDER"))
    args = p.parse_args(argv)
    if args.child_memory:
        _child_memory(int(args.child_memory[0]), args.child_memory[1])
        return 0
    run(args.points, args.repeat, args.slow_points, not args.no_memory)
    return 0


if __name__ == "__main__":
    sys.exit(main())
