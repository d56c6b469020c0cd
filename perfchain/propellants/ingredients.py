"""Propellant ingredients by the name a user types: bundled, conditioned, or mixed by mass.

:func:`get_ingredient` is the one resolver of an ingredient name. It takes

* a bundled name or alias (``"LOX"``, ``"ch4(l)"``; the records of :mod:`.records`),
* a conditioned storage state, ``"NAME @ T"`` (``"LOX @ 80 K"``, ``"N2O@-5degC"``;
  :func:`~perfchain.propellants.conditioned.conditioned`),
* a mixture by mass fraction, ``"NAME=FRACTION, ..."`` (``"RP-1=0.9, Al=0.1"``), which
  becomes one blended ingredient (the fuel or oxidizer of a bipropellant; a whole
  propellant given this way is a formulation, :mod:`.formulation`),
* or an :class:`Ingredient` record, returned as it is.

The text form of a mixture is parsed here too (:func:`parse_formulation`,
:func:`formulation_parts`), so that names resolve the same way everywhere. The records
themselves (:class:`Ingredient`, :func:`blend`, :func:`custom_ingredient`, the bundled
data) live in :mod:`.records` and are re-exported.
"""

from __future__ import annotations

import math
import re
from pathlib import Path
from typing import Mapping

from perfchain.errors import InputError
from perfchain.propellants import records
from perfchain.propellants.conditioned import conditioned
from perfchain.propellants.records import (DATA_FILE, OXIDIZING_VALENCE, Ingredient, atomic_weight,
                                           bundled_ingredient, custom_ingredient, list_ingredients)

__all__ = [
    "Ingredient", "get_ingredient", "list_ingredients", "blend", "custom_ingredient", "bundled_ingredient",
    "atomic_weight", "OXIDIZING_VALENCE", "DATA_FILE", "parse_formulation", "formulation_parts",
    "formulation_ingredient", "SUM_TOLERANCE",
]

#: Mass fractions must add up to 1 within this [-].
SUM_TOLERANCE = 1e-6

_FORM = "parts as 'NAME=FRACTION, ...' (e.g. 'AP=0.68, Al=0.18, HTPB=0.14') or one ingredient name"
_FRACTION = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(%?)\s*$")


def get_ingredient(name, field: str = "ingredient", path: str | Path | None = None) -> Ingredient:
    """An ingredient from its name as typed: bundled, conditioned (``"@ T"``) or mixed (``"A=x, B=y"``).

    Parameters
    ----------
    name : str or Ingredient
        E.g. ``"LOX"``, ``"ch4(l)"``, ``"RP-1"``; ``"LOX @ 80 K"`` is the record
        conditioned to that storage temperature; ``"RP-1=0.9, Al=0.1"`` a blend by
        mass fraction; an :class:`Ingredient` is returned unchanged.
    field : str
        Input name used in the error message (``"oxidizer"``, ``"fuel"``).
    path : str or Path, optional
        Another ingredient file (default the bundled one).

    Returns
    -------
    Ingredient

    Examples
    --------
    Liquid oxygen at its normal boiling point, 90.17 K (NASA TP-2002-211556;
    from memory), and as a liquid held at 80 K:

    >>> get_ingredient("lox").temperature, get_ingredient("LOX @ 80 K").name
    (90.17, 'LOX@80K')
    >>> get_ingredient("LOXX", field="oxidizer")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: oxidizer: got 'LOXX'; allowed: a known ingredient (did you mean 'LOX', 'LO2', 'GOX'?)
    """
    if isinstance(name, str) and "=" in name:   # a mixture of ingredients: "RP-1=0.9, Al=0.1"
        return formulation_ingredient(name, field=field, path=path)
    return _single(name, field, path)


def _single(name, field: str, path) -> Ingredient:
    """A record, a bundled name or a conditioned name (no mixtures: a part of a mixture)."""
    if isinstance(name, str) and "@" in name:   # a conditioned storage state: "LOX @ 80 K"
        base, _, temperature = name.partition("@")
        return conditioned(bundled_ingredient(base, field=field, path=path), temperature.strip(),
                           field=f"{field}.temperature")
    return bundled_ingredient(name, field=field, path=path)


