"""Sweep tables: column names and types, and the CSV / JSON / Parquet writers.

Columns come grid first (``propellant, oxidizer, fuel, mixture_ratio, chamber_pressure, <exit>,
ambient_pressure[, altitude], flow, status, reason``), then in the order rows first show
them. Each column has one type: ``float64``, ``bool`` or ``string``. The writers stream a
table chunk by chunk (rows in memory or checkpoint files), so memory stays near one chunk.
"""

from __future__ import annotations

import json
import math

from perfchain.study.files import load_chunk

__all__ = ["kinds_of", "table_order", "rows_frame", "table_columns", "frame_columns", "pandas_attrs", "write_csv", "write_json",
           "write_parquet"]


def kinds_of(rows) -> dict:
    """Column name -> type of its first value that is not None (or None), in first-seen order.

    Parameters
    ----------
    rows : iterable of dict
        Table rows.

    Returns
    -------
    dict
        ``"float64"``, ``"bool"``, ``"string"``, or None for a column seen only empty.

    Examples
    --------
    >>> kinds_of([{"cstar": 1800.0, "reason": None}, {"ok": True, "flow": "frozen", "reason": "x"}])
    {'cstar': 'float64', 'reason': 'string', 'ok': 'bool', 'flow': 'string'}
    """
    kinds: dict = {}
    open_: set = set()          # keys seen only with None so far
    for row in rows:
        if row.keys() <= kinds.keys() and all(row[k] is None for k in open_ if k in row):
            continue            # nothing new in this row (most rows of a table)
        for k, v in row.items():
            if k not in kinds or kinds[k] is None:
                kinds[k] = None if v is None else ("bool" if isinstance(v, bool) else
                                                   "float64" if isinstance(v, (int, float)) else "string")
                (open_.add if v is None else open_.discard)(k)
    return kinds


def _grid_names(grid) -> list:
    """The columns every sweep table starts with."""
    names = ["propellant", "oxidizer", "fuel", "mixture_ratio", "chamber_pressure", grid.exit_key,
             "ambient_pressure"]
    return names + (["altitude"] if grid.altitude is not None else []) + ["flow", "status", "reason"]


def table_order(grid, keys) -> list:
    """Column names in a table's order: the grid's columns first (those among ``keys``), then
    the other ``keys`` in their order (the order :func:`table_columns` gives one chunk's columns).

    Examples
    --------
    >>> from perfchain.study.grid import make_grid
    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.6", chamber_pressure="70 bar", area_ratio="40")
    >>> table_order(g, ["propellant", "cstar", "flow", "status", "reason"])
    ['propellant', 'flow', 'status', 'reason', 'cstar']
    """
    names = _grid_names(grid)
    have = set(keys)
    head = [k for k in names if k in have]
    return head + [k for k in keys if k not in set(head)]


def rows_frame(grid, rows):
    """A chunk's rows as a pandas DataFrame, its columns in the table's order (:func:`table_order`).

    Parameters
    ----------
    grid : SweepGrid
    rows : list of dict
        Table rows (SI units).

    Returns
    -------
    pandas.DataFrame
        ``pandas.DataFrame(rows)`` with its columns reordered.

    Examples
    --------
    >>> from perfchain.study.grid import make_grid
    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.6", chamber_pressure="70 bar", area_ratio="40")
    >>> rows_frame(g, [{"cstar": 1800.0, "flow": "shifting", "status": "ok"}]).columns.tolist()
    ['flow', 'status', 'cstar']
    """
    import pandas as pd

    df = pd.DataFrame(rows)
    keys = df.columns.tolist()
    order = table_order(grid, keys)
    return df if order == keys else df[order]


