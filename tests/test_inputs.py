"""The one validation layer (perfchain.inputs): accepted forms, SI values, one-line errors.

Unit factors are checked against their definitions: 1 bar = 1e5 Pa, 1 atm = 101 325 Pa,
1 psi = 6894.757 Pa, 1 deg = pi/180 rad (NIST SP 811, Appendix B; NIST SP 330, 2019).
"""

import math

import numpy as np
import pint
import pytest

from perfchain import inputs
from perfchain.errors import InputError
from perfchain.units import Q_


# ------------------------------------------------------------------ one value
@pytest.mark.parametrize("given", ["70 bar", "7 MPa", Q_(70, "bar"), pint.UnitRegistry().Quantity(7, "MPa"),
                                   7e6, 7_000_000, np.int64(7_000_000), np.float64(7e6), np.array(7e6)])
def test_a_pressure_in_any_accepted_form_is_the_same_si_float(given):
    # 1 bar = 1e5 Pa and 1 MPa = 1e6 Pa exactly (NIST SP 811)
    assert inputs.value("chamber_pressure", given) == 7e6


def test_psi_and_atm_follow_their_definitions():
    # NIST SP 811 Appendix B: psi = 6.894757e3 Pa; atm = 101 325 Pa exactly
    assert inputs.value("chamber_pressure", "1000 psi") == pytest.approx(6.894757e6, rel=1e-7)
    assert inputs.value("ambient_pressure", Q_(1, "atm")) == 101325.0


@pytest.mark.parametrize("given", ["2.6", 2.6, np.float64(2.6), Q_(2.6, "")])
def test_a_ratio_from_text_numbers_numpy_and_dimensionless_quantities(given):
    assert inputs.value("mixture_ratio", given) == 2.6


def test_numpy_integers_and_float32_are_numbers():
    assert inputs.value("area_ratio", np.int32(40)) == 40.0
    assert inputs.value("mixture_ratio", np.float32(2.5)) == 2.5


@pytest.mark.parametrize("field, given, shown", [
    ("chamber_pressure", "-3 bar", "'-3 bar'"),
    ("chamber_pressure", Q_(-3, "bar"), "'-3 bar'"),          # the Quantity as typed, not -300000.0
    ("chamber_pressure", "20", "'20'"),                        # no unit: could be bar, psi or MPa
    ("chamber_pressure", Q_(2, "m"), "'2 m'"),                 # wrong dimension
    ("chamber_pressure", True, "True"),
    ("mixture_ratio", "-2", "'-2'"),
    ("mixture_ratio", np.float64("nan"), "nan"),
    ("mixture_ratio", "abc", "'abc'"),
    ("area_ratio", "1", "'1'"),
    ("fuel_percent", 100, "100"),
    ("altitude", "90 km", "'90 km'"),
    ("nozzle_half_angle", "50 deg", "'50 deg'"),
    ("cstar_efficiency", "1.5", "'1.5'"),
    ("structural_ratio", "100 %", "'100 %'"),
    ("payload", "-1 t", "'-1 t'"),
])
def test_a_refusal_is_one_line_naming_the_field_the_typed_value_and_what_is_allowed(field, given, shown):
    with pytest.raises(InputError) as info:
        inputs.value(field, given)
    text = str(info.value)
    assert "\n" not in text
    assert text.startswith(f"{field}: got {shown}; allowed: "), text
    assert len(text) > len(f"{field}: got {shown}; allowed: ") + 5


def test_the_message_can_name_a_key_path():
    with pytest.raises(InputError, match=r"^engine\[2\]\.chamber_pressure: got '0 bar'"):
        inputs.value("chamber_pressure", "0 bar", name="engine[2].chamber_pressure")


def test_angles_fractions_and_counts():
    assert inputs.value("nozzle_half_angle", "15 deg") == pytest.approx(math.radians(15), rel=1e-15)
    assert inputs.value("nozzle_half_angle", Q_(15, "degree")) == pytest.approx(math.radians(15), rel=1e-15)
    assert inputs.value("structural_ratio", "15 %") == 0.15
    assert inputs.value("propellant_fraction", np.float64(0.85)) == 0.85
    assert inputs.count(np.int64(3), "workers", "at least 1", 1) == 3
    for bad in ("0", 0, 2.0, True, "two", np.float64(2)):
        with pytest.raises(InputError, match="^workers: got"):
            inputs.count(bad, "workers", "a whole number of workers, at least 1", 1)


def test_the_contraction_bound_is_the_nozzle_modules_bound():
    from perfchain.nozzle.contraction import MAX_CONTRACTION

    spec = inputs.FIELDS["contraction_ratio"]
    assert spec.high == MAX_CONTRACTION and f"{MAX_CONTRACTION:g}" in spec.allowed


