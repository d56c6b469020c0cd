"""Thrust-chamber sizing against a hand calculation and the c*/Isp definitions."""

import math

import pytest

from perfchain.constants import G0
from perfchain.nozzle import isentropic as isen
from perfchain.errors import InputError
from perfchain.performance.sizing import diameter, size_thrust_chamber


def test_hand_calculation_invented_engine():
    # Invented engine "Brightwater BW-12" (demo data): F = 12 kN, Isp = 310 s,
    # c* = 1750 m/s, pc = 3 MPa, eps = 25, O/F = 1.5, LOX 1141 kg/m^3, ethanol
    # 789 kg/m^3 (densities as commonly quoted: LOX at its normal boiling point, ethanol at
    # 20 C, CRC Handbook of Chemistry and Physics; from memory). By hand:
    #   mdot = 12000 / (310 * 9.80665)       = 12000 / 3040.06  = 3.94729 kg/s
    #   At   = 3.94729 * 1750 / 3e6                             = 2.30258e-3 m^2
    #   Dt   = sqrt(4 * 2.30258e-3 / pi)     = sqrt(2.93175e-3) = 0.0541456 m
    #   Ae   = 25 * At                                          = 0.0575646 m^2
    #   De   = sqrt(25) * Dt = 5 * 0.0541456                    = 0.270728 m
    #   ox   = 3.94729 * 1.5 / 2.5 = 2.36837 kg/s; fuel = 3.94729 / 2.5 = 1.57892 kg/s
    #   Vox  = 2.36837 / 1141 = 2.07570e-3 m^3/s; Vf = 1.57892 / 789 = 2.00116e-3 m^3/s
    s = size_thrust_chamber(12.0e3, 310.0, 1750.0, 3.0e6, 25.0, 1.5,
                            oxidizer_density=1141.0, fuel_density=789.0)
    hand = dict(mass_flow=3.94729, throat_area=2.30258e-3, throat_diameter=0.0541456,
                exit_area=0.0575646, exit_diameter=0.270728, oxidizer_mass_flow=2.36837,
                fuel_mass_flow=1.57892, oxidizer_volume_flow=2.07570e-3, fuel_volume_flow=2.00116e-3)
    d = s.to_dict()
    assert set(d) == set(hand)
    for key, value in hand.items():
        assert d[key] == pytest.approx(value, rel=5e-6), key


def test_thrust_reproduced_from_cf():
    # F = Cf pc At and Isp = c* Cf / g0 (definitions): sizing with the ideal
    # closed-form values must give back the thrust (g = 1.2, eps = 40, vacuum)
    g, eps, pc, Tc, mol = 1.2, 40.0, 5.0e6, 3300.0, 20.0
    cs = isen.cstar(Tc, mol, g)
    cf = isen.thrust_coefficient(g, isen.exit_pressure_ratio_for_area_ratio(eps, g), 0.0, eps)
    s = size_thrust_chamber(50.0e3, cs * cf / G0, cs, pc, eps, 3.0)
    assert cf * pc * s.throat_area == pytest.approx(50.0e3, rel=1e-13)
    assert s.oxidizer_mass_flow + s.fuel_mass_flow == pytest.approx(s.mass_flow, rel=1e-15)
    assert s.oxidizer_mass_flow / s.fuel_mass_flow == pytest.approx(3.0, rel=1e-14)
    assert s.oxidizer_volume_flow is None and s.fuel_volume_flow is None


def test_fuel_only():
    s = size_thrust_chamber(1.0e3, 230.0, 1300.0, 1.0e6, 50.0, 0.0, fuel_density=1008.0)
    assert s.oxidizer_mass_flow == 0.0 and s.fuel_mass_flow == s.mass_flow


def test_diameter_closed_form():
    assert diameter(math.pi) == pytest.approx(2.0, rel=1e-15)


@pytest.mark.parametrize("kwargs, field", [
    ({"thrust": 0.0}, "thrust"),
    ({"thrust": -5.0}, "thrust"),
    ({"isp": 0.0}, "isp"),
    ({"cstar": math.nan}, "cstar"),
    ({"chamber_pressure": -1.0}, "chamber_pressure"),
    ({"area_ratio": 0.9}, "area_ratio"),
    ({"mixture_ratio": -1.0}, "mixture_ratio"),
    ({"oxidizer_density": 0.0}, "oxidizer_density"),
    ({"thrust": True}, "thrust"),
])
def test_errors(kwargs, field):
    args = dict(thrust=1.0e3, isp=300.0, cstar=1600.0, chamber_pressure=2.0e6,
                area_ratio=10.0, mixture_ratio=2.0)
    args.update(kwargs)
    with pytest.raises(InputError, match=f"^{field}: got"):
        size_thrust_chamber(**args)
