"""Input checks shared by the vehicle modules: positive numbers, fractions, reachable targets.

Every failure is a one-line :class:`~perfchain.errors.InputError` naming the field, the value
and what is allowed.
"""

from __future__ import annotations

import math

from perfchain.errors import InputError
from perfchain.units import as_float

__all__ = ["check_positive", "check_fraction", "raise_shortfall"]


def check_positive(field: str, value, unit: str) -> float:
    """``value`` as a finite float above 0, else InputError.

    Parameters
    ----------
    field : str
        Field name for the message.
    value : float
        The input, in ``unit``.
    unit : str
        Unit named in the message (``"kg"``, ``"m/s"`` ...).

    Returns
    -------
    float

    Examples
    --------
    A mass is above 0 kg (closed form: the rocket equation needs ln(m0/mf) with m0, mf > 0):

    >>> check_positive("dry_mass", 28500, "kg")
    28500.0
    >>> check_positive("dry_mass", 0, "kg")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: dry_mass: got 0; allowed: a number above 0 kg
    """
    if isinstance(value, bool):
        raise InputError(field, value, f"a number above 0 {unit}")
    try:
        number = as_float(value)
    except (TypeError, ValueError):
        raise InputError(field, value, f"a number above 0 {unit}") from None
    if not (math.isfinite(number) and number > 0):
        raise InputError(field, value, f"a number above 0 {unit}")
    return number


def check_fraction(field: str, value) -> float:
    """``value`` as a float strictly between 0 and 1, else InputError.

    Parameters
    ----------
    field : str
        Field name for the message.
    value : float
        The fraction [-].

    Returns
    -------
    float

    Examples
    --------
    A structural ratio dry / (dry + propellant) lies in (0, 1) for positive masses (closed
    form); 28.5 t dry on 161.5 t propellant gives 0.15:

    >>> check_fraction("structural_ratio", 28500 / 190000)
    0.15
    >>> check_fraction("structural_ratio", 1.0)
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: structural_ratio: got 1.0; allowed: a fraction strictly between 0 and 1
    """
    try:
        number = as_float(value)
    except (TypeError, ValueError):
        raise InputError(field, value, "a fraction strictly between 0 and 1") from None
    if not (0.0 < number < 1.0):
        raise InputError(field, value, "a fraction strictly between 0 and 1")
    return number


def raise_shortfall(field, target, reachable):
    """Raise InputError: the target delta-v [m/s] is above what the vehicle can reach [m/s].

    Parameters
    ----------
    field : str
        Field name for the message.
    target, reachable : float
        Target and reachable delta-v [m/s].

    Examples
    --------
    One stage of structural ratio 0.15 and c = 3000 m/s reaches at most c ln(1/0.15) =
    5691.4 m/s with no payload (closed form, rocket equation):

    >>> import math
    >>> raise_shortfall("delta_v", 6000.0, 3000 * math.log(1 / 0.15))
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: delta_v: got '6000.0 m/s'; allowed: at most 5691.4 m/s (the vehicle falls short of the target by 308.6 m/s)
    """
    raise InputError(field, f"{target:.1f} m/s",
                     f"at most {reachable:.1f} m/s (the vehicle falls short of the target "
                     f"by {target - reachable:.1f} m/s)")
