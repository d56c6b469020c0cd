"""Field types of the study file: quantities as text with units, lists, fractions, plain numbers.

Every value is checked by the one validation layer, :func:`perfchain.inputs.value`, as the
input field it is (a chamber pressure, an area ratio, a payload...), so a study refuses what
the command line and the Python API refuse, with the same words. A quantity is kept as the
text given (``"20 bar"``), so a study saved again reads back equal; a bare number is refused
(it could be any unit). Every check raises :class:`~perfchain.errors.InputError` under a
placeholder name; the study loader puts the key path in its place.
"""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import BaseModel, BeforeValidator, ConfigDict, Field

from perfchain.errors import InputError
from perfchain.inputs import FIELDS, fraction, grid_texts, value as checked
from perfchain.units import as_float

__all__ = ["Section", "listed", "not_bool", "Pressure", "AmbientPressure", "Altitude", "Mass", "MassOrZero",
           "Force", "Speed", "Time", "Angle", "Volume", "Density", "DensityOrZero", "Temperature",
           "MolarEnthalpy", "Fraction", "Positive", "AreaRatio", "Factor", "Flow", "Which", "Name", "MixtureRatio",
           "ContractionRatio", "MassFraction", "Length", "Diameter", "WallTemperature", "ConeAngle",
           "BellLengthFraction"]


def _quantity(field: str):
    """Text with a unit, checked as the input field ``field`` of :data:`perfchain.inputs.FIELDS`."""
    kind = FIELDS[field].kind   # the placeholder name the study loader replaces by the key path

    def check(value):
        if isinstance(value, bool) or not isinstance(value, (str, int, float)):
            raise InputError(kind, value, f"a {kind} with a unit as text")
        text = str(value)
        checked(field, text, name=kind)
        return text
    return Annotated[str, BeforeValidator(check)]


def _number(field: str):
    """A plain number (not true/false), checked as the input field ``field``; SI float."""
    def check(value):
        if isinstance(value, bool):
            raise InputError("value", value, "a number, not true/false")
        if isinstance(value, str):   # "2.2" in quotes is text: strict, never converted
            raise InputError("value", value, "a number (not in quotes)")
        return checked(field, value, name="value")
    return Annotated[float, BeforeValidator(check)]


def listed(item, field: str | None = None):
    """A list of ``item``; a single value is taken as a list of one.

    With ``field``, one text in a list or range form (``"30, 60, 100 bar"``,
    ``"2.6 to 4.0 step 0.2"``, ``"20:100:20 bar"``) stands for its values, as on the
    command line (:func:`perfchain.inputs.grid_texts`); a single value stays as typed.

    Parameters
    ----------
    item : type
        The field type of each value.
    field : str, optional
        The input field of :data:`perfchain.inputs.FIELDS` the values are.

    Returns
    -------
    typing.Annotated
        A pydantic field type: a non-empty list.

    Examples
    --------
    >>> from pydantic import TypeAdapter
    >>> TypeAdapter(listed(Positive)).validate_python(2.6)
    [2.6]
    >>> TypeAdapter(listed(Pressure, "chamber_pressure")).validate_python("30, 60 bar")
    ['30 bar', '60 bar']
    >>> TypeAdapter(listed(MixtureRatio, "mixture_ratio")).validate_python("2.6 to 3.0 step 0.2")
    [2.6, 2.8, 3.0]
    """
    def wrap(value):
        if field is not None and isinstance(value, str) and _is_list_text(value):
            texts = grid_texts(field, value, name=FIELDS[field].kind or "value")
            return texts if FIELDS[field].kind else [as_float(t) for t in texts]
        return list(value) if isinstance(value, (list, tuple)) else [value]
    return Annotated[list[item], BeforeValidator(wrap), Field(min_length=1)]


def _is_list_text(text: str) -> bool:
    """Text in a list or range form (commas, a colon range or 'to ... step'), not one value."""
    return "," in text or ":" in text or " to " in text.lower()


Pressure = _quantity("chamber_pressure")
AmbientPressure = _quantity("ambient_pressure")
Altitude = _quantity("altitude")
Mass = _quantity("dry_mass")
MassOrZero = _quantity("payload")
Force = _quantity("thrust")
Speed = _quantity("delta_v")
Time = _quantity("isp")
Angle = _quantity("nozzle_half_angle")
Volume = _quantity("tank_volume")
Density = _quantity("density")
DensityOrZero = _quantity("tank_mass_per_volume")
Temperature = _quantity("temperature")
MolarEnthalpy = _quantity("enthalpy")
Fraction = Annotated[float, BeforeValidator(lambda v: fraction(v, "fraction"))]
MixtureRatio = _number("mixture_ratio")
AreaRatio = _number("area_ratio")
ContractionRatio = _number("contraction_ratio")
Factor = _number("cstar_efficiency")
MassFraction = _number("mass_fraction")
Length = _quantity("characteristic_length")
Diameter = _quantity("throat_diameter")
WallTemperature = _quantity("wall_temperature")
ConeAngle = _quantity("cone_half_angle")
BellLengthFraction = _number("bell_length_fraction")


def not_bool(value):
    """TOML true/false is not a number here (pydantic would read it as 1.0/0.0).

    Parameters
    ----------
    value
        Anything but a boolean passes through unchanged.

    Examples
    --------
    >>> not_bool(40.0)
    40.0
    >>> try:
    ...     not_bool(True)
    ... except ValueError as exc:
    ...     print(exc)
    a number, not true/false
    """
    if isinstance(value, bool):
        raise ValueError("a number, not true/false")
    return value


Positive = Annotated[float, BeforeValidator(not_bool), Field(gt=0.0, allow_inf_nan=False)]
Flow = Literal["shifting", "frozen", "frozen-throat"]
Which = Literal["vacuum", "ambient"]
Name = Annotated[str, Field(min_length=1)]


class Section(BaseModel):
    """Base of every study-file section: unknown keys refused, values frozen, types strict.

    Strict: a number given as text (``"2.2"``) or a boolean as text or a number
    (``plots = "yes"``) is refused, never converted.
    """

    model_config = ConfigDict(extra="forbid", frozen=True, strict=True)

