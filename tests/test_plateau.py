"""Melting plateaus in the batch solver: alumina solid and liquid together at 2327 K.

Many exits and throats of aluminized composites sit where both phases coexist. The batch
solver holds T at the transition and solves the phase split from the enthalpy or entropy
(the condensed-phase method of Gordon & McBride, NASA RP-1311, 1994, ch. 3; from memory).
Checks against two outside references: the general path (lever rule between the two sides of
the transition, on Cantera states) and plain Cantera multiphase equilibrium (VCS, each
condensed species its own phase, tests/plain_reference.py); and the Gibbs-minimum conditions
themselves, evaluated with Cantera's species data.
"""

from __future__ import annotations

import numpy as np
import pytest

from perfchain.constants import G0, R_UNIVERSAL
from perfchain.performance.batched import _template, performance_batch
from perfchain.performance.general import performance_general
from perfchain.propellants.formulation import make_formulation
from perfchain.thermo import batch
from perfchain.thermo.equilibrium import EquilibriumSystem
from plain_reference import plain_multiphase_point

# AP 68 / Al 18 / HTPB 14 at 30 bar: exits between area ratio ~5 and ~7 sit on the plateau
EPS = (4.0, 5.5, 6.2, 9.0)


@pytest.fixture(scope="module")
def composite():
    prop = make_formulation({"AP": 0.68, "Al": 0.18, "HTPB": 0.14})
    tab = batch.tables_for(_template(frozenset(prop.elements)))
    b = [[prop.elements.get(e, 0.0) for e in tab.element_names]]
    nz = batch.nozzle(tab, b, np.array([prop.enthalpy]), np.array([30e5]), np.zeros(len(EPS), int),
                      area_ratio=np.array(EPS))
    return prop, tab, nz


def _on_plateau(tab, bt, i):
    ids = np.asarray(tab.formula_id)
    return any(bt.act[i, ids == f].sum() == 2 for f in set(ids.tolist()))


def test_plateau_exits_stay_on_the_batch(composite):
    prop, tab, nz = composite
    assert nz.ok.all(), nz.why
    plateau = [i for i in range(len(EPS)) if _on_plateau(tab, nz.exit, i)]
    assert plateau == [1, 2]
    # exactly the transition temperature of the data (AL2O3(a) ends, AL2O3(L) begins at 2327 K)
    a, liq = tab.cond_names.index("AL2O3(a)"), tab.cond_names.index("AL2O3(L)")
    assert tab.cond_tmax[a] == tab.cond_tmin[liq] == nz.exit.T[1] == nz.exit.T[2]
    # the wider exit holds more solid (it is colder in enthalpy terms): the split moves with eps
    frac = nz.exit.nc[:, a] / (nz.exit.nc[:, a] + nz.exit.nc[:, liq])
    assert 0.0 < frac[1] < frac[2] < 1.0
    assert nz.exit.T[0] > 2327.0 > nz.exit.T[3]


def test_plateau_points_match_the_general_path(composite):
    """Tolerances: the general path blends two Cantera states 0.2 uK either side of 2327 K whose
    alumina Gibbs energies differ by 6e-6 RT in the data (the NASA fits of the two phases do not
    cross exactly at 2327 K); the batch holds one state with the mean of the two. Measured:
    Isp 1e-11, condensed mass fraction 7e-10, sound speed and gamma 1e-9, cp 8e-9 (a derivative,
    most sensitive to that gap)."""
    prop = composite[0]
    got = performance_batch([(prop, 30e5, e) for e in EPS[1:3]])
    for eps, a in zip(EPS[1:3], got):
        b = performance_general(prop, 30e5, area_ratio=eps)
        assert a.isp_vacuum == pytest.approx(b.isp_vacuum, rel=1e-9)
        assert a.cstar == pytest.approx(b.cstar, rel=1e-9)
        x, y = a.exit, b.exit
        assert x.temperature == pytest.approx(y.temperature, rel=1e-9)
        assert x.pressure == pytest.approx(y.pressure, rel=1e-9)
        assert x.condensed_mass_fraction == pytest.approx(y.condensed_mass_fraction, rel=1e-8)
        for key in ("sound_speed", "gamma"):
            assert getattr(x, key) == pytest.approx(getattr(y, key), rel=1e-8), key
        assert x.cp == pytest.approx(y.cp, rel=1e-7)


