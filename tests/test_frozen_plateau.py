"""Frozen and frozen-throat flow across the alumina melting point, on the batch solver.

With the composition frozen, a condensed substance that reaches its melting point changes
phase, not amount: T stays at the transition (2327 K for alumina in the NASA data) while the
entropy target sets the solid / liquid split (lever rule on s). The batch solver now holds
these rows itself (:func:`perfchain.thermo.isentrope.frozen_step`); they are checked here
against the general path (:meth:`~perfchain.thermo.equilibrium.EquilibriumSystem.frozen_sp`,
a root on T over Cantera states and the lever rule between the two sides of the transition)
and against a closed form (on the plateau p / rho = n R T is fixed, so rho a^2 / p = 1).
"""

from __future__ import annotations

import numpy as np
import pytest

from perfchain.constants import R_UNIVERSAL
from perfchain.performance.batched import _template, performance_batch
from perfchain.performance.general import performance_general
from perfchain.propellants.formulation import make_formulation
from perfchain.thermo import batch
from perfchain.thermo.isentrope import on_plateau

PC = 70e5
# AP 68 / Al 18 / HTPB 14 at 70 bar: frozen exits sit at 2327 K for area ratios ~2.7-4,
# frozen-throat exits for ~3.2-4.7; each list also holds one exit on either side
EPS = {"frozen": (2.4, 2.9, 3.4, 3.9, 4.3), "frozen-throat": (3.0, 3.4, 4.0, 4.6, 5.2)}


@pytest.fixture(scope="module")
def composite():
    prop = make_formulation({"AP": 0.68, "Al": 0.18, "HTPB": 0.14})
    tab = batch.tables_for(_template(frozenset(prop.elements)))
    return prop, tab


def _nozzle(prop, tab, flow):
    b = [[prop.elements.get(e, 0.0) for e in tab.element_names]]
    eps = np.array(EPS[flow])
    return batch.nozzle(tab, b, np.array([prop.enthalpy]), np.array([PC]), np.zeros(len(eps), int),
                        area_ratio=eps, flow=flow)


@pytest.mark.parametrize("flow", ["frozen", "frozen-throat"])
def test_frozen_plateau_rows_stay_on_the_batch(composite, flow):
    prop, tab = composite
    nz = _nozzle(prop, tab, flow)
    assert nz.ok.all(), nz.why
    flat = on_plateau(tab, nz.exit.act)
    assert flat[1:4].all() and not flat[0] and not flat[-1]
    a, liq = tab.cond_names.index("AL2O3(a)"), tab.cond_names.index("AL2O3(L)")
    assert (nz.exit.T[flat] == tab.cond_tmax[a]).all() and tab.cond_tmax[a] == tab.cond_tmin[liq] == 2327.0
    assert nz.exit.T[0] > 2327.0 > nz.exit.T[-1]
    # frozen: the alumina amount is the chamber's (throat's for frozen-throat), only its phase moves
    ref = nz.chamber if flow == "frozen" else nz.throat
    np.testing.assert_allclose(nz.exit.nc[:, [a, liq]].sum(1), ref.nc[0, [a, liq]].sum(), rtol=1e-14)
    frac = nz.exit.nc[flat, a] / (nz.exit.nc[flat, a] + nz.exit.nc[flat, liq])
    assert (np.diff(frac) > 0).all() and 0.0 < frac[0] and frac[-1] < 1.0    # more solid further out
    # closed form on the plateau: p / rho = n R T is fixed, so rho a^2 / p = 1, dlnT/dlnp = 0
    ng = nz.exit_props["n_gas"][flat]
    np.testing.assert_allclose(nz.exit_deriv["sound_speed"][flat], np.sqrt(ng * R_UNIVERSAL * 2327.0), rtol=1e-15)
    assert (nz.exit_deriv["dlnT_dlnp_s"][flat] == 0.0).all()


# rel. tolerance per flow model: frozen flow differs only by the general path's root tolerances
# (measured 1e-10); frozen-throat inherits the two paths' shifting-throat difference (c* and
# throat pressure 6.5e-9 apart, measured at every area ratio, plateau or not)
TOL = {"frozen": 5e-10, "frozen-throat": 2e-8}


@pytest.mark.parametrize("flow", ["frozen", "frozen-throat"])
def test_frozen_plateau_points_match_the_general_path(composite, flow):
    """Both find T = 2327 K exactly on the plateau and split by the same lever rule on s (the
    batch on the NASA-7 fits, the general path on Cantera's evaluation of the same fits); the
    general path's sound speed there is a central difference of p(rho) along the frozen
    isentrope. Measured (frozen / frozen-throat): Isp 3e-12 / 8e-10, T and p 1e-10 / 9e-9,
    sound speed 3e-12 / 8e-10, each phase's share of the alumina 4e-10 / 1e-8."""
    prop, tab = composite
    tol = TOL[flow]
    got = performance_batch([(prop, PC, e) for e in EPS[flow]], flow=flow)
    for eps, a in zip(EPS[flow], got):
        assert not isinstance(a, Exception), a
        b = performance_general(prop, PC, area_ratio=eps, flow=flow)
        assert a.isp_vacuum == pytest.approx(b.isp_vacuum, rel=tol)
        assert a.cstar == pytest.approx(b.cstar, rel=tol)
        x, y = a.exit, b.exit
        for key in ("temperature", "pressure", "density", "enthalpy", "entropy", "molar_mass", "cp",
                    "cp_frozen", "gamma_frozen", "velocity", "condensed_mass_fraction", "sound_speed", "gamma",
                    "mach"):
            assert getattr(x, key) == pytest.approx(getattr(y, key), rel=tol), key
        total = sum(y.composition.get(n, 0.0) for n in ("AL2O3(a)", "AL2O3(L)"))
        for name in ("AL2O3(a)", "AL2O3(L)"):
            assert x.composition.get(name, 0.0) == pytest.approx(y.composition.get(name, 0.0), abs=tol * total)
