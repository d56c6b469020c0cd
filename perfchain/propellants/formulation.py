"""Formulations: a propellant given by its ingredients and their mass fractions.

Solid grains (``"AP=0.68, Al=0.18, HTPB=0.14"``), double-base and sugar propellants,
premixed liquids and monopropellants (``"H2O2-98"``, ``"N2H4"``) have no oxidizer/fuel
split to state: the formulation gives its parts directly. :func:`make_formulation`
returns the same :class:`~perfchain.propellants.mixture.Propellant` record the chain
burns (element totals and enthalpy per kilogram), with its O/F quantities None.

Text form (CLI, study files): ``NAME=FRACTION`` items separated by commas, a fraction
as a number (``0.68``) or a per cent (``68%``); or one ingredient name alone. Names
resolve like every ingredient name (aliases, case, ``"N2O @ 280 K"`` conditioning).
"""

from __future__ import annotations

from perfchain.errors import InputError
from perfchain.propellants.ingredients import (SUM_TOLERANCE, formulation_ingredient, formulation_parts,
                                               parse_formulation)
from perfchain.propellants.mixture import Propellant

__all__ = ["make_formulation", "parse_formulation", "formulation_ingredient", "SUM_TOLERANCE"]


def _check_power(items, field: str, shown: str) -> None:
    """A formulation must release energy: a monopropellant ingredient, or both an oxidizer
    and a fuel among its parts (roles from the oxidizing valences)."""
    if any(i.monopropellant for i, _ in items):
        return
    roles = {i.role for i, _ in items}
    if "oxidizer" not in roles:
        raise InputError(field, shown, "a formulation with oxidizing power (an oxidizer such as AP, KN, "
                                       "N2O) or a monopropellant ingredient; these parts have none")
    if "fuel" not in roles:
        raise InputError(field, shown, "a formulation with reducing power (a fuel such as HTPB, Al, "
                                       "sorbitol) or a monopropellant ingredient; these parts have none")


def make_formulation(parts, field: str = "propellant") -> Propellant:
    """A propellant from its ingredients and mass fractions.

    Parameters
    ----------
    parts : str, Mapping or Ingredient
        ``"AP=0.68, Al=0.18, HTPB=0.14"``, ``{"AP": 0.68, "Al": 0.18, "HTPB": 0.14}``
        (keys may be :class:`Ingredient` records), one name (``"H2O2-98"``) or one
        Ingredient. Fractions by mass [-], summing to 1 within 1e-6.
    field : str
        Input name for error messages.

    Returns
    -------
    Propellant
        ``parts`` filled, ``oxidizer``/``fuel``/``mixture_ratio`` None.

    Raises
    ------
    InputError
        Unknown names (with the closest ones), fractions outside (0, 1] or not summing
        to 1, or parts that cannot release energy (no monopropellant ingredient and not
        both oxidizing and reducing power).

    Examples
    --------
    A composite of 68 % AP (NH4ClO4, 117.49 kg/kmol) has 0.68/117.49 = 5.788 mol Cl per kg:

    >>> p = make_formulation("AP=0.68, Al=0.18, HTPB=0.14")
    >>> round(p.elements["Cl"] * 1e3, 3), p.mixture_ratio
    (5.788, None)
    >>> make_formulation({"AP": 0.68, "Al": 0.18, "HTPB": 0.1})
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: propellant: got 'AP=0.68, Al=0.18, HTPB=0.1'; allowed: mass fractions that sum to 1 within 1e-6 (these sum to 0.96)
    """
    items = formulation_parts(parts, field)
    shown = parts if isinstance(parts, str) else ", ".join(f"{i.name}={f:.6g}" for i, f in items)
    _check_power(items, field, shown)
    return Propellant(None, None, None, parts=tuple(items))
