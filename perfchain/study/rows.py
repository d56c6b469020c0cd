"""Table rows: a :class:`~perfchain.performance.chain.Performance` flattened to one tidy row.

Each row carries the keys of :meth:`perfchain.performance.chain.Performance.to_dict` with
the stations flattened (``chamber_temperature``, ``throat_pressure``, ``exit_mach``...), SI
units. Ambient pressure changes only the ambient thrust terms, so the rows of the other
ambient pressures of a solve follow exactly from ``c_amb = c_vac - p_a eps c* / p_c``
(:func:`with_ambient`).
"""

from __future__ import annotations

import json
import math
import sys
from functools import lru_cache

from perfchain.constants import G0

__all__ = ["NOT_IN_ROWS", "flatten_result", "flat_performance", "with_ambient", "ambient_row", "derivable",
           "canonical_rows", "COMPOSITION_TOP", "AMBIENT_KEYS"]

COMPOSITION_TOP = 5   #: species kept per station in the ``<station>_composition`` column
#: result keys that are not table columns: the reactants block belongs to a point's JSON (a
#: table has ``propellant`` and ``reactant_enthalpy``; the element totals follow from the name)
NOT_IN_ROWS = ("reactants",)
#: the columns that change with ambient pressure alone
AMBIENT_KEYS = ("ambient_pressure", "cf_ambient", "isp_ambient", "exhaust_velocity_ambient")


def flatten_result(d: dict, top: int = COMPOSITION_TOP) -> dict:
    """Flatten a :meth:`Performance.to_dict` into one table row (SI units).

    Station dicts become ``<station>_<key>`` columns; a composition keeps its
    ``top`` largest mole fractions as a JSON text column (none if ``top`` is
    0); other nested dicts are prefixed the same way, lists become JSON text; the keys of
    :data:`NOT_IN_ROWS` are left out.

    >>> flatten_result({"cstar": 1800.0, "exit": {"name": "exit", "mach": 3.1,
    ...                 "composition": {"H2O": 0.6, "H2": 0.4}}}, top=1)
    {'cstar': 1800.0, 'exit_mach': 3.1, 'exit_composition': '{"H2O": 0.6}'}
    """
    out = {}
    for key, value in d.items():
        if key in NOT_IN_ROWS:
            continue
        if isinstance(value, dict):
            for k, v in value.items():
                if k == "name":
                    continue
                if k == "composition":
                    if top:
                        best = sorted(v.items(), key=lambda kv: -kv[1])[:top]
                        out[f"{key}_composition"] = _json_object(best)
                    continue
                if isinstance(v, (dict, list, tuple)) or (isinstance(v, int) and not isinstance(v, bool)):
                    out.update(flatten_result({f"{key}_{k}": v}, top))
                else:
                    out[f"{key}_{k}"] = v
        elif isinstance(value, (list, tuple)):
            out[key] = json.dumps(value)
        elif isinstance(value, int) and not isinstance(value, bool):
            out[key] = float(value)
        else:
            out[key] = value
    return out


_SAFE_KEYS: set = set()


def _json_object(items) -> str:
    """``json.dumps(dict(items))`` for plain-text keys and finite floats, without the encoder."""
    for k, v in items:
        if type(v) is not float or not math.isfinite(v):
            return json.dumps(dict(items))
        if k not in _SAFE_KEYS:
            if not (isinstance(k, str) and k.isascii() and k.isprintable() and '"' not in k and "\\" not in k):
                return json.dumps(dict(items))
            _SAFE_KEYS.add(k)
    return "{" + ", ".join(f'"{k}": {v!r}' for k, v in items) + "}"


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



_PLAIN = (float, str, bool, type(None))


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
        for k, v in r.items():
            if type(v) not in _PLAIN:
                r[k] = json.loads(json.dumps(v, allow_nan=True))
    return rows


@lru_cache(maxsize=None)
def _flat_keys():
    """Result fields, station fields, optional blocks and interned column names."""
    from perfchain.performance.result import OPTIONAL_BLOCKS, Performance
    from perfchain.nozzle.stations import Station

    fields = [k for k in Performance.__dataclass_fields__ if k not in NOT_IN_ROWS]
    station = [k for k in Station.__dataclass_fields__ if k not in ("name", "composition")]
    # one string object per column name, shared by every row (pickles once per chunk)
    names = {(f, k): sys.intern(f"{f}_{k}") for f in fields for k in station + ["composition"]}
    return fields, station, tuple(OPTIONAL_BLOCKS), names


def flat_performance(res, top: int = COMPOSITION_TOP) -> dict:
    """``flatten_result(res.to_dict(), top)`` for a Performance, without the nested dicts.

    Parameters
    ----------
    res : Performance
        One solved point (SI units).
    top : int
        Species kept per station composition column (0: none).

    Returns
    -------
    dict
        The flat row (SI units), key for key and bit for bit :func:`flatten_result`'s.

    Examples
    --------
    LOX/RP-1 at O/F 2.56, 1000 psia to 1 atm gives about 300 s at sea level (Sutton &
    Biblarz, Rocket Propulsion Elements, Table 5-5; from memory, +/- 1 %):

    >>> from perfchain.performance.chain import performance
    >>> p = performance("LOX", "RP-1", mixture_ratio=2.56, chamber_pressure="1000 psi",
    ...                 exit_pressure="1 atm")
    >>> row = flat_performance(p)
    >>> row == flatten_result(p.to_dict()), bool(abs(row["isp_ambient"] / 300 - 1) < 0.01)
    (True, True)
    """
    from perfchain.nozzle.stations import Station

    fields, station, optional, names = _flat_keys()
    if any(getattr(res, k) is not None for k in optional):
        return flatten_result(res.to_dict(), top)
    out = {}
    for key in fields:
        v = getattr(res, key)
        if isinstance(v, Station):
            d = v.__dict__
            for k in station:
                x = d[k]
                out[names[key, k]] = float(x) if type(x) is int else x
            if top:
                out[names[key, "composition"]] = _json_object(
                    sorted(v.composition.items(), key=lambda kv: -kv[1])[:top])
        elif v is None and key in optional:
            continue
        else:
            out[key] = float(v) if isinstance(v, int) and not isinstance(v, bool) else v
    return out

