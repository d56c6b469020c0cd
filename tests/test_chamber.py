"""Chamber equilibrium: the equilibrium condition itself, conservation, flame temperatures."""

import numpy as np
import pytest

from perfchain.nozzle.chamber import chamber_state
from perfchain.thermo.equilibrium import R_UNIVERSAL, EquilibriumSystem
from perfchain.propellants.mixture import make_propellant

ATM = 101325.0


def _element_potentials(system, st):
    gas = system.gas
    gas.TPX = st.T, st.p, st.X
    mask = st.X > 1e-8
    mu = gas.chemical_potentials[mask] / (R_UNIVERSAL * st.T)
    lam, *_ = np.linalg.lstsq(system.A[mask], mu, rcond=None)
    return gas, lam


@pytest.mark.parametrize("ox,fu,r", [("LOX", "RP-1", 2.56), ("N2O4", "MMH", 2.0), ("LOX", "LH2", 6.0)])
def test_equilibrium_condition_and_conservation(ox, fu, r):
    # Equilibrium condition (any chemical-thermodynamics text, e.g. Smith & Missen,
    # Chemical Reaction Equilibrium Analysis): every species present has
    # mu_k / RT = sum_e a_ke lambda_e with one set of element potentials.
    p = make_propellant(ox, fu, mixture_ratio=r)
    system = EquilibriumSystem(p.elements)
    st = chamber_state(system, p.enthalpy, 7e6)
    gas, lam = _element_potentials(system, st)
    mu = gas.chemical_potentials / (R_UNIVERSAL * st.T)
    present = st.X > 1e-12
    resid = mu[present] - system.A[present] @ lam
    assert np.abs(resid).max() < 1e-6
    # elements conserved (kmol/kg) and enthalpy conserved (adiabatic chamber)
    b = st.n_gas * (system.A.T @ st.X)
    assert np.allclose(b, system.b, rtol=1e-9, atol=1e-14)
    assert abs(st.h - p.enthalpy) < 1e-6 * abs(st.cp_frozen * st.T)


def test_condensed_graphite_meets_its_condition():
    # Fuel-rich LOX/CH4 forms graphite at low temperature (common practice; the
    # condition for a pure condensed phase is mu_c / RT = sum_e a_ce lambda_e).
    p = make_propellant("LOX", "LCH4", mixture_ratio=1.0)
    system = EquilibriumSystem(p.elements)
    st = system.tp(900.0, 5e6)
    names = [system.cond_names[i] for i, _ in st.condensed]
    assert names == ["C(gr)"]
    _, lam = _element_potentials(system, st)
    i = system.cond_names.index("C(gr)")
    th = system.cond_species[i].thermo
    g_rt = (th.h(900.0) - 900.0 * th.s(900.0)) / (R_UNIVERSAL * 900.0)
    assert abs(g_rt - system.cond_A[i] @ lam) < 1e-7
    system.check(st)  # element balance including the graphite


def test_no_condensed_species_outside_its_range():
    # H2O(L) data cover 273.15-600 K (NASA TP-2002-211556 ranges as shipped):
    # below 273.15 K only ice may appear.
    p = make_propellant("GOX", "GH2", equivalence_ratio=2.0)
    system = EquilibriumSystem(p.elements)
    cold = system.tp(250.0, ATM)
    assert [system.cond_names[i] for i, _ in cold.condensed] == ["H2O(s)"]


@pytest.mark.parametrize("ox,fu,expected,tol", [
    ("air", "GH2", 2383.0, 25.0),   # Turns, An Introduction to Combustion, App. B; from memory
    ("air", "GCH4", 2226.0, 25.0),  # Turns, App. B; from memory
    ("GOX", "GH2", 3080.0, 40.0),   # Glassman, Combustion, Table 1.1 (rounded); from memory
])
def test_adiabatic_flame_temperature(ox, fu, expected, tol):
    p = make_propellant(ox, fu, equivalence_ratio=1.0)
    st = chamber_state(EquilibriumSystem(p.elements), p.enthalpy, ATM)
    assert abs(st.T - expected) < tol


def test_cryogenic_reactants_reach_the_enthalpy_target():
    # LOX/LH2 reactant enthalpy lies below any gas state at 200 K (see the
    # Cantera field notes); the chamber must still close on it.
    p = make_propellant("LOX", "LH2", mixture_ratio=5.0)
    system = EquilibriumSystem(p.elements)
    st = chamber_state(system, p.enthalpy, 2e6)
    assert abs(st.h - p.enthalpy) < 1e-3
    assert 2500 < st.T < 3600  # common practice: LOX/LH2 near O/F 5 burns at ~3200 K
