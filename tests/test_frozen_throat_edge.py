"""A frozen throat at the edge of the alumina melting plateau: both paths and plain Cantera.

AP 62 / Al 16 / HTPB 22 at 100 bar, frozen: the liquid alumina of the chamber reaches its
melting point (2327 K in the NASA data) at p/p0 ~ 0.5995, while the flow is still subsonic. On
the plateau T is held and the frozen sound speed drops (rho a^2 / p = 1), so the flow is
supersonic there: u^2 - a^2 jumps through zero at the edge and the mass flux rho u, whose
maximum is the throat, peaks at the edge itself. The general path once stopped on the root of
u^2 - a^2 that its central-difference sound speed makes just inside the plateau (rho u lower by
1.7e-6, throat pressure 2.6e-5 off); the batch closes on the edge.

Independent check: the same frozen isentrope on plain Cantera objects (an ideal-gas Solution of
the product gases, the NASA-7 data of the two alumina phases; condensed volume neglected, no
slip) with the chamber composition frozen: the edge pressure, its rho u, and rho u on either
side of it (liquid above the transition, the lever rule on s below).
"""

from __future__ import annotations

import math

import cantera as ct
import numpy as np
import pytest
from scipy.optimize import brentq

from perfchain.constants import R_UNIVERSAL
from perfchain.nozzle.chamber import chamber_state
from perfchain.performance.batched import performance_batch
from perfchain.performance.general import performance_general
from perfchain.propellants.formulation import make_formulation
from perfchain.thermo.equilibrium import EquilibriumSystem

PC = 100e5


@pytest.fixture(scope="module")
def row():
    prop = make_formulation({"AP": 0.62, "Al": 0.16, "HTPB": 0.22})
    return prop, performance_general(prop, PC, area_ratio=10.0, flow="frozen")


def test_both_paths_close_on_the_same_throat(row):
    prop, gen = row
    (bat,) = performance_batch([(prop, PC, 10.0)], flow="frozen")
    assert not isinstance(bat, Exception), bat
    assert gen.throat.temperature == pytest.approx(2327.0, rel=1e-12)
    assert gen.cstar == pytest.approx(bat.cstar, rel=1e-8)                    # measured 1e-12
    assert gen.throat.pressure == pytest.approx(bat.throat.pressure, rel=1e-8)  # measured 3e-11


def test_throat_is_the_mass_flux_maximum_of_plain_cantera_states(row):
    prop, gen = row
    system = EquilibriumSystem(prop.elements)
    ch = chamber_state(system, prop.enthalpy, PC)
    names = [system.cond_names[i] for i, _ in ch.condensed]
    assert names == ["AL2O3(L)"]
    n_al2o3 = ch.condensed[0][1]
    liq = system.cond_species[system.cond_names.index("AL2O3(L)")].thermo
    sol = system.cond_species[system.cond_names.index("AL2O3(a)")].thermo
    gas = ct.Solution(thermo="ideal-gas", species=system.gas.species())
    m_gas = ch.n_gas * gas.molecular_weights @ ch.X

    def gas_hs(T, p):
        gas.TPX = T, p, ch.X
        return m_gas * gas.enthalpy_mass, m_gas * gas.entropy_mass

    def flux(T, p, h_cond):
        h = gas_hs(T, p)[0] + h_cond
        return p / (ch.n_gas * R_UNIVERSAL * T) * math.sqrt(2.0 * (ch.h - h))

    def liquid(p):          # off the plateau: T from s = s0 with all alumina liquid
        T = brentq(lambda t: gas_hs(t, p)[1] + n_al2o3 * liq.s(t) - ch.s, 2327.0 - 50, ch.T, xtol=1e-12)
        return flux(T, p, n_al2o3 * liq.h(T))

    def plateau(p):         # on it: T = 2327 K, the lever rule on s splits solid / liquid
        T = 2327.0
        w = (gas_hs(T, p)[1] + n_al2o3 * liq.s(T) - ch.s) / (n_al2o3 * (liq.s(T) - sol.s(T)))
        assert 0.0 < w < 1.0
        return flux(T, p, n_al2o3 * (w * sol.h(T) + (1 - w) * liq.h(T)))

    # the edge: all liquid at 2327 K with the chamber entropy (s linear in ln p there)
    p_edge = math.exp(brentq(lambda x: gas_hs(2327.0, math.exp(x))[1] + n_al2o3 * liq.s(2327.0) - ch.s,
                             math.log(0.3 * PC), math.log(0.9 * PC), xtol=1e-14))
    g_edge = flux(2327.0, p_edge, n_al2o3 * liq.h(2327.0))
    for r in (1e-5, 1e-4, 1e-3):
        assert liquid(p_edge * (1 + r)) < g_edge and plateau(p_edge * (1 - r)) < g_edge
    assert gen.throat.pressure == pytest.approx(p_edge, rel=1e-8)
    assert gen.cstar == pytest.approx(PC / g_edge, rel=1e-8)
