"""Benchmark of ``perfchain.sweep``: ms per point against the plain reference path, scaling, memory.

Run: ``python benchmarks/bench_sweep.py [--large]``. Prints what it measured; it asserts nothing
about wall time. Fixed sweep: LOX/RP-1, shifting, 21 mixture ratios 1.6..3.6 x 4 chamber pressures
x 3 area ratios (252 points), ambient 1 atm.
"""

from __future__ import annotations

import argparse
import os
import resource
import tempfile
import time
import tracemalloc

from perfchain.mixture import make_propellant
from perfchain.reference import plain_shifting_point
from perfchain.sweep import make_grid, sweep, sweep_to_file

MR = ",".join(f"{1.6 + 0.1 * i:.1f}" for i in range(21))
PC = "20 bar,50 bar,100 bar,200 bar"
EPS = "10,40,100"


def timed(fn):
    t = time.perf_counter()
    out = fn()
    return out, time.perf_counter() - t


def main():
    ap = argparse.ArgumentParser(description=__doc__)
    ap.add_argument("--large", action="store_true", help="also a streamed 100,000-point sweep (2 workers)")
    ap.add_argument("--subsample", type=int, default=12, help="reference points (default 12)")
    args = ap.parse_args()

    # one-time start-up (imports, NASA data, unit registry) measured apart from the per-point cost
    _, t0 = timed(lambda: sweep("LOX", "RP-1", mixture_ratio="2.0", chamber_pressure="20 bar",
                                area_ratio="10", progress=False))
    print(f"start-up (first point of a fresh process, paid once): {t0:.2f} s")
    df, t1 = timed(lambda: sweep("LOX", "RP-1", mixture_ratio=MR, chamber_pressure=PC, area_ratio=EPS,
                                 progress=False))
    n = len(df)
    ms_sweep = 1e3 * t1 / n
    print(f"fixed sweep: {n} points, 1 worker: {t1:.2f} s, {ms_sweep:.1f} ms/point, "
          f"{(df.status == 'ok').sum()} ok")

    step = max(1, n // args.subsample)
    picks = df.iloc[::step].head(args.subsample)
    t = time.perf_counter()
    worst = 0.0
    for _, row in picks.iterrows():
        prop = make_propellant("LOX", "RP-1", row.mixture_ratio)
        ref = plain_shifting_point(prop, row.chamber_pressure, area_ratio=row.area_ratio,
                                   ambient_pressure=row.ambient_pressure)
        for key in ("isp_vacuum", "isp_ambient"):
            worst = max(worst, abs(row[key] / ref[key] - 1) * 100)
    ms_ref = 1e3 * (time.perf_counter() - t) / len(picks)
    print(f"plain reference path: {len(picks)} points, {ms_ref:.1f} ms/point; "
          f"speed-up of the sweep {ms_ref / ms_sweep:.1f}x (issue target >= 300x, <= 1 ms/point)")
    print(f"largest Isp difference sweep vs reference on those points: {worst:.2e} %")

    # linearity: the same mixture ratios (same mix of cheap and graphite-forming points), twice the
    # chamber pressures
    pcs4 = "20 bar,50 bar,100 bar,200 bar"
    pcs8 = pcs4 + ",30 bar,70 bar,140 bar,250 bar"
    _, ta = timed(lambda: sweep("LOX", "RP-1", mixture_ratio=MR, chamber_pressure=pcs4, area_ratio=EPS,
                                workers=1, progress=False))
    _, tb = timed(lambda: sweep("LOX", "RP-1", mixture_ratio=MR, chamber_pressure=pcs8, area_ratio=EPS,
                                workers=1, progress=False))
    print(f"linearity: N=252 points {ta:.2f} s, 2N=504 points {tb:.2f} s, ratio {tb / ta:.2f} (2.00 is linear)")

    # workers: a sweep long enough (~10 s on one worker) that pool start-up is not the measurement
    big = ",".join(f"{1.6 + 0.025 * i:.3f}" for i in range(81))
    _, s1 = timed(lambda: sweep("LOX", "RP-1", mixture_ratio=big, chamber_pressure=pcs4, area_ratio=EPS,
                                workers=1, progress=False))
    _, s2 = timed(lambda: sweep("LOX", "RP-1", mixture_ratio=big, chamber_pressure=pcs4, area_ratio=EPS,
                                workers=2, progress=False))
    print(f"workers: {81 * 12} points, 1 worker {s1:.2f} s, 2 workers {s2:.2f} s, speed-up {s1 / s2:.2f}x "
          f"(machine has {os.cpu_count()} cores; includes pool start-up)")

    if args.large:
        # 10 x 10 x 10 solves, each with 100 ambient pressures taken from the thrust equation
        grid = make_grid("LOX", "RP-1", mixture_ratio=",".join(f"{2.0 + 0.1 * i:.1f}" for i in range(10)),
                         chamber_pressure=",".join(f"{10 + 20 * i} bar" for i in range(10)),
                         area_ratio=",".join(str(5 + 10 * i) for i in range(10)),
                         ambient_pressure=",".join(f"{i * 1000} Pa" for i in range(100)), confirm=True)
        with tempfile.TemporaryDirectory() as tmp:
            tracemalloc.start()
            _, tl = timed(lambda: sweep_to_file(os.path.join(tmp, "large.parquet"), grid, workers=2,
                                                progress=False, top=0))
            _, peak = tracemalloc.get_traced_memory()
            tracemalloc.stop()
            size = os.path.getsize(os.path.join(tmp, "large.parquet"))
        own = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
        kids = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024
        print(f"large streamed sweep: {grid.size} points (1000 solves), 2 workers, {tl:.1f} s, "
              f"{1e3 * tl / grid.size:.2f} ms/point, file {size / 1e6:.1f} MB; peak Python heap in the "
              f"parent {peak / 1e6:.1f} MB (tracemalloc), max RSS parent {own:.0f} MB, largest worker {kids:.0f} MB")


if __name__ == "__main__":
    main()
