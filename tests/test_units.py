"""Units at the edges: the fast path for common units equals pint (the reference library) exactly."""

import random
import subprocess
import sys

import pytest

from perfchain.errors import InputError
from perfchain.units import FAST_UNITS, KINDS, registry, to_si


@pytest.mark.parametrize("kind, unit", [(k, u) for k, units in FAST_UNITS.items() for u in units])
def test_fast_units_equal_pint_bit_for_bit(kind, unit):
    # pint's own conversion is the reference; values spread over many decades, as typed
    rng = random.Random(7)
    values = [rng.uniform(0, 1000) for _ in range(300)] + [1, 2.1, 20, 0.1, 3.7e-3, 12345.678, 1e-9, 7e8]
    ureg = registry()
    for v in values:
        text = f"{v!r} {unit}"
        assert to_si(text, kind, "x") == float(ureg.Quantity(v, unit).to(KINDS[kind][0]).magnitude), text


def test_common_units_do_not_load_pint():
    code = ("import sys; from perfchain.units import to_si; "
            "to_si('20 bar', 'pressure', 'p'); to_si('11 km', 'length', 'z'); "
            "print('pint' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_other_units_still_go_through_pint():
    # 1000 psi = 6.894757 MPa (NIST SP 811, Appendix B; psi = lbf/in^2)
    assert to_si("1000 psi", "pressure", "p") == pytest.approx(6.894757293e6, rel=1e-9)
    assert to_si("25 degC", "temperature", "t") == pytest.approx(298.15, rel=1e-12)


@pytest.mark.parametrize("text, kind, si", [
    # powers written as a bare digit, as data sheets print them; exact unit definitions
    # (1 g/cm3 = 1000 kg/m3; 1 ft = 0.3048 m, NIST SP 811)
    ("1950 kg/m3", "density", 1950.0), ("1.95 g/cm3", "density", 1950.0),
    ("100 ft3", "volume", 100 * 0.3048 ** 3), ("0.01 m2", "area", 0.01), ("1141 kg/m^3", "density", 1141.0),
])
def test_powers_as_bare_digits(text, kind, si):
    assert to_si(text, kind, "x") == pytest.approx(si, rel=1e-12)


def test_bare_digit_power_still_checks_the_dimension():
    with pytest.raises(InputError) as info:
        to_si("2 m2", "length", "x")
    assert str(info.value).startswith("x: got '2 m2'")