# ------------------------------------------------------------------ grids
@pytest.mark.parametrize("given, expected", [
    (2.6, [2.6]),
    ("2.6", [2.6]),
    ([2.0, "2.4", np.float64(2.8)], [2.0, 2.4, 2.8]),
    (np.array([2.0, 2.4]), [2.0, 2.4]),
    ("2.0,2.4, 2.8", [2.0, 2.4, 2.8]),
    ("1.6:2.0:0.1", [1.6, 1.7, 1.8, 1.9, 2.0]),          # stop included, decimal steps exact
    ("1:2:0.3", [1.0, 1.3, 1.6, 1.9]),                    # a stop off the step is not reached
    ("1.5,2:3:0.5", [1.5, 2.0, 2.5, 3.0]),                # values and ranges mixed
])
def test_mixture_ratio_grids(given, expected):
    out = inputs.grid("mixture_ratio", given)
    assert out.dtype == np.float64 and out.ndim == 1
    assert out.tolist() == expected


@pytest.mark.parametrize("given", ["20 bar,50 bar", "20:50:30 bar", "20 bar:50 bar:30 bar", ["20 bar", 5e6],
                                   Q_(np.array([20, 50]), "bar"), [Q_(2, "MPa"), Q_(50, "bar")],
                                   np.array([2e6, 5e6])])
def test_pressure_grids(given):
    assert inputs.grid("chamber_pressure", given).tolist() == [2e6, 5e6]


@pytest.mark.parametrize("field, given, shown", [
    ("mixture_ratio", "", "''"),
    ("mixture_ratio", "2.4,", "'2.4,'"),
    ("mixture_ratio", "2.4,abc", "'abc'"),
    ("mixture_ratio", "2.4,2.40", "'2.4,2.40'"),
    ("mixture_ratio", [2.4, 2.4], "[2.4, 2.4]"),
    ("mixture_ratio", [], "[]"),
    ("mixture_ratio", None, "None"),
    ("mixture_ratio", "0:3:0.5", "'0:3:0.5'"),             # the range as typed, not its first value
    ("mixture_ratio", "3:1:0.5", "'3:1:0.5'"),
    ("mixture_ratio", "1:3:0", "'1:3:0'"),
    ("mixture_ratio", "1:3", "'1:3'"),
    ("mixture_ratio", "1:1e9:1", "'1:1e9:1'"),
    ("chamber_pressure", "20,30", "'20'"),
    ("chamber_pressure", "20:100:20", "'20:100:20'"),
    ("chamber_pressure", "20 bar:100 psi:20 bar", "'20 bar:100 psi:20 bar'"),
    ("area_ratio", "10,0.5", "'0.5'"),
    ("altitude", "0 km,100 km", "'100 km'"),
])
def test_bad_grids_are_one_line(field, given, shown):
    with pytest.raises(InputError) as info:
        inputs.grid(field, given)
    assert str(info.value).startswith(f"{field}: got {shown}; allowed: "), str(info.value)
    assert "\n" not in str(info.value)


# ------------------------------------------------------------------ a whole point
def test_point_args_are_si_and_ingredients_are_records():
    a = inputs.point_args("lox", "RP-1", mixture_ratio="2.6", chamber_pressure="70 bar", area_ratio="40",
                          nozzle_half_angle="15 deg", cstar_efficiency=np.float64(0.97), thrust="5 kN")
    assert a["oxidizer"].name == "LOX" and a["fuel"].name == "RP-1"
    assert (a["mixture_ratio"], a["chamber_pressure"], a["area_ratio"], a["ambient_pressure"]) == \
        (2.6, 7e6, 40.0, 101325.0)
    assert a["losses"] == {"cstar_efficiency": 0.97, "conical_half_angle": pytest.approx(math.radians(15))}
    assert a["thrust"] == 5000.0 and a["flow"] == "shifting" and a["thrust_at"] == "vacuum"


BASE = dict(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.6, chamber_pressure="70 bar")


@pytest.mark.parametrize("extra, start", [
    (dict(exit_pressure="80 bar"), "exit_pressure: got '80 bar'; allowed: a pressure below the chamber"),
    (dict(area_ratio=40, ambient_pressure=Q_(100, "bar")), "ambient_pressure: got '100 bar'"),
    (dict(area_ratio=40, altitude="1 km", ambient_pressure="1 atm"), "altitude: got '1 km'"),
    (dict(area_ratio=40, exit_pressure="1 atm"), "exit: got 'both'"),
    (dict(), "exit: got 'neither'"),
    (dict(area_ratio=40, equivalence_ratio=1.2), "mixture: got 'mixture_ratio, equivalence_ratio'"),
    (dict(area_ratio=40, flow="sideways"), "flow: got 'sideways'"),
    (dict(area_ratio=40, thrust_at="orbit"), "thrust_at: got 'orbit'"),
    (dict(area_ratio=40, losses={"kinetc": 0.99}), "losses: got 'kinetc'"),
    (dict(area_ratio=40, losses={"cstar_efficiency": 0.9}, cstar_efficiency=0.95), "cstar_efficiency: got 0.95"),
    (dict(area_ratio=40, fuel="LOX"), "fuel: got 'LOX'"),
])
def test_cross_field_rules_name_the_typed_value(extra, start):
    with pytest.raises(InputError) as info:
        inputs.point_args(**{**BASE, **extra})
    assert str(info.value).startswith(start), str(info.value)
