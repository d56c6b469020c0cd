"""Small result tables as files: a point, a comparison or a vehicle, in CSV, Parquet or JSON.

``perfchain point``, ``compare`` and ``deltav`` take ``--out FILE`` and ``--units si|us``; the
rows they write come through here, in the same three formats and with the same unit metadata
as a sweep table (:mod:`perfchain.study.tables`): the format follows the extension; a CSV gets a
``<file>.meta.json`` sidecar; Parquet keeps the units in its schema metadata, read back by
pandas as ``DataFrame.attrs["units"]``; JSON is one object with ``metadata``, ``columns`` and
``rows``. Without an output unit system the values are SI base units (Pa, K, m/s, kg, s), as in
a sweep table; with ``si`` or ``us`` they are converted by :func:`convert_rows`.
"""

from __future__ import annotations

import json
from pathlib import Path

__all__ = ["convert_rows", "write_rows", "column_types"]


def convert_rows(rows, system: str | None = None) -> tuple[list, dict]:
    """Rows in an output unit system, and ``{column: unit}`` of the values.

    Parameters
    ----------
    rows : list of dict
        Table rows in SI units; keys are column names of :mod:`perfchain.study.columns`.
    system : str, optional
        ``"si"`` (bar, K, m/s, mm...) or ``"us"`` (psia, degR, ft/s, in...); None keeps the SI
        base units (Pa, K, m/s, m...).

    Returns
    -------
    (list of dict, dict)
        New rows (the given ones are not changed), and the unit of every column seen.

    Examples
    --------
    1000 psia is 6 894 757.29 Pa (NIST SP 811, Appendix B):

    >>> rows, units = convert_rows([{"chamber_pressure": 6894757.293168, "flow": "frozen"}], "us")
    >>> round(rows[0]["chamber_pressure"], 6), units
    (1000.0, {'chamber_pressure': 'psia', 'flow': ''})
    >>> convert_rows([{"chamber_pressure": 7e6}])
    ([{'chamber_pressure': 7000000.0}], {'chamber_pressure': 'Pa'})
    """
    from perfchain.study.columns import check_units, column_kind, factor, si_unit, unit_label

    names = list(dict.fromkeys(k for r in rows for k in r))
    if system is None:
        return [dict(r) for r in rows], {c: si_unit(c) for c in names}
    system = check_units(system)
    kinds = {c: column_kind(c) for c in names}
    scale = {c: factor(k, system) for c, k in kinds.items() if k is not None}
    out = [{k: (v * scale[k] if k in scale and isinstance(v, (int, float)) and not isinstance(v, bool) else v)
            for k, v in r.items()} for r in rows]
    return out, {c: unit_label(kinds[c], system) for c in names}


def column_types(rows) -> dict:
    """Column -> ``float64``, ``bool`` or ``string``; a column seen only empty by its declared kind.

    >>> column_types([{"cstar": 1800.0, "note": None, "density_isp": None, "at_bound": False}])
    {'cstar': 'float64', 'note': 'string', 'density_isp': 'float64', 'at_bound': 'bool'}
    """
    from perfchain.study.columns import TEXT, declared_kind
    from perfchain.study.tables import kinds_of

    return {k: v or ("string" if declared_kind(k) == TEXT else "float64") for k, v in kinds_of(rows).items()}


def write_rows(out, rows, *, units: str | None = None, inputs: dict | None = None) -> Path:
    """Write table rows to ``out`` (CSV, Parquet or JSON by extension), atomically.

    Parameters
    ----------
    out : str or Path
        A file ending in ``.csv``, ``.parquet`` or ``.json`` in an existing, writable folder.
    rows : list of dict
        SI units.
    units : str, optional
        Output unit system, ``"si"`` or ``"us"``; None keeps SI base units.
    inputs : dict, optional
        The command's inputs as typed, kept in the metadata.

    Returns
    -------
    Path
        The file written; a CSV also gets ``<file>.meta.json`` (units, perfchain version, inputs).

    Examples
    --------
    A round trip through pandas; 70 bar is 7 MPa (SI Brochure, 9th ed., Table 8):

    >>> import tempfile, pandas as pd
    >>> with tempfile.TemporaryDirectory() as d:
    ...     path = write_rows(f"{d}/p.parquet", [{"chamber_pressure": 7e6, "flow": "shifting"}], units="si")
    ...     t = pd.read_parquet(path)
    >>> float(t.chamber_pressure[0]), t.attrs["units"]["chamber_pressure"]
    (70.0, 'bar')
    """
    from perfchain import __version__
    from perfchain.study.files import check_out, write_atomic
    from perfchain.study.tables import write_csv, write_json, write_parquet

    path = check_out(out)
    table, col_units = convert_rows(list(rows), units)
    cols = column_types(table)
    meta = {"units": col_units, "units_system": units or "SI", "perfchain": __version__,
            "inputs": dict(inputs or {})}
    ext = path.suffix.lower()
    if ext == ".csv":
        write_atomic(path, lambda fh: write_csv(fh, list(cols), [table]))
        side = Path(str(path) + ".meta.json")
        write_atomic(side, lambda fh: fh.write((json.dumps(meta, indent=1, default=str) + "\n").encode()))
    elif ext == ".json":
        write_atomic(path, lambda fh: write_json(fh, list(cols), [table], meta))
    else:
        write_atomic(path, lambda fh: write_parquet(fh, cols, [table], meta))
    return path
