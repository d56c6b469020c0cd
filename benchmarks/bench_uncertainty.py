"""Benchmark of uncertainty propagation: 10,000 samples of a shifting design point (ideal and
delivered) and 100,000 vehicle samples, beside the same samples one at a time.

Run: ``python benchmarks/bench_uncertainty.py [--rounds 3] [--general 20]``. Prints what it
measured; asserts nothing about wall time. One core (workers=1), compiled kernels loaded by a
warm-up run first (the one-off compile or cache load and the scipy import are not counted).

Point: LOX/RP-1, 70 bar, area ratio 40, shifting, c* efficiency 0.97, Cf efficiency 0.98, sized
for 100 kN in vacuum; varied: O/F +/- 2 %, chamber pressure +/- 3 %, c* efficiency 0.95..0.98,
Cf efficiency 0.97..0.99 (local sensitivity: 10,000 samples + 9 one-at-a-time rows). The
one-at-a-time figures run a subset of the very same samples (``--general`` of them) through the
general path (:func:`perfchain.performance.general.performance_general`, Cantera, then
:func:`perfchain.performance.delivered.deliver`) and through ``pc.point`` (batch of one), and
EXTRAPOLATE to 10,000. Figures are CPU seconds of this process (one core; the machine is shared,
so the wall clock is printed beside them with the load average).

Vehicle: two stages, first-stage Isp +/- 1 %, second-stage structural ratio 0.08..0.10,
payload +/- 5 %: 100,000 samples (local; and Sobol indices, 100,000 x 5 rows), against
``pc.delta_v`` one vehicle at a time on 2,000 of the samples, EXTRAPOLATED to 100,000.
"""

from __future__ import annotations

import argparse
import os
import time

import perfchain as pc
from perfchain.inputs import point_args
from perfchain.study.uncertainty import point_uncertainty

POINT = dict(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.56, chamber_pressure="70 bar", area_ratio=40,
             cstar_efficiency=0.97, cf_efficiency=0.98, thrust="100 kN")
VARY = {"mixture_ratio": "+/-2%", "chamber_pressure": "+/-3%", "cstar_efficiency": "0.95..0.98",
        "cf_efficiency": "0.97..0.99"}
STAGES = ["isp=300 s, mass=200 t, propellant_fraction=0.9", "isp=345 s, propellant=20 t, structural_ratio=0.09"]
VEHICLE_VARY = {"stage1.isp": "+/-1%", "stage2.structural_ratio": "0.08..0.10", "payload": "+/-5%"}


def cpu_timed(fn):
    """(result, wall seconds, CPU seconds of this process): on a shared machine the CPU time is what one
    core spent, the wall time what the clock showed."""
    c, t = time.process_time(), time.perf_counter()
    out = fn()
    return out, time.perf_counter() - t, time.process_time() - c


def general_one(row):
    """One sample on the general path: Cantera equilibrium per point, then deliver()."""
    from perfchain.performance.delivered import deliver
    from perfchain.performance.general import performance_general
    from perfchain.performance.losses import LossModel
    from perfchain.propellants.mixture import make_propellant

    r = performance_general(make_propellant("LOX", "RP-1", row["mixture_ratio"]), row["chamber_pressure"],
                            area_ratio=40.0)
    return deliver(r, LossModel(cstar_efficiency=row["cstar_efficiency"], cf_efficiency=row["cf_efficiency"]),
                   thrust=1e5)


def point_one(row):
    return pc.point(**{**POINT, "mixture_ratio": row["mixture_ratio"], "chamber_pressure": row["chamber_pressure"],
                       "cstar_efficiency": row["cstar_efficiency"], "cf_efficiency": row["cf_efficiency"]})


