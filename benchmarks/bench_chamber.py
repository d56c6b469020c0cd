"""Benchmark of the thrust-chamber design (``perfchain chamber``): CPU time per design and per station.

Run: ``python benchmarks/bench_chamber.py [--rounds 3]``. Prints what it measured; asserts
nothing about time. Times are CPU time of this process (``time.process_time``: the machine is
shared, wall time says more about the neighbours).

- Cold: the first design in a fresh process (product species, compiled kernels from cache,
  transport data read).
- Warm: LOX/RP-1 at 70 bar, CR 4, area ratio 12, 50 kN, 20 / 60 / 120 stations (best of the
  rounds), split into the point (finite chamber, general path), the stations' gas states and
  their transport properties.
"""

from __future__ import annotations

import argparse
import cProfile
import pstats
import time

from perfchain.performance.chamber_design import chamber_design
from perfchain.propellants.mixture import make_propellant

ARGS = dict(area_ratio=12.0, contraction_ratio=4.0, characteristic_length=1.1, thrust=5e4)


def _design(points):
    return chamber_design(make_propellant("LOX", "RP-1", 2.6), 7e6, points=points, **ARGS)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--rounds", type=int, default=3)
    n_rounds = ap.parse_args().rounds
    t = time.process_time()
    _design(20)
    print(f"cold first design (20 stations): {time.process_time() - t:.2f} s CPU")
    for points in (20, 60, 120):
        best = min(_timed(points) for _ in range(n_rounds))
        print(f"warm design, {points:3d} stations: {best:.3f} s CPU ({best / points * 1e3:.1f} ms per station "
              f"including the point), best of {n_rounds}")
    prof = cProfile.Profile()
    prof.enable()
    _design(60)
    prof.disable()
    stats = pstats.Stats(prof)
    total = sum(v[3] for k, v in stats.stats.items() if k[2] == "chamber_design")
    for label, name in (("point (finite chamber)", "performance_of"), ("gas states", "contour_states"),
                        ("transport", "gas_transport"), ("finite chamber again", "finite_area_chamber")):
        cum = sum(v[3] for k, v in stats.stats.items() if k[2] == name)
        print(f"  60 stations, {label:22s} {cum:.3f} s of {total:.3f} s (profiled)")


def _timed(points):
    t = time.process_time()
    _design(points)
    return time.process_time() - t


if __name__ == "__main__":
    main()
