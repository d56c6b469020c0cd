"""Nozzle expansion against closed forms, conservation, and an independent plain path."""

import math

import pytest

from perfchain.constants import G0
from perfchain.thermo.equilibrium import R_UNIVERSAL, EquilibriumSystem
from perfchain.nozzle.expansion import expand
from perfchain.propellants.ingredients import get_ingredient
from perfchain.propellants.mixture import make_propellant
from perfchain.performance.chain import performance, performance_of
from plain_reference import plain_shifting_point

G = 5.0 / 3.0  # argon: cp = 5/2 R at every temperature in the NASA data -> gamma 5/3 exactly


def _area_ratio(M, g=G):  # NACA Report 1135, eq. 80
    return (1 / M) * ((2 / (g + 1)) * (1 + (g - 1) / 2 * M * M)) ** ((g + 1) / (2 * (g - 1)))


@pytest.fixture(scope="module")
def argon():
    system = EquilibriumSystem(get_ingredient("Ar").elements)
    return system, system.tp(5500.0, 2e6)


@pytest.mark.parametrize("eps", [1.5, 4.0, 25.0])
def test_argon_frozen_expansion_matches_closed_forms(argon, eps):
    system, ch = argon
    e = expand(system, ch, "frozen", area_ratio=eps)
    M = e.exit_velocity / e.exit_sound_speed
    # NACA Report 1135 isentropic relations, gamma = 5/3
    assert _area_ratio(M) == pytest.approx(eps, rel=1e-6)
    assert e.exit.p / ch.p == pytest.approx((1 + (G - 1) / 2 * M * M) ** (-G / (G - 1)), rel=1e-6)
    assert e.throat.p / ch.p == pytest.approx((2 / (G + 1)) ** (G / (G - 1)), rel=1e-6)
    # c* = sqrt(R T0 / M) / Gamma(g)  (closed form; Sutton & Biblarz, Rocket Propulsion
    # Elements, ch. 3, from memory)
    gamma_fn = math.sqrt(G) * (2 / (G + 1)) ** ((G + 1) / (2 * (G - 1)))
    cstar = math.sqrt(R_UNIVERSAL * ch.T / ch.molar_mass) / gamma_fn
    assert e.cstar == pytest.approx(cstar, rel=1e-6)
    # vacuum Cf closed form
    pr = e.exit.p / ch.p
    cf_mom = math.sqrt(2 * G * G / (G - 1) * (2 / (G + 1)) ** ((G + 1) / (G - 1)) * (1 - pr ** ((G - 1) / G)))
    assert e.thrust_per_mass_flow(0.0) / e.cstar == pytest.approx(cf_mom + pr * eps, rel=1e-6)


def test_equilibrium_sound_speed_below_frozen():
    p = make_propellant("LOX", "RP-1", mixture_ratio=2.5)
    system = EquilibriumSystem(p.elements)
    st = system.hp(p.enthalpy, 5e6)
    system.gas.TPX = st.T, st.p, st.X
    # equilibrium sound speed is 2-3 % below the frozen one near the chamber
    # (Cantera field notes, measured; common practice)
    ratio = system.sound_speed(st, shifting=True) / system.gas.sound_speed
    assert 0.95 < ratio < 0.995


@pytest.mark.parametrize("flow", ["shifting", "frozen", "frozen-throat"])
def test_conservation_along_the_nozzle(flow):
    r = performance("N2O4", "MMH", mixture_ratio=2.0, chamber_pressure="20 bar", area_ratio=30.0, flow=flow)
    c, t, e = r.chamber, r.throat, r.exit
    for s in (t, e):  # isentropic, adiabatic: s and h + u^2/2 constant
        assert s.entropy == pytest.approx(c.entropy, rel=1e-8)
        assert s.enthalpy + s.velocity ** 2 / 2 == pytest.approx(c.enthalpy, abs=1e-6 * abs(c.cp_frozen * c.temperature))
    # mass flux rho*u*A constant between throat (A*) and exit (eps A*)
    assert e.density * e.velocity * r.area_ratio == pytest.approx(t.density * t.velocity, rel=1e-8)
    assert t.mach == pytest.approx(1.0, abs=1e-9)


def test_throat_is_the_maximum_of_mass_flux():
    # Sonic throat <=> maximum of rho*u along the isentrope (any gas-dynamics text).
    p = make_propellant("LOX", "LCH4", mixture_ratio=3.4)
    system = EquilibriumSystem(p.elements)
    ch = system.hp(p.enthalpy, 7e6)
    e = expand(system, ch, "shifting", area_ratio=10)
    g_t = e.throat_mass_flux
    for f in (0.99, 1.01):
        st = system.sp(ch.s, e.throat.p * f, e.throat)
        assert st.density * math.sqrt(2 * (ch.h - st.h)) < g_t


