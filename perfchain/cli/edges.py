"""What every command shares at its edges: errors that quote the text typed, and JSON that is always valid.

No physics here, and nothing from the commands: :mod:`.point`, :mod:`.sweep`,
:mod:`.study` and :mod:`.vehicle` import it.
"""

from __future__ import annotations

import functools
import json
import math

from perfchain.errors import InputError

__all__ = ["quote_as_typed", "json_text", "finite_or_none", "units_option", "out_option", "check_output",
           "UNITS_HELP", "OUT_HELP"]

UNITS_HELP = ("Units of the readable output and of --out: si (bar, K, m/s, kg, mm) or us (psia, degR, ft/s, "
              "lbm, in); --json stays SI. [default: si on screen; SI base units (Pa, m) in --out files]")
OUT_HELP = "Also write the result as a table: .csv (with a .meta.json of units), .parquet or .json."


def _option_text(field: str, params: dict):
    """The text typed for the option an error names (``exit_pressure``, ``--out``...), or None."""
    key = field.strip().lstrip("-").replace("-", "_")
    value = params.get(key)
    return value if isinstance(value, str) else None


def quote_as_typed(command):
    """Make a click callback's one-line errors quote the option as the user typed it.

    A check deep in the chain sees SI numbers (``exit_pressure: got 7999986.887...``); this
    puts the option's own text back (``got '1160.3 psi'``) when the error names an option
    that was given as text. The rest of the line is kept.

    Parameters
    ----------
    command : callable
        A click command's callback (keyword arguments named after the options).

    Returns
    -------
    callable

    Examples
    --------
    >>> @quote_as_typed
    ... def point(exit_pressure=None):
    ...     raise InputError("exit_pressure", 7999986.8872632515, "a pressure below the throat pressure")
    >>> try:
    ...     point(exit_pressure="1160.3 psi")
    ... except InputError as exc:
    ...     print(exc)
    exit_pressure: got '1160.3 psi'; allowed: a pressure below the throat pressure
    """
    @functools.wraps(command)
    def wrapper(*args, **params):
        try:
            return command(*args, **params)
        except InputError as exc:
            text = _option_text(str(exc.field), params)
            if text is None or exc.value == text:
                raise
            raise type(exc)(exc.field, text, exc.allowed) from None
    return wrapper


def units_option(f):
    """The ``--units si|us`` option of a command (checked by :func:`check_output`, not by click)."""
    import click

    return click.option("--units", help=UNITS_HELP)(f)


def out_option(f):
    """The ``--out FILE`` option of a command that writes its result as a small table."""
    import click

    return click.option("--out", help=OUT_HELP)(f)


def check_output(out, units):
    """Check ``--out`` and ``--units`` before anything is computed; ``(path or None, units or None)``.

    >>> check_output(None, "US")
    (None, 'us')
    >>> check_output(None, "metric")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: units: got 'metric'; allowed: one of si, us
    """
    from perfchain.study.columns import check_units
    from perfchain.study.files import check_out

    return (None if out is None else check_out(out)), (None if units is None else check_units(units))


def finite_or_none(data):
    """A copy of plain data (dicts, lists, numbers) with every non-finite float as None.

    >>> finite_or_none({"burn_time": float("inf"), "stages": [1.5, float("nan")]})
    {'burn_time': None, 'stages': [1.5, None]}
    """
    if isinstance(data, float):
        return data if math.isfinite(data) else None
    if isinstance(data, dict):
        return {k: finite_or_none(v) for k, v in data.items()}
    if isinstance(data, (list, tuple)):
        return [finite_or_none(v) for v in data]
    return data


def json_text(data, indent: int = 2) -> str:
    """JSON text of plain data that every JSON reader accepts: a non-finite number becomes ``null``.

    Python's :func:`json.dumps` writes ``Infinity`` and ``NaN`` by default, which are not JSON
    (RFC 8259, section 6).

    >>> json_text({"burn_time": float("inf")}, indent=None)
    '{"burn_time": null}'
    """
    return json.dumps(finite_or_none(data), indent=indent, allow_nan=False)
