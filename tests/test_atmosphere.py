"""U.S. Standard Atmosphere 1976 checks against the published document."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from perfchain import atmosphere as atm
from perfchain.errors import InputError

# Layer bases in geopotential km (U.S. Standard Atmosphere 1976, NOAA-S/T 76-1562, Table 4;
# from memory): (H [m'], p [Pa], T [K]).
LAYER_BASES = [
    (0.0, 101325.0, 288.15),
    (11000.0, 22632.1, 216.65),
    (20000.0, 5474.89, 216.65),
    (32000.0, 868.019, 228.65),
    (47000.0, 110.906, 270.65),
]


@pytest.mark.parametrize("h, p_ref, t_ref", LAYER_BASES)
def test_layer_bases_match_published_table(h, p_ref, t_ref):
    z = atm.geometric_altitude(h)
    # published to 6 significant figures: agree to half a unit in the last digit
    assert atm.pressure(z) == pytest.approx(p_ref, rel=6e-6)
    assert atm.temperature(z) == pytest.approx(t_ref, abs=1e-9)


# Geometric-altitude rows of the 1976 document, Table I (from memory, so a looser
# tolerance of 0.05 % on pressure/density and 0.01 K on temperature):
# z [m], T [K], p [Pa], rho [kg/m^3]
GEOMETRIC_ROWS = [
    (10000.0, 223.252, 26499.9, 0.41351),
    (30000.0, 226.509, 1197.0, 1.8410e-2),
    (50000.0, 270.65, 79.779, 1.0269e-3),
    (86000.0, 186.87, 0.37338, 6.958e-6),
]


@pytest.mark.parametrize("z, t_ref, p_ref, rho_ref", GEOMETRIC_ROWS)
def test_geometric_rows_from_memory(z, t_ref, p_ref, rho_ref):
    assert atm.temperature(z) == pytest.approx(t_ref, abs=0.01)
    assert atm.pressure(z) == pytest.approx(p_ref, rel=5e-4)
    assert atm.density(z) == pytest.approx(rho_ref, rel=5e-4)


def test_sea_level_density_and_speed_of_sound():
    # 1976 document, Table I: rho0 = 1.2250 kg/m^3, a0 = 340.294 m/s
    assert atm.density(0.0) == pytest.approx(1.2250, abs=5e-5)
    assert atm.speed_of_sound(0.0) == pytest.approx(340.294, abs=5e-4)


def test_speed_of_sound_at_86_km_from_memory():
    # 1976 document, Table I, 86 km: 274.10 m/s (from memory)
    assert atm.speed_of_sound(86000.0) == pytest.approx(274.10, abs=0.02)


def test_geopotential_of_86_km():
    # 1976 document: 86 km geometric is 84.852 km' geopotential
    assert atm.geopotential_altitude(86000.0) == pytest.approx(84852.0, abs=0.5)


def test_arrays_match_scalars():
    z = np.array([0.0, 5000.0, 11019.0, 47000.0, 71000.0, 86000.0])
    for fn in (atm.pressure, atm.temperature, atm.density, atm.speed_of_sound):
        out = fn(z)
        assert isinstance(out, np.ndarray) and out.shape == z.shape
        assert np.allclose(out, [fn(float(v)) for v in z], rtol=1e-14)
    assert isinstance(atm.pressure(1000.0), float)


@pytest.mark.parametrize("bad", [-1.0, 86000.1, 1.0e6, math.nan])
def test_out_of_range_altitude(bad):
    with pytest.raises(InputError, match="altitude.*an altitude from 0 to 86 km"):
        atm.pressure(bad)


def test_out_of_range_altitude_in_array():
    with pytest.raises(InputError, match="altitude: got -5.0"):
        atm.temperature(np.array([0.0, -5.0]))


@pytest.mark.parametrize("bad", [101325.5, 0.3, 0.0, -1.0])
def test_inverse_out_of_range(bad):
    with pytest.raises(InputError, match="pressure"):
        atm.altitude_for_pressure(bad)


@settings(max_examples=200, deadline=None)
@given(st.floats(min_value=0.0, max_value=86000.0))
def test_inverse_round_trip(z):
    assert atm.altitude_for_pressure(atm.pressure(z)) == pytest.approx(z, abs=1e-6)


def test_pressure_strictly_decreasing():
    # hydrostatic equation: dp/dz = -rho g < 0
    p = atm.pressure(np.linspace(0.0, 86000.0, 2001))
    assert np.all(np.diff(p) < 0.0)


def test_hydrostatic_balance_numerically():
    # dp/dH = -rho g0 in geopotential altitude (1976 document, eq. 33a)
    for z in (3000.0, 15000.0, 25000.0, 40000.0, 60000.0, 80000.0):
        h = atm.geopotential_altitude(z)
        dh = 1.0
        dp = atm.pressure(atm.geometric_altitude(h + dh)) - atm.pressure(atm.geometric_altitude(h - dh))
        assert dp / (2 * dh) == pytest.approx(-atm.density(z) * atm.G0, rel=1e-6)
