"""Isentropic closed forms against NACA Report 1135 and exact identities."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from perfchain.nozzle import isentropic as isen
from perfchain.errors import InputError

# NACA Report 1135 (Ames Research Staff, 1953), isentropic table, g = 1.4; printed to
# 4 significant figures, so compare within half a unit of the last digit.
def test_naca_1135_mach_2():
    assert isen.pressure_ratio(2.0, 1.4) == pytest.approx(0.1278, abs=5e-5)
    assert isen.temperature_ratio(2.0, 1.4) == pytest.approx(0.5556, abs=5e-5)
    assert isen.area_ratio(2.0, 1.4) == pytest.approx(1.688, abs=5e-4)


def test_naca_1135_mach_3_from_memory():
    # M = 3 row from memory: looser tolerance (0.1 %)
    assert isen.pressure_ratio(3.0, 1.4) == pytest.approx(0.02722, rel=1e-3)
    assert isen.area_ratio(3.0, 1.4) == pytest.approx(4.235, rel=1e-3)


def test_naca_1135_subsonic_row_from_memory():
    # NACA 1135, g = 1.4, M = 0.5: p/p0 0.8430, A/A* 1.340 (from memory, 0.1 %)
    assert isen.pressure_ratio(0.5, 1.4) == pytest.approx(0.8430, rel=1e-3)
    assert isen.area_ratio(0.5, 1.4) == pytest.approx(1.340, rel=1e-3)
    assert isen.mach_from_area_ratio(1.33984, 1.4, supersonic=False) == pytest.approx(0.5, abs=1e-4)


def test_sonic_throat_identities():
    # closed forms at M = 1: A/A* = 1, T*/T0 = 2/(g+1), p*/p0 = (2/(g+1))^(g/(g-1))
    for g in (1.1, 1.2, 1.4, 5.0 / 3.0):
        assert isen.area_ratio(1.0, g) == pytest.approx(1.0, rel=1e-15)
        assert isen.temperature_ratio(1.0, g) == pytest.approx(2.0 / (g + 1.0), rel=1e-15)
        assert isen.pressure_ratio(1.0, g) == pytest.approx((2.0 / (g + 1.0)) ** (g / (g - 1.0)), rel=1e-14)
        assert isen.mach_from_area_ratio(1.0, g) == 1.0


def test_cf_infinite_closed_form_values():
    # Closed form Cf_inf = sqrt(2 g^2/(g-1) (2/(g+1))^((g+1)/(g-1))) (Sutton & Biblarz ch. 3),
    # evaluated by hand: g = 1.2 -> 2.2466, g = 1.4 -> 1.8116
    assert isen.thrust_coefficient_infinite(1.2) == pytest.approx(2.2466, abs=5e-5)
    assert isen.thrust_coefficient_infinite(1.4) == pytest.approx(1.8116, abs=5e-5)


def test_cf_tends_to_infinite_value():
    # vacuum Cf rises monotonically with area ratio towards Cf_inf (closed form)
    g = 1.2
    cf_inf = isen.thrust_coefficient_infinite(g)
    cfs = []
    for eps in (1.0e2, 1.0e4, 1.0e6, 1.0e9, 1.0e12):
        pe = isen.exit_pressure_ratio_for_area_ratio(eps, g)
        cfs.append(isen.thrust_coefficient(g, pe, 0.0, eps))
    assert all(a < b for a, b in zip(cfs, cfs[1:]))
    assert cfs[-1] < cf_inf
    assert cfs[-1] == pytest.approx(cf_inf, rel=2e-3)


def test_cf_mass_flow_identity():
    # Cf = F/(pc At) and c* = pc At / mdot, so Cf c* = ve + (pe - pa) Ae / mdot.
    # Build ve from the energy equation independently (g = 1.4, M_e = 3):
    g, Me, Tc, mol = 1.4, 3.0, 3000.0, 22.0
    R = isen.R_UNIVERSAL / mol
    Te = Tc * isen.temperature_ratio(Me, g)
    ve = Me * math.sqrt(g * R * Te)
    cs = isen.cstar(Tc, mol, g)
    pe = isen.pressure_ratio(Me, g)
    eps = isen.area_ratio(Me, g)
    cf_momentum = isen.thrust_coefficient(g, pe, pe, eps)  # pe = pa removes the pressure term
    assert cf_momentum * cs == pytest.approx(ve, rel=1e-12)


def test_optimum_area_ratio_gives_max_cf():
    g, pc, pa = 1.25, 7.0e6, 1.0e5
    eps_opt = isen.optimum_area_ratio_closed_form(g, pc, pa)

    def cf(eps):
        return isen.thrust_coefficient(g, isen.exit_pressure_ratio_for_area_ratio(eps, g), pa / pc, eps)

    assert cf(eps_opt) > cf(eps_opt * 0.95)
    assert cf(eps_opt) > cf(eps_opt * 1.05)
    assert isen.exit_pressure_ratio_for_area_ratio(eps_opt, g) == pytest.approx(pa / pc, rel=1e-10)


def test_arrays():
    M = np.array([0.5, 1.0, 2.0, 3.0])
    assert isinstance(isen.area_ratio(M, 1.4), np.ndarray)
    back = isen.mach_from_area_ratio(isen.area_ratio(M[1:], 1.4), 1.4)
    assert np.allclose(back, M[1:], rtol=1e-12)
    assert isinstance(isen.pressure_ratio(2.0, 1.4), float)


@pytest.mark.parametrize("call, field", [
    (lambda: isen.area_ratio(2.0, 1.0), "gamma"),
    (lambda: isen.area_ratio(0.0, 1.4), "mach"),
    (lambda: isen.mach_from_area_ratio(0.9, 1.4), "area_ratio"),
    (lambda: isen.mach_from_pressure_ratio(1.5, 1.4), "pressure_ratio"),
    (lambda: isen.cstar(-1.0, 20.0, 1.2), "chamber_temperature"),
    (lambda: isen.optimum_area_ratio_closed_form(1.2, 1.0e5, 2.0e5), "ambient_pressure"),
    (lambda: isen.temperature_ratio(np.array([1.0, -1.0]), 1.4), "mach"),
])
def test_input_errors_name_the_field(call, field):
    with pytest.raises(InputError, match=f"^{field}: got"):
        call()


gammas = st.floats(min_value=1.05, max_value=1.67)

# Near M = 1 the inverse is ill-conditioned (A/A* - 1 ~ (M - 1)^2), so the Mach
# number can only come back to about sqrt(machine epsilon); the area ratio itself
# must come back to round-off.


@settings(max_examples=150, deadline=None)
@given(st.floats(min_value=1.0, max_value=12.0), gammas)
def test_round_trip_supersonic(M, g):
    eps = isen.area_ratio(M, g)
    back = isen.mach_from_area_ratio(eps, g)
    assert back >= 1.0
    assert back == pytest.approx(M, rel=1e-9, abs=1e-7)
    assert isen.area_ratio(back, g) == pytest.approx(eps, rel=1e-13)


@settings(max_examples=150, deadline=None)
@given(st.floats(min_value=0.01, max_value=1.0), gammas)
def test_round_trip_subsonic(M, g):
    eps = isen.area_ratio(M, g)
    back = isen.mach_from_area_ratio(eps, g, supersonic=False)
    assert back <= 1.0
    assert back == pytest.approx(M, rel=1e-9, abs=1e-7)
    assert isen.area_ratio(back, g) == pytest.approx(eps, rel=1e-13)


@settings(max_examples=150, deadline=None)
@given(st.floats(min_value=0.0, max_value=15.0), gammas)
def test_round_trip_pressure(M, g):
    assert isen.mach_from_pressure_ratio(isen.pressure_ratio(M, g), g) == pytest.approx(M, rel=1e-8, abs=1e-6)


@settings(max_examples=100, deadline=None)
@given(st.floats(min_value=1.01, max_value=1000.0), gammas)
def test_density_is_pressure_over_temperature(eps, g):
    # ideal gas: rho/rho0 = (p/p0) / (T/T0)
    M = isen.mach_from_area_ratio(eps, g)
    assert isen.density_ratio(M, g) == pytest.approx(
        isen.pressure_ratio(M, g) / isen.temperature_ratio(M, g), rel=1e-12)
