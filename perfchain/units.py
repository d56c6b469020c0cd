"""Quantities with units at the edges; SI floats inside.

Every edge of perfchain (CLI options, study files, the Python API) accepts text
such as ``"300 psi"``, ``"2.1 MPa"``, ``"15 km"`` or ``"15deg"``, or a pint
Quantity (:func:`Q_`, or one of any other pint registry), and turns it into an SI
float with :func:`to_si`. Text without a unit is refused for any dimensioned
quantity: ``"20"`` could be bar, psi or MPa, and guessing is how engines get
mis-sized. From Python a plain number (int, float or a numpy scalar) is taken as
already in SI units. Field-level checks (bounds, grids, names) are in
:mod:`perfchain.inputs`.
"""

from __future__ import annotations

import math
import re
import threading
from functools import lru_cache

from perfchain.errors import InputError

__all__ = ["KINDS", "to_si", "registry", "UNITS_LOCK", "from_si", "Q_", "plain_number", "is_quantity", "quantity_text",
           "split_number", "as_float"]

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

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$", re.ASCII)
#: a length unit with its power as a bare digit, as engineers write it ("kg/m3", "g/cm3", "ft3")
_POWER = re.compile(r"(?<![A-Za-z])(m|cm|mm|dm|ft|in)([23])(?![\w*^])", re.ASCII)


#: Held around every parse and conversion on a pint registry. pint fills its parse and
#: conversion caches lazily in plain dicts and does not promise thread safety, while studies
#: and Dask workers parse quantities from several threads; the common units skip pint
#: altogether (``FAST_UNITS``), so the lock costs the fast path nothing.
UNITS_LOCK = threading.RLock()


def registry():
    """The shared pint registry, with ``psia`` as an alias of psi (absolute).

    Built once, under :data:`UNITS_LOCK`, so that threads asking at the same moment get the
    same registry. Hold the lock while converting with it from threads.
    """
    with UNITS_LOCK:
        return _registry()


@lru_cache(maxsize=1)
def _registry():
    import pint

    ureg = pint.UnitRegistry()
    ureg.define("psia = psi")
    return ureg


def Q_(value, unit: str):
    """A pint Quantity of perfchain's registry (:func:`registry`), e.g. ``Q_(70, "bar")``.

    Examples
    --------
    One bar is 100 000 Pa exactly (NIST SP 811, Appendix B):

    >>> Q_(70, "bar").to("Pa").magnitude
    7000000.0
    """
    return registry().Quantity(value, unit)


def is_quantity(value) -> bool:
    """True for a pint Quantity of any registry (checked without importing pint).

    >>> is_quantity(Q_(1, "m")), is_quantity(1.0), is_quantity("1 m")
    (True, False, False)
    """
    return type(value).__module__.split(".")[0] == "pint" and hasattr(value, "magnitude")


def plain_number(value):
    """``value`` as a Python float if it is a real number (int, float, numpy scalar or 0-d
    array; not a bool), else None.

    >>> import numpy as np
    >>> plain_number(np.int64(3)), plain_number(np.float32(0.5)), plain_number(True), plain_number("2")
    (3.0, 0.5, None, None)
    """
    if isinstance(value, bool):
        return None
    if isinstance(value, (int, float)):
        return float(value)
    if type(value).__module__ == "numpy" and getattr(value, "ndim", None) == 0 \
            and getattr(value, "dtype", None) is not None and value.dtype.kind in "iuf":
        return float(value.item())
    return None


def to_si(value, kind: str, field: str, *, minimum: float | None = None,
          exclusive: bool = True, maximum: float | None = None) -> float:
    """Convert ``value`` to an SI float of the given kind.

    Parameters
    ----------
    value : str, pint.Quantity or float
        Text with a unit (``"300 psi"``), a pint Quantity (any registry), or,
        from the Python API only, a plain number (int, float, numpy scalar)
        already in SI units. Text without a unit is refused for every
        dimensioned kind. Error messages quote the value as given.
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
    number = plain_number(value)
    if number is not None:
        pass
    elif isinstance(value, str):
        number = _parse_text(value, kind, field, allowed)
    elif is_quantity(value):
        number = _from_quantity(value, kind)
        value = quantity_text(value)
        if number is None:
            raise InputError(field, value, allowed)
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


_PLAIN = re.compile(r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?", re.ASCII)


def as_float(value) -> float:
    """``float(value)``, but text must be a plain decimal number in ASCII digits.

    Python's ``float`` reads ``"3_3"`` as 33, ``"nan"``, ``"inf"`` and non-ASCII digits too;
    none of those is a number a user meant to type here.

    Raises
    ------
    ValueError
        For any other text (as ``float`` does for junk); TypeError for other types.

    Examples
    --------
    >>> as_float(" 2.5e3 "), as_float(7)
    (2500.0, 7.0)
    >>> as_float("3_3")
    Traceback (most recent call last):
    ...
    ValueError: not a plain decimal number: '3_3'
    """
    if isinstance(value, str):
        text = value.strip()
        if not _PLAIN.fullmatch(text):
            raise ValueError(f"not a plain decimal number: {value!r}")
        return float(text)
    return float(value)


def split_number(text: str):
    """``"20 bar"`` -> ``("20", "bar")``; ``"2.6"`` -> ``("2.6", "")``; None if it does not start with a number.

    >>> split_number(" 1e3 kPa "), split_number("bar")
    (('1e3', 'kPa'), None)
    """
    match = _NUMBER.match(text)
    return (match.group(1), match.group(2)) if match else None


def _parse_text(text: str, kind: str, field: str, allowed: str) -> float:
    match = _NUMBER.match(text)
    if not match:
        raise InputError(field, text, allowed)
    number, unit = float(match.group(1)), _POWER.sub(r"\1**\2", match.group(2))
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
        with UNITS_LOCK:
            si = float(ureg.Quantity(number, unit).to(KINDS[kind][0]).magnitude)
        if not math.isfinite(si):
            raise ValueError(text)
    except Exception:  # pint raises many kinds (tokenizer, assertion, zero division...) for junk
        raise InputError(field, text, allowed) from None
    return si


def quantity_text(quantity) -> str:
    """A Quantity as the user would have typed it, for messages.

    >>> quantity_text(Q_(70, "bar")), quantity_text(Q_(2.5, "m**3"))
    ('70 bar', '2.5 m**3')
    """
    try:
        return f"{quantity.magnitude!r} {quantity.units:~}".replace(" ** ", "**")
    except Exception:  # an odd registry or format: plain str() is still readable
        return str(quantity)


def _from_quantity(quantity, kind: str):
    """SI float of a scalar pint Quantity of ``kind``, or None (wrong dimension, not a scalar)."""
    try:
        with UNITS_LOCK:
            si = quantity.to(KINDS[kind][0]).magnitude
    except Exception:  # DimensionalityError, or a unit this registry lacks
        return None
    return plain_number(si)


def from_si(value: float, unit: str, kind: str) -> float:
    """Convert an SI float of ``kind`` to ``unit`` (for output unit sets).

    >>> round(from_si(6894757.293168361, "psi", "pressure"), 6)
    1000.0
    """
    ureg = registry()
    with UNITS_LOCK:
        return float(ureg.Quantity(value, KINDS[kind][0]).to(unit).magnitude)
