"""The batch solver (perfchain.thermo.batch): rows kept apart, and checked against outside references.

References: Cantera's own gas equilibrium solver (a general-purpose library, independent of our
Newton method) for gas-only chamber states; the plain path of plain_reference (fresh Cantera
equilibria at every state, a scalar search for the throat) for Isp; the general path of
perfchain.thermo.equilibrium (our other, Cantera-based implementation) where graphite condenses.
"""

import json
import math
import os
import subprocess
import sys

import numpy as np
import pytest

from perfchain.thermo import batch, jit
from perfchain.thermo.equilibrium import EquilibriumSystem
from perfchain.propellants.mixture import make_propellant
from perfchain.performance.chain import performance_batch, performance_general as _general, performance_of
from plain_reference import plain_shifting_point

# fuel-rich LOX/RP-1 (graphite in the exit), near-optimum LOX/RP-1, lean, and a chamber shared
# by several exits: the mix a sweep chunk sees
POINTS = [("LOX", "RP-1", mr, pc, eps) for mr in (1.5, 2.0, 2.6, 3.4) for pc in (20e5, 150e5)
          for eps in (8.0, 60.0)]


def _batch_of(points):
    return performance_batch([(make_propellant(o, f, mr), pc, eps) for o, f, mr, pc, eps in points])


def test_a_point_in_a_batch_is_the_point_alone():
    # The issue asks that sweep rows equal single points exactly: the batch keeps rows apart,
    # so every field, to the last bit, is what the point gets in a batch of one.
    together = _batch_of(POINTS)
    shuffled = _batch_of(POINTS[::-1])[::-1]
    for spec, a, b in zip(POINTS, together, shuffled):
        o, f, mr, pc, eps = spec
        alone = performance_of(make_propellant(o, f, mr), pc, area_ratio=eps)
        assert a.to_dict() == alone.to_dict() == b.to_dict(), spec


def test_graphite_forms_in_fuel_rich_exits_and_matches_the_general_path():
    # Two independent implementations of the condensed phase: the batch Newton method and the
    # general path (Cantera gas equilibria with an outer solve for the graphite amount).
    p = make_propellant("LOX", "RP-1", 1.5)
    fast = performance_of(p, 20e5, area_ratio=60.0)
    slow = _general(p, 20e5, area_ratio=60.0)
    assert fast.exit.condensed_mass_fraction > 0.01 and "C(gr)" in fast.exit.composition
    assert fast.exit.condensed_mass_fraction == pytest.approx(slow.exit.condensed_mass_fraction, rel=1e-7)
    for key in ("isp_vacuum", "cstar", "cf_vacuum"):
        assert getattr(fast, key) == pytest.approx(getattr(slow, key), rel=1e-10), key
    assert fast.exit.temperature == pytest.approx(slow.exit.temperature, rel=1e-9)


@pytest.mark.parametrize("pair, mr", [(("LOX", "LH2"), 6.0), (("N2O4", "MMH"), 2.2), (("LOX", "LCH4"), 3.4)])
def test_chamber_equals_cantera_equilibrium(pair, mr):
    # Cantera's HP equilibrium over the same NASA species (gas only at these states).
    import cantera as ct

    prop = make_propellant(*pair, mr)
    full = EquilibriumSystem(prop.elements)
    tab = batch.tables_for(full)
    bt = batch.Batch(tab, [[prop.elements.get(e, 0.0) for e in tab.element_names]], [3800.0], [70e5])
    batch.hp(bt, [0], [prop.enthalpy])
    assert bt.ok[0] and not bt.act[0].any()
    gas = ct.Solution(thermo="ideal-gas", species=[full.gas.species(n) for n in full.species_names])
    gas.TPX = 3000.0, 70e5, full.n0
    gas.equilibrate("TP")
    gas.HP = prop.enthalpy, 70e5
    gas.equilibrate("HP", rtol=1e-12)
    assert bt.T[0] == pytest.approx(gas.T, rel=1e-9)
    x = bt.props()["nj"][0] / bt.props()["n_gas"][0]
    big = gas.X > 1e-6
    np.testing.assert_allclose(x[big], gas.X[big], rtol=1e-7)


