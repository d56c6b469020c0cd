"""Rayleigh flow closed forms and the finite-contraction-ratio chamber helper."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from perfchain.nozzle import isentropic as isen
from perfchain.nozzle import rayleigh as ray
from perfchain.errors import InputError

# Rayleigh-flow table, g = 1.4 (Anderson, Modern Compressible Flow, Table A.3;
# NACA Report 1135 has the same table; from memory, so 0.05 % tolerance):
# M, p/p*, T/T*, T0/T0*, p0/p0*
TABLE = [
    (0.5, 1.7778, 0.7901, 0.6914, 1.1141),
    (2.0, 0.3636, 0.5289, 0.7934, 1.5031),
]


@pytest.mark.parametrize("M, p, T, T0, p0", TABLE)
def test_rayleigh_table_from_memory(M, p, T, T0, p0):
    assert ray.pressure_ratio(M, 1.4) == pytest.approx(p, rel=5e-4)
    assert ray.temperature_ratio(M, 1.4) == pytest.approx(T, rel=5e-4)
    assert ray.stagnation_temperature_ratio(M, 1.4) == pytest.approx(T0, rel=5e-4)
    assert ray.stagnation_pressure_ratio(M, 1.4) == pytest.approx(p0, rel=5e-4)


def test_sonic_point_and_limits():
    # closed forms: all ratios are 1 at M = 1; at M = 0 p/p* = 1 + g and
    # p0/p0* = (1 + g) (2/(g+1))^(g/(g-1)) = 1.2679 for g = 1.4 (Rayleigh table)
    for g in (1.2, 1.4, 5.0 / 3.0):
        for fn in (ray.pressure_ratio, ray.temperature_ratio,
                   ray.stagnation_temperature_ratio, ray.stagnation_pressure_ratio):
            assert fn(1.0, g) == pytest.approx(1.0, rel=1e-15)
        assert ray.pressure_ratio(0.0, g) == pytest.approx(1.0 + g, rel=1e-15)
    assert ray.stagnation_pressure_ratio(0.0, 1.4) == pytest.approx(1.2679, abs=5e-5)
    # M -> infinity: T0/T0* -> (g^2 - 1)/g^2 = 0.4898 for g = 1.4
    assert ray.stagnation_temperature_ratio(1.0e4, 1.4) == pytest.approx(0.96 / 1.96, rel=1e-6)


def test_heat_addition_drives_towards_sonic():
    # T0/T0* rises monotonically to 1 at M = 1 on both branches
    sub = ray.stagnation_temperature_ratio(np.linspace(0.01, 1.0, 200), 1.3)
    sup = ray.stagnation_temperature_ratio(np.linspace(1.0, 8.0, 200), 1.3)
    assert np.all(np.diff(sub) > 0) and np.all(np.diff(sup) < 0)


gammas = st.floats(min_value=1.05, max_value=1.67)


@settings(max_examples=150, deadline=None)
@given(st.floats(min_value=0.001, max_value=1.0), gammas)
def test_T0_round_trip_subsonic(M, g):
    r = ray.stagnation_temperature_ratio(M, g)
    assert ray.mach_from_T0_ratio(r, g) == pytest.approx(M, rel=1e-7, abs=2e-7)


@settings(max_examples=150, deadline=None)
@given(st.floats(min_value=1.0, max_value=20.0), gammas)
def test_T0_round_trip_supersonic(M, g):
    r = ray.stagnation_temperature_ratio(M, g)
    assert ray.mach_from_T0_ratio(r, g, supersonic=True) == pytest.approx(M, rel=1e-6, abs=2e-7)


def test_chamber_ratio_is_rayleigh_over_injector_state():
    # injector face at M = 0 has p = p0, so p0_inlet/p_inj = (p0/p0*)(M) / (p0/p0*)(0);
    # the closed-form helper must agree with the Rayleigh table functions
    for cr in (1.0, 1.5, 2.0, 3.0, 6.0):
        g = 1.22
        M = ray.chamber_inlet_mach(cr, g)
        assert isen.area_ratio(M, g) == pytest.approx(cr, rel=1e-12)
        expected = ray.stagnation_pressure_ratio(M, g) / ray.stagnation_pressure_ratio(0.0, g)
        assert ray.chamber_stagnation_pressure_ratio(cr, g) == pytest.approx(expected, rel=1e-12)


def test_infinite_contraction_ratio_limit():
    # Ac/At -> infinity: inlet Mach -> 0 and no stagnation-pressure loss
    ratios = ray.chamber_stagnation_pressure_ratio(np.array([2.0, 10.0, 100.0, 1.0e4]), 1.2)
    assert np.all(np.diff(ratios) > 0) and ratios[-1] == pytest.approx(1.0, abs=1e-8)


@pytest.mark.parametrize("cr", [4.0, 8.0, 20.0])
def test_low_mach_expansion(cr):
    # p0 loss ~ 1 - (g/2) M^2 at low Mach (series of the closed form); error O(M^4)
    g = 1.2
    M = ray.chamber_inlet_mach(cr, g)
    assert ray.chamber_stagnation_pressure_ratio(cr, g) == pytest.approx(1 - 0.5 * g * M * M, abs=M ** 4)


def test_choked_chamber_value():
    # Ac/At = 1, g = 1.4: 1/1.2679 = 0.7887 (Rayleigh table; from memory)
    assert ray.chamber_stagnation_pressure_ratio(1.0, 1.4) == pytest.approx(0.7887, abs=1e-4)


def test_errors():
    with pytest.raises(InputError, match="^contraction_ratio: got 0.5"):
        ray.chamber_inlet_mach(0.5, 1.2)
    with pytest.raises(InputError, match="^T0_ratio: got 1.5"):
        ray.mach_from_T0_ratio(1.5, 1.4)
    with pytest.raises(InputError, match="^T0_ratio: got 0.3"):
        ray.mach_from_T0_ratio(0.3, 1.4, supersonic=True)
    with pytest.raises(InputError, match="^gamma: got 0.9"):
        ray.pressure_ratio(0.5, 0.9)
