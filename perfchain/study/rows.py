"""Table rows: a :class:`~perfchain.performance.chain.Performance` flattened to one tidy row.

The flattening itself lives in :mod:`perfchain.performance.flat` (the batch path builds its
rows there, straight from the solver's arrays) and is re-exported here. Each row carries the keys of :meth:`perfchain.performance.chain.Performance.to_dict` with
the stations flattened (``chamber_temperature``, ``throat_pressure``, ``exit_mach``...), SI
units. Ambient pressure changes only the ambient thrust terms, so the rows of the other
ambient pressures of a solve follow exactly from ``c_amb = c_vac - p_a eps c* / p_c``
(:func:`with_ambient`).
"""

from __future__ import annotations

import json

from perfchain.constants import G0
from perfchain.performance.flat import COMPOSITION_TOP, NOT_IN_ROWS, flat_performance, flatten_result

__all__ = ["NOT_IN_ROWS", "flatten_result", "flat_performance", "with_ambient", "ambient_row", "derivable",
           "canonical_rows", "COMPOSITION_TOP", "AMBIENT_KEYS"]

#: the columns that change with ambient pressure alone
AMBIENT_KEYS = ("ambient_pressure", "cf_ambient", "isp_ambient", "exhaust_velocity_ambient")


def with_ambient(row: dict, pa: float) -> dict:
    """The same solve at another ambient pressure: only the ambient thrust terms change.

    Parameters
    ----------
    row : dict
        A flat row with ``exhaust_velocity_vacuum`` [m/s], ``area_ratio`` [-], ``cstar``
        [m/s] and ``chamber_pressure`` [Pa].
    pa : float
        The other ambient pressure [Pa].

    Returns
    -------
    dict
        A copy with ``ambient_pressure`` [Pa], ``exhaust_velocity_ambient`` [m/s],
        ``cf_ambient`` [-] and ``isp_ambient`` [s] for ``pa``.

    Examples
    --------
    Thrust coefficient at ambient pressure, Cf = Cf_vac - (p_a/p_c) eps (Sutton & Biblarz,
    Rocket Propulsion Elements, eq. 3-30; closed form): 1.8 - 0.01 x 40 = 1.4.

    >>> r = with_ambient({"exhaust_velocity_vacuum": 3240.0, "area_ratio": 40.0, "cstar": 1800.0,
    ...                   "chamber_pressure": 1.0e7}, 1.0e5)
    >>> round(r["cf_ambient"], 12), r["ambient_pressure"]
    (1.4, 100000.0)
    """
    new = dict(row)
    c_amb = row["exhaust_velocity_vacuum"] - pa * row["area_ratio"] * row["cstar"] / row["chamber_pressure"]
    new.update(ambient_pressure=pa, exhaust_velocity_ambient=c_amb, cf_ambient=c_amb / row["cstar"],
               isp_ambient=c_amb / G0)
    return new


def ambient_row(row: dict, pa: float, rule) -> dict:
    """:func:`with_ambient` for a nozzle that flows full at ``pa``, with its ambient-model fields.

    Parameters
    ----------
    row : dict
        A flat row (SI units) with ``exit_pressure`` [Pa] and the keys :func:`with_ambient` reads.
    pa : float
        The other ambient pressure [Pa].
    rule : SeparationRule
        The separation criterion (the caller has checked that the nozzle flows full).

    Returns
    -------
    dict
        The row at ``pa``; ``flows_full`` True, ``ambient_model`` ``"full-flowing"``.

    Raises
    ------
    SolverError
        When the ambient thrust is not positive.

    Examples
    --------
    Closed form as in :func:`with_ambient`; p_e / p_a = 6e4 / 1e5 = 0.6:

    >>> from perfchain.performance.ambient import separation_rule
    >>> r = ambient_row({"exhaust_velocity_vacuum": 3240.0, "area_ratio": 40.0, "cstar": 1800.0,
    ...                  "chamber_pressure": 1.0e7, "exit_pressure": 6.0e4}, 1.0e5, separation_rule())
    >>> round(r["cf_ambient"], 12), r["exit_ambient_pressure_ratio"], r["ambient_model"]
    (1.4, 0.6, 'full-flowing')
    """
    from perfchain.performance.ambient import full_flow_fields

    new = with_ambient(row, pa)
    new.update(full_flow_fields(row["exit_pressure"], pa, rule, new["exhaust_velocity_ambient"]))
    return new


def derivable(row: dict) -> bool:
    """True when :func:`with_ambient` reproduces this row's own ambient terms (to 1e-9).

    Parameters
    ----------
    row : dict
        A flat row (SI units).

    Returns
    -------
    bool

    Examples
    --------
    A row made by :func:`with_ambient` (closed form) is derivable; one without its vacuum
    terms is not:

    >>> r = with_ambient({"exhaust_velocity_vacuum": 3240.0, "area_ratio": 40.0, "cstar": 1800.0,
    ...                   "chamber_pressure": 1.0e7}, 1.0e5)
    >>> derivable(r), derivable({"cstar": 1800.0})
    (True, False)
    """
    if not all(k in row for k in AMBIENT_KEYS + ("exhaust_velocity_vacuum", "cstar", "area_ratio")):
        return False
    again = with_ambient(row, row["ambient_pressure"])
    return all(abs(again[k] - row[k]) <= 1e-9 * max(abs(row[k]), 1.0) for k in AMBIENT_KEYS[1:])



_PLAIN = frozenset((float, str, bool, type(None)))


def canonical_rows(rows: list) -> list:
    """One form for fresh and reloaded chunks: every value as the JSON round trip gives it.

    Plain floats, text, booleans and None already are (the round trip is exact for
    floats); anything else (a numpy scalar, a tuple) goes through it. The rows are
    changed in place and returned.

    Parameters
    ----------
    rows : list of dict
        Table rows (SI units).

    Returns
    -------
    list of dict

    Examples
    --------
    A tuple becomes the list JSON gives back (RFC 8259 has no tuples):

    >>> canonical_rows([{"isp_vacuum": 311.5, "species": ("H2O", "CO2")}])
    [{'isp_vacuum': 311.5, 'species': ['H2O', 'CO2']}]
    """
    for r in rows:
        if _PLAIN.issuperset(map(type, r.values())):
            continue        # most rows: nothing to change
        for k, v in r.items():
            if type(v) not in _PLAIN:
                r[k] = json.loads(json.dumps(v, allow_nan=True))
    return rows
