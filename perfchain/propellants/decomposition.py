"""Inputs of a catalytic hydrazine thruster: the ammonia dissociation fraction.

In a catalytic bed hydrazine first decomposes to ammonia and nitrogen, and part of the
ammonia then dissociates further:

    3 N2H4 -> 4 (1 - X) NH3 + (1 + 2 X) N2 + 6 X H2

(Sutton & Biblarz, Rocket Propulsion Elements, monopropellant chapter; from memory).
X is a design input (bed length, loading, residence time), not an equilibrium
result. This module checks the input; the chamber state from the energy balance is
:func:`perfchain.thermo.decomposition.hydrazine_decomposition` (the thermo floor holds
the species data).
"""

from __future__ import annotations

import math

from perfchain.errors import InputError
from perfchain.propellants.ingredients import get_ingredient
from perfchain.propellants.mixture import Propellant

__all__ = ["check_ammonia_dissociation", "is_hydrazine", "decomposition_moles"]


def is_hydrazine(propellant) -> bool:
    """True if the propellant is hydrazine alone (a one-part formulation of N2H4).

    >>> from perfchain.propellants.formulation import make_formulation
    >>> is_hydrazine(make_formulation("hydrazine")), is_hydrazine(make_formulation("H2O2-98"))
    (True, False)
    """
    if not isinstance(propellant, Propellant) or len(propellant.parts) != 1:
        return False
    ing = propellant.parts[0][0]
    ref = get_ingredient("N2H4")
    return dict(ing.formula) == dict(ref.formula) and not ing.parts


def check_ammonia_dissociation(value, propellant) -> float:
    """The ammonia dissociation fraction X [-], checked: a number in [0, 1], and only for
    hydrazine alone.

    Parameters
    ----------
    value : float
        X [-].
    propellant : Propellant

    Returns
    -------
    float

    Examples
    --------
    >>> from perfchain.propellants.formulation import make_formulation
    >>> check_ammonia_dissociation(0.4, make_formulation("N2H4"))
    0.4
    >>> check_ammonia_dissociation(1.2, make_formulation("N2H4"))
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: ammonia_dissociation: got 1.2; allowed: a fraction from 0 to 1
    >>> check_ammonia_dissociation(0.4, make_formulation("H2O2-98"))
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: ammonia_dissociation: got 0.4; allowed: only for hydrazine alone (propellant N2H4), not H2O2-98
    """
    field = "ammonia_dissociation"
    if isinstance(value, bool):
        raise InputError(field, value, "a fraction from 0 to 1")
    try:
        x = float(value)
    except (TypeError, ValueError):
        raise InputError(field, value, "a fraction from 0 to 1") from None
    if not (math.isfinite(x) and 0.0 <= x <= 1.0):
        raise InputError(field, value, "a fraction from 0 to 1")
    if not is_hydrazine(propellant):
        name = propellant.name if isinstance(propellant, Propellant) else propellant
        raise InputError(field, value, f"only for hydrazine alone (propellant N2H4), not {name}")
    return x


def decomposition_moles(x: float) -> dict[str, float]:
    """Product moles per 3 mol of hydrazine at ammonia dissociation ``x`` [-].

    Examples
    --------
    Half the ammonia dissociated: 2 NH3 + 2 N2 + 3 H2 (atoms: 6 N, 12 H, as 3 N2H4):

    >>> decomposition_moles(0.5)
    {'NH3': 2.0, 'N2': 2.0, 'H2': 3.0}
    """
    return {"NH3": 4.0 * (1.0 - x), "N2": 1.0 + 2.0 * x, "H2": 6.0 * x}
