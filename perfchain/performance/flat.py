"""Results as flat table rows: a Performance, or a batch-solved point read from its columns.

A row carries the keys of :meth:`perfchain.performance.result.Performance.to_dict` with the
stations flattened (``chamber_temperature``, ``throat_pressure``, ``exit_mach``...), SI units;
a composition keeps its largest mole fractions as a JSON text column. The batch path
(:mod:`.batched`) builds the same rows straight from the solver's arrays
(:class:`StationColumns`, :func:`row_template`): no Station or Performance objects, the same
keys in the same order and the same bits as :func:`flat_performance`.
"""

from __future__ import annotations

import itertools
import json
import math
import sys
from functools import lru_cache
from operator import itemgetter

import numpy as np

from perfchain.nozzle.stations import COMPOSITION_THRESHOLD, TRANSPORT_FIELDS, Station

__all__ = ["COMPOSITION_TOP", "NOT_IN_ROWS", "flatten_result", "flat_performance", "StationColumns", "row_template", "plain"]

COMPOSITION_TOP = 5   #: species kept per station in the ``<station>_composition`` column
#: result keys that are not table columns: the reactants block belongs to a point's JSON (a
#: table has ``propellant`` and ``reactant_enthalpy``; the element totals follow from the name)
NOT_IN_ROWS = ("reactants",)


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
                if v is None and k in TRANSPORT_FIELDS:
                    continue    # transport properties not computed: no column
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


def _safe_key(k) -> bool:
    """True for a key JSON writes as it is: printable ASCII text without quotes or backslashes."""
    if k not in _SAFE_KEYS:
        if not (isinstance(k, str) and k.isascii() and k.isprintable() and '"' not in k and "\\" not in k):
            return False
        _SAFE_KEYS.add(k)
    return True


def _json_object(items) -> str:
    """``json.dumps(dict(items))`` for plain-text keys and finite floats, without the encoder."""
    for k, v in items:
        if type(v) is not float or not math.isfinite(v) or not _safe_key(k):
            return json.dumps(dict(items))
    return "{" + ", ".join(f'"{k}": {v!r}' for k, v in items) + "}"


@lru_cache(maxsize=None)
def _object_format(n: int) -> str:
    """The %-format of a JSON object of ``n`` text keys and float values, as :func:`_json_object` writes it."""
    return "{" + ", ".join(['"%s": %r'] * n) + "}"


_by_fraction = itemgetter(1)


def _top_json(composition: dict, top: int) -> str:
    """The ``top`` largest mole fractions of a composition as JSON text."""
    return _json_object(sorted(composition.items(), key=lambda kv: -kv[1])[:top])


def plain(v):
    """A value as a row holds it: an integer (not a bool) as a float, anything else as is.

    >>> plain(3), plain(True), plain(None)
    (3.0, True, None)
    """
    return float(v) if isinstance(v, int) and not isinstance(v, bool) else v


@lru_cache(maxsize=None)
def _flat_keys():
    """Result fields, station fields, optional blocks, interned column names and the station
    transport fields (columns only when computed)."""
    from perfchain.performance.result import OPTIONAL_BLOCKS, Performance

    fields = [k for k in Performance.__dataclass_fields__ if k not in NOT_IN_ROWS]
    transport = list(TRANSPORT_FIELDS)
    station = [k for k in Station.__dataclass_fields__ if k not in ["name", "composition"] + transport]
    # one string object per column name, shared by every row (pickles once per chunk)
    names = {(f, k): sys.intern(f"{f}_{k}") for f in fields for k in station + transport + ["composition"]}
    return fields, station, tuple(OPTIONAL_BLOCKS), names, transport


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
    fields, station, optional, names, transport = _flat_keys()
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
                out[names[key, "composition"]] = _top_json(v.composition, top)
            for k in transport:      # columns only when computed (after composition, as in to_dict)
                if d[k] is not None:
                    out[names[key, k]] = d[k]
        elif v is None and key in optional:
            continue
        else:
            out[key] = plain(v)
    return out


def row_template(values: dict, stations: dict, top: int) -> dict:
    """Every column of a batch-solved point's row, in :func:`flat_performance`'s order.

    Parameters
    ----------
    values : dict
        Result field -> value (SI); fields missing here hold None until the row is filled.
    stations : dict
        Station field (``"chamber"``...) -> its items (:meth:`StationColumns.items`), or None
        for a station filled per row.
    top : int
        Species kept per station composition column (0: none).

    Returns
    -------
    dict
        A row whose keys come in the order :func:`flat_performance` gives them for a result
        with no optional block; copy it and set the per-row values.

    Examples
    --------
    >>> row = row_template({"propellant": "LOX/RP-1", "cstar": 1800.0}, {}, 0)
    >>> list(row)[:3], row["cstar"], "exit_mach" in row, "altitude" in row
    (['propellant', 'oxidizer', 'fuel'], 1800.0, True, False)
    """
    fields, station, optional, names, _ = _flat_keys()
    out: dict = {}
    for key in fields:
        if key in optional:
            continue
        if key in ("chamber", "throat", "exit"):
            items = stations.get(key)
            if items is None:
                out.update((names[key, k], None) for k in station + (["composition"] if top else []))
            else:
                out.update(items)
        else:
            out[key] = plain(values.get(key))
    return out


