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

import math
import re
from typing import Mapping

from perfchain.errors import InputError
from perfchain.propellants.ingredients import Ingredient, blend, get_ingredient
from perfchain.propellants.mixture import Propellant

__all__ = ["make_formulation", "parse_formulation", "formulation_ingredient", "SUM_TOLERANCE"]

#: Mass fractions must add up to 1 within this [-].
SUM_TOLERANCE = 1e-6

_FORM = "parts as 'NAME=FRACTION, ...' (e.g. 'AP=0.68, Al=0.18, HTPB=0.14') or one ingredient name"
_FRACTION = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(%?)\s*$")


def parse_formulation(text: str, field: str = "propellant") -> dict[str, float]:
    """Split the text form into ``{name: mass fraction}`` (no look-up, no sum check).

    Examples
    --------
    >>> parse_formulation("AP=0.68, Al=18%, HTPB=0.14")
    {'AP': 0.68, 'Al': 0.18, 'HTPB': 0.14}
    >>> parse_formulation("H2O2-98")
    {'H2O2-98': 1.0}
    >>> parse_formulation("AP 0.68, Al=0.32")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: propellant: got 'AP 0.68'; allowed: parts as 'NAME=FRACTION, ...' (e.g. 'AP=0.68, Al=0.18, HTPB=0.14') or one ingredient name
    """
    if not isinstance(text, str) or not text.strip():
        raise InputError(field, text, _FORM)
    if "=" not in text:
        return {text.strip(): 1.0}
    out: dict[str, float] = {}
    for item in text.split(","):
        name, eq, value = item.partition("=")
        name = name.strip()
        m = _FRACTION.match(value)
        if not eq or not name or m is None:
            raise InputError(field, item.strip(), _FORM)
        if name.lower() in (n.lower() for n in out):
            raise InputError(f"{field}.{name}", item.strip(), "each ingredient once")
        out[name] = float(m.group(1)) / (100.0 if m.group(2) else 1.0)
    return out


def _parts(parts, field: str) -> list[tuple[Ingredient, float]]:
    """Any accepted form -> checked [(Ingredient, mass fraction)] summing to 1 within 1e-6."""
    if isinstance(parts, str):
        parts = parse_formulation(parts, field)
    elif isinstance(parts, Ingredient):
        parts = {parts: 1.0}
    elif not isinstance(parts, Mapping):
        try:
            parts = dict(parts)
        except (TypeError, ValueError):
            raise InputError(field, parts, _FORM + ", a {name: fraction} mapping or an Ingredient") from None
    if not parts:
        raise InputError(field, parts, _FORM)
    items: list[tuple[Ingredient, float]] = []
    for key, frac in parts.items():
        ing = get_ingredient(key, field=field)
        where = f"{field}.{ing.name}"
        if isinstance(frac, bool) or not isinstance(frac, (int, float)) \
                or not (math.isfinite(frac) and 0 < frac <= 1):
            raise InputError(where, frac, "a mass fraction in (0, 1]")
        if any(i.name == ing.name for i, _ in items):
            raise InputError(where, frac, "each ingredient once")
        items.append((ing, float(frac)))
    total = math.fsum(f for _, f in items)
    if abs(total - 1.0) > SUM_TOLERANCE:
        shown = parts if isinstance(parts, str) else ", ".join(f"{i.name}={f:g}" for i, f in items)
        raise InputError(field, shown, f"mass fractions that sum to 1 within 1e-6 (these sum to {total:.9g})")
    return [(i, f / total) for i, f in items]


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
    items = _parts(parts, field)
    shown = parts if isinstance(parts, str) else ", ".join(f"{i.name}={f:.6g}" for i, f in items)
    _check_power(items, field, shown)
    return Propellant(None, None, None, parts=tuple(items))


def formulation_ingredient(text, field: str = "ingredient", path=None) -> Ingredient:
    """A blend from the text form, to stand as the oxidizer or fuel of a bipropellant.

    Examples
    --------
    RP-1 carrying 10 % aluminium, as a fuel:

    >>> f = formulation_ingredient("RP-1=0.9, Al=0.1")
    >>> f.name, f.role
    ('RP-1=0.9, Al=0.1', 'fuel')
    """
    items = _parts(text, field)
    name = ", ".join(f"{i.name}={f:.6g}" for i, f in items)
    return blend(name, {i: f for i, f in items})