def test_plateau_exits_match_plain_multiphase(composite):
    """Against Cantera's VCS multiphase equilibrium expanded to the same exit pressure: the
    plain path finds T by Brent (1e-10 K) and blends the two sides of the transition; measured
    agreement 1e-8 in Isp, so 1e-7 is a tight bound with room for its root tolerances."""
    prop, tab, nz = composite
    got = performance_batch([(prop, 30e5, EPS[1])])[0]
    ref = plain_multiphase_point(prop, 30e5, got.exit.pressure)
    assert ref["exit_temperature"] == pytest.approx(2327.0, abs=1e-6)
    assert got.exit.velocity / G0 == pytest.approx(ref["isp_optimum"], rel=1e-7)
    assert got.exit.condensed_mass_fraction == pytest.approx(ref["exit_condensed"], rel=1e-8)
    assert got.chamber.temperature == pytest.approx(ref["chamber_temperature"], rel=1e-7)


def _check_gibbs_minimum(system, tab, bt, i):
    """Every present gas species: mu_j/RT = a_j . pi; every present condensed phase
    mu0_c/RT = a_c . pi (on a plateau within the 6e-6 gap of the data); no absent candidate
    valid at T has mu0_c/RT < a_c . pi (Gordon & McBride, NASA RP-1311, 1994, ch. 2; from
    memory). Chemical potentials from Cantera, element potentials from the batch solver."""
    order = [tab.element_names.index(e) for e in system.element_names]
    pi = bt.pi[i][order]
    nj = np.exp(bt.lnn[i])
    gas = system.gas
    idx = [tab.species_names.index(n) for n in system.species_names]
    gas.TPX = bt.T[i], bt.p[i], nj[idx]
    mu = gas.chemical_potentials / (R_UNIVERSAL * bt.T[i])
    major = gas.X > 1e-10
    assert np.abs(system.A[major] @ pi - mu[major]).max() < 1e-8
    gap = 1e-5 if _on_plateau(tab, bt, i) else 1e-8
    present = [tab.cond_names[c] for c in range(len(tab.cond_names)) if bt.act[i, c]]
    assert present
    for k, name in enumerate(system.cond_names):
        drive = system.cond_g_rt(k, bt.T[i]) - system.cond_A[k] @ pi
        if name in present:
            assert abs(drive) < gap, name
        elif system.cond_valid(k, bt.T[i], tol=0.0):
            assert drive > -1e-8, name


def test_element_potentials_at_aluminized_chamber_and_exits(composite):
    prop, tab, nz = composite
    system = EquilibriumSystem(prop.elements)
    _check_gibbs_minimum(system, tab, nz.chamber, 0)
    _check_gibbs_minimum(system, tab, nz.throat, 0)
    for i in range(len(EPS)):
        _check_gibbs_minimum(system, tab, nz.exit, i)


def test_enthalpy_target_on_the_plateau(composite):
    """HP with T held: the enthalpy of a plateau exit, asked for at its pressure from a cold
    start, gives back that state (same split), as the general path's HP does."""
    prop, tab, nz = composite
    h = float(nz.exit_props["h"][1])
    p = float(nz.exit.p[1])
    bt = batch.Batch(tab, nz.exit.b[1:2], [3800.0], [p])
    batch.hp(bt, [0], [h])
    assert bt.ok[0] and bt.T[0] == 2327.0 and _on_plateau(tab, bt, 0)
    np.testing.assert_allclose(bt.nc[0], nz.exit.nc[1], rtol=1e-9, atol=1e-15)
    st = EquilibriumSystem(prop.elements).hp(h, p)
    got = bt.props()
    assert got["n_gas"][0] == pytest.approx(st.n_gas, rel=1e-9)
    assert st.T == pytest.approx(2327.0, rel=1e-10)