def blend(name: str, parts: Mapping, density=None, aliases=(), sources=None,
          monopropellant: bool | None = None) -> Ingredient:
    """Mix ingredients by mass fraction (ideal mixing: no heat of mixing); names resolve as typed.

    :func:`perfchain.propellants.records.blend` with every part name resolved by
    :func:`get_ingredient` first, so conditioned names (``"N2O @ 270 K"``) may be parts.

    Parameters
    ----------
    name : str
    parts : Mapping[str or Ingredient, float]
        Mass fractions [-] summing to 1 within 1e-6; names as :func:`get_ingredient` takes them.
    density, aliases, sources, monopropellant
        As in :func:`perfchain.propellants.records.blend` (density [kg/m^3]).

    Returns
    -------
    Ingredient

    Examples
    --------
    A blend of one part is that part (closed form), here LOX held at 80 K:

    >>> blend("cold-lox", {"LOX @ 80 K": 1.0}).density == get_ingredient("LOX@80K").density
    True
    """
    if isinstance(parts, Mapping):   # pairs, not a dict: two names of one record stay two parts
        parts = [(_single(k, f"{name}.parts", None) if isinstance(k, str) else k, v) for k, v in parts.items()]
    return records.blend(name, parts, density, aliases, sources, monopropellant)


def parse_formulation(text: str, field: str = "propellant") -> dict[str, float]:
    """Split the text form into ``{name: mass fraction}`` (no look-up, no sum check).

    Items ``NAME=FRACTION`` separated by commas, a fraction as a number (``0.68``) or a
    per cent (``68%``); or one ingredient name alone (fraction 1).

    Parameters
    ----------
    text : str
    field : str
        Input name for error messages.

    Returns
    -------
    dict
        Name as typed -> mass fraction [-].

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


def formulation_parts(parts, field: str = "propellant", path=None) -> list[tuple[Ingredient, float]]:
    """Any accepted form of a formulation -> checked ``[(Ingredient, mass fraction)]`` summing to 1.

    Parameters
    ----------
    parts : str, Mapping or Ingredient
        The text form (:func:`parse_formulation`), ``{name or Ingredient: fraction}``, or
        one Ingredient (fraction 1).
    field : str
        Input name for error messages.
    path : str or Path, optional
        Another ingredient file.

    Returns
    -------
    list of (Ingredient, float)
        Fractions [-] in (0, 1], divided by their sum (which is 1 within :data:`SUM_TOLERANCE`).

    Examples
    --------
    >>> [(i.name, f) for i, f in formulation_parts("AP=0.8, HTPB=0.2")]
    [('AP', 0.8), ('HTPB', 0.2)]
    >>> formulation_parts({"AP": 0.68, "Al": 0.18, "HTPB": 0.1})
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: propellant: got 'AP=0.68, Al=0.18, HTPB=0.1'; allowed: mass fractions that sum to 1 within 1e-6 (these sum to 0.96)
    """
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
        ing = _single(key, field, path)
        where = f"{field}.{ing.name}"
        if type(frac).__module__ == "numpy" and getattr(frac, "ndim", None) == 0:
            frac = frac.item()
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


def formulation_ingredient(text, field: str = "ingredient", path=None) -> Ingredient:
    """A blend from the text form, to stand as the oxidizer or fuel of a bipropellant.

    Parameters
    ----------
    text, field, path
        As :func:`formulation_parts` takes them (the parts, the input name for messages,
        another ingredient file).

    Returns
    -------
    Ingredient
        Named ``"NAME=FRACTION, ..."``.

    Examples
    --------
    RP-1 carrying 10 % aluminium, as a fuel:

    >>> f = formulation_ingredient("RP-1=0.9, Al=0.1")
    >>> f.name, f.role
    ('RP-1=0.9, Al=0.1', 'fuel')
    """
    items = formulation_parts(text, field, path)
    name = ", ".join(f"{i.name}={f:.6g}" for i, f in items)
    return records.blend(name, {i: f for i, f in items})
