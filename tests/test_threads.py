"""Solving in threads gives the serial numbers, bit for bit (issue 12).

A Dask worker runs several threads by default. Cantera phases and the systems built on them
were cached per process, so threads equilibrated one phase at once and rows a serial run
solves came back failed ("element balance violated ... after the gas solve") or a few ulps
off. Each thread now has its own (perfchain.thermo.gas.per_thread_cache); these tests solve
the same points in four threads at once and compare with the serial results.
"""

from __future__ import annotations

import random
from concurrent.futures import ThreadPoolExecutor

import pytest

from perfchain.errors import PerfchainError
from perfchain.performance.chain import performance

# Fuel-rich frozen points go through the general path on Cantera (the shared phases that
# broke); the rest through the batch solver, for a mix of both in every thread.
POINTS = [dict(oxidizer=ox, fuel=fu, mixture_ratio=mr, chamber_pressure=3e6, area_ratio=eps, flow=flow)
          for ox, fu, mrs in (("LOX", "RP-1", (0.8, 1.0, 1.3, 2.6)), ("LOX", "LCH4", (1.0, 1.5, 3.4)),
                              ("N2O4", "MMH", (1.6, 2.2)))
          for mr in mrs for flow in ("shifting", "frozen", "frozen-throat") for eps in (8.0, 40.0)]


def solve(kw):
    try:
        r = performance(**kw)
    except PerfchainError as exc:
        return ("failed", str(exc))
    return ("ok", r.isp_vacuum, r.isp_ambient, r.cstar, r.chamber.temperature, r.exit.pressure, r.exit.mach)


def test_four_threads_solving_the_same_points_equal_the_serial_run():
    serial = [solve(p) for p in POINTS]
    assert sum(s[0] == "ok" for s in serial) > len(POINTS) // 2
    order = list(range(len(POINTS))) * 3          # every point solved three times, in shuffled order
    random.Random(12).shuffle(order)
    with ThreadPoolExecutor(4) as pool:
        threaded = list(pool.map(lambda n: solve(POINTS[n]), order))
    wrong = [(POINTS[n], serial[n], got) for n, got in zip(order, threaded) if got != serial[n]]
    assert not wrong, wrong[:3]


def test_dask_worker_with_four_threads_equals_the_serial_table():
    distributed = pytest.importorskip("distributed")
    from perfchain.study.sweep import sweep

    grid = dict(mixture_ratio="0.8,1.0,1.3,2.6", chamber_pressure="20 bar,30 bar", area_ratio="8,40",
                flow="shifting,frozen,frozen-throat", ambient_pressure="0 Pa,1 atm", composition_top=2,
                chunk_solves=6)
    serial = sweep("LOX", "RP-1", **grid)
    with distributed.LocalCluster(n_workers=1, threads_per_worker=4, processes=False, protocol="tcp",
                                  host="127.0.0.1", dashboard_address=None) as cluster:
        threaded = sweep("LOX", "RP-1", cluster=cluster.scheduler_address, **grid)
    assert (serial.status == "ok").sum() > len(serial) // 2
    assert threaded.equals(serial)


def test_unit_parsing_and_conditioning_in_eight_threads_equal_the_serial_results():
    """pint and CoolProp fill process-wide caches lazily and promise no thread safety; both are
    used under a lock (perfchain.units.UNITS_LOCK, perfchain.propellants.conditioned.COOLPROP_LOCK).
    Each call runs on a cold cache here, in eight threads at once, and must give the serial value.
    """
    from perfchain.propellants import conditioned as cond
    from perfchain.units import _registry, to_si

    texts = [("pressure", f"{v} {u}") for v in (1, 2.5, 70, 300) for u in ("psi", "MPa", "kgf/cm**2", "inHg")]
    texts += [("temperature", f"{v} {u}") for v in (-40, 0, 20) for u in ("degC", "degF", "degR")]
    fluids = [("N2O", f"{t} K") for t in (250, 260, 270, 280, 290, 300)] + [("LOX", f"{t} K") for t in (66, 70, 80)]

    def work(job):
        kind, item = job
        if kind == "fluid":
            ing = cond.conditioned(*item)
            return ing.enthalpy, ing.density
        return to_si(item[1], item[0], field="x")

    jobs = [("unit", t) for t in texts] + [("fluid", f) for f in fluids]
    serial = [work(j) for j in jobs]
    for _ in range(3):
        _registry.cache_clear()
        for cache in (cond.saturated_liquid, cond._conditioned, cond.liquid_range):
            cache.cache_clear()
        with ThreadPoolExecutor(8) as pool:
            threaded = list(pool.map(work, jobs * 2))
        assert threaded == serial * 2
