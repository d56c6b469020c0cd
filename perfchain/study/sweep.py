"""Performance tables: a full grid of operating points, one tidy row per point.

The grid is the product of mixture ratios x chamber pressures x (area ratios
or exit pressures) x (ambient pressures or altitudes) x flow models, in that
order (the last one varies fastest). Each row carries the keys of
:meth:`perfchain.performance.chain.Performance.to_dict` with the stations flattened
(``chamber_temperature``, ``throat_pressure``, ``exit_mach``...), SI units,
plus ``status`` (``"ok"``/``"failed"``) and ``reason`` (the one-line message
of the :class:`~perfchain.errors.PerfchainError` that stopped a point).

This module is the front: :func:`sweep` (a DataFrame) and :func:`sweep_to_file` (a
table file). The parts live beside it, lowest first: :mod:`.grid` (the validated lists),
:mod:`.rows` (a result as one row), :mod:`.provenance` (versions, inputs, code
fingerprint), :mod:`.files` (output paths, atomic writes), :mod:`.tables` (column types,
units and writers), :mod:`.chunks` (the work units, solved by the batch solver) and
:mod:`.execution` (chunks on a local pool or a Dask cluster, checkpoints and resume).
"""

from __future__ import annotations

import json
from pathlib import Path

from perfchain.errors import InputError
from perfchain.study.chunks import CHUNK_SOLVES
from perfchain.study.execution import run_chunks
from perfchain.study.files import FORMATS, check_out, folder_lock, load_chunk, remove_stale_temps, write_atomic
from perfchain.study.grid import MAX_POINTS, SweepGrid, make_grid
from perfchain.study.provenance import code_fingerprint, provenance
from perfchain.study.rows import COMPOSITION_TOP, flatten_result
from perfchain.study.columns import column_units, si_unit as column_unit
from perfchain.study.tables import frame_columns, table_columns, write_csv, write_json, write_parquet

__all__ = ["SweepGrid", "make_grid", "sweep", "sweep_to_file", "flatten_result",
           "column_unit", "MAX_POINTS", "provenance", "to_xarray", "CHUNK_SOLVES", "COMPOSITION_TOP",
           "FORMATS", "check_out", "code_fingerprint", "run_chunks", "table_columns", "write_csv"]


def sweep(oxidizer=None, fuel=None, *, mixture_ratio=None, chamber_pressure, area_ratio=None, exit_pressure=None,
          ambient_pressure=None, altitude=None, flow="shifting", workers: int = 1, cluster=None,
          checkpoint=None, progress=None, confirm=False, composition_top: int = COMPOSITION_TOP,
          chunk_solves: int = CHUNK_SOLVES, separation=None, cluster_timeout=None, propellant=None,
          transport: bool = False):
    """Performance over a full grid, as a pandas DataFrame (one row per point, SI units).

    Parameters
    ----------
    oxidizer, fuel, mixture_ratio, chamber_pressure, area_ratio, exit_pressure, ambient_pressure, altitude, flow, confirm
        As in :func:`~perfchain.study.grid.make_grid`.
    propellant : str, Mapping or Ingredient, optional
        A formulation or monopropellant instead of oxidizer, fuel and mixture_ratio (no O/F axis).
    workers : int
        Local worker processes (1: this process).
    cluster : str or distributed.Client, optional
        Address of a running Dask scheduler (needs ``dask[distributed]``).
    checkpoint : str or Path, optional
        Folder for finished chunks; a rerun of the same sweep reuses them.
    progress : bool, optional
        Progress bar; by default only on a terminal.
    composition_top : int
        Species kept per station composition column (0: none).
    chunk_solves : int
        Solves per chunk (batch, checkpoint and progress unit).
    separation : str, optional
        Separation criterion: ``"summerfield"`` (default, k = 0.4), ``"summerfield:K"`` or
        ``"schmucker"``; separated rows carry the cut-nozzle estimate
        (:mod:`perfchain.performance.ambient`).
    cluster_timeout : float, optional
        Seconds to wait for a cluster's first worker (default 60 s, or
        ``PERFCHAIN_CLUSTER_TIMEOUT``).
    transport : bool
        Add the gas transport columns (``<station>_viscosity``, ``_thermal_conductivity``,
        ``_thermal_conductivity_equilibrium``, ``_prandtl``, ``_prandtl_equilibrium``); off by
        default (a few ms per station).

    Returns
    -------
    pandas.DataFrame
        Columns as :func:`flatten_result`, plus ``status`` and ``reason``;
        units in ``df.attrs["units"]``, provenance in ``df.attrs["perfchain"]``.

    Examples
    --------
    Ideal shifting LOX/RP-1 at O/F 2.56 and 1000 psia to 1 atm is about 300 s
    at sea level (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5;
    from memory, +/- 1 %); a point with p_e above p_c keeps its row:

    >>> df = sweep("LOX", "RP-1", mixture_ratio="2.56", chamber_pressure="1000 psi",
    ...            exit_pressure="1 atm,100 bar")
    >>> list(df.status), bool(abs(df.isp_ambient[0] / 300 - 1) < 0.01)
    (['ok', 'failed'], True)
    """
    import pandas as pd

    grid = make_grid(oxidizer, fuel, mixture_ratio=mixture_ratio, chamber_pressure=chamber_pressure,
                     area_ratio=area_ratio, exit_pressure=exit_pressure, ambient_pressure=ambient_pressure,
                     altitude=altitude, flow=flow, confirm=confirm, separation=separation, propellant=propellant,
                     transport=transport)
    if checkpoint is not None:
        Path(checkpoint).mkdir(parents=True, exist_ok=True)
    if isinstance(chunk_solves, bool) or not isinstance(chunk_solves, int) or chunk_solves < 1:
        raise InputError("chunk_solves", chunk_solves, "a whole number of solves per chunk, at least 1")
    if checkpoint is None:   # each worker hands back its chunk as a frame: the table builds in parallel
        frames, _ = run_chunks(grid, workers=workers, cluster=cluster, progress=progress, top=composition_top,
                               solves=chunk_solves, as_frames=True, cluster_timeout=cluster_timeout)
        cols = frame_columns(grid, frames)
    else:
        got: dict = {}
        results, _ = run_chunks(grid, workers=workers, cluster=cluster, parts=checkpoint, progress=progress,
                                top=composition_top, solves=chunk_solves, cluster_timeout=cluster_timeout,
                                on_chunk=lambda n, rows: got.__setitem__(n, pd.DataFrame(rows)))
        chunks = [load_chunk(item) for item in results]
        cols = table_columns(grid, chunks)
        frames = [got[n] if n in got else pd.DataFrame(c) for n, c in enumerate(chunks)]
    df = _typed_table(frames, cols)
    df.attrs["units"] = column_units(cols)
    df.attrs["perfchain"] = provenance(grid, composition_top)
    return df


