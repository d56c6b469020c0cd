"""Field types of the study file: quantities as text with units, lists, fractions, plain numbers.

A quantity is kept as the text given (``"20 bar"``) after :func:`perfchain.units.to_si` has
checked it, so a study saved again reads back equal; a bare number is refused (it could be
any unit). Every check raises :class:`~perfchain.errors.InputError`; the study loader adds
the key path.
"""

from __future__ import annotations

from typing import Annotated, Literal

from pydantic import BaseModel, BeforeValidator, ConfigDict, Field

from perfchain.errors import InputError
from perfchain.units import to_si

__all__ = ["Section", "listed", "not_bool", "Pressure", "AmbientPressure", "Altitude", "Mass", "MassOrZero",
           "Force", "Speed", "Time", "Angle", "Volume", "Density", "DensityOrZero", "Temperature",
           "MolarEnthalpy", "Fraction", "Positive", "AreaRatio", "Factor", "Flow", "Which", "Name"]


def _quantity(kind: str, **bounds):
    """Text with a unit of ``kind``; a bare number is refused (it could be any unit)."""
    def check(value):
        if isinstance(value, bool) or not isinstance(value, (str, int, float)):
            raise InputError(kind, value, f"a {kind} with a unit as text")
        text = str(value)
        to_si(text, kind, kind, **bounds)  # raises InputError; the path is added on translation
        return text
    return Annotated[str, BeforeValidator(check)]


def listed(item):
    """A list of ``item``; a single value is taken as a list of one.

    Parameters
    ----------
    item : type
        The field type of each value.

    Returns
    -------
    typing.Annotated
        A pydantic field type: a non-empty list.

    Examples
    --------
    >>> from pydantic import TypeAdapter
    >>> TypeAdapter(listed(Positive)).validate_python(2.6)
    [2.6]
    """
    def wrap(value):
        return list(value) if isinstance(value, (list, tuple)) else [value]
    return Annotated[list[item], BeforeValidator(wrap), Field(min_length=1)]


def _fraction(value):
    """A fraction in (0, 1): a number or a percentage text (``"85 %"``)."""
    if isinstance(value, str) and value.strip().endswith("%"):
        try:
            value = float(value.strip()[:-1]) / 100.0
        except ValueError:
            raise InputError("fraction", value, "a number in (0, 1) or a percentage, e.g. '85 %'") from None
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not 0.0 < value < 1.0:
        raise InputError("fraction", value, "a number in (0, 1) or a percentage, e.g. '85 %'")
    return float(value)


Pressure = _quantity("pressure", minimum=0.0)
AmbientPressure = _quantity("pressure", minimum=0.0, exclusive=False)
Altitude = _quantity("length", minimum=0.0, exclusive=False, maximum=86000.0)
Mass = _quantity("mass", minimum=0.0)
MassOrZero = _quantity("mass", minimum=0.0, exclusive=False)
Force = _quantity("force", minimum=0.0)
Speed = _quantity("speed", minimum=0.0)
Time = _quantity("time", minimum=0.0)
Angle = _quantity("angle", minimum=0.0)
Volume = _quantity("volume", minimum=0.0)
Density = _quantity("density", minimum=0.0)
DensityOrZero = _quantity("density", minimum=0.0, exclusive=False)
Temperature = _quantity("temperature", minimum=0.0)
MolarEnthalpy = _quantity("molar_enthalpy")
Fraction = Annotated[float, BeforeValidator(_fraction)]


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
AreaRatio = Annotated[float, BeforeValidator(not_bool), Field(gt=1.0, allow_inf_nan=False)]
Factor = Annotated[float, BeforeValidator(not_bool), Field(gt=0.0, le=1.0)]
Flow = Literal["shifting", "frozen", "frozen-throat"]
Which = Literal["vacuum", "ambient"]
Name = Annotated[str, Field(min_length=1)]


class Section(BaseModel):
    """Base of every study-file section: unknown keys refused, values frozen."""

    model_config = ConfigDict(extra="forbid", frozen=True, strict=False)