def test_plateau_isentropic_exponent_from_plain_multiphase(composite):
    """On the plateau T is held while the melt fraction takes up the entropy, so the isentropic
    exponent is -1 / (dlnV/dlnp)_T, not the one-sided cp/cv value of the phases counted as one.
    Independent check: gamma_s = dln p / dln rho and a^2 = dp/drho by central differences
    (p +/- 1e-4) along the isentrope of plain Cantera multiphase equilibrium (VCS, the lever
    rule at 2327 K; rho = p / (n_gas R T), condensed volume neglected as on both sides).
    Truncation ~1e-8, root noise ~1e-9 (measured agreement 6e-10): 1e-6 is tight; the one-sided
    exponent both paths reported before is 16-17 % off here (checked too, so the test tells
    the two apart)."""
    from plain_reference import PlainMultiphase

    prop, tab, nz = composite
    ref = PlainMultiphase(prop)
    s0 = float(nz.chamber_props["s"][0])
    for i in (1, 2):
        p = float(nz.exit.p[i])
        sides = [ref.xp("s", s0, p * (1 + f), 300.0, 2500.0) for f in (1e-4, -1e-4)]
        assert all(st["T"] == pytest.approx(2327.0, abs=1e-9) for st in sides)
        rho = [p * (1 + f) / (st["n_gas"] * R_UNIVERSAL * st["T"]) for st, f in zip(sides, (1e-4, -1e-4))]
        gamma_fd = np.log((1 + 1e-4) / (1 - 1e-4)) / np.log(rho[0] / rho[1])
        a_fd = np.sqrt(2e-4 * p / (rho[0] - rho[1]))
        assert nz.exit_deriv["gamma_s"][i] == pytest.approx(gamma_fd, rel=1e-6)
        assert nz.exit_deriv["sound_speed"][i] == pytest.approx(a_fd, rel=1e-6)
        assert nz.exit_deriv["dlnT_dlnp_s"][i] == 0.0
        one_sided = -(nz.exit_deriv["cp"][i] / nz.exit_deriv["cv"][i]) / nz.exit_deriv["dlnV_dlnp"][i]
        assert abs(one_sided / gamma_fd - 1) > 0.1


def test_plateau_split_moves_along_the_isentrope(composite):
    """The solid / liquid split along the plateau isentrope (d n_c / d ln p of each phase) against
    a central difference of the general path's states (Cantera TP states either side of 2327 K
    and the lever rule on s, steps of 1e-5 in ln p): dh = v dp at fixed T sets it. Measured
    within 1e-6 relative (the general path's root noise over the step)."""
    prop, tab, nz = composite
    system = EquilibriumSystem(prop.elements)
    s0 = float(nz.chamber_props["s"][0])
    i = 1
    p = float(nz.exit.p[i])
    sides = [dict((system.cond_names[c], n) for c, n in system.sp(s0, p * np.exp(f)).condensed) for f in (1e-5, -1e-5)]
    for name in ("AL2O3(a)", "AL2O3(L)"):
        fd = (sides[0][name] - sides[1][name]) / 2e-5
        got = nz.exit_deriv["dnc_s"][i, tab.cond_names.index(name)]
        assert got == pytest.approx(fd, rel=1e-5)
    assert nz.exit_deriv["dnc_s"][i, tab.cond_names.index("AL2O3(a)")] < 0    # the melt freezes as p falls


def _plain_mass_flux(ref, ch, p):
    """rho u [kg/(m^2 s)] at p [Pa] on the plain multiphase isentrope of chamber state ``ch``."""
    st = ref.xp("s", ch["s"], p, 300.0, ch["T"])
    return p / (st["n_gas"] * R_UNIVERSAL * st["T"]) * np.sqrt(2.0 * (ch["h"] - st["h"]))


