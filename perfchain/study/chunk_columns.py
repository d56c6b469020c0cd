"""A sweep chunk's table built column by column from the batch solver's arrays.

The common chunk (every point batch-solved and feasible at every ambient pressure, no optional
block, no transport columns) skips the per-row dicts of :mod:`.chunks`: the station columns come
straight from the solver's arrays, the values that are the same for a propellant or a chamber
once per point, and only the ambient terms are computed per row, by the same functions the rows
use (:func:`~perfchain.performance.result.performance_terms` at the first ambient pressure,
:func:`~perfchain.study.rows.ambient_row` or the cut-nozzle estimate at the others). The frame
is the one :func:`~perfchain.study.tables.rows_frame` gives for the chunk's rows (``pandas.DataFrame(rows)``,
its columns in the table's order): the same columns in the same order, dtypes and bits. Any other
chunk gets None and goes the row way.
"""

from __future__ import annotations

import numpy as np

from perfchain.constants import G0
from perfchain.errors import PerfchainError
from perfchain.performance.ambient import cut_ambient, infeasibility
from perfchain.performance.flat import plain, row_template
from perfchain.performance.result import performance_terms
from perfchain.study.rows import ambient_row, derivable
from perfchain.study.tables import table_order

__all__ = ["chunk_frame"]

_STATIONS = ("chamber", "throat", "exit")


def chunk_frame(grid, rule, top: int, triples, expansions: dict):
    """The table of a chunk whose points all went through the batch solver, or None.

    Parameters
    ----------
    grid : SweepGrid
    rule : SeparationRule
    top : int
        Species kept per station composition column (0: none).
    triples : list of (int, int, int)
        The chunk's (mixture-ratio, pc, exit) index triples, in row order.
    expansions : dict
        Flow model -> (:class:`~perfchain.performance.batched.Expansions` of the chunk's
        feasible triples, triple -> point index).

    Returns
    -------
    pandas.DataFrame or None
        One row per point (SI units) in the grid's row order, the frame of the chunk's rows
        (:func:`perfchain.study.chunks.compute_chunk`) with its columns in the table's order
        (:func:`~perfchain.study.tables.rows_frame`); None when a point failed, went to the
        general path, carries an optional block, or the grid asks for transport properties.

    Examples
    --------
    The frame of the rows, column for column (the separated rows carry the cut-nozzle estimate):

    >>> import pandas as pd
    >>> from dataclasses import asdict
    >>> from perfchain.study.chunks import chunk_triples, compute_chunk, compute_frame
    >>> from perfchain.study.grid import make_grid
    >>> from perfchain.study.tables import rows_frame
    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.2,2.8", chamber_pressure="20 bar",
    ...               area_ratio="10,100", ambient_pressure="1 atm,0 bar")
    >>> task = (asdict(g), next(chunk_triples(g)), 5)
    >>> pd.testing.assert_frame_equal(compute_frame(task), rows_frame(g, compute_chunk(task)))
    """
    import pandas as pd

    if grid.transport:
        return None
    n_p, n_a, n_f = len(triples), len(grid.ambient_pressure), len(grid.flow)
    parts: dict = {}
    keys = None
    for f, flow in enumerate(grid.flow):
        exps, index = expansions[flow]
        items = exps.solved()
        if items is None or len(items) != n_p or any(index.get(t) != n for n, t in enumerate(triples)):
            return None
        got = _flow_columns(grid, rule, top, exps, items, flow)
        if got is None:
            return None
        row_keys, fixed, ambient = got
        keys = keys or row_keys
        for k in range(n_a):
            where = (np.arange(n_p) * n_a + k) * n_f + f
            for key, values in fixed.items():
                parts.setdefault(key, []).append((where, values))
            for key, values in ambient[k].items():
                parts.setdefault(key, []).append((where, values))
            if grid.altitude is not None:
                parts.setdefault("altitude", []).append((where, [grid.altitude[k]] * n_p))
            parts.setdefault("status", []).append((where, ["ok"] * n_p))
            parts.setdefault("reason", []).append((where, [None] * n_p))
    order = _row_order(keys, grid)
    text = pd.Series(["text"]).dtype     # the dtype pandas gives a column of texts (object before pandas 3)
    text = text if isinstance(text, pd.StringDtype) else None
    n = n_p * n_a * n_f
    return pd.DataFrame({key: _typed(_interleave(parts[key], n), text) for key in order})


