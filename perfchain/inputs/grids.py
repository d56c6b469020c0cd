"""Grid axes: a value, a list, an array or text -> a checked 1-D float array in SI.

See :mod:`perfchain.inputs` for the accepted forms.
"""

from __future__ import annotations

import re

from perfchain.errors import InputError
from perfchain.inputs.fields import FIELDS, typed, value
from perfchain.units import KINDS, is_quantity, plain_number, split_number

__all__ = ["grid", "grid_texts", "LIST_FORMS"]

#: words for the accepted forms of a grid, used in messages
LIST_FORMS = ("a value, a list, or text such as '2.0,2.4', '30, 60, 100 bar', '1.6:3.6:0.1' or "
              "'2.6 to 4.0 step 0.2'")


def grid(field: str, x, *, name: str | None = None, distinct: bool = True):
    """The values of a grid axis of a known field, checked, as a 1-D float array in SI.

    Parameters
    ----------
    field : str
        A key of :data:`FIELDS`.
    x : scalar, sequence, numpy array, pint Quantity or str
        One value; a list or array of values (each as :func:`value` takes it);
        or text of comma-separated values and ranges. A range is
        ``START to STOP step STEP`` (the steps must land on the stop) or
        ``start:stop:step`` (values up to the stop, included when a step lands on it).
        A unit goes on every value, or once after the last value for the whole
        list (``"30, 60, 100 bar"``); in a range on any of its parts, the same
        unit each time (``"30 to 100 bar step 10"``, ``"20:100:20 bar"``).
    name : str, optional
        The field's name in messages.
    distinct : bool
        Refuse a value given twice.

    Returns
    -------
    numpy.ndarray
        1-D, float64, SI units, in the order given.

    Examples
    --------
    Range arithmetic is decimal, so 1.6 + 0.1 k is 1.7, not 1.7000000000000002:

    >>> grid("mixture_ratio", "1.6:2.0:0.1").tolist()
    [1.6, 1.7, 1.8, 1.9, 2.0]
    >>> grid("chamber_pressure", "20:60:20 bar").tolist()
    [2000000.0, 4000000.0, 6000000.0]
    >>> grid("area_ratio", [10, "40"]).tolist()
    [10.0, 40.0]

    A unit written once for a list, and the range in words, give the explicit grids:

    >>> grid("chamber_pressure", "30, 60, 100 bar").tolist() == grid("chamber_pressure", "30 bar,60 bar,100 bar").tolist()
    True
    >>> grid("mixture_ratio", "2.6 to 3.2 step 0.2").tolist()
    [2.6, 2.8, 3.0, 3.2]
    >>> grid("chamber_pressure", "30 to 50 bar step 10").tolist()
    [3000000.0, 4000000.0, 5000000.0]
    """
    import numpy as np

    name = name or field
    pairs = _grid_items(field, x, name)
    if distinct:
        seen = set()
        for given, v in pairs:
            if v in seen:
                raise InputError(name, typed(x), f"distinct values ({typed(given)!r} is given twice)")
            seen.add(v)
    return np.array([v for _, v in pairs], dtype=float)


def grid_texts(field: str, text: str, *, name: str | None = None) -> list:
    """The values a grid text stands for, each as the text of one value (checked).

    A study file keeps what was typed, one value per item; a list or range written as one
    text (``"30, 60, 100 bar"``, ``"2.6 to 3.0 step 0.2"``) becomes those items here.

    Parameters
    ----------
    field : str
        A key of :data:`FIELDS`.
    text : str
        As :func:`grid` takes it.
    name : str, optional
        The field's name in messages.

    Returns
    -------
    list of str
        One text per value, with its unit (``"30 bar"``), in the order given.

    Examples
    --------
    >>> grid_texts("chamber_pressure", "30, 60 bar")
    ['30 bar', '60 bar']
    >>> grid_texts("mixture_ratio", "2.6 to 3.0 step 0.2")
    ['2.6', '2.8', '3.0']
    """
    return [str(given) for given, _ in _grid_items(field, text, name or field)]


def _grid_items(field: str, x, name: str) -> list:
    """(value as typed, SI value) for every point of a grid axis."""
    allowed = LIST_FORMS + ", none empty"
    if isinstance(x, str):
        return _text_items(field, x, name)
    if is_quantity(x) and getattr(x.magnitude, "ndim", 0) > 0:
        seq = list(x)
    elif plain_number(x) is not None or is_quantity(x):
        return [(x, value(field, x, name=name))]
    elif isinstance(x, (bytes, dict, set)) or x is None:
        raise InputError(name, x, allowed)
    else:
        try:
            seq = list(x)
        except TypeError:
            raise InputError(name, x, allowed) from None
    if not seq or any(p is None or (isinstance(p, str) and not p.strip()) for p in seq):
        raise InputError(name, typed(x), allowed)
    seq = [p.strip() if isinstance(p, str) else p for p in seq]
    return [(p, value(field, p, name=name)) for p in seq]


