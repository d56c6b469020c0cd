"""Ambient performance that knows about flow separation, and the one feasibility rule.

A nozzle over-expanded past its separation limit does not flow full: the full-flowing thrust
equation F = mdot u_e + (p_e - p_a) A_e no longer applies (it can even give a negative
thrust). perfchain then estimates the ambient thrust with the nozzle taken as cut at the
separation station, the wall pressure ambient downstream of it (the "cut nozzle" estimate of
over-expanded nozzles, as described in Sutton & Biblarz, Rocket Propulsion Elements, ch. 3;
from memory):

    F / mdot = u_sep + (p_sep - p_a) A_sep / mdot,

where the separation station is the state on the same isentrope (same flow model) whose
pressure is the separation pressure p_sep. It is a conservative estimate: the real wall
pressure downstream of separation recovers towards p_a from below.

Separation criteria (:class:`SeparationRule`):

* ``summerfield`` (default, k = 0.4): the flow separates where p/p_a falls below k
  (Summerfield, Foster & Swan, Jet Propulsion 24, 1954; from memory), so p_sep = k p_a;
* ``schmucker``: p_sep/p_a = (1.88 M - 1)^-0.64 at the local Mach number M (Schmucker,
  1973; from memory), solved along the isentrope.

Every result carries ``exit_ambient_pressure_ratio`` (p_e/p_a; None in vacuum),
``separation_criterion``, ``flows_full``, ``ambient_model`` (``"full-flowing"`` or
``"separated-cut (<criterion>)"``) and, for a separated nozzle, the station it was cut at.

The feasibility rule (:func:`infeasibility`) is the one every path applies: ``point``,
sweeps and study grids.
"""

from __future__ import annotations

import math
from typing import Callable, NamedTuple

import numpy as np

from perfchain.constants import G0
from perfchain.errors import InputError, SolverError, suggest
from perfchain.performance.separation import SCHMUCKER_COEFFICIENTS, SEPARATION_CRITERIA, SUMMERFIELD_THRESHOLD

__all__ = ["SeparationRule", "separation_rule", "DEFAULT_SEPARATION", "AMBIENT_FIELDS",
           "infeasibility", "full_flow_fields", "separation_pressures", "cut_ambient"]

#: the default criterion and Summerfield k [-]
DEFAULT_SEPARATION = "summerfield"
_K_DEFAULT, _K_RANGE = SUMMERFIELD_THRESHOLD, (0.25, 0.5)
_SCHMUCKER = SCHMUCKER_COEFFICIENTS

#: the fields every result and row carries about its ambient model, in order
AMBIENT_FIELDS = ("exit_ambient_pressure_ratio", "separation_criterion", "flows_full", "ambient_model",
                  "separation_pressure", "separation_area_ratio", "separation_velocity", "separation_mach")


class SeparationRule(NamedTuple):
    """A separation criterion: ``criterion`` name and, for Summerfield, ``threshold`` k [-]."""

    criterion: str
    threshold: float | None

    @property
    def label(self) -> str:
        """``"summerfield k=0.4"`` or ``"schmucker"``."""
        return f"summerfield k={self.threshold:g}" if self.criterion == "summerfield" else self.criterion

    def critical_ratio(self, mach):
        """p/p_a below which the flow separates, at Mach ``mach`` [-] (float or array)."""
        if self.threshold is not None:   # Summerfield: a constant (the common case, kept cheap)
            return self.threshold
        with np.errstate(all="ignore"):
            return SEPARATION_CRITERIA[self.criterion].threshold(mach, self.threshold)

    def separates(self, exit_pressure: float, ambient_pressure: float, exit_mach: float) -> bool:
        """True when a nozzle with this exit state separates at this ambient pressure."""
        return ambient_pressure > 0.0 and exit_pressure < self.critical_ratio(exit_mach) * ambient_pressure