class StationColumns:
    """The chamber, throat or exit stations of a solved batch nozzle, as columns (SI).

    :meth:`station` makes a :class:`~perfchain.nozzle.stations.Station` on first use;
    :meth:`items` gives a table row's columns of a station without one. Rows the batch
    handed back have no station (None).

    Parameters
    ----------
    name : str
        ``"chamber"``, ``"throat"`` or ``"exit"``.
    bt : Batch
        The solved states.
    pr, d : dict
        Their properties and the flow model's derivatives (:mod:`perfchain.thermo.batch`).
    velocity : array
        Flow velocity [m/s].
    eps : float, array or None
        Area ratio A/A* [-] (None in the chamber).
    full : EquilibriumSystem
        The system whose species the batch solved over (names, condensed molar masses).

    Examples
    --------
    Argon at area ratio 4 (as in :func:`perfchain.thermo.batch.nozzle`: Mach 3.441 from the
    closed form of NACA Report 1135); the station and the row items agree:

    >>> from perfchain.constants import R_UNIVERSAL
    >>> from perfchain.thermo import batch
    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> ar = get_ingredient("Ar")
    >>> full = EquilibriumSystem(ar.elements)
    >>> h0 = 2.5 * R_UNIVERSAL / 39.948 * (3000.0 - 298.15)
    >>> nz = batch.nozzle(batch.tables_for(full), [[ar.elements["Ar"]]], np.array([h0]), np.array([1e6]),
    ...                   np.array([0]), area_ratio=np.array([4.0]))
    >>> ex = StationColumns("exit", nz.exit, nz.exit_props, nz.exit_deriv, nz.exit_velocity, nz.area_ratio, full)
    >>> round(ex.station(0).mach, 3), dict(ex.items(0, 1))["exit_composition"]
    (3.441, '{"Ar": 1.0}')
    >>> ex.column("mach").tolist() == ex.cols["mach"], str(ex.column("mach").dtype)
    (True, 'float64')
    """

    def __init__(self, name, bt, pr, d, velocity, eps, full):
        ng = pr["n_gas"]
        n = len(ng)
        nc = np.where(bt.act, bt.nc, 0.0)
        total = ng + nc.sum(-1)
        cnames = full.cond_names
        with np.errstate(all="ignore"):
            xg = (pr["nj"] / ng[:, None]) * ng[:, None] / total[:, None]
            xc = nc / total[:, None]
            cmf = (nc * full.cond_mw[None, :]).sum(-1) if len(cnames) else np.zeros(n)
            a = d["sound_speed"]
            gamma = pr["density"] * a * a / bt.p
            mach = velocity / a
            gf = pr["cp_frozen"] / pr["cv_frozen"]
        eps_list = [eps] * n if not isinstance(eps, np.ndarray) else eps.tolist()
        self.name, self.ok = name, bt.ok.copy()
        cols = dict(pressure=bt.p, temperature=bt.T, density=pr["density"], enthalpy=pr["h"], entropy=pr["s"],
                    molar_mass=1.0 / ng, gamma=gamma, gamma_frozen=gf, cp=d["cp"], cp_frozen=pr["cp_frozen"],
                    sound_speed=a, velocity=velocity, mach=mach, area_ratio=None, condensed_mass_fraction=cmf)
        # in the Station's field order, as flat_performance reads them
        arrays = {k: np.asarray(cols[k]) for k in _flat_keys()[1] if k != "area_ratio"}
        self.cols = {k: eps_list if k == "area_ratio" else arrays[k].tolist() for k in _flat_keys()[1]}
        # the float64 columns also as arrays (copies: the same values as the lists), for column-built tables
        self._arrays = {k: a.copy() for k, a in arrays.items() if a.dtype == np.float64 and a.ndim == 1}
        self._gas, self._cond, self._full = xg, xc, full
        self._compositions = None
        self._stations: dict = {}
        self._items: dict = {}
        self._texts: dict = {}
        self._tops: dict = {}
        names = _flat_keys()[3]
        self._keys = [names[name, k] for k in self.cols] + [names[name, "composition"]]

    @property
    def compositions(self) -> list:
        """Per row its composition above the threshold, by falling mole fraction (None where handed back)."""
        if self._compositions is None:
            # all rows at once: the species above the threshold, row by row in species order,
            # then each row sorted by falling mole fraction (stable: ties keep that order)
            xg, xc, full = self._gas, self._cond, self._full
            names, cnames, n = full.species_names, full.cond_names, len(xg)
            rg, kg = np.nonzero(xg > COMPOSITION_THRESHOLD)
            ends = np.searchsorted(rg, np.arange(n + 1)).tolist()
            keys, vals = [names[k] for k in kg.tolist()], xg[rg, kg].tolist()
            above_c = xc > COMPOSITION_THRESHOLD
            self._compositions = [None] * n
            for i in np.nonzero(self.ok)[0].tolist():
                comp = dict(zip(keys[ends[i]:ends[i + 1]], vals[ends[i]:ends[i + 1]]))
                for c in np.nonzero(above_c[i])[0]:
                    comp[cnames[c]] = comp.get(cnames[c], 0.0) + float(xc[i, c])
                self._compositions[i] = dict(sorted(comp.items(), key=_by_fraction, reverse=True))
        return self._compositions

    def column(self, field: str) -> np.ndarray:
        """``cols[field]`` as an array (float64 when every value is a float; example in the class docstring)."""
        a = self._arrays.get(field)
        return a if a is not None else np.asarray(self.cols[field])

    def station(self, i: int) -> Station | None:
        """Row ``i`` as a Station (made once), or None when the batch handed it back."""
        if not self.ok[i]:
            return None
        if i not in self._stations:
            self._stations[i] = Station(name=self.name, **{k: v[i] for k, v in self.cols.items()},
                                        composition=self.compositions[i])
        return self._stations[i]

    def items(self, i: int, top: int) -> tuple:
        """Row ``i``'s table columns: ((``<name>_<field>``, value), ...), as :func:`flat_performance`
        gives them for the station (made once per row and ``top``)."""
        key = (i, top)
        if key not in self._items:
            values = [v[i] for v in self.cols.values()]
            if int in map(type, values):
                values = [plain(v) for v in values]
            if top:
                values.append(self.composition_text(i, top))
            self._items[key] = tuple(zip(self._keys, values))
        return self._items[key]

    def composition_text(self, i: int, top: int) -> str:
        """Row ``i``'s ``top`` largest mole fractions as JSON text (the composition column; made
        once per row and ``top``)."""
        key = (i, top)
        if key not in self._texts:
            if top not in self._tops:
                self._tops[top] = self._largest(top)
            names, values, counts = self._tops[top]
            if names is None:   # already sorted: the first ``top`` are the largest (as _top_json picks them)
                self._texts[key] = _json_object(list(itertools.islice(self.compositions[i].items(), top)))
            elif counts[i] and type(values[i][0]) is float and math.isfinite(values[i][0]):
                # plain names (checked once) and finite floats (the first is the largest): as _json_object writes them
                c = counts[i]
                self._texts[key] = _object_format(c) % tuple(itertools.chain.from_iterable(
                    zip(names[i][:c], values[i][:c])))
            else:
                self._texts[key] = _json_object(list(zip(names[i][:counts[i]], values[i][:counts[i]])))
        return self._texts[key]

    def composition_texts(self, rows, top: int) -> list:
        """:meth:`composition_text` of each row in ``rows`` (a list of row indices), in that order:
        the texts not made yet are made together."""
        texts = self._texts
        todo = [i for i in dict.fromkeys(rows) if (i, top) not in texts]
        if todo:
            if top not in self._tops:
                self._tops[top] = self._largest(top)
            names, values, counts = self._tops[top]
            if names is None:
                for i in todo:
                    self.composition_text(i, top)
            else:
                formats = [_object_format(c) for c in range(top + 1)]
                for i in todo:
                    c, v = counts[i], values[i]
                    if c and type(v[0]) is float and math.isfinite(v[0]):    # as composition_text
                        row = [None] * (2 * c)
                        row[::2], row[1::2] = names[i][:c], v[:c]
                        texts[i, top] = formats[c] % tuple(row)
                    else:
                        self.composition_text(i, top)
        return [texts[i, top] for i in rows]

    def _largest(self, top: int) -> tuple:
        """Per row the names and mole fractions of its ``top`` largest species above the threshold,
        by falling mole fraction (ties in species order, gas before condensed: the order of
        :attr:`compositions`), and how many there are; (None, None, None) when a condensed species
        shares a gas species' name (the compositions add them up) or a name that JSON would escape."""
        full = self._full
        names = list(full.species_names) + list(full.cond_names)
        if len(set(names)) < len(names) or not all(_safe_key(k) for k in names):
            return None, None, None
        x = np.concatenate([self._gas, self._cond], axis=1)
        with np.errstate(invalid="ignore"):
            above = x > COMPOSITION_THRESHOLD
        # only the species above the threshold in some row: the others sort last in every row
        # (key inf), so dropping them keeps each row's order of the ones it counts (stable sort)
        kept = np.flatnonzero(above.any(0))
        x, names = x[:, kept], [names[k] for k in kept.tolist()]
        key = np.where(above[:, kept], -x, np.inf)
        order = np.argsort(key, axis=1, kind="stable")[:, :top]
        picked = np.take_along_axis(x, order, axis=1)
        counts = (np.take_along_axis(key, order, axis=1) < np.inf).sum(1)
        return np.array(names, object)[order].tolist(), picked.tolist(), counts.tolist()

    def column_names(self) -> list:
        """The table column of each of :attr:`cols` and then of the composition (``<name>_<field>``)."""
        return list(self._keys)