@pytest.mark.parametrize("mr, eps", [(1.7, 40.0), (2.4, 10.0), (3.2, 100.0)])
def test_isp_equals_the_plain_path(mr, eps):
    # The accuracy target is 0.02 % of the plain path; the two agree far better.
    prop = make_propellant("LOX", "RP-1", mr)
    fast = performance_of(prop, 50e5, area_ratio=eps, ambient_pressure=101325.0)
    ref = plain_shifting_point(prop, 50e5, area_ratio=eps, ambient_pressure=101325.0)
    assert fast.isp_vacuum == pytest.approx(ref["isp_vacuum"], rel=1e-8)
    assert fast.cstar == pytest.approx(ref["cstar"], rel=1e-8)
    assert fast.chamber.temperature == pytest.approx(ref["chamber_temperature"], rel=1e-9)


_CHILD = """
import json
from perfchain.propellants.mixture import make_propellant
from perfchain.performance.chain import performance_batch
pts = [("LOX", "RP-1", 1.5, 20e5, 60.0), ("LOX", "RP-1", 2.6, 150e5, 8.0), ("LOX", "LH2", 6.0, 70e5, 40.0)]
out = performance_batch([(make_propellant(o, f, mr), pc, eps) for o, f, mr, pc, eps in pts])
print(json.dumps([r.to_dict() for r in out]))
"""


@pytest.mark.skipif(not jit.COMPILED, reason="the suite runs uncompiled: nothing compiled to compare with")
def test_compiled_and_uncompiled_kernels_agree():
    # One kernel source run two ways: compiled by numba here, as plain Python in a child process
    # (PERFCHAIN_NO_JIT=1). The same operations in the same order: equal to round-off (on the
    # development machine even bit for bit), including a graphite exit and a hydrogen point.
    pts = [("LOX", "RP-1", 1.5, 20e5, 60.0), ("LOX", "RP-1", 2.6, 150e5, 8.0), ("LOX", "LH2", 6.0, 70e5, 40.0)]
    compiled = [r.to_dict() for r in _batch_of(pts)]
    env = {**os.environ, "PERFCHAIN_NO_JIT": "1"}
    run = subprocess.run([sys.executable, "-c", _CHILD], env=env, capture_output=True, text=True, timeout=600)
    assert run.returncode == 0, run.stderr
    plain = json.loads(run.stdout)
    assert compiled[0]["exit"]["condensed_mass_fraction"] > 0.01
    for a, b in zip(compiled, plain):
        for key in ("isp_vacuum", "cstar", "cf_vacuum", "area_ratio"):
            assert a[key] == pytest.approx(b[key], rel=1e-12), key
        for st in ("chamber", "throat", "exit"):
            for key in ("pressure", "temperature", "sound_speed", "condensed_mass_fraction"):
                assert a[st][key] == pytest.approx(b[st][key], rel=1e-12, abs=1e-300), (st, key)


def test_points_the_batch_hands_back_get_the_general_path():
    # Hydrogen-rich products at 1 bar and area ratio 300 reach ~218 K: the general path's lever
    # rule settles the ice/water plateau; the batch solver hands such rows back, never guesses.
    p = make_propellant("LOX", "LH2", equivalence_ratio=4.0)
    full = EquilibriumSystem(p.elements)
    tab = batch.tables_for(full)
    nz = batch.nozzle(tab, [[p.elements.get(e, 0.0) for e in tab.element_names]], np.array([p.enthalpy]),
                      np.array([1e5]), np.array([0]), area_ratio=np.array([300.0]))
    assert not nz.ok[0] and nz.why[0]
    # (in vacuum: a 1 bar chamber at the default 1 atm ambient is infeasible, the one rule of
    # perfchain.performance.ambient)
    got = performance_batch([(p, 1e5, 300.0)], ambient_pressure=0.0)[0]
    assert got.to_dict() == _general(p, 1e5, area_ratio=300.0, system=full, ambient_pressure=0.0).to_dict()
    # handed back from a batch whose first point is another mixture: solved with its own elements
    other = make_propellant("LOX", "LH2", equivalence_ratio=1.0)
    mixed = performance_batch([(other, 1e5, 300.0), (p, 1e5, 300.0)], ambient_pressure=0.0)
    assert mixed[1].to_dict() == got.to_dict()
    assert mixed[0].to_dict() == performance_of(other, 1e5, area_ratio=300.0, ambient_pressure=0.0).to_dict()


