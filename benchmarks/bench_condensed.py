"""Benchmark of condensed products on the batch solver: an aluminized-composite sweep against the
plain multiphase path, and the liquid-bipropellant fixed sweep beside it, in one run.

Run: ``python benchmarks/bench_condensed.py [--rounds 3]``. Prints what it measured; asserts
nothing about wall time. Composite sweep: AP / Al / HTPB with HTPB 14 % and Al 14, 16, 18, 20 %
(AP the rest) x 5 chamber pressures (30-150 bar) x 30 area ratios (4-40): 600 points, shifting,
solved by :func:`perfchain.performance.batched.performance_batch` in chunks of 256 (the unit a
sweep hands the batch solver; row flattening not included). The plain path is Cantera's own
multiphase equilibrium (tests/plain_reference.py), optimum expansion to 1 atm, on a few points.
"""

from __future__ import annotations

import argparse
import os
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tests"))

import numpy as np

from perfchain.constants import G0
from perfchain.performance.batched import performance_batch
from perfchain.propellants.formulation import make_formulation
from perfchain.study.sweep import sweep
from plain_reference import plain_multiphase_point

AL = (0.14, 0.16, 0.18, 0.20)
PC = (30e5, 50e5, 70e5, 100e5, 150e5)
EPS = tuple(np.linspace(4.0, 40.0, 30))


def composite(al):
    return make_formulation({"AP": round(0.86 - al, 6), "Al": al, "HTPB": 0.14})


def timed(fn):
    t = time.perf_counter()
    out = fn()
    return out, time.perf_counter() - t


def run_composite(props, chunk=256):
    points = [(props[a], pc, eps) for a in AL for pc in PC for eps in EPS]
    out = []
    for k in range(0, len(points), chunk):
        out += performance_batch(points[k:k + chunk], exit_key="area_ratio")
    return out


def main():
    ap = argparse.ArgumentParser(description=__doc__)
    ap.add_argument("--rounds", type=int, default=3, help="rounds (default 3)")
    ap.add_argument("--plain", type=int, default=4, help="plain multiphase points per round (default 4)")
    args = ap.parse_args()
    props = {a: composite(a) for a in AL}
    _, t0 = timed(lambda: (run_composite(props),
                           sweep("LOX", "RP-1", mixture_ratio="2.0", chamber_pressure="20 bar",
                                 area_ratio="10", progress=False)))
    print(f"start-up (first sweep of a fresh process, compiles and caches): {t0:.2f} s")
    res = run_composite(props)
    n = len(res)
    bad = [r for r in res if isinstance(r, Exception)]
    # which rows the batch solved itself: the same points, one at a time, count hand-backs
    from perfchain.thermo import batch
    from perfchain.performance.batched import _template
    tab = batch.tables_for(_template(frozenset(props[AL[0]].elements)))
    handed = 0
    for a in AL:
        b = [[props[a].elements.get(e, 0.0) for e in tab.element_names]] * len(PC)
        src = np.repeat(np.arange(len(PC)), len(EPS))
        nz = batch.nozzle(tab, b, np.full(len(PC), props[a].enthalpy), np.array(PC), src,
                          area_ratio=np.tile(np.array(EPS), len(PC)))
        handed += int((~nz.ok).sum())
    picks = [(AL[k % len(AL)], PC[(2 * k) % len(PC)]) for k in range(args.plain)]

    def run_plain():
        worst = 0.0
        for al, pc in picks:
            ref = plain_multiphase_point(props[al], pc, 101325.0)
            got = performance_batch([(props[al], pc, 101325.0)], exit_key="exit_pressure")[0]
            worst = max(worst, abs(got.exit.velocity / G0 / ref["isp_optimum"] - 1) * 100)
        return worst

    def run_liquid():
        return sweep("LOX", "RP-1", mixture_ratio=",".join(f"{1.6 + 0.1 * i:.1f}" for i in range(21)),
                     chamber_pressure="20 bar,50 bar,100 bar,200 bar", area_ratio="10,40,100", progress=False)

    rounds = []
    for _ in range(args.rounds):
        t_c = min(timed(lambda: run_composite(props))[1] for _ in range(3))
        worst, t_p = timed(run_plain)
        df, _ = timed(run_liquid)
        t_l = min(timed(run_liquid)[1] for _ in range(3))
        rounds.append((1e3 * t_c / n, 1e3 * t_p / len(picks), 1e3 * t_l / len(df), worst))
    print(f"aluminized composite: {n} points, {n - len(bad)} ok, {handed} handed back to the general "
          f"path (melting plateau)")
    for c, p, l_, w in rounds:
        print(f"  round: composite {c:.3f} ms/point | plain multiphase {p:.0f} ms/point = {p / c:.0f}x; "
              f"liquid fixed sweep {l_:.3f} ms/point; largest Isp difference vs plain {w:.2e} %")
    best = min(r[0] for r in rounds), min(r[2] for r in rounds)
    print(f"fastest: composite {best[0]:.3f} ms/point (target <= 1 ms), liquid {best[1]:.3f} ms/point "
          f"(target <= 0.2 ms); Isp agreement target 0.02 %")


if __name__ == "__main__":
    main()