def main():
    ap = argparse.ArgumentParser(description=__doc__)
    ap.add_argument("--rounds", type=int, default=3, help="rounds of the batched runs (default 3)")
    ap.add_argument("--general", type=int, default=20, help="samples timed on the general path (default 20)")
    ap.add_argument("--samples", type=int, default=10_000, help="point samples (default 10,000)")
    args = ap.parse_args()
    base = point_args(**POINT)
    point_uncertainty(base, VARY, samples=64, seed=1)        # warm-up: kernels loaded, scipy imported
    pc.delta_v_uncertainty(STAGES, "2 t", vary=VEHICLE_VARY, samples=64)

    batched, cpu = [], []
    for _ in range(args.rounds):
        (_, prop), t, c = cpu_timed(lambda: point_uncertainty(base, VARY, samples=args.samples, seed=0))
        batched.append(t)
        cpu.append(c)
    df = prop.frame()
    sub = df.sample(args.general, random_state=0).to_dict("records")
    _, _, t_gen = cpu_timed(lambda: [general_one(r) for r in sub])
    _, _, t_one = cpu_timed(lambda: [point_one(r) for r in sub])
    n = args.samples
    best = min(cpu)
    print(f"point: {n} samples (+{prop.evaluations - n} one-at-a-time rows), {prop.failed} failed; "
          f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores; CPU seconds of this process")
    print(f"  batched, 1 worker          {best:8.2f} s CPU  (rounds: {', '.join(f'{t:.2f}' for t in cpu)}; wall "
          f"{', '.join(f'{t:.2f}' for t in batched)})  {best / n * 1e3:.3f} ms/sample")
    print(f"  pc.point one at a time     {t_one / len(sub) * n:8.1f} s CPU  (EXTRAPOLATED from {len(sub)} samples:"
          f" {t_one / len(sub) * 1e3:.1f} ms/sample)  ratio {t_one / len(sub) * n / best:.1f}x")
    print(f"  general path one at a time {t_gen / len(sub) * n:8.1f} s CPU  (EXTRAPOLATED from {len(sub)} samples:"
          f" {t_gen / len(sub) * 1e3:.1f} ms/sample)  ratio {t_gen / len(sub) * n / best:.1f}x")
    r = pc.point(**POINT)
    isp = [general_one(x).delivered["isp_vacuum"] for x in sub[:3]]
    got = [row["delivered.isp_vacuum"] for row in sub[:3]]
    print(f"  largest |delivered Isp| difference, batch vs general path on 3 samples: "
          f"{max(abs(a - b) for a, b in zip(isp, got)):.2e} s (nominal {r.delivered['isp_vacuum']:.2f} s)")

    m = 100_000
    for method in ("local", "sobol"):
        times, cpus = [], []
        for _ in range(args.rounds):
            u, t, c = cpu_timed(lambda: pc.delta_v_uncertainty(STAGES, "2 t", vary=VEHICLE_VARY, samples=m,
                                                               sensitivity=method))
            times.append(t)
            cpus.append(c)
        print(f"vehicle: {m} samples, {method:5s} ({u.propagation.evaluations} rows)  {min(cpus):6.3f} s CPU"
              f"  (wall rounds: {', '.join(f'{t:.3f}' for t in times)})")
    rows = u.samples().head(2000).to_dict("records")

    def one(row):
        return pc.delta_v([f"isp={row['stage1.isp']!r} s, mass=200 t, propellant_fraction=0.9",
                           f"isp=345 s, propellant=20 t, structural_ratio={row['stage2.structural_ratio']!r}"],
                          row["payload"])

    _, _, t_v = cpu_timed(lambda: [one(r) for r in rows])
    print(f"  pc.delta_v one at a time  {t_v / len(rows) * m:6.1f} s CPU  (EXTRAPOLATED from {len(rows)} samples)")
    same = all(one(r).total_delta_v == r["total_delta_v"] for r in rows[:20])
    print(f"  same bits as pc.delta_v on 20 samples: {same}")
    print("(figures from one run on this machine; see docs/benchmarks.md)")


if __name__ == "__main__":
    main()
