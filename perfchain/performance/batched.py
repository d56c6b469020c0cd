"""The chain for many points of one flow model at once (infinite-area chamber).

Points go through the batch solver of :mod:`perfchain.thermo.batch` grouped by element set;
points sharing propellant and chamber pressure share one chamber and throat solve. Any point
the batch solver hands back is solved on the general path
(:mod:`perfchain.performance.general`). Rows never mix: every point gets the bits it gets alone.
"""

from __future__ import annotations

from functools import partial
from typing import Callable, NamedTuple

import numpy as np

from perfchain.constants import ONE_ATM
from perfchain.errors import PerfchainError
from perfchain.nozzle.stations import Station
from perfchain.performance.ambient import (AMBIENT_FIELDS, cut_ambient, infeasibility, separation_pressures,
                                           separation_rule)
from perfchain.performance.general import performance_general
from perfchain.performance.flat import COMPOSITION_TOP, StationColumns, flat_performance, plain, row_template
from perfchain.performance.result import Performance, assemble_performance, performance_terms, propellant_fields
from perfchain.thermo.equilibrium import EquilibriumSystem
from perfchain.thermo.gas import per_thread_cache

__all__ = ["performance_batch", "expansion_batch", "Expansions"]


class _Solved(NamedTuple):
    """A point the batch solver settled: what its result is assembled from, and where its exit is
    (chamber and throat at row ``ci`` of ``stations``, the exit at ``row``)."""

    fields: dict
    pc: float
    flow: str
    stations: tuple
    ci: int
    G: float
    u_e: float
    p_e: float
    eps: float
    point: Callable
    nz: object
    row: int

    @property
    def chamber(self) -> Station:
        return self.stations[0].station(self.ci)

    @property
    def throat(self) -> Station:
        return self.stations[1].station(self.ci)

    @property
    def exit(self) -> Station:
        return self.stations[2].station(self.row)