def separation_rule(value=None) -> SeparationRule:
    """A :class:`SeparationRule` from a name, ``"summerfield:K"``, a rule, or None (the default).

    Parameters
    ----------
    value : str, SeparationRule or None
        ``"summerfield"`` (k = 0.4), ``"summerfield:0.35"`` (k from 0.25 to 0.5) or
        ``"schmucker"``.

    Returns
    -------
    SeparationRule

    Examples
    --------
    >>> separation_rule().label, separation_rule("summerfield:0.35").label, separation_rule("schmucker").label
    ('summerfield k=0.4', 'summerfield k=0.35', 'schmucker')
    """
    if value is None:
        return SeparationRule(DEFAULT_SEPARATION, _K_DEFAULT)
    if isinstance(value, SeparationRule):
        return value
    allowed = "summerfield, summerfield:K (K from 0.25 to 0.5) or schmucker"
    if not isinstance(value, str):
        raise InputError("separation", value, allowed)
    name, _, k = value.strip().lower().partition(":")
    if name == "schmucker" and not k:
        return SeparationRule("schmucker", None)
    if name != "summerfield":
        hint = suggest(name, ("summerfield", "schmucker"))
        raise InputError("separation", value, allowed + (f" ({hint})" if hint else ""))
    if not k:
        return SeparationRule(name, _K_DEFAULT)
    try:
        kk = float(k)
    except ValueError:
        raise InputError("separation", value, allowed) from None
    if not _K_RANGE[0] <= kk <= _K_RANGE[1]:
        raise InputError("separation", value, allowed)
    return SeparationRule(name, kk)


def infeasibility(chamber_pressure: float, ambient_pressure: float, exit_pressure: float | None = None, *,
                  ambient_field: str = "ambient_pressure", ambient_value=None, exit_value=None):
    """The one feasibility rule of an operating point: the error that rules it out, or None.

    An operating point is feasible when the chamber pressure is a finite pressure above 0 Pa,
    the ambient pressure a finite one from 0 Pa up to (not including) the chamber pressure, and
    an exit pressure, if given, one above 0 Pa and below the chamber pressure. ``point``
    raises the error; sweeps and study grids give the row ``status="failed"`` and its text.

    Parameters
    ----------
    chamber_pressure, ambient_pressure : float
        [Pa]
    exit_pressure : float, optional
        [Pa], when the exit is given by pressure.
    ambient_field : str
        Field named in the error (``"altitude"`` when the ambient came from one).
    ambient_value, exit_value : optional
        The values as the user gave them, quoted in the error (default: the SI numbers).

    Returns
    -------
    InputError or None

    Examples
    --------
    >>> print(infeasibility(50e5, 60e5))
    ambient_pressure: got 6000000.0; allowed: an ambient pressure below the chamber pressure (5e+06 Pa)
    >>> infeasibility(50e5, 101325.0) is None
    True
    """
    pc, pa = chamber_pressure, ambient_pressure
    if not (math.isfinite(pc) and pc > 0.0):
        return InputError("chamber_pressure", pc, "a pressure above 0 Pa")
    if not (math.isfinite(pa) and 0.0 <= pa < pc):
        return InputError(ambient_field, pa if ambient_value is None else ambient_value,
                          f"an ambient pressure below the chamber pressure ({pc:.6g} Pa)")
    if exit_pressure is not None and not (0.0 < exit_pressure < pc):
        return InputError("exit_pressure", exit_pressure if exit_value is None else exit_value,
                          f"a pressure below the chamber pressure ({pc:.6g} Pa)")
    return None


def full_flow_fields(exit_pressure: float, ambient_pressure: float, rule: SeparationRule,
                     exhaust_velocity_ambient: float | None = None) -> dict:
    """The ambient-model fields of a nozzle that flows full.

    Parameters
    ----------
    exit_pressure, ambient_pressure : float
        [Pa]
    rule : SeparationRule
    exhaust_velocity_ambient : float, optional
        The full-flowing ambient exhaust velocity [m/s], checked to be above 0.

    Returns
    -------
    dict
        :data:`AMBIENT_FIELDS`; the pressure ratio p_e/p_a [-] is None in vacuum.

    Raises
    ------
    SolverError
        When the given ambient exhaust velocity is not a number above 0.

    Examples
    --------
    >>> full_flow_fields(50e3, 100e3, separation_rule())["exit_ambient_pressure_ratio"]
    0.5
    """
    c = exhaust_velocity_ambient
    if c is not None and not (math.isfinite(c) and c > 0.0):
        raise SolverError(f"ambient thrust not positive at ambient {ambient_pressure:.6g} Pa "
                          f"(pe/pa = {exit_pressure / ambient_pressure:.4g})")
    return {"exit_ambient_pressure_ratio": exit_pressure / ambient_pressure if ambient_pressure > 0 else None,
            "separation_criterion": rule.label, "flows_full": True, "ambient_model": "full-flowing",
            "separation_pressure": None, "separation_area_ratio": None, "separation_velocity": None,
            "separation_mach": None}