def table_columns(grid, chunks, known=None) -> dict:
    """Column name -> type (float64, bool, string), grid columns first, then first-seen order.

    Parameters
    ----------
    grid : SweepGrid
    chunks : list
        Each chunk's rows, or its checkpoint file.
    known : dict, optional
        A chunk's index -> its :func:`kinds_of`, for chunks not to be read again.

    Returns
    -------
    dict
        A column never seen with a value is ``float64`` (``string`` for ``status``, ``reason``).

    Examples
    --------
    >>> from perfchain.study.grid import make_grid
    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.6", chamber_pressure="70 bar", area_ratio="40")
    >>> cols = table_columns(g, [[{"status": "ok", "reason": None, "cstar": 1800.0}]])
    >>> list(cols)[:5], cols["reason"], cols["cstar"], cols["oxidizer"]
    (['propellant', 'oxidizer', 'fuel', 'mixture_ratio', 'chamber_pressure'], 'string', 'float64', 'string')
    """
    names = _grid_names(grid)
    kinds: dict = {}
    for n, rows in enumerate(chunks):
        chunk = (known or {}).get(n)
        for k, v in (chunk if chunk is not None else kinds_of(load_chunk(rows))).items():
            if k not in kinds or kinds[k] is None:
                kinds[k] = v
    for k in kinds:
        if k not in names:
            names.append(k)
    return {k: kinds.get(k) or _empty_kind(k) for k in names}


def _empty_kind(name: str) -> str:
    """The type of a column never seen with a value: text where declared so (a formulation's
    ``oxidizer`` and ``fuel``), else float64 (NaN)."""
    from perfchain.study.columns import TEXT, declared_kind

    return "string" if name in ("reason", "status") or declared_kind(name) == TEXT else "float64"


#: the kind of each column dtype seen (an object column's kind depends on its values: None)
_DTYPE_KINDS: dict = {}


def _dtype_kind(dtype):
    """``bool``, ``float64`` or ``string`` for a column of this dtype, None for an object column (kept)."""
    import pandas as pd

    if pd.api.types.is_bool_dtype(dtype):
        kind = "bool"
    elif pd.api.types.is_float_dtype(dtype):
        kind = "float64"
    elif pd.api.types.is_string_dtype(dtype) and not pd.api.types.is_object_dtype(dtype):
        kind = "string"      # pandas infers a text dtype only from text values
    else:
        kind = None
    _DTYPE_KINDS[dtype] = kind
    return kind


def frame_columns(grid, frames) -> dict:
    """:func:`table_columns` for chunks held as DataFrames (built from the same rows).

    Parameters
    ----------
    grid : SweepGrid
    frames : list of pandas.DataFrame

    Returns
    -------
    dict
        Column name -> ``float64``, ``bool`` or ``string``, as :func:`table_columns` gives
        for the rows the frames were built from.

    Examples
    --------
    >>> import pandas as pd
    >>> from perfchain.study.grid import make_grid
    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.6", chamber_pressure="70 bar", area_ratio="40")
    >>> rows = [{"status": "ok", "reason": None, "cstar": 1800.0}]
    >>> frame_columns(g, [pd.DataFrame(rows)]) == table_columns(g, [rows])
    True
    """
    import pandas as pd

    names = _grid_names(grid)
    kinds: dict = {}
    for f in frames:
        columns = f.columns.tolist()   # (iterating pandas' text index itself is slow)
        if all(kinds.get(c) is not None for c in columns):
            continue            # nothing new in this chunk (most chunks of a table)
        for c, dtype in zip(columns, f.dtypes.tolist()):
            if kinds.get(c) is not None:
                continue
            if isinstance(dtype, pd.StringDtype):
                kind = "string"     # (pandas' text dtypes hash slowly)
            else:
                kind = _DTYPE_KINDS[dtype] if dtype in _DTYPE_KINDS else _dtype_kind(dtype)
            if kind is None:   # an object column: its values tell
                v = next((x for x in f[c].to_numpy() if x is not None and x == x), None)
                kind = None if v is None else ("bool" if isinstance(v, bool) else
                                               "float64" if isinstance(v, (int, float)) else "string")
            kinds[c] = kind
    for k in kinds:
        if k not in names:
            names.append(k)
    return {k: kinds.get(k) or _empty_kind(k) for k in names}


def pandas_attrs(units: dict, provenance: dict) -> bytes:
    """Parquet schema metadata that :func:`pandas.read_parquet` turns into ``DataFrame.attrs``.

    pandas (2.1 and later) stores ``DataFrame.attrs`` as JSON under the schema metadata key
    ``PANDAS_ATTRS`` and restores it on reading; this gives ``{"units": ..., "perfchain": ...}``,
    the same attrs as a table from :func:`perfchain.study.sweep.sweep`.

    Parameters
    ----------
    units : dict
        Column -> unit of its values in the file.
    provenance : dict
        Versions, data and inputs.

    Returns
    -------
    bytes
        JSON text.

    Examples
    --------
    >>> json.loads(pandas_attrs({"chamber_pressure": "Pa"}, {"perfchain": "0.1"}))
    {'units': {'chamber_pressure': 'Pa'}, 'perfchain': {'perfchain': '0.1'}}
    """
    return json.dumps({"units": units, "perfchain": provenance}, default=str).encode()