def test_sonic_throat_on_the_plateau_is_the_mass_flux_maximum():
    """A fuel-rich composite (AP 58.25 / Al 18 / HTPB 23.75, 70 bar) whose shifting throat sits on
    the plateau (18 % of the alumina solid). The throat is where rho u peaks (u^2 = dp/drho along
    the isentrope). Along this isentrope rho u has two humps, one just below the plateau (solid
    alumina, p/p0 ~0.575) and a higher one on it (p/p0 ~0.637), each with a sonic point; with
    the one-sided exponent both paths stopped on the lower one (c* 0.9 % high). Both paths now
    compare every sonic point (the batch in perfchain.thermo.throat_scan), so the batch keeps
    this row and the checks below hold its throat. Checked on plain Cantera multiphase states (tests/plain_reference.py): rho u at
    the throat pressure found and at ln p +/- 1e-3, the top of the parabola through them within
    1e-5 in ln p of that throat (measured 2e-6; 1e-5 would cost 1e-10 of c*), the same rho u
    there, and no higher rho u anywhere on p/p0 = 0.56-0.68 (both humps)."""
    from plain_reference import PlainMultiphase

    prop = make_formulation({"AP": 0.5825, "Al": 0.18, "HTPB": 0.2375})
    tab = batch.tables_for(_template(frozenset(prop.elements)))
    b = [[prop.elements.get(e, 0.0) for e in tab.element_names]]
    nz = batch.nozzle(tab, b, np.array([prop.enthalpy]), np.array([70e5]), np.zeros(1, int),
                      area_ratio=np.array([10.0]))
    assert nz.ok[0], nz.why
    got = performance_batch([(prop, 70e5, 10.0)])[0]
    t = got.throat
    assert t.temperature == 2327.0 and t.mach == pytest.approx(1.0, abs=1e-9)
    ref = PlainMultiphase(prop)
    ch = ref.xp("h", prop.enthalpy, 70e5, 1000.0, 5000.0)
    h = 1e-3
    g = [_plain_mass_flux(ref, ch, t.pressure * np.exp(k * h)) for k in (-1, 0, 1)]
    assert g[1] > g[0] and g[1] > g[2]
    top = h * (g[0] - g[2]) / (2.0 * (g[0] - 2.0 * g[1] + g[2]))
    assert abs(top) < 1e-5
    # the plain path leaves out ions ("E" species) and has its own root tolerances: the chamber
    # and rho u agree to ~6e-8 (as test_plateau_exits_match_plain_multiphase allows 1e-7)
    assert t.density * t.velocity == pytest.approx(g[1], rel=2e-7)
    assert 70e5 / got.cstar == pytest.approx(g[1], rel=2e-7)
    for r in (0.56, 0.575, 0.59, 0.61, 0.66, 0.68):
        assert _plain_mass_flux(ref, ch, 70e5 * r) < g[1] * (1 + 2e-7), r


def test_throat_at_the_edge_of_the_plateau():
    """AP 60 / Al 18 / HTPB 22 at 70 bar: rho u peaks where the isentrope enters the plateau, a
    kink (the sound speed drops there, from the liquid side's to the plateau's), so no state has
    u = a exactly; the throat is the kink itself, u between the two sound speeds (the station
    reports the plateau's, Mach 1.03). The batch solves this edge state itself
    (perfchain.thermo.throat_scan). Checked on plain Cantera multiphase states: rho u at the
    throat pressure above rho u at ln p +/- 1e-4 (a kink, not a smooth top) and equal to the
    throat's (2e-7, as above)."""
    from plain_reference import PlainMultiphase

    prop = make_formulation({"AP": 0.60, "Al": 0.18, "HTPB": 0.22})
    t = performance_batch([(prop, 70e5, 10.0)])[0].throat
    assert t.temperature == 2327.0 and 1.01 < t.mach < 1.05
    ref = PlainMultiphase(prop)
    ch = ref.xp("h", prop.enthalpy, 70e5, 1000.0, 5000.0)
    g = [_plain_mass_flux(ref, ch, t.pressure * np.exp(k * 1e-4)) for k in (-1, 0, 1)]
    assert g[1] > g[0] and g[1] > g[2]
    assert t.density * t.velocity == pytest.approx(g[1], rel=2e-7)
