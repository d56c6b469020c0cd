"""Grid axes: a value, a list, an array or text -> a checked 1-D float array in SI.

See :mod:`perfchain.inputs` for the accepted forms.
"""

from __future__ import annotations

from perfchain.errors import InputError
from perfchain.inputs.fields import FIELDS, typed, value
from perfchain.units import KINDS, is_quantity, plain_number, split_number

__all__ = ["grid", "LIST_FORMS"]

#: words for the accepted forms of a grid, used in messages
LIST_FORMS = "a value, a list, or text such as '2.0,2.4' or '1.6:3.6:0.1'"


def grid(field: str, x, *, name: str | None = None, distinct: bool = True):
    """The values of a grid axis of a known field, checked, as a 1-D float array in SI.

    Parameters
    ----------
    field : str
        A key of :data:`FIELDS`.
    x : scalar, sequence, numpy array, pint Quantity or str
        One value; a list or array of values (each as :func:`value` takes it);
        or text of comma-separated values and ``start:stop:step`` ranges whose
        stop is included. In a range the unit may follow each part or only the
        last (``"20 bar:100 bar:20 bar"`` or ``"20:100:20 bar"``).
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


def _grid_items(field: str, x, name: str) -> list:
    """(value as typed, SI value) for every point of a grid axis."""
    allowed = LIST_FORMS + ", none empty"
    if isinstance(x, str):
        parts = [p.strip() for p in x.split(",")]
        if any(not p for p in parts):
            raise InputError(name, x, allowed)
        out = []
        for p in parts:
            out += _range(field, p, name) if ":" in p else [(p, value(field, p, name=name))]
        return out
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


_MAX_RANGE = 1_000_000


def _range(field: str, text: str, name: str) -> list:
    """``"start:stop:step"`` (stop included) -> SI values, by decimal arithmetic in the typed unit."""
    from decimal import Decimal, InvalidOperation

    spec = FIELDS[field]
    allowed = "a range start:stop:step with start <= stop and a step above 0, e.g. '1.6:3.6:0.1'"
    parts = text.split(":")
    matches = [split_number(p) for p in parts]
    if len(parts) != 3 or not all(matches):
        raise InputError(name, text, allowed)
    units = [m[1] for m in matches]
    unit = units[2]
    if any(u and u != unit for u in units[:2]) or (spec.kind in KINDS and not unit) \
            or (spec.kind not in KINDS and unit):
        raise InputError(name, text, allowed + ("; one unit for all three parts" if any(units) else
                                                "; with a unit, e.g. '20:100:20 bar'"))
    try:
        start, stop, step = (Decimal(m[0]) for m in matches)
    except InvalidOperation:
        raise InputError(name, text, allowed) from None
    if not step > 0 or stop < start:
        raise InputError(name, text, allowed)
    n = int((stop - start) / step) + 1
    if n > _MAX_RANGE:
        raise InputError(name, text, f"a range of at most {_MAX_RANGE} values")
    out = []
    for k in range(n):
        typed = str(start + k * step) + (f" {unit}" if unit else "")
        try:
            out.append((typed, value(field, typed, name=name)))
        except InputError as exc:
            raise InputError(name, text, exc.allowed) from None
    return out