@pytest.mark.parametrize("ox,fu,r", [("LOX", "RP-1", 2.56), ("LOX", "LH2", 5.5), ("N2O4", "N2H4", 1.36),
                                     ("LOX", "LCH4", 3.4), ("H2O2-98", "RP-1", 7.0)])
def test_shifting_isp_at_least_frozen(ox, fu, r):
    # Recombination releases heat: shifting >= frozen-throat >= frozen (Sutton & Biblarz ch. 5; common practice)
    isp = {f: performance(ox, fu, mixture_ratio=r, chamber_pressure="50 bar", area_ratio=40, flow=f).isp_vacuum
           for f in ("shifting", "frozen-throat", "frozen")}
    assert isp["shifting"] >= isp["frozen-throat"] >= isp["frozen"]


# Sutton & Biblarz, Rocket Propulsion Elements (7th ed.), Table 5-5: 1000 psia
# expanded to 1 atm; from memory, so Tc +/- 1.5 %, c* and Isp +/- 1 %.
HANDBOOK = [
    ("LOX", "LH2", 4.02, "shifting", 2999.0, 2428.0, 391.0),
    ("LOX", "RP-1", 2.56, "shifting", 3676.0, 1799.0, 300.0),
    ("N2O4", "N2H4", 1.36, "shifting", 3258.0, 1783.0, 292.0),
    ("LOX", "RP-1", 2.24, "frozen", 3571.0, 1774.0, 285.4),
]


@pytest.mark.parametrize("ox,fu,r,flow,tc,cstar,isp", HANDBOOK)
def test_handbook_liquid_bipropellants(ox, fu, r, flow, tc, cstar, isp):
    res = performance(ox, fu, mixture_ratio=r, chamber_pressure="1000 psi", exit_pressure="1 atm", flow=flow)
    assert res.chamber.temperature == pytest.approx(tc, rel=0.015)
    assert res.cstar == pytest.approx(cstar, rel=0.01)
    assert res.isp_ambient == pytest.approx(isp, rel=0.01)
    assert res.isp_ambient == pytest.approx(res.cstar * res.cf_ambient / G0, rel=1e-12)


@pytest.mark.parametrize("ox,fu,r,eps", [("LOX", "RP-1", 2.7, 40.0), ("N2O4", "MMH", 2.1, 80.0),
                                         ("LOX", "LCH4", 3.3, 25.0)])
def test_against_plain_full_species_path(ox, fu, r, eps):
    # Independent plain calculation: every NASA gas species of the elements, a
    # fresh equilibrium at every state, throat by maximizing rho*u. Isp within 0.05 %.
    prop = make_propellant(ox, fu, mixture_ratio=r)
    ref = plain_shifting_point(prop, 5e6, area_ratio=eps)
    res = performance_of(prop, 5e6, area_ratio=eps)
    assert res.isp_vacuum == pytest.approx(ref["isp_vacuum"], rel=5e-4)
    assert res.cstar == pytest.approx(ref["cstar"], rel=5e-4)
    assert res.chamber.temperature == pytest.approx(ref["chamber_temperature"], rel=1e-6)


@pytest.mark.parametrize("ox,fu,r,T,p", [("LOX", "RP-1", 2.5, None, 5e6), ("N2O4", "MMH", 2.0, None, 1e6),
                                         ("LOX", "LCH4", 1.0, 900.0, 5e6),   # with graphite
                                         ("GOX", "GH2", 3.95, 300.0, 1e5)])  # with liquid water
def test_analytic_equilibrium_derivatives_match_finite_differences(ox, fu, r, T, p):
    # The analytic sound speed and cp (differentiated equilibrium conditions) against
    # central differences of fresh equilibrium solves: two independent routes.
    prop = make_propellant(ox, fu, mixture_ratio=r)
    system = EquilibriumSystem(prop.elements)
    st = system.hp(prop.enthalpy, p) if T is None else system.tp(T, p)
    d = system.equilibrium_derivatives(st)
    assert d["sound_speed"] == pytest.approx(system.sound_speed_fd(st, shifting=True), rel=1e-6)
    assert d["cp"] == pytest.approx(system.cp_equilibrium_fd(st), rel=1e-6)


def test_cold_isentrope_never_returns_an_extrapolated_gas_state():
    # Regression: a gas-only SP solve once landed at 36 K (below the 200 K data
    # floor) instead of condensing water; the state must stay in range.
    prop = make_propellant("GOX", "GH2", mixture_ratio=3.95)
    system = EquilibriumSystem(prop.elements)
    st = system.tp(300.0, 1e5)
    nxt = system.sp(st.s, 1.0001e5, st)
    assert nxt.T == pytest.approx(300.0, abs=0.1) and nxt.condensed
