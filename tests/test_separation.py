"""Separation flag: Summerfield and Schmucker criteria, full-flow altitude."""

import math

import pytest

from perfchain import atmosphere as atm
from perfchain.nozzle import isentropic as isen
from perfchain.errors import InputError
from perfchain.performance.separation import list_separation_criteria, separation


def test_summerfield_flag_either_side_of_threshold():
    # Summerfield, Foster & Swan 1954 (from memory): separated when pe/pa < 0.4
    pa = 101325.0
    assert separation(0.39 * pa, pa).flag is True
    assert separation(0.41 * pa, pa).flag is False
    assert separation(1.2 * pa, pa).flag is False  # under-expanded never separates


def test_threshold_override_within_published_range():
    pa = 101325.0
    assert separation(0.37 * pa, pa, threshold=0.35).flag is False
    assert separation(0.37 * pa, pa).flag is True
    with pytest.raises(InputError, match="^threshold: got 0.9"):
        separation(1.0e4, pa, threshold=0.9)


def test_vacuum_never_separates():
    s = separation(500.0, 0.0)
    assert s.flag is False and s.pressure_ratio == math.inf


def test_full_flow_pressure_and_altitude_consistent_with_atmosphere():
    s = separation(20.0e3, 101325.0)
    assert s.full_flow_ambient_pressure == pytest.approx(20.0e3 / 0.4, rel=1e-15)
    # the 1976 atmosphere at that altitude has exactly that pressure
    assert atm.pressure(s.full_flow_altitude) == pytest.approx(50.0e3, rel=1e-10)
    # 50 kPa lies near 5.57 km (1976 table: 5.5 km 50.5 kPa, 6 km 47.2 kPa; from memory)
    assert 5.5e3 < s.full_flow_altitude < 6.0e3
    # at that ambient pressure the nozzle sits exactly on the threshold
    assert separation(20.0e3, s.full_flow_ambient_pressure * 1.001).flag is True
    assert separation(20.0e3, s.full_flow_ambient_pressure * 0.999).flag is False


def test_full_flow_at_sea_level_gives_zero_and_above_86_km_none():
    assert separation(60.0e3, 101325.0).full_flow_altitude == 0.0
    assert separation(0.1, 1.0).full_flow_altitude is None


def test_schmucker_closed_form():
    # Schmucker (from memory): (1.88 Me - 1)^-0.64; Me = 3 -> 4.64^-0.64 = 0.3745
    s = separation(30.0e3, 101325.0, "schmucker", exit_mach=3.0)
    assert s.threshold == pytest.approx(0.3745, abs=1e-4)
    assert s.flag is True
    assert separation(40.0e3, 101325.0, "schmucker", exit_mach=3.0).flag is False


def test_schmucker_with_isentropic_exit_mach():
    # sea-level engine, g = 1.2, eps = 30, pc = 7 MPa: pe from the closed form
    g, eps, pc = 1.2, 30.0, 7.0e6
    Me = isen.mach_from_area_ratio(eps, g)
    pe = isen.exit_pressure_ratio_for_area_ratio(eps, g) * pc
    s = separation(pe, 101325.0, "schmucker", exit_mach=Me)
    assert s.threshold == pytest.approx((1.88 * Me - 1) ** -0.64, rel=1e-15)
    assert s.flag == (pe / 101325.0 < s.threshold)


def test_registry_and_errors():
    assert set(list_separation_criteria()) == {"summerfield", "schmucker"}
    with pytest.raises(InputError, match="^criterion: got 'sumerfield'.*did you mean 'summerfield'"):
        separation(1.0e4, 1.0e5, "sumerfield")
    with pytest.raises(InputError, match="^exit_mach: got None"):
        separation(1.0e4, 1.0e5, "schmucker")
    with pytest.raises(InputError, match="^exit_pressure: got 0.0"):
        separation(0.0, 1.0e5)
    with pytest.raises(InputError, match="^ambient_pressure: got -1.0"):
        separation(1.0e4, -1.0)


def test_to_dict():
    d = separation(30.0e3, 101325.0).to_dict()
    assert set(d) == {"flag", "criterion", "threshold", "pressure_ratio",
                      "full_flow_ambient_pressure", "full_flow_altitude"}