def _typed(values, text):
    """A column as pandas reads it from a list of the rows' values, made up front (pandas need not
    infer it): texts as ``text`` (None: left as they are), booleans as a bool array, floats and
    None as a float array with NaN for None; anything else as it is."""
    if isinstance(values, np.ndarray):
        return values
    types = set(map(type, values))
    if types == {str} and text is not None:
        import pandas as pd

        return pd.array(values, dtype=text)
    if types == {bool}:
        return np.array(values, bool)
    if types == {float, type(None)}:
        return np.array(values, float)
    return values


def _row_order(keys, grid) -> list:
    """The columns in the table's order (:func:`~perfchain.study.tables.table_order`) of rows whose
    keys come in the order the row dicts hold them: the result's, then altitude, status, reason."""
    order = [k for k in keys if k not in ("altitude", "status", "reason")]
    return table_order(grid, order + (["altitude"] if grid.altitude is not None else []) + ["status", "reason"])


def _interleave(pieces, n: int):
    """One column from its (row positions, values) pieces: a float array when every piece is one
    (or a list of floats), else a list of the values as the rows hold them."""
    pieces = [(w, _floats(v)) for w, v in pieces]
    if len(pieces) == 1 and len(pieces[0][0]) == n:     # one flow model and ambient pressure: rows in order
        values = pieces[0][1]
        if isinstance(values, np.ndarray):
            return values if values.dtype == np.float64 else values.tolist()
        return list(values)
    if all(isinstance(v, np.ndarray) and v.dtype == np.float64 for _, v in pieces):
        out = np.empty(n)
        for where, values in pieces:
            out[where] = values
        return out
    out = np.empty(n, object)
    for where, values in pieces:
        if isinstance(values, np.ndarray):
            values = values.tolist()
        column = np.empty(len(where), object)
        column[:] = values
        out[where] = column
    return out.tolist()


def _floats(values):
    """A list of Python floats as a float array (pandas reads such a list as float64), else as is."""
    if isinstance(values, list) and values and set(map(type, values)) == {float}:
        return np.array(values, float)
    return values


def _flow_columns(grid, rule, top, exps, items, flow):
    """The columns of one flow model's points: (columns that are the same at every ambient
    pressure, per ambient pressure the ambient-dependent ones), or None when a point needs the
    row way (infeasible, failed, or a core whose ambient terms cannot be derived)."""
    nz = items[0].nz
    if any(it.nz is not nz for it in items):
        return None     # several batch nozzles (element sets): the row way
    stations = items[0].stations
    by_exit = grid.exit_key == "exit_pressure"
    pas = list(grid.ambient_pressure)
    checked = set()     # (pc, exit) pairs feasible at every ambient pressure
    for it, (_, _, x) in zip(items, exps.points):
        if (it.pc, x) not in checked:
            if any(infeasibility(it.pc, pa, x if by_exit else None) is not None for pa in pas):
                return None
            checked.add((it.pc, x))
    mach = stations[2].cols["mach"]
    cut = [[rule.separates(it.p_e, pa, mach[it.row]) for it in items] for pa in pas]
    requests = [(n, pa) for k, pa in enumerate(pas) for n in range(len(items)) if cut[k][n]]
    got = exps.separation_stations([n for n, _ in requests], [pa for _, pa in requests], rule)
    station_at = dict(zip(requests, got))
    if any(isinstance(s, Exception) for s in got):
        return None
    try:
        ambient = [_first_terms(items, pas[0], rule, [station_at.get((n, pas[0])) for n in range(len(items))])]
        for pa, cuts in zip(pas[1:], cut[1:]):
            ambient.append(_derived_terms(items, ambient[0], pa, rule, cuts, station_at))
    except PerfchainError:
        return None
    if any(a is None for a in ambient):
        return None
    return _fixed_columns(items, stations, flow, top, ambient[0]) + (ambient,)