def test_exit_by_pressure_and_a_failed_row_keep_their_places():
    p = make_propellant("LOX", "RP-1", 2.6)
    out = performance_batch([(p, 70e5, 101325.0), (p, 70e5, 80e5), (p, 70e5, 5e4)], exit_key="exit_pressure")
    assert out[0].exit.pressure == pytest.approx(101325.0, rel=1e-12)
    assert isinstance(out[1], Exception) and "exit_pressure" in str(out[1])
    assert out[2].exit.pressure == pytest.approx(5e4, rel=1e-12) and out[2].isp_vacuum > out[0].isp_vacuum
    assert math.isfinite(out[2].cstar) and out[2].cstar == out[0].cstar  # one shared chamber and throat


@pytest.mark.parametrize("flow", ["frozen", "frozen-throat"])
@pytest.mark.parametrize("pair, mr, exit_", [(("LOX", "RP-1"), 2.6, {"area_ratio": 40.0}),
                                             (("LOX", "LH2"), 6.0, {"exit_pressure": 1e4}),
                                             (("N2O4", "MMH"), 2.0, {"area_ratio": 8.0})])
def test_frozen_flows_match_the_general_path(flow, pair, mr, exit_):
    # Two implementations of the frozen isentrope: our Newton on T at fixed composition with the
    # frozen sound speed sqrt(gamma_f R T / M), and Cantera's SP state at fixed composition.
    p = make_propellant(*pair, mr)
    fast = performance_of(p, 70e5, flow=flow, **exit_)
    slow = _general(p, 70e5, flow=flow, **exit_)
    for key in ("isp_vacuum", "isp_ambient", "cstar", "area_ratio"):
        assert getattr(fast, key) == pytest.approx(getattr(slow, key), rel=1e-9), key
    for st in ("throat", "exit"):
        a, b = getattr(fast, st), getattr(slow, st)
        for key in ("pressure", "temperature", "mach", "gamma", "sound_speed"):
            assert getattr(a, key) == pytest.approx(getattr(b, key), rel=1e-8), (st, key)


def test_frozen_chamber_with_graphite_is_batched():
    # LOX/RP-1 at O/F 1.0 and 10 bar has graphite in the chamber (Tc ~1460 K). Frozen flow with
    # inert particles in velocity and thermal equilibrium: a^2 = gamma_f n R T with the
    # condensed cp in gamma_f (Sutton & Biblarz ch. 3, from memory); the batch solves it and
    # agrees with the general path (which finds the frozen isentrope by its own root on T).
    p = make_propellant("LOX", "RP-1", 1.0)
    full = EquilibriumSystem(p.elements)
    tab = batch.tables_for(full)
    nz = batch.nozzle(tab, [[p.elements.get(e, 0.0) for e in tab.element_names]], np.array([p.enthalpy]),
                      np.array([10e5]), np.array([0]), area_ratio=np.array([10.0]), flow="frozen")
    assert nz.chamber.act[0].any() and nz.ok[0]
    got = performance_of(p, 10e5, area_ratio=10.0, flow="frozen")
    ref = _general(p, 10e5, area_ratio=10.0, flow="frozen")
    assert got.exit.condensed_mass_fraction > 0
    for key in ("isp_vacuum", "cstar", "cf_vacuum"):
        assert getattr(got, key) == pytest.approx(getattr(ref, key), rel=1e-8), key
    for st in ("throat", "exit"):
        for key in ("pressure", "temperature", "sound_speed", "condensed_mass_fraction"):
            assert getattr(getattr(got, st), key) == pytest.approx(getattr(getattr(ref, st), key), rel=1e-8)
