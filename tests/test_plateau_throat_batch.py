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