#: ``START to STOP step STEP``, each part a number with or without a unit
_TO_RANGE = re.compile(r"^(?P<start>.+?)\s+to\s+(?P<stop>.+?)\s+step\s+(?P<step>.+)$", re.IGNORECASE)


def _pieces(part: str):
    """One comma-separated part -> (form, [(number, unit) or None, ...]); form is value, colon or to."""
    found = _TO_RANGE.match(part)
    if found:
        return "to", [split_number(found.group(k)) for k in ("start", "stop", "step")]
    if re.search(r"\sto\s", part, re.IGNORECASE):     # 'to' with no step, or junk around it
        return "to", [None]
    if ":" in part:
        return "colon", [split_number(p) for p in part.split(":")]
    return "value", [split_number(part)]


def _text_items(field: str, text: str, name: str) -> list:
    """The items of a grid typed as text: values and ranges by commas, a unit on each or once at the end."""
    parts = [p.strip() for p in text.split(",")]
    if any(not p for p in parts):
        raise InputError(name, text, LIST_FORMS + ", none empty")
    pieces = [_pieces(p) for p in parts]
    has_unit = [any(n and n[1] for n in nums) for _, nums in pieces]
    shared = ""          # a unit written once, after the last value, for the whole list
    if FIELDS[field].kind in KINDS and len(parts) > 1 and any(has_unit) and not all(has_unit):
        if not has_unit[-1] or any(has_unit[:-1]):
            raise InputError(name, text, "a unit on every value, or one unit after the last value for the "
                             "whole list, e.g. '30, 60, 100 bar' or '30 to 100 bar step 10'")
        shared = next(n[1] for n in pieces[-1][1] if n and n[1])
    out = []
    for part, (form, nums) in zip(parts, pieces):
        if form == "value":
            typed_ = part if (nums[0] is None or nums[0][1] or not shared) else f"{part} {shared}"
            out.append((typed_, value(field, typed_, name=name)))
        else:
            out += _range(field, part, nums, name, shared, exact=form == "to")
    return out


_MAX_RANGE = 1_000_000
_RANGE_FORMS = "a range start:stop:step or 'START to STOP step STEP' with start <= stop and a step above 0, " \
               "e.g. '1.6:3.6:0.1' or '2.6 to 4.0 step 0.2'"


def _range(field: str, text: str, nums: list, name: str, shared: str = "", exact: bool = False) -> list:
    """A range (stop included) -> (text, SI value) per point, by decimal arithmetic in the typed unit.

    ``nums`` holds (number, unit) of start, stop and step; a unit may be written on any of them
    (all the same) or, with ``shared``, only after the list. ``exact``: the steps must land on stop.
    """
    from decimal import Decimal, InvalidOperation

    spec = FIELDS[field]
    if len(nums) != 3 or not all(nums):
        raise InputError(name, text, _RANGE_FORMS)
    units = {m[1] for m in nums if m[1]}
    unit = next(iter(units), shared)
    if len(units) > 1 or (spec.kind in KINDS and not unit) or (spec.kind not in KINDS and unit):
        raise InputError(name, text, _RANGE_FORMS + ("; one unit for all three parts" if units else
                                                     "; with a unit, e.g. '20:100:20 bar' or '20 to 100 bar step 20'"))
    try:
        start, stop, step = (Decimal(m[0]) for m in nums)
    except InvalidOperation:
        raise InputError(name, text, _RANGE_FORMS) from None
    if not step > 0 or stop < start:
        raise InputError(name, text, _RANGE_FORMS)
    n = int((stop - start) / step) + 1
    if n > _MAX_RANGE:
        raise InputError(name, text, f"a range of at most {_MAX_RANGE} values")
    if exact and start + (n - 1) * step != stop:
        raise InputError(name, text, f"a step that lands on the stop ({stop - start} is not a whole number of "
                         f"steps of {step}; the last value would be {start + (n - 1) * step})")
    out = []
    for k in range(n):
        typed_ = str(start + k * step) + (f" {unit}" if unit else "")
        try:
            out.append((typed_, value(field, typed_, name=name)))
        except InputError as exc:
            raise InputError(name, text, exc.allowed) from None
    return out