class Expansions:
    """Solved expansions of many points of one flow model, ready for any ambient pressure.

    Made by :func:`expansion_batch`. :meth:`at_ambient` gives each point's
    :class:`~perfchain.performance.result.Performance` at an ambient pressure, :meth:`rows`
    the same as flat table rows; :meth:`ambient_terms` the ambient values alone of separated
    nozzles (for tables that derive the full-flowing rows of other ambient pressures
    themselves). Separation stations are solved together, from each point's own exit state
    (:func:`perfchain.thermo.batch.restate_exits`).
    """

    def __init__(self, points, exit_key: str, flow: str):
        self.points, self.exit_key, self.flow = points, exit_key, flow
        self.items: list = [None] * len(points)   # per point: _Solved, a system holder, or the error
        self._templates: dict = {}

    def _general(self, k, pa, rule) -> Performance:
        prop, pc, x = self.points[k]
        system = self.items[k][0]
        if system is None:
            system = self.items[k][0] = EquilibriumSystem(prop.elements)
        return performance_general(prop, pc, ambient_pressure=pa, flow=self.flow, system=system,
                                   separation=rule, **{self.exit_key: x})

    def _check(self, k, pa):
        """The point's error (solver or feasibility) at ambient ``pa``, or None."""
        item = self.items[k]
        if isinstance(item, Exception):
            return item
        _, pc, x = self.points[k]
        return infeasibility(pc, pa, x if self.exit_key == "exit_pressure" else None)

    def at_ambient(self, ambient_pressure: float, separation=None, only=None) -> list:
        """Each point's result at one ambient pressure [Pa], separation-aware.

        Parameters
        ----------
        ambient_pressure : float
            [Pa]
        separation : str or SeparationRule, optional
        only : list of int, optional
            Only these points (the others stay None).

        Returns
        -------
        list
            Per point a Performance, or the :class:`~perfchain.errors.PerfchainError` that
            rules it out (solver, :func:`~perfchain.performance.ambient.infeasibility`, or an
            ambient thrust that is not positive even for the cut nozzle).
        """
        return self._resolve(ambient_pressure, separation, only, _assemble, None)

    def rows(self, ambient_pressure: float, separation=None, top: int = COMPOSITION_TOP, only=None) -> list:
        """:meth:`at_ambient` as flat table rows, built from the batch's arrays.

        Parameters
        ----------
        ambient_pressure, separation, only
            As in :meth:`at_ambient`.
        top : int
            Species kept per station composition column (0: none).

        Returns
        -------
        list
            Per point the row (key for key and bit for bit
            :func:`~perfchain.performance.flat.flat_performance` of its :meth:`at_ambient`
            result), or the error; points of the general path are flattened from their result.

        Examples
        --------
        >>> from perfchain.propellants.mixture import make_propellant
        >>> e = expansion_batch([(make_propellant("LOX", "RP-1", 2.56), 7e6, 40.0)])
        >>> e.rows(101325.0)[0] == flat_performance(e.at_ambient(101325.0)[0])
        True
        """
        return self._resolve(ambient_pressure, separation, only, partial(self._row, top=top),
                             partial(flat_performance, top=top))

    def _row(self, it: _Solved, pa, rule, cut, top) -> dict:
        """The flat row of a batch-solved point: its chamber-row template, the exit and the terms."""
        if it.fields["notes"] is not None:      # an optional block: the general flattening
            return flat_performance(_assemble(it, pa, rule, cut), top)
        key = (id(it.fields), id(it.stations), it.ci, top)
        template = self._templates.get(key)
        if template is None:
            template = self._templates[key] = row_template(
                dict(it.fields, flow=it.flow, chamber_pressure=it.pc),
                {"chamber": it.stations[0].items(it.ci, top), "throat": it.stations[1].items(it.ci, top)}, top)
        row = dict(template)
        row.update(it.stations[2].items(it.row, top))
        row["ambient_pressure"] = plain(pa)
        # floats, text, booleans and None (no integers: the terms are quotients of floats)
        row.update(performance_terms(it.pc, pa, it.G, it.u_e, it.p_e, it.eps, it.point, rule, cut))
        return row

    def _resolve(self, pa, separation, only, build, general) -> list:
        """Each point at ambient ``pa``: ``build(item, pa, rule, cut)`` for batch-solved points,
        ``general(result)`` (or the result) for the general path, or the error."""
        rule = separation_rule(separation)
        out: list = [None] * len(self.points)
        queue = []
        for k in range(len(self.points)) if only is None else only:
            item = self.items[k]
            out[k] = self._check(k, pa)
            if out[k] is not None:
                continue
            try:
                if not isinstance(item, _Solved):
                    res = self._general(k, pa, rule)
                    out[k] = res if general is None else general(res)
                elif rule.separates(item.p_e, pa, item.stations[2].cols["mach"][item.row]):
                    queue.append(k)
                else:
                    out[k] = build(item, pa, rule, None)
            except PerfchainError as exc:
                out[k] = exc
        for k, st in zip(queue, self.separation_stations(queue, [pa] * len(queue), rule)):
            try:
                out[k] = st if isinstance(st, Exception) else build(self.items[k], pa, rule, st)
            except PerfchainError as exc:
                out[k] = exc
        return out

    def ambient_terms(self, requests, separation=None) -> list:
        """Ambient values of separated nozzles: the cut-nozzle estimate, solved together.

        Parameters
        ----------
        requests : list of (int, float)
            (point index, ambient pressure [Pa]) pairs where the nozzle separates.
        separation : str or SeparationRule, optional

        Returns
        -------
        list
            Per request a dict (``ambient_pressure`` [Pa], ``exhaust_velocity_ambient`` [m/s],
            ``cf_ambient`` [-], ``isp_ambient`` [s] and the
            :data:`~perfchain.performance.ambient.AMBIENT_FIELDS`), or the error.
        """
        rule = separation_rule(separation)
        out: list = [None] * len(requests)
        batch = []
        for n, (k, pa) in enumerate(requests):
            out[n] = self._check(k, pa)
            if out[n] is None and not isinstance(self.items[k], _Solved):
                try:
                    r = self._general(k, pa, rule)
                    out[n] = {key: getattr(r, key) for key in _AMBIENT_VALUES}
                except PerfchainError as exc:
                    out[n] = exc
            elif out[n] is None:
                batch.append(n)
        stations = self.separation_stations([requests[n][0] for n in batch], [requests[n][1] for n in batch], rule)
        for n, st in zip(batch, stations):
            it, pa = self.items[requests[n][0]], requests[n][1]
            try:
                out[n] = st if isinstance(st, Exception) else cut_ambient(st, it.G, it.pc / it.G, it.p_e, pa, rule)
            except PerfchainError as exc:
                out[n] = exc
        return out

    def solved(self) -> list | None:
        """Every point's batch-solved pieces, or None when a point is not one (general path, error,
        or a result with an optional block): per point a record with ``fields`` (the propellant's),
        ``pc`` [Pa], ``G`` throat mass flux [kg/(m^2 s)], ``u_e`` [m/s], ``p_e`` [Pa], ``eps`` [-],
        ``point`` (its description, called for an error message), ``stations`` (chamber, throat
        and exit :class:`~perfchain.performance.flat.StationColumns`), ``ci`` (its chamber and
        throat row), ``row`` (its exit row) and ``nz`` (the batch nozzle).

        Examples
        --------
        >>> from perfchain.propellants.mixture import make_propellant
        >>> e = expansion_batch([(make_propellant("LOX", "RP-1", 2.56), 7e6, 40.0)])
        >>> it = e.solved()[0]
        >>> it.stations[2].cols["pressure"][it.row] == it.p_e, it.pc
        (True, 7000000.0)
        """
        ok = all(isinstance(it, _Solved) and it.fields["notes"] is None for it in self.items)
        return list(self.items) if ok else None

    def separation_stations(self, ks, pas, rule) -> list:
        """Separation stations of the batch-solved points ``ks`` at ambient pressures ``pas`` [Pa],
        one solve per nozzle (:func:`~perfchain.performance.ambient.separation_pressures`): per
        request a dict of ``separation_*`` values or the error."""
        from perfchain.thermo.batch import restate_exits

        out: list = [None] * len(ks)
        groups: dict = {}
        for n, k in enumerate(ks):
            groups.setdefault(id(self.items[k].nz), []).append(n)
        for ns in groups.values():
            its = [self.items[ks[n]] for n in ns]
            nz, rows = its[0].nz, np.array([it.row for it in its], int)
            got = separation_pressures(
                lambda idx, p: restate_exits(nz, rows[idx], p, self.flow),
                [it.p_e for it in its], [it.stations[1].cols["pressure"][it.ci] for it in its],
                [it.stations[2].cols["mach"][it.row] for it in its], [pas[n] for n in ns], rule)
            for n, st in zip(ns, got):
                out[n] = st
        return out


