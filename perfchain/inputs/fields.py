"""Field checks: one value of one named input -> SI float (or a name, a choice, a count).

:data:`FIELDS` holds every quantity and ratio field with its kind and bounds, so a
field is checked the same way wherever it is typed. See :mod:`perfchain.inputs`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from perfchain.constants import MAX_ALTITUDE
from perfchain.errors import InputError, suggest
from perfchain.units import UNITS_LOCK, as_float, is_quantity, plain_number, quantity_text, to_si

__all__ = ["Field", "FIELDS", "value", "number", "fraction", "count", "choice", "ingredient", "propellant",
           "pair", "exactly_one", "typed"]


@dataclass(frozen=True)
class Field:
    """How one input field is checked.

    Attributes
    ----------
    kind : str or None
        A unit kind of :data:`perfchain.units.KINDS`, ``"fraction"`` (a number or
        ``"85 %"``), or None for a plain number.
    low, high : float or None
        Bounds in SI units.
    low_open, high_open : bool
        Whether each bound is excluded.
    allowed : str or None
        What is allowed, for messages; None: the words of :func:`perfchain.units.to_si`.
    """

    kind: str | None
    low: float | None = None
    high: float | None = None
    low_open: bool = True
    high_open: bool = False
    allowed: str | None = None


_ABOVE_0 = dict(low=0.0)
_FACTOR = Field(None, 0.0, 1.0, allowed="a factor in (0, 1]")
_FRACTION = Field("fraction", 0.0, 1.0, high_open=True,
                  allowed="a fraction between 0 and 1 (exclusive), e.g. '0.85' or '85 %'")

#: field name -> its check; names are those of the CLI options and the Python keywords
FIELDS = {
    "mixture_ratio": Field(None, 0.0, allowed="an O/F by mass above 0"),
    "equivalence_ratio": Field(None, 0.0, allowed="an equivalence ratio above 0"),
    "fuel_percent": Field(None, 0.0, 100.0, high_open=True, allowed="a fuel mass per cent in (0, 100)"),
    "area_ratio": Field(None, 1.0, allowed="an exit/throat area ratio above 1"),
    # the upper bound is perfchain.nozzle.contraction.MAX_CONTRACTION (tests/test_inputs.py checks it)
    "contraction_ratio": Field(None, 1.0, 1e4, allowed="a chamber/throat area ratio above 1 and at most 10000 "
                               "(beyond that the chamber is infinite for all practical purposes)"),
    "chamber_pressure": Field("pressure", **_ABOVE_0),
    "exit_pressure": Field("pressure", **_ABOVE_0),
    "ambient_pressure": Field("pressure", 0.0, low_open=False),
    "altitude": Field("length", 0.0, MAX_ALTITUDE, low_open=False,
                      allowed="an altitude from 0 to 86 km (U.S. Standard Atmosphere 1976)"),
    "thrust": Field("force", **_ABOVE_0),
    "cstar_efficiency": _FACTOR, "divergence_factor": _FACTOR, "cf_efficiency": _FACTOR,
    "boundary_layer": _FACTOR, "kinetic": _FACTOR, "two_phase": _FACTOR,
    "nozzle_half_angle": Field("angle", 0.0, math.pi / 4, high_open=True,
                               allowed="an angle between 0 and 45 deg, exclusive"),
    "bell_exit_angle": Field("angle", 0.0, math.pi / 4, high_open=True,
                             allowed="an angle between 0 and 45 deg, exclusive"),
    "payload": Field("mass", 0.0, low_open=False),
    "isp": Field("time", **_ABOVE_0),
    "exhaust_velocity": Field("speed", **_ABOVE_0),
    "delta_v": Field("speed", **_ABOVE_0),
    "dry_mass": Field("mass", **_ABOVE_0),
    "propellant_mass": Field("mass", **_ABOVE_0),
    "total_mass": Field("mass", **_ABOVE_0),
    "propellant_fraction": _FRACTION,
    "structural_ratio": _FRACTION,
    "mass_fraction": Field(None, 0.0, 1.0, allowed="a mass fraction in (0, 1]"),
    "ammonia_dissociation": Field(None, 0.0, 1.0, low_open=False, allowed="a fraction from 0 to 1"),
    "tank_volume": Field("volume", **_ABOVE_0),
    "density": Field("density", **_ABOVE_0),
    "tank_mass_per_volume": Field("density", 0.0, low_open=False),
    "temperature": Field("temperature", **_ABOVE_0),
    "enthalpy": Field("molar_enthalpy"),
    # thrust-chamber design (perfchain chamber)
    "characteristic_length": Field("length", **_ABOVE_0, allowed="a length above 0 m, e.g. '1.1 m', '40 in'"),
    "throat_diameter": Field("length", **_ABOVE_0, allowed="a diameter above 0 m, e.g. '72 mm'"),
    "particle_size": Field("length", **_ABOVE_0, allowed="a mean particle diameter above 0 m, e.g. '3 um'"),
    "axial_position": Field("length", 0.0, low_open=False, allowed="a distance from the injector face, 0 m or more"),
    "wall_temperature": Field("temperature", **_ABOVE_0, allowed="a temperature above 0 K, e.g. '800 K'"),
    "bell_length_fraction": Field(None, 0.6, 0.9, low_open=False,
                                  allowed="a fraction of the 15 deg cone's length from 0.6 to 0.9 (the range "
                                  "of the published wall-angle charts)"),
    "cone_half_angle": Field("angle", math.radians(5.0), math.radians(40.0), low_open=False,
                             allowed="a cone half-angle from 5 to 40 deg"),
}
FIELDS["conical_half_angle"] = FIELDS["nozzle_half_angle"]


def _spec(field: str) -> Field:
    try:
        return FIELDS[field]
    except KeyError:
        raise KeyError(f"no such input field: {field!r}") from None


def value(field: str, x, *, name: str | None = None) -> float:
    """One value of a known field, checked and in SI units.

    Parameters
    ----------
    field : str
        A key of :data:`FIELDS` (``"chamber_pressure"``, ``"mixture_ratio"``...).
    x : str, pint.Quantity, int, float or numpy scalar
        As typed: text with a unit, a Quantity, or a plain number in SI.
    name : str, optional
        The field's name in the message (e.g. ``"engine[1].chamber_pressure"``);
        default ``field``.

    Returns
    -------
    float
        [SI unit of the field's kind], or [-] for ratios.

    Examples
    --------
    1000 psi is 6.894757 MPa (NIST SP 811, Appendix B), and the message quotes what was typed:

    >>> round(value("chamber_pressure", "1000 psi"))
    6894757
    >>> value("mixture_ratio", "2.6"), value("area_ratio", 40)
    (2.6, 40.0)
    >>> value("chamber_pressure", "-3 bar")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: chamber_pressure: got '-3 bar'; allowed: a pressure above 0 Pa
    """
    spec = _spec(field)
    name = name or field
    if spec.kind is None:
        si = number(x, name, spec.allowed)
    elif spec.kind == "fraction":
        return fraction(x, name, spec.allowed)
    elif spec.allowed is None:   # the bounds in the words of perfchain.units.to_si
        return to_si(x, spec.kind, name, minimum=spec.low, exclusive=spec.low_open, maximum=spec.high)
    else:
        si = to_si(x, spec.kind, name)
    if not _within(si, spec):
        raise InputError(name, typed(x), spec.allowed)
    return si


def _within(v: float, spec: Field) -> bool:
    if spec.low is not None and (v < spec.low or (spec.low_open and v == spec.low)):
        return False
    return spec.high is None or not (v > spec.high or (spec.high_open and v == spec.high))


def typed(x):
    """The value as the user typed it, for messages (a Quantity as its text).

    >>> from perfchain.units import Q_
    >>> typed(Q_(70, "bar")), typed("70 bar")
    ('70 bar', '70 bar')
    >>> import numpy as np
    >>> typed(np.float64(2.5))
    2.5
    """
    if is_quantity(x):
        return quantity_text(x)
    if type(x).__module__ == "numpy" and getattr(x, "ndim", None) == 0:
        return x.item()   # 2.5, not np.float64(2.5)
    return x


def number(x, name: str, allowed: str) -> float:
    """A finite plain (unitless) number from a number, numpy scalar, dimensionless Quantity or text.

    >>> number("2.5", "mixture_ratio", "an O/F by mass above 0")
    2.5
    >>> number(True, "area_ratio", "an exit/throat area ratio above 1")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: area_ratio: got True; allowed: an exit/throat area ratio above 1
    """
    out = plain_number(x)
    if out is None and isinstance(x, str):
        try:
            out = as_float(x)
        except ValueError:
            out = None
    elif out is None and is_quantity(x):
        try:
            with UNITS_LOCK:
                out = plain_number(x.to("dimensionless").magnitude)
        except Exception:  # pint's DimensionalityError: not a plain number
            out = None
    if out is None or not math.isfinite(out):
        raise InputError(name, typed(x), allowed)
    return out


def fraction(x, name: str, allowed: str = _FRACTION.allowed) -> float:
    """A fraction strictly between 0 and 1: a number, or a percentage as text.

    >>> fraction("85 %", "propellant_fraction"), fraction(0.15, "structural_ratio")
    (0.85, 0.15)
    """
    scale = 1.0
    if isinstance(x, str) and x.strip().endswith("%"):
        scale = 0.01
        f = number(x.strip()[:-1], name, allowed) * scale
    else:
        f = number(x, name, allowed)
    if not 0.0 < f < 1.0:
        raise InputError(name, typed(x), allowed)
    return f


def count(x, name: str, allowed: str, minimum: int = 0) -> int:
    """A whole number (int, numpy integer, or digits as text) of at least ``minimum``.

    >>> count("4", "workers", "a whole number of worker processes, at least 1", 1)
    4
    """
    n = None
    if isinstance(x, str):
        if x.strip().lstrip("+").isdigit() and x.isascii():   # "٣" is a digit to Python, not here
            n = int(x.strip())
    elif isinstance(x, int) and not isinstance(x, bool):
        n = x
    elif type(x).__module__ == "numpy" and getattr(getattr(x, "dtype", None), "kind", "") in "iu" \
            and getattr(x, "ndim", 1) == 0:
        n = int(x)
    if n is None or n < minimum:
        raise InputError(name, typed(x), allowed)
    return n


def choice(x, name: str, choices) -> str:
    """One of ``choices`` (case-insensitive), as the choice is spelled there.

    >>> choice("Vacuum", "thrust_at", ("vacuum", "ambient"))
    'vacuum'
    """
    choices = tuple(choices)
    if isinstance(x, str):
        for c in choices:
            if x.strip().lower() == c.lower():
                return c
    hint = suggest(str(x), choices)
    raise InputError(name, x, "one of " + ", ".join(choices) + (f" ({hint})" if hint else ""))


def ingredient(x, name: str = "ingredient"):
    """An :class:`~perfchain.propellants.ingredients.Ingredient` from a name, alias or record.

    >>> ingredient("lox", "oxidizer").name
    'LOX'
    """
    from perfchain.propellants.ingredients import get_ingredient

    return get_ingredient(x, field=name)


def propellant(x, name: str = "propellant"):
    """A formulation (a :class:`~perfchain.propellants.mixture.Propellant`) from its text, a mapping or a name.

    ``"AP=0.68, Al=0.18, HTPB=0.14"`` (fractions by mass, or per cent ``"68%"``), a mapping
    ``{"AP": 0.68, ...}`` whose keys may be :class:`~perfchain.propellants.ingredients.Ingredient`
    records, one monopropellant name (``"H2O2-98"``, ``"N2O @ 280 K"``) or one Ingredient.
    Fractions must sum to 1 within 1e-6, and the parts must be able to release energy.

    >>> propellant("AP=68%, HTPB=32%").name
    'AP=0.68, HTPB=0.32'
    >>> propellant("HTPB")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: propellant: got 'HTPB'; allowed: a formulation with oxidizing power (an oxidizer such as AP, KN, N2O) or a monopropellant ingredient; these parts have none
    """
    from perfchain.propellants.formulation import make_formulation
    from perfchain.propellants.mixture import Propellant

    if isinstance(x, Propellant) and x.is_formulation:
        return x
    return make_formulation(x, field=name)


def pair(x, name: str = "pair") -> tuple:
    """``"LOX/RP-1"`` or ``("LOX", "RP-1")`` -> ``("LOX", "RP-1")`` (names or Ingredients).

    >>> pair(" N2O4 / MMH ")
    ('N2O4', 'MMH')
    """
    if isinstance(x, str):
        parts = [p.strip() for p in x.split("/")]
    elif isinstance(x, (tuple, list)):
        parts = list(x)
    else:
        parts = []
    if len(parts) != 2 or not all(parts):
        raise InputError(name, x, "OXIDIZER/FUEL, e.g. 'LOX/RP-1'")
    return parts[0], parts[1]


def exactly_one(name: str, **given) -> str:
    """The one keyword of ``given`` that is not None; else an error naming ``name``.

    >>> exactly_one("exit", area_ratio=40, exit_pressure=None)
    'area_ratio'
    """
    set_ = [k for k, v in given.items() if v is not None]
    if len(set_) == 1:
        return set_[0]
    keys = list(given)
    words = " or ".join(keys) if len(keys) == 2 else ", ".join(keys)
    value_ = ("both" if len(set_) == 2 and len(keys) == 2 else ", ".join(set_)) if set_ else \
        ("neither" if len(keys) == 2 else "none")
    raise InputError(name, value_, f"exactly one of {words}")