def separation_pressures(solve_at: Callable, exit_pressure, throat_pressure, exit_mach, ambient_pressure,
                         rule: SeparationRule, *, tol: float = 1e-12) -> list:
    """The separation stations of separated nozzles, solved along their isentropes.

    Summerfield: one solve at p_sep = k p_a. Schmucker: p_sep/p_a = (1.88 M - 1)^-0.64 at the
    station's own Mach number, found by the Illinois variant of false position in ln p between
    the exit (separated) and the throat (M = 1), one vectorised solve per step; every point
    stops on its own (rows never mix).

    Parameters
    ----------
    solve_at : callable
        ``solve_at(indices, pressures) -> dict`` of arrays over ``indices``: ``velocity``
        [m/s], ``area_ratio`` [-], ``mach`` [-], ``ok``, ``why`` (as
        :func:`perfchain.thermo.batch.restate_exits`).
    exit_pressure, throat_pressure, exit_mach, ambient_pressure : array_like
        Per point [Pa], [Pa], [-], [Pa].
    rule : SeparationRule
    tol : float
        Criterion residual in ln p [-].

    Returns
    -------
    list
        Per point a dict ``separation_pressure`` [Pa], ``separation_velocity`` [m/s],
        ``separation_area_ratio`` [-], ``separation_mach`` [-], or the
        :class:`~perfchain.errors.SolverError` that rules the estimate out.

    Examples
    --------
    Summerfield on a calorically perfect gas of exponent 1.4 (closed form as the "solve"):
    the station sits at p = 0.4 p_a:

    >>> def cpg(idx, p):
    ...     m = np.sqrt(5.0 * ((1e6 / np.asarray(p)) ** (0.4 / 1.4) - 1.0))
    ...     return {"velocity": m, "area_ratio": m, "mach": m, "ok": np.ones(len(m), bool), "why": {}}
    >>> separation_pressures(cpg, [1e3], [5.28e5], [5.0], [1e5], separation_rule())[0]["separation_pressure"]
    40000.0
    """
    pe, pt, me, pa = (np.asarray(v, float) for v in (exit_pressure, throat_pressure, exit_mach, ambient_pressure))
    n = len(pe)
    out: list = [None] * n
    if rule.criterion == "summerfield":
        p = rule.threshold * pa
        bad = ~(p < pt)
        for i in np.nonzero(bad)[0]:
            out[i] = _no_station(pa[i], rule)
        idx = np.nonzero(~bad)[0]
        _fill(out, idx, solve_at(idx, p[idx]), p[idx])
        return out
    a, b = _SCHMUCKER
    g_lo = np.log(pe / pa) - b * np.log(a * me - 1.0)       # < 0: the exit is separated
    g_hi = np.log(pt / pa) - b * math.log(a - 1.0)           # the throat, M = 1
    lo, hi = np.log(pe), np.log(pt)
    live = np.isfinite(g_lo) & (g_lo < 0) & (g_hi > 0)
    for i in np.nonzero(~live)[0]:
        out[i] = _no_station(pa[i], rule)
    x = np.where(live, lo - g_lo * (hi - lo) / (g_hi - g_lo), lo)
    side = np.zeros(n)
    for _ in range(60):
        idx = np.nonzero(live)[0]
        if not len(idx):
            break
        st = solve_at(idx, np.exp(x[idx]))
        for j, i in enumerate(idx):
            if not st["ok"][j]:
                out[i], live[i] = SolverError(st["why"].get(j, "separation station not solved")), False
        with np.errstate(all="ignore"):
            g = x[idx] - np.log(pa[idx]) - b * np.log(a * st["mach"] - 1.0)
        done = st["ok"] & (np.abs(g) < tol)
        _fill(out, idx[done], {k: (v[done] if isinstance(v, np.ndarray) else {}) for k, v in st.items()},
              np.exp(x[idx[done]]))
        live[idx[done]] = False
        go = st["ok"] & ~done
        i, gi = idx[go], g[go]
        neg = gi < 0
        # Illinois: halve the stale end's residual when the same end moves twice
        g_hi[i] = np.where(neg & (side[i] < 0), 0.5 * g_hi[i], g_hi[i])
        g_lo[i] = np.where(~neg & (side[i] > 0), 0.5 * g_lo[i], g_lo[i])
        lo[i], g_lo[i] = np.where(neg, x[i], lo[i]), np.where(neg, gi, g_lo[i])
        hi[i], g_hi[i] = np.where(neg, hi[i], x[i]), np.where(neg, g_hi[i], gi)
        side[i] = np.where(neg, -1.0, 1.0)
        x[i] = lo[i] - g_lo[i] * (hi[i] - lo[i]) / (g_hi[i] - g_lo[i])
    for i in np.nonzero(live)[0]:
        out[i] = SolverError("separation station (schmucker) not found in 60 steps")
    return out