def _first_terms(items, pa, rule, stations) -> dict:
    """The ambient terms at the first ambient pressure, as the rows have them: the arithmetic of
    :func:`~perfchain.performance.result.performance_terms` (and, for a separated nozzle,
    :func:`~perfchain.performance.ambient.cut_ambient`) on arrays, operation for operation; a
    point it would raise for goes the scalar way (and raises there)."""
    if any(not _plain_station(st) for st in stations):
        return _scalar_terms(items, pa, rule, stations)
    pc, G, u_e, p_e, eps = (np.array([getattr(it, k) for it in items], float) for k in ("pc", "G", "u_e", "p_e", "eps"))
    cut = np.array([st is not None for st in stations])
    sep = {k: np.array([st[k] if st is not None else np.nan for st in stations], float) for k in _SEPARATION}
    with np.errstate(all="ignore"):
        cstar = pc / G
        c_vac = u_e + (p_e - 0.0) * eps / G
        c_amb = u_e + (p_e - pa) * eps / G
        c_cut = sep["separation_velocity"] + (sep["separation_pressure"] - pa) * sep["separation_area_ratio"] / G
        c = np.where(cut, c_cut, c_amb)
    if not (np.isfinite(cstar).all() and np.isfinite(c_vac).all() and np.isfinite(c_amb).all()
            and np.isfinite(c).all() and (c > 0.0).all()):
        return _scalar_terms(items, pa, rule, stations)
    n, label = len(items), rule.label
    flows = (~cut).tolist()
    out = {"ambient_pressure": [plain(pa)] * n, "area_ratio": eps, "cstar": cstar, "cf_vacuum": c_vac / cstar,
           "isp_vacuum": c_vac / G0, "exhaust_velocity_vacuum": c_vac, "exit_ambient_pressure_ratio":
           (p_e / pa).tolist() if pa > 0 else [None] * n,
           "separation_criterion": [label] * n, "flows_full": flows,
           "ambient_model": ["full-flowing" if f else f"separated-cut ({label})" for f in flows],
           "cf_ambient": c / cstar, "isp_ambient": c / G0, "exhaust_velocity_ambient": c}
    for k in _SEPARATION:
        out[k] = [None if f else v for f, v in zip(flows, sep[k].tolist())]
    return out      # the float columns as arrays (the rows' floats, as tolist() gives them)


#: the separation-station fields of a separated nozzle's row
_SEPARATION = ("separation_pressure", "separation_area_ratio", "separation_velocity", "separation_mach")


def _plain_station(st) -> bool:
    """A separation station of float values only (or none: a nozzle that flows full)."""
    return st is None or all(type(st.get(k)) is float for k in _SEPARATION)


def _scalar_terms(items, pa, rule, stations) -> dict:
    """:func:`_first_terms` point by point through the functions the rows use."""
    rows = []
    for it, st in zip(items, stations):
        d = {"ambient_pressure": plain(pa)}
        d.update(performance_terms(it.pc, pa, it.G, it.u_e, it.p_e, it.eps, it.point, rule, st))
        rows.append(d)
    return {key: [d[key] for d in rows] for key in rows[0]}


def _derived_terms(items, first: dict, pa, rule, cuts, station_at):
    """The ambient terms at another ambient pressure, derived from the first as the rows derive
    them (:func:`~perfchain.study.rows.ambient_row`, or the cut estimate); None when a core's own
    terms do not follow the derivation (the row way solves it again)."""
    keys = list(first)
    out = {key: first[key].tolist() if isinstance(first[key], np.ndarray) else list(first[key]) for key in keys}
    first = {key: out[key][:] for key in keys}      # Python values, as the rows hold them
    for n, it in enumerate(items):
        template = {key: first[key][n] for key in keys}
        if cuts[n]:
            new = cut_ambient(station_at[n, pa], it.G, it.pc / it.G, it.p_e, pa, rule)
        else:
            template.update(chamber_pressure=it.pc, exit_pressure=it.p_e)
            if template["flows_full"] and not derivable(template):
                return None
            new = ambient_row(template, pa, rule)
        for key in keys:
            if key in new:
                out[key][n] = new[key]
    return out


def _fixed_columns(items, stations, flow, top, ambient) -> tuple:
    """(a row's keys in order, the columns that do not depend on the ambient pressure)."""
    keys = list(row_template(dict(items[0].fields, flow=flow, chamber_pressure=items[0].pc), {}, top))
    ci = np.array([it.ci for it in items], np.int64)
    rows = np.array([it.row for it in items], np.int64)
    station_cols = {}
    for sc, idx in zip(stations, (ci, ci, rows)):
        names = sc.column_names()
        for field, name in zip(list(sc.cols) + ["composition"], names):
            station_cols[name] = (sc, field, idx)
    out = {}
    for key in keys:
        if key in ambient:
            continue
        if key in station_cols:
            sc, field, idx = station_cols[key]
            if field == "composition":
                out[key] = sc.composition_texts(idx.tolist(), top)
            else:
                col = sc.column(field)
                out[key] = col[idx] if col.dtype == np.float64 else [plain(sc.cols[field][i]) for i in idx.tolist()]
        else:   # a point's value: its propellant's field (shared by its points), its flow or pc
            column = [flow] * len(items) if key == "flow" else [it.pc for it in items] \
                if key == "chamber_pressure" else [it.fields.get(key) for it in items]
            out[key] = column if _AS_IS.issuperset(map(type, column)) else [plain(v) for v in column]
    return keys, out


#: the value types :func:`~perfchain.performance.flat.plain` hands back as they are
_AS_IS = frozenset((float, str, bool, type(None)))