def _typed_table(frames: list, cols: dict):
    """The chunks' frames as one table of the columns ``cols`` (name -> kind), each column of its
    kind: float64, bool, or text (pandas' text dtype, or objects where a text is missing: None, as
    in the rows). One frame that has the columns in order is the table itself (no copy), and
    frames that have them are not reindexed."""
    import numpy as np
    import pandas as pd

    names = list(cols)
    df = frames[0] if len(frames) == 1 else pd.concat(frames, ignore_index=True)
    if df.columns.tolist() != names:     # (the chunks' frames come in the table's order: rarely)
        df = df.reindex(columns=names)
    dtypes = dict(zip(names, df.dtypes.tolist()))
    for c, kind in cols.items():
        if kind == "float64" and dtypes[c] != np.float64:
            df[c] = df[c].astype("float64")
    for c in (c for c, kind in cols.items() if kind == "string"):
        column = df[c]
        if dtypes[c] == object and all(v is None or type(v) is str for v in column.to_numpy()):
            continue    # already texts and None (the common reason column)
        if column.array.isna().any():     # a missing text is None, as in the rows
            df[c] = column.astype(object).where(column.notna(), None)
    return df


def to_xarray(df, grid: SweepGrid | None = None):
    """The table as an xarray Dataset whose dimensions are the grid axes (needs xarray).

    Parameters
    ----------
    df : pandas.DataFrame
        A table of :func:`sweep`.
    grid : SweepGrid, optional
        Its grid; by default the axes are read from ``df.attrs["perfchain"]["grid_order"]``.

    Returns
    -------
    xarray.Dataset
        One variable per column, with ``attrs["units"]`` (as in ``df.attrs["units"]``) on
        every variable and coordinate; ``attrs["perfchain"]`` holds the provenance as JSON text.

    Raises
    ------
    perfchain.errors.DataError
        xarray is not installed: one line naming the extra to install.
    """
    try:
        import xarray  # noqa: F401
    except ImportError:
        from perfchain.errors import DataError

        raise DataError("xarray", "not installed",
                        "the optional extra: pip install 'perfchain[xarray]'") from None
    dims = list(grid.dims) if grid is not None else list(df.attrs["perfchain"]["grid_order"])
    ds = df.set_index(dims).to_xarray()
    units = df.attrs.get("units", {})
    for name in list(ds.data_vars) + list(ds.coords):
        ds[name].attrs["units"] = units.get(name, column_unit(name))
    ds.attrs = {"perfchain": json.dumps(df.attrs.get("perfchain", {}))}   # text: netCDF keeps it
    return ds


