"""Plain data as TOML text: keys, values (strings, numbers, booleans, lists, inline tables) and tables.

Enough of TOML 1.0 to write a study file back: :func:`emit_table` writes a table or an
array of tables with its nested arrays of tables after it. Read back with :mod:`tomllib`.
"""

from __future__ import annotations

import math

from perfchain.errors import InputError

__all__ = ["emit_table"]


def _toml_key(key: str) -> str:
    if key and all(c.isalnum() or c in "-_" for c in key) and key.isascii():
        return key
    return _toml_value(key)


def _toml_value(value) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if not math.isfinite(value):
            raise InputError("value", value, "a finite number")
        return repr(value)
    if isinstance(value, str):
        escaped = value.replace("\\", "\\\\").replace('"', '\\"').replace("\n", "\\n").replace("\t", "\\t")
        return f'"{escaped}"'
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{ " + ", ".join(f"{_toml_key(k)} = {_toml_value(v)}" for k, v in value.items()) + " }"
    raise TypeError(type(value).__name__)


def emit_table(lines: list, header: str, table: dict, array: bool):
    """Append a TOML table (or one element of an array of tables) to ``lines``.

    Parameters
    ----------
    lines : list of str
        Receives the lines.
    header : str
        Dotted table name.
    table : dict
        Plain data; lists of dicts become nested arrays of tables, ``fixed_tank`` a nested table.
    array : bool
        ``[[header]]`` instead of ``[header]``.

    Examples
    --------
    >>> import tomllib
    >>> lines = []
    >>> emit_table(lines, "engine", {"name": "E", "area_ratio": [40.0, 80.0], "thrust": "25 kN"}, True)
    >>> tomllib.loads("\\n".join(lines))
    {'engine': [{'name': 'E', 'area_ratio': [40.0, 80.0], 'thrust': '25 kN'}]}
    """
    lines.append(f"[[{header}]]" if array else f"[{header}]")
    nested = []
    for key, value in table.items():
        if isinstance(value, list) and value and all(isinstance(v, dict) for v in value):
            nested.append((key, value, True))
        elif isinstance(value, dict) and key in ("fixed_tank",):
            nested.append((key, value, False))
        else:
            lines.append(f"{_toml_key(key)} = {_toml_value(value)}")
    lines.append("")
    for key, value, many in nested:
        for item in (value if many else [value]):
            emit_table(lines, f"{header}.{key}", item, many)

