"""Batch throats near a melting plateau stay on the batch solver and match the general path.

Near a condensed product's phase change rho u along the isentrope can have two sonic points (one
on the melting plateau, one off it); the throat is the one of higher rho u. The general path
(:func:`perfchain.performance.general.performance_general`, Cantera states) scans for every sonic
point and keeps that one; the batch solver (:mod:`perfchain.thermo.throat_scan`) now does the same
on its own rows instead of handing them back. Checked: the batch rows are ok and agree with the
general path, which tests/test_plateau.py checks against plain Cantera multiphase equilibrium.
"""

from __future__ import annotations

import numpy as np
import pytest

from perfchain.constants import G0
from perfchain.performance.batched import _template, performance_batch
from perfchain.performance.general import performance_general
from perfchain.propellants.formulation import make_formulation
from perfchain.thermo import batch
from perfchain.thermo.flow_models import near_transition

# AP/Al/HTPB 60/18/22: throats at 2235-2353 K near alumina's 2327 K melting point;
# AP/Mg/HTPB 70/15/15: throats at 2860-2990 K, magnesia melting at 3105 K (NASA data) below the chamber
CASES = {"Al": ({"AP": 0.60, "Al": 0.18, "HTPB": 0.22}, (20e5, 100e5)),
         "Mg": ({"AP": 0.70, "Mg": 0.15, "HTPB": 0.15}, (50e5, 100e5))}
EPS = (4.0, 12.0)
# rel. tolerance: shifting throats differ by the two paths' root tolerances on the equilibrium
# sound speed (measured up to 2.9e-9 in c* and throat p, as in tests/test_frozen_plateau.py's
# 6.5e-9 for shifting throats); frozen throats up to 3e-9 in throat T (measured)
TOL = 1e-8


@pytest.mark.parametrize("flow", ["shifting", "frozen", "frozen-throat"])
@pytest.mark.parametrize("case", sorted(CASES))
def test_plateau_throats_stay_on_the_batch_and_match_the_general_path(case, flow):
    parts, pcs = CASES[case]
    prop = make_formulation(parts)
    tab = batch.tables_for(_template(frozenset(prop.elements)))
    b = [[prop.elements.get(e, 0.0) for e in tab.element_names]] * len(pcs)
    src = np.repeat(np.arange(len(pcs)), len(EPS))
    nz = batch.nozzle(tab, b, np.full(len(pcs), prop.enthalpy), np.array(pcs), src,
                      area_ratio=np.tile(EPS, len(pcs)), flow=flow)
    assert nz.ok.all(), nz.why                       # none handed back
    # these are the rows the batch used to hand back: a transition near the throat
    assert near_transition(tab.cond_tmin, tab.cond_tmax, nz.throat.T, nz.chamber.T).all()
    got = performance_batch([(prop, pc, e) for pc in pcs for e in EPS], flow=flow)
    for (pc, eps), a in zip([(pc, e) for pc in pcs for e in EPS], got):
        assert not isinstance(a, Exception), a
        g = performance_general(prop, pc, area_ratio=eps, flow=flow)
        assert a.cstar == pytest.approx(g.cstar, rel=TOL)
        assert a.isp_vacuum == pytest.approx(g.isp_vacuum, rel=TOL)
        assert a.throat.pressure == pytest.approx(g.throat.pressure, rel=TOL)
        assert a.throat.temperature == pytest.approx(g.throat.temperature, rel=TOL)


def _edge_nozzle(parts, pc, flow, eps=10.0):
    prop = make_formulation(parts)
    tab = batch.tables_for(_template(frozenset(prop.elements)))
    b = [[prop.elements.get(e, 0.0) for e in tab.element_names]]
    nz = batch.nozzle(tab, b, np.array([prop.enthalpy]), np.array([pc]), np.zeros(1, int),
                      area_ratio=np.array([eps]), flow=flow)
    return prop, tab, nz


def _cstar_isp(nz, pc):
    """c* = p0 A* / mdot [m/s] and vacuum Isp = (u_e + p_e A_e / mdot) / g0 [s] of row 0
    (definitions, Sutton & Biblarz ch. 3; from memory)."""
    G_e = nz.exit_props["density"][0] * nz.exit_velocity[0]
    return pc / nz.throat_mass_flux[0], (nz.exit_velocity[0] + nz.exit.p[0] / G_e) / G0