def _write_table(path: Path, grid: SweepGrid, results: list, cols: dict, meta: dict, units: str | None = None):
    """The table (and a CSV's sidecar) from the chunks, each atomically; on failure none of this call's files.

    ``units`` (``si`` or ``us``) converts each chunk's rows as they stream; None keeps SI base units.
    """
    meta["units"] = column_units(cols)
    if units is not None:
        from perfchain.study.columns import check_units, column_kind, unit_label
        from perfchain.study.outfiles import convert_rows

        units = check_units(units)
        meta["units"] = {c: unit_label(column_kind(c), units) for c in cols}
        meta["units_system"] = units
        results = _converted(results, units, convert_rows)
    ext = path.suffix.lower()
    written = False
    try:
        if ext == ".csv":
            write_atomic(path, lambda fh: write_csv(fh, cols, results))
            written = True
            side = Path(str(path) + ".meta.json")
            write_atomic(side, lambda fh: fh.write((json.dumps(meta, indent=1) + "\n").encode()))
        elif ext == ".json":
            write_atomic(path, lambda fh: write_json(fh, cols, results, meta))
        else:
            write_atomic(path, lambda fh: write_parquet(fh, cols, results, meta))
    except BaseException:
        if written:       # a table whose sidecar could not be written is not left behind
            path.unlink(missing_ok=True)
        raise


class _converted:
    """The chunks of a table, each read and converted to ``units`` when a writer reaches it (re-iterable)."""

    def __init__(self, results, units, convert):
        self.results, self.units, self.convert = results, units, convert

    def __iter__(self):
        return (self.convert(load_chunk(item), self.units)[0] for item in self.results)


def sweep_to_file(out, grid: SweepGrid, *, workers=1, cluster=None, progress=None, top=COMPOSITION_TOP,
                  options=None, keep_parts=False, solves=CHUNK_SOLVES, cluster_timeout=None, units=None) -> Path:
    """Run a sweep with checkpoints in ``<out>.parts/`` and write the table atomically.

    The table is streamed chunk by chunk from the checkpoint files, so memory
    stays near one chunk whatever the grid size. CSV gets a sidecar
    ``<out>.meta.json`` (units, provenance); Parquet keeps them in its schema
    metadata (key ``perfchain``); JSON in its ``metadata`` member.

    Parameters
    ----------
    out : str or Path
        ``.csv``, ``.json`` or ``.parquet`` file.
    grid : SweepGrid
    workers, cluster, progress
        As in :func:`sweep`.
    top : int
        Species kept per station composition column (0: none).
    options : dict, optional
        The texts as given, kept in the provenance.
    keep_parts : bool
        Keep the checkpoint chunks after the table is written.
    solves : int
        Solves per chunk.
    cluster_timeout : float, optional
        Seconds to wait for a cluster's first worker.
    units : str, optional
        Output units of the table, ``"si"`` (bar, K, m/s, mm...) or ``"us"`` (psia, degR,
        ft/s, in...); None keeps SI base units (Pa, K, m/s, m). The checkpoints stay SI.

    Returns
    -------
    Path
        The table written (SI base units unless ``units``). The checkpoint folder is locked while the sweep runs;
        a chunk found damaged is computed again; a full disk is one line naming the file,
        with no table left half-written (the chunks stay for a rerun).

    Examples
    --------
    Sea-level Isp of about 300 s for LOX/RP-1 at O/F 2.56, 1000 psia to 1 atm (Sutton &
    Biblarz, Rocket Propulsion Elements, Table 5-5; from memory, +/- 1 %):

    >>> import csv, tempfile
    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.56", chamber_pressure="1000 psi",
    ...               exit_pressure="1 atm")
    >>> with tempfile.TemporaryDirectory() as d:
    ...     rows = list(csv.DictReader(sweep_to_file(f"{d}/t.csv", g, progress=False).read_text().splitlines()))
    >>> rows[0]["status"], bool(abs(float(rows[0]["isp_ambient"]) / 300 - 1) < 0.01)
    ('ok', True)
    """
    path = check_out(out)
    if units is not None:     # refused before anything is computed
        from perfchain.study.columns import check_units

        units = check_units(units)
    parts = Path(str(path) + ".parts")
    try:
        parts.mkdir(exist_ok=True)
    except OSError:
        raise InputError("out", str(out), "a path whose .parts checkpoint folder can be made") from None
    with folder_lock(parts, "out"):      # the same sweep started twice: the second stops with one line
        for name in (path.name, path.name + ".meta.json"):
            remove_stale_temps(path.parent, name)     # a run killed during its final write
        known: dict = {}
        results, _ = run_chunks(grid, workers=workers, cluster=cluster, parts=parts, progress=progress,
                                top=top, solves=solves, kinds=known, cluster_timeout=cluster_timeout)
        _write_table(path, grid, results, table_columns(grid, results, known), provenance(grid, top, options),
                     units)
        if not keep_parts:
            for item in results:
                item.unlink(missing_ok=True)
            try:
                parts.rmdir()
            except OSError:
                pass  # other sweeps' chunks live here too
    return path