#: the values of a result that depend on the ambient pressure
_AMBIENT_VALUES = ("ambient_pressure", "exhaust_velocity_ambient", "cf_ambient", "isp_ambient") + AMBIENT_FIELDS


def _assemble(it: _Solved, pa, rule, cut) -> Performance:
    return assemble_performance(it.fields, it.pc, pa, it.flow, it.chamber, it.throat, it.exit,
                                it.G, it.u_e, it.p_e, it.eps, None, it.point, rule, cut)


def performance_batch(points, *, exit_key: str = "area_ratio", ambient_pressure: float = ONE_ATM,
                      system: EquilibriumSystem | None = None, flow: str = "shifting", separation=None) -> list:
    """Performance of many points at once (infinite-area chamber, SI).

    Parameters
    ----------
    points : list of (Propellant, chamber pressure [Pa], exit value)
        The exit value is an area ratio [-] or an exit pressure [Pa], by ``exit_key``.
    exit_key : str
        ``"area_ratio"`` or ``"exit_pressure"``.
    ambient_pressure : float
        [Pa]
    system : EquilibriumSystem, optional
        A system of the points' elements, reused.
    flow : str
        ``"shifting"``, ``"frozen"`` or ``"frozen-throat"`` (all points).
    separation : str or SeparationRule, optional
        Separation criterion (default Summerfield, k = 0.4); see
        :mod:`perfchain.performance.ambient`.

    Returns
    -------
    list
        Per point a :class:`~perfchain.performance.result.Performance`, or the
        :class:`~perfchain.errors.PerfchainError` that stopped it.

    Every point gets the numbers it gets alone (:mod:`perfchain.thermo.batch` keeps
    rows apart); points sharing propellant and chamber pressure share one
    chamber and throat solve. ``flow`` is checked by the caller.

    Examples
    --------
    LOX/RP-1 at O/F 2.56 and 1000 psia expanded to 1 atm gives about 300 s at
    sea level (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5; from
    memory, +/- 1 %); an exit pressure above the chamber's keeps its place as
    an error:

    >>> from perfchain.propellants.mixture import make_propellant
    >>> p = make_propellant("LOX", "RP-1", 2.56)
    >>> a, b = performance_batch([(p, 6894757.29, 101325.0), (p, 6894757.29, 8e6)],
    ...                          exit_key="exit_pressure")
    >>> abs(a.isp_ambient / 300 - 1) < 0.01, type(b).__name__
    (True, 'InputError')
    """
    return expansion_batch(points, exit_key=exit_key, system=system, flow=flow).at_ambient(
        ambient_pressure, separation)