@pytest.mark.parametrize("flow", ["shifting", "frozen-throat"])
def test_throat_at_the_plateau_edge_stays_on_the_batch(flow):
    """AP 60 / Al 18 / HTPB 22 at 70 bar: rho u peaks where the isentrope enters the alumina
    plateau (a kink, see tests/test_plateau.py, which checks it on plain Cantera multiphase
    states). The batch Newton cannot hold the states within ~4e-7 in ln p of that edge, so
    the batch used to hand these rows back; it now solves the edge itself (liquid alumina
    alone at 2327 K, the chamber entropy). Checked: the row stays on the batch, its throat is
    that state (exactly the transition temperature of the data, no solid), it is a kink (the
    velocity between the plateau's sound speed and the liquid side's, the latter by the
    batch's own derivatives of the state without the plateau), and c*, vacuum Isp, throat p
    and T agree with the general path to 1e-8 (measured 9e-10: the general path's Brent stops
    within its root tolerances of the kink and blends Cantera states 1e-7 K either side)."""
    parts = {"AP": 0.60, "Al": 0.18, "HTPB": 0.22}
    prop, tab, nz = _edge_nozzle(parts, 70e5, flow)
    assert nz.ok[0], nz.why
    liq, sol = tab.cond_names.index("AL2O3(L)"), tab.cond_names.index("AL2O3(a)")
    th = nz.throat
    assert th.T[0] == tab.cond_tmin[liq] == tab.cond_tmax[sol] == 2327.0
    assert th.act[0, liq] and not th.act[0, sol]
    u = nz.throat_velocity[0]
    liquid_side = batch.derivatives(th.take([0]))["sound_speed"][0]
    assert nz.throat_deriv["sound_speed"][0] < u < liquid_side          # a kink, not a sonic point
    cstar, isp = _cstar_isp(nz, 70e5)
    g = performance_general(prop, 70e5, area_ratio=10.0, flow=flow)
    assert cstar == pytest.approx(g.cstar, rel=TOL)
    assert isp == pytest.approx(g.isp_vacuum, rel=TOL)
    assert th.p[0] == pytest.approx(g.throat.pressure, rel=TOL)
    assert th.T[0] == pytest.approx(g.throat.temperature, rel=TOL)


def test_frozen_throat_at_the_plateau_edge_stays_on_the_batch():
    """AP 62 / Al 16 / HTPB 22 at 150 bar, frozen: the frozen isentrope enters the plateau at
    the kink of rho u too (the sound speed falls from sqrt(gamma_f n R T) to sqrt(n R T)); the
    batch used to hand this row back. Checked on the general path's own frozen states (Cantera,
    the lever rule at 2327 K): rho u at the batch's throat pressure above rho u at ln p +/- 1e-4
    (a kink) and equal to the batch's mass flux, and c* and vacuum Isp against the general
    path's. Tolerance 1e-7: the general path's rho u scatters by 3e-8 within 1e-7 in ln p of
    the edge (its lever rule's root tolerances; measured), so its throat is that far off."""
    from perfchain.thermo.equilibrium import EquilibriumSystem

    parts = {"AP": 0.62, "Al": 0.16, "HTPB": 0.22}
    prop, tab, nz = _edge_nozzle(parts, 150e5, "frozen")
    assert nz.ok[0], nz.why
    assert nz.throat.T[0] == 2327.0
    system = EquilibriumSystem(prop.elements)
    ch = system.hp(prop.enthalpy, 150e5)

    def flux(p):
        st = system.frozen_sp(ch, ch.s, p)
        return st.density * np.sqrt(2.0 * (ch.h - st.h))

    pt = float(nz.throat.p[0])
    g = [flux(pt * np.exp(k * 1e-4)) for k in (-1, 0, 1)]
    assert g[1] > g[0] and g[1] > g[2]
    assert nz.throat_mass_flux[0] == pytest.approx(g[1], rel=1e-7)
    cstar, isp = _cstar_isp(nz, 150e5)
    ref = performance_general(prop, 150e5, area_ratio=10.0, flow="frozen")
    assert cstar == pytest.approx(ref.cstar, rel=1e-7)
    assert isp == pytest.approx(ref.isp_vacuum, rel=1e-7)
    assert cstar <= ref.cstar * (1 + 1e-12)              # a mass flux no lower than the general path's
