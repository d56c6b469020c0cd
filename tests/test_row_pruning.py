"""Pruned rows of the batch solver: each solve works on the gas species that matter and proves
the rest negligible (perfchain.thermo.pruning: ROW_KEEP, ROW_ALARM).

The check is made from outside the solver: Cantera's standard Gibbs energies of every gas
species of the NASA data and the row's element potentials predict each species' equilibrium
mole fraction, ln x_k = a_k . pi - mu0_k/RT - ln(p/p0) (ideal gas; Gordon & McBride, NASA
RP-1311, 1994, ch. 2; from memory). Every species predicted above ROW_ALARM must be in the
state at that amount; what the state leaves out must be predicted below ROW_KEEP; no absent
condensed candidate may lower the Gibbs energy.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from perfchain.performance.batched import _template
from perfchain.propellants.formulation import make_formulation
from perfchain.propellants.mixture import make_propellant
from perfchain.thermo import batch
from perfchain.thermo.equilibrium import EquilibriumSystem
from perfchain.thermo.pruning import ROW_ALARM, ROW_KEEP

CASES = [
    ("composite", lambda: make_formulation({"AP": 0.68, "Al": 0.18, "HTPB": 0.14}), 70e5, (3.0, 40.0)),
    ("composite-plateau", lambda: make_formulation({"AP": 0.68, "Al": 0.18, "HTPB": 0.14}), 30e5, (5.5,)),
    ("LOX/RP-1", lambda: make_propellant("LOX", "RP-1", 2.6), 70e5, (10.0, 100.0)),
    ("LOX/RP-1 graphite", lambda: make_propellant("LOX", "RP-1", 1.0), 10e5, (10.0,)),
]


def _prove(system, tab, bt, i):
    gas = system.gas
    idx = [tab.species_names.index(n) for n in system.species_names]
    order = [tab.element_names.index(e) for e in system.element_names]
    gas.TP = bt.T[i], bt.p[i]
    # Cantera's standard state of an ideal gas is at the mixture's pressure: ln(p/p0) is in it
    pred = system.A @ bt.pi[i][order] - gas.standard_gibbs_RT
    x = np.exp(bt.lnn[i][idx] - bt.lnN[i])
    carried = pred > math.log(ROW_ALARM)
    # every species that matters is in the state at its equilibrium amount
    assert np.allclose(x[carried], np.exp(pred[carried]), rtol=1e-6, atol=0.0)
    # what the state leaves out (no amount at all) is predicted below ROW_KEEP
    out = x < 1e-290
    assert not out.all() and (pred[out] < math.log(ROW_KEEP) + 1e-6).all()
    # and all of it together is negligible beside the 1e-9 exactness of the chain
    assert np.exp(pred[out]).sum() < 1e-11
    for k, name in enumerate(system.cond_names):
        c = tab.cond_names.index(name)
        if not bt.act[i, c] and system.cond_valid(k, bt.T[i], tol=0.0):
            assert system.cond_g_rt(k, bt.T[i]) - system.cond_A[k] @ bt.pi[i][order] > -1e-8, name
    return int(out.sum())


@pytest.mark.parametrize("name, make, pc, eps", CASES, ids=[c[0] for c in CASES])
def test_left_out_species_are_proven_negligible(name, make, pc, eps):
    prop = make()
    tab = batch.tables_for(_template(frozenset(e for e, n in prop.elements.items() if n > 0)))
    nz = batch.nozzle(tab, [[prop.elements.get(e, 0.0) for e in tab.element_names]], np.array([prop.enthalpy]),
                      np.array([pc]), np.zeros(len(eps), int), area_ratio=np.array(eps))
    assert nz.ok.all(), nz.why
    system = EquilibriumSystem(prop.elements)
    left_out = [_prove(system, tab, nz.chamber, 0), _prove(system, tab, nz.throat, 0)]
    left_out += [_prove(system, tab, nz.exit, i) for i in range(len(eps))]
    # the pruning is real: every state leaves species out
    assert min(left_out) > 0