def expansion_batch(points, *, exit_key: str = "area_ratio", system: EquilibriumSystem | None = None,
                    flow: str = "shifting") -> Expansions:
    """Chamber, throat and exit of many points at once, before any ambient pressure (SI).

    Parameters
    ----------
    points, exit_key, system, flow
        As in :func:`performance_batch`.

    Returns
    -------
    Expansions

    Examples
    --------
    One solve, two ambient pressures: the vacuum Isp is the same bits at both (closed form:
    ambient pressure enters only the pressure-thrust term):

    >>> from perfchain.propellants.mixture import make_propellant
    >>> e = expansion_batch([(make_propellant("LOX", "RP-1", 2.56), 7e6, 40.0)])
    >>> a, b = e.at_ambient(0.0)[0], e.at_ambient(2e4)[0]
    >>> a.isp_vacuum == b.isp_vacuum == a.isp_ambient, b.flows_full
    (True, True)
    """
    exps = Expansions(points, exit_key, flow)
    groups: dict = {}
    elements = {}
    sets = {}       # per propellant its element set (the group key)
    for k, (prop, _, _) in enumerate(points):
        key = sets.get(id(prop))
        if key is None:
            elements[id(prop)] = prop.elements
            key = sets[id(prop)] = frozenset(e for e, n in elements[id(prop)].items() if n > 0)
        groups.setdefault(key, []).append(k)
    for ks in groups.values():
        prop0 = points[ks[0]][0]
        full = system if system is not None and len(groups) == 1 else _template(frozenset(
            e for e, n in elements[id(prop0)].items() if n > 0))
        _solve_group(exps, ks, full, elements)
    return exps


def _solve_group(exps, ks, full, elements):
    """Solve the points ``ks`` (one element set) on the batch solver over ``full``'s species;
    fill ``exps.items[k]``: the solved pieces, or a holder for the general path (handed back)."""
    from perfchain.thermo import batch

    points, exit_key, flow = exps.points, exps.exit_key, exps.flow
    tab = batch.tables_for(full)
    chambers: dict = {}
    source = []
    reactants: dict = {}     # per propellant: its element totals in the tables' order and its enthalpy
    for k in ks:
        prop, pc, _ = points[k]
        if id(prop) not in reactants:
            el = elements[id(prop)]
            reactants[id(prop)] = (tuple(float(el.get(e, 0.0)) for e in tab.element_names), prop.enthalpy)
        source.append(chambers.setdefault(reactants[id(prop)] + (pc,), len(chambers)))
    keys = list(chambers)
    nz = stations = None
    if tab.supported:
        nz = batch.nozzle(tab, [k[0] for k in keys], np.array([k[1] for k in keys]),
                          np.array([k[2] for k in keys]), np.array(source), flow=flow,
                          **{exit_key: np.array([float(points[k][2]) for k in ks])})
        stations = _batch_stations(nz, full)
    fixed: dict = {}
    if nz is not None:   # the per-point values as Python numbers, each array read once (.tolist)
        ok, src = nz.ok.tolist(), nz.source.tolist()
        G, u_e, p_e, eps = (np.asarray(a, float).tolist() for a in (nz.throat_mass_flux, nz.exit_velocity,
                                                                     nz.exit.p, nz.area_ratio))
    for j, k in enumerate(ks):
        prop, pc, x = points[k]
        if nz is not None and ok[j]:
            if id(prop) not in fixed:
                fixed[id(prop)] = propellant_fields(prop)
            ci = int(src[j])
            exps.items[k] = _Solved(fixed[id(prop)], pc, flow, stations, ci, G[ci], u_e[j], p_e[j], eps[j],
                                    partial(_describe, prop, pc, flow), nz, j)
        else:   # handed back: the general path, on a system of this point's own elements
            same = np.array_equal(full.b, [float(elements[id(prop)].get(e, 0.0)) for e in full.element_names])
            exps.items[k] = [full if same else None]


def _describe(prop, pc, flow) -> str:
    return f"{prop.describe()}, chamber pressure {pc:.6g} Pa, {flow} flow"


@per_thread_cache(maxsize=32)   # a system holds a Cantera phase and memos: one per thread
def _template(elements: frozenset) -> EquilibriumSystem:
    """A system over the products of these elements (its element totals are placeholders):
    species lists and tables for the batch solver, shared by every mixture of them in a thread."""
    return EquilibriumSystem({e: 1.0 for e in elements})


def _batch_stations(nz, full) -> tuple:
    """Chamber, throat and exit :class:`~perfchain.performance.flat.StationColumns` of a solved batch nozzle."""
    n_ch = len(nz.chamber.T)
    return (StationColumns("chamber", nz.chamber, nz.chamber_props, nz.chamber_deriv, np.zeros(n_ch), None, full),
            StationColumns("throat", nz.throat, nz.throat_props, nz.throat_deriv, nz.throat_velocity, 1.0, full),
            StationColumns("exit", nz.exit, nz.exit_props, nz.exit_deriv, nz.exit_velocity, nz.area_ratio, full))