def _no_station(pa, rule):
    return SolverError(f"no supersonic separation station at ambient {pa:.6g} Pa ({rule.label}): the "
                       "nozzle would separate at its throat; no ambient estimate")


def _fill(out, idx, st, pressures=None):
    """Put the solved stations ``st`` (arrays over ``idx``) into ``out``."""
    p = st.get("pressure") if pressures is None else pressures
    cols = [np.asarray(c, float).tolist() for c in (p, st["velocity"], st["area_ratio"], st["mach"])]
    for j, i in enumerate(idx):
        if not st["ok"][j]:
            out[i] = SolverError(st["why"].get(j, "separation station not solved"))
            continue
        out[i] = {"separation_pressure": cols[0][j], "separation_velocity": cols[1][j],
                  "separation_area_ratio": cols[2][j], "separation_mach": cols[3][j]}


def cut_ambient(station: dict, throat_mass_flux: float, cstar: float, exit_pressure: float,
                ambient_pressure: float, rule: SeparationRule) -> dict:
    """Ambient terms of a separated nozzle from its separation station (the cut-nozzle estimate).

    Parameters
    ----------
    station : dict
        From :func:`separation_pressures`: ``separation_pressure`` [Pa],
        ``separation_velocity`` [m/s], ``separation_area_ratio`` [-], ``separation_mach`` [-].
    throat_mass_flux : float
        mdot / A* [kg/(m^2 s)].
    cstar : float
        [m/s]
    exit_pressure, ambient_pressure : float
        Full-flowing exit pressure and ambient pressure [Pa].
    rule : SeparationRule

    Returns
    -------
    dict
        ``ambient_pressure`` [Pa], ``exhaust_velocity_ambient`` = u_sep + (p_sep - p_a)
        eps_sep / G [m/s], ``cf_ambient`` [-], ``isp_ambient`` [s] and the
        :data:`AMBIENT_FIELDS`.

    Raises
    ------
    SolverError
        When even the cut nozzle gives no positive thrust.

    Examples
    --------
    Closed form: u_sep 2500 m/s, p_sep 40 kPa at p_a 100 kPa, eps_sep 10, G 4000 kg/(m^2 s):
    c = 2500 - 60e3 * 10 / 4000 = 2350 m/s:

    >>> st = {"separation_pressure": 4e4, "separation_velocity": 2500.0, "separation_area_ratio": 10.0,
    ...       "separation_mach": 3.0}
    >>> cut_ambient(st, 4000.0, 1750.0, 1e4, 1e5, separation_rule())["exhaust_velocity_ambient"]
    2350.0
    """
    c = station["separation_velocity"] + (station["separation_pressure"] - ambient_pressure) \
        * station["separation_area_ratio"] / throat_mass_flux
    if not (math.isfinite(c) and c > 0.0):
        raise SolverError(f"ambient thrust not positive even for the nozzle cut at its separation station "
                          f"(pe/pa = {exit_pressure / ambient_pressure:.4g}, {rule.label})")
    return dict(ambient_pressure=ambient_pressure, exhaust_velocity_ambient=c, cf_ambient=c / cstar,
                isp_ambient=c / G0, exit_ambient_pressure_ratio=exit_pressure / ambient_pressure,
                separation_criterion=rule.label, flows_full=False,
                ambient_model=f"separated-cut ({rule.label})", **station)