def _text(v):
    if v is None or (isinstance(v, float) and math.isnan(v)):
        return ""
    return repr(v) if isinstance(v, float) else str(v)


def write_csv(fh, cols, chunks):
    """Stream a table as CSV (SI units, floats as their shortest repr, empty for None/NaN).

    Parameters
    ----------
    fh : binary file
    cols : iterable of str
        Column names, in order.
    chunks : iterable
        Each chunk's rows, or its checkpoint file.

    Examples
    --------
    >>> import io
    >>> fh = io.BytesIO()
    >>> write_csv(fh, ["cstar", "reason"], [[{"cstar": 1800.0, "reason": None}]])
    >>> fh.getvalue().decode()
    'cstar,reason\\n1800.0,\\n'
    """
    import csv
    import io

    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(cols)
    for rows in chunks:
        for r in load_chunk(rows):
            w.writerow([_text(r.get(c)) for c in cols])
        fh.write(buf.getvalue().encode())
        buf.seek(0)
        buf.truncate()


def write_json(fh, cols, chunks, meta):
    """Stream a table as one JSON object: ``metadata``, ``columns`` and ``rows`` (NaN as null).

    Parameters
    ----------
    fh : binary file
    cols : iterable of str
    chunks : iterable
        Each chunk's rows, or its checkpoint file.
    meta : dict
        Units and provenance.

    Examples
    --------
    >>> import io
    >>> fh = io.BytesIO()
    >>> write_json(fh, ["cstar"], [[{"cstar": float("nan")}]], {"units": {"cstar": "m/s"}})
    >>> json.loads(fh.getvalue())["rows"]
    [{'cstar': None}]
    """
    head = json.dumps({"metadata": meta, "columns": list(cols)}, indent=1)[:-2]
    fh.write((head + ',\n "rows": [').encode())
    first = True
    for rows in chunks:
        for r in load_chunk(rows):
            row = {c: (None if isinstance(r.get(c), float) and math.isnan(r[c]) else r.get(c)) for c in cols}
            fh.write(((" " if first else ",\n  ") + json.dumps(row, allow_nan=False)).encode())
            first = False
    fh.write(b"]\n}\n")


def write_parquet(fh, cols, chunks, meta):
    """Stream a table as Parquet; ``meta`` (units, provenance) goes in the schema metadata.

    Parameters
    ----------
    fh : binary file
    cols : dict
        Column name -> ``float64``, ``bool`` or ``string``.
    chunks : iterable
        Each chunk's rows, or its checkpoint file.
    meta : dict
        Stored as JSON under the schema metadata key ``perfchain``, and as the DataFrame
        attrs pandas reads back (``pandas.read_parquet(...).attrs["units"]``).

    Examples
    --------
    >>> import io
    >>> import pandas as pd
    >>> import pyarrow.parquet as pq
    >>> fh = io.BytesIO()
    >>> write_parquet(fh, {"cstar": "float64"}, [[{"cstar": 1800.0}]], {"units": {"cstar": "m/s"}})
    >>> pq.read_table(io.BytesIO(fh.getvalue())).column("cstar").to_pylist()
    [1800.0]
    >>> pd.read_parquet(io.BytesIO(fh.getvalue())).attrs["units"]
    {'cstar': 'm/s'}
    """
    import pyarrow as pa
    import pyarrow.parquet as pq

    types = {"float64": pa.float64(), "bool": pa.bool_(), "string": pa.string()}
    schema = pa.schema([(c, types[k]) for c, k in cols.items()],
                       metadata={b"perfchain": json.dumps(meta).encode(),
                                 b"PANDAS_ATTRS": pandas_attrs(meta.get("units", {}),
                                                               {k: v for k, v in meta.items() if k != "units"})})
    with pq.ParquetWriter(fh, schema) as w:
        for rows in chunks:
            rows = load_chunk(rows)
            w.write_table(pa.Table.from_pydict({c: [r.get(c) for r in rows] for c in cols}, schema=schema))

