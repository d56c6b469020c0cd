"""Quantities with units at the edges; SI floats inside.

Every edge of perfchain (CLI options, study files, the friendly Python layer)
accepts text such as ``"300 psi"``, ``"2.1 MPa"``, ``"15 km"`` or ``"15deg"`` and
turns it into an SI float with :func:`to_si`. A bare number is refused for any
dimensioned quantity: ``"20"`` could be bar, psi or MPa, and guessing is how
engines get mis-sized.
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

from perfchain.errors import InputError

__all__ = ["KINDS", "to_si", "registry", "from_si"]

#: kind -> (SI unit, pint dimensionality text, example for messages)
KINDS = {
    "pressure": ("Pa", "[mass] / [length] / [time] ** 2", "'20 bar', '300 psi', '2.1 MPa'"),
    "temperature": ("K", "[temperature]", "'90.2 K', '25 degC'"),
    "length": ("m", "[length]", "'11 km', '0.2 m'"),
    "area": ("m**2", "[length] ** 2", "'0.01 m**2', '15 in**2'"),
    "mass": ("kg", "[mass]", "'10 t', '2500 kg', '500 lb'"),
    "speed": ("m/s", "[length] / [time]", "'4.5 km/s', '3200 m/s'"),
    "time": ("s", "[time]", "'350 s'"),
    "force": ("N", "[length] * [mass] / [time] ** 2", "'5 kN', '1000 lbf'"),
    "angle": ("rad", "", "'15deg', '0.26 rad'"),
    "density": ("kg/m**3", "[mass] / [length] ** 3", "'1141 kg/m**3'"),
    "volume": ("m**3", "[length] ** 3", "'2.5 m**3', '500 L'"),
    "molar_enthalpy": ("J/mol", "[length] ** 2 * [mass] / [substance] / [time] ** 2", "'-12.98 kJ/mol'"),
}

#: kind -> unit text -> exact SI factor, for the common units: converted without loading pint
#: (~0.6 s per process). tests/test_units.py checks each against pint, bit for bit.
FAST_UNITS = {
    "pressure": {"Pa": 1.0, "kPa": 1e3, "MPa": 1e6, "bar": 1e5, "atm": 101325.0},
    "length": {"m": 1.0, "km": 1e3},
    "temperature": {"K": 1.0},
    "time": {"s": 1.0},
    "force": {"N": 1.0, "kN": 1e3},
    "mass": {"kg": 1.0, "t": 1e3},
    "speed": {"m/s": 1.0, "km/s": 1e3},
}

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


@lru_cache(maxsize=1)
def registry():
    """The shared pint registry, with ``psia`` as an alias of psi (absolute)."""
    import pint

    ureg = pint.UnitRegistry()
    ureg.define("psia = psi")
    return ureg


def to_si(value, kind: str, field: str, *, minimum: float | None = None,
          exclusive: bool = True, maximum: float | None = None) -> float:
    """Convert ``value`` to an SI float of the given kind.

    Parameters
    ----------
    value : str or float
        Text with a unit (``"300 psi"``) or, from the Python API only, a plain
        number already in SI units. Text without a unit is refused for every
        dimensioned kind.
    kind : str
        One of :data:`KINDS`.
    field : str
        Name of the input, used in the error message.
    minimum, maximum : float, optional
        Bounds in SI units; ``exclusive`` makes the minimum exclusive.

    Returns
    -------
    float
        The value in SI units (Pa, K, m, kg, m/s, s, N, rad, ...).

    Examples
    --------
    One standard atmosphere is 101 325 Pa exactly (NIST SP 330, 2019):

    >>> to_si("1 atm", "pressure", "ambient_pressure")
    101325.0
    >>> round(to_si("1000 psi", "pressure", "chamber_pressure"))
    6894757
    >>> to_si("20", "pressure", "chamber_pressure")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: chamber_pressure: got '20'; allowed: a pressure with a unit, e.g. '20 bar', '300 psi', '2.1 MPa'
    """
    if kind not in KINDS:
        raise KeyError(kind)
    si_unit, _dim, example = KINDS[kind]
    allowed = f"a {kind.replace('_', ' ')} with a unit, e.g. {example}"
    if isinstance(value, bool):
        raise InputError(field, value, allowed)
    if isinstance(value, (int, float)):
        number = float(value)
    elif isinstance(value, str):
        number = _parse_text(value, kind, field, allowed)
    else:
        raise InputError(field, value, allowed)
    if not math.isfinite(number):
        raise InputError(field, value, "a finite number")
    if minimum is not None and (number < minimum or (exclusive and number == minimum)):
        op = "above" if exclusive else "at least"
        raise InputError(field, value, f"a {kind.replace('_', ' ')} {op} {minimum:g} {si_unit}")
    if maximum is not None and number > maximum:
        raise InputError(field, value, f"a {kind.replace('_', ' ')} at most {maximum:g} {si_unit}")
    return number


def _parse_text(text: str, kind: str, field: str, allowed: str) -> float:
    match = _NUMBER.match(text)
    if not match:
        raise InputError(field, text, allowed)
    number, unit = float(match.group(1)), match.group(2)
    if not unit:
        raise InputError(field, text, allowed)
    factor = FAST_UNITS.get(kind, {}).get(unit)
    if factor is not None:
        si = number * factor
        if not math.isfinite(si):
            raise InputError(field, text, allowed)
        return si
    ureg = registry()
    try:
        quantity = ureg.Quantity(number, unit)
        si = quantity.to(KINDS[kind][0])
        if not math.isfinite(float(si.magnitude)):
            raise ValueError(text)
    except Exception:  # pint raises many kinds (tokenizer, assertion, zero division...) for junk
        raise InputError(field, text, allowed) from None
    return float(si.magnitude)


def from_si(value: float, unit: str, kind: str) -> float:
    """Convert an SI float of ``kind`` to ``unit`` (for output unit sets).

    >>> round(from_si(6894757.293168361, "psi", "pressure"), 6)
    1000.0
    """
    ureg = registry()
    return float(ureg.Quantity(value, KINDS[kind][0]).to(unit).magnitude)
