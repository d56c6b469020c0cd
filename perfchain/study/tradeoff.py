"""Chemistry to delta-v: a stage from an operating point, and the fixed-tank O/F trade.

The layer that joins :mod:`perfchain.performance.chain` (Cantera side) and
:mod:`perfchain.vehicle.rocket` (pure rocket equation). SI inside: masses [kg],
volumes [m^3], densities [kg/m^3], pressures [Pa], speeds [m/s]; text with
units is accepted at this edge and turned into SI with
:func:`perfchain.units.to_si`.

Why the best mixture ratio of a stage is not the best-Isp one: with tanks of
fixed volume ``V`` filled full, the propellant mass is ``rho_bulk(r) V`` and

    delta_v(r) = c(r) ln[(B + rho_bulk(r) V) / B],   B = payload + fixed dry + k V

so ``d delta_v / dr = c' ln(m0/mf) + c V rho_bulk' / m0``. At the Isp peak
``c' = 0`` and the sign of the slope is the sign of ``rho_bulk'``: when the
oxidizer is denser than the fuel (LOX/LH2, N2O4/MMH, LOX/RP-1) the bulk density
rises with O/F, so the delta-v optimum lies at a higher O/F than the Isp peak.
"""

from __future__ import annotations

import math
from typing import Mapping, Sequence

from perfchain.errors import InputError, PerfchainError
from perfchain.thermo.flow_models import check_flow
from perfchain.propellants.ingredients import get_ingredient
from perfchain.propellants.mixture import make_propellant
from perfchain.performance.chain import ONE_ATM, Performance, performance_of
from perfchain.units import to_si
from perfchain.vehicle.rocket import Stage, fixed_tank_delta_v, make_stage

__all__ = ["stage_from_point", "point_exhaust_velocity", "fixed_tank_sweep", "best_fixed_tank_mixture_ratio",
           "SWEEP_COLUMNS"]

#: Columns of :func:`fixed_tank_sweep`, in order.
SWEEP_COLUMNS = ("oxidizer", "fuel", "mixture_ratio", "isp_vacuum", "exhaust_velocity",
                 "bulk_density", "propellant_mass", "delta_v", "status", "reason")

_WHICH = ("vacuum", "ambient")


def _which(which) -> str:
    if which not in _WHICH:
        raise InputError("which", which, "'vacuum' (upper stage) or 'ambient' (first stage)")
    return which


def point_exhaust_velocity(perf: Performance, which: str) -> float:
    """The point's effective exhaust velocity [m/s]: delivered where efficiencies were given.

    Parameters
    ----------
    perf : Performance
    which : str
        ``"vacuum"`` or ``"ambient"`` (at the point's ambient pressure).

    Returns
    -------
    float
        [m/s], above 0 (else an InputError: no thrust at that ambient pressure).

    Examples
    --------
    Definition: c = Isp g0 (to the last digit or two: Isp is stored as c / g0).

    >>> from perfchain.constants import G0
    >>> from perfchain.performance.chain import performance
    >>> p = performance("LOX", "RP-1", mixture_ratio=2.6, chamber_pressure="70 bar", area_ratio=20)
    >>> abs(point_exhaust_velocity(p, "vacuum") / (p.isp_vacuum * G0) - 1.0) < 1e-15
    True
    """
    source = perf.delivered if perf.delivered else perf.to_dict()
    c = source[f"exhaust_velocity_{which}"]
    if not (math.isfinite(c) and c > 0):
        raise InputError(f"exhaust_velocity_{which}", c,
                         "above 0 m/s (the nozzle gives no thrust at this ambient pressure)")
    return c


def stage_from_point(perf: Performance, *, which: str = "vacuum", dry_mass=None,
                     propellant_mass=None, total_mass=None, propellant_fraction=None,
                     structural_ratio=None, thrust=None, name: str = "") -> Stage:
    """A :class:`~perfchain.vehicle.rocket.Stage` whose engine is a perfchain operating point.

    Parameters
    ----------
    perf : Performance
        The operating point (from :func:`~perfchain.performance.chain.performance`).
    which : str
        ``"vacuum"`` (upper stage: ``exhaust_velocity_vacuum``) or ``"ambient"``
        (first stage: ``exhaust_velocity_ambient``, at the point's ambient pressure).
    dry_mass, propellant_mass, total_mass : str or float, optional
        [kg] (or text with a unit, ``"2 t"``).
    propellant_fraction, structural_ratio : float, optional
        [-]. Mass sets accepted as in :func:`~perfchain.vehicle.rocket.make_stage`:
        dry + propellant, total + propellant fraction, propellant + structural ratio.
    thrust : str or float, optional
        [N] (or ``"50 kN"``).
    name : str
        Label for tables.

    Returns
    -------
    Stage
        With ``exhaust_velocity`` = the point's effective exhaust velocity [m/s]:
        the delivered one when the point carries efficiency factors, else the ideal one.

    Examples
    --------
    LOX/RP-1 at O/F 2.56, 1000 psia, to 1 atm, shifting: sea-level Isp 300 s
    (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5; from memory,
    +/- 1 %). The stage's Isp is the point's, since c = Isp g0 (definition):

    >>> from perfchain.performance.chain import performance
    >>> p = performance("LOX", "RP-1", mixture_ratio=2.56, chamber_pressure="1000 psi",
    ...                 exit_pressure="1 atm")
    >>> s = stage_from_point(p, which="ambient", total_mass="100 t", propellant_fraction=0.9)
    >>> abs(s.isp / 300 - 1) < 0.01, round(s.dry_mass)
    (True, 10000)
    >>> s.exhaust_velocity == p.exhaust_velocity_ambient
    True
    """
    if not isinstance(perf, Performance):
        raise InputError("perf", type(perf).__name__, "a Performance operating point")
    c = point_exhaust_velocity(perf, _which(which))

    def mass(value, field):
        return None if value is None else to_si(value, "mass", field, minimum=0.0)

    return make_stage(exhaust_velocity=c, dry_mass=mass(dry_mass, "dry_mass"),
                      propellant_mass=mass(propellant_mass, "propellant_mass"),
                      total_mass=mass(total_mass, "total_mass"),
                      propellant_fraction=propellant_fraction, structural_ratio=structural_ratio,
                      thrust=None if thrust is None else to_si(thrust, "force", "thrust",
                                                                minimum=0.0),
                      name=name)


def _settings(chamber_pressure, area_ratio, exit_pressure, ambient_pressure, tank_volume,
              payload_mass, fixed_dry_mass, tank_mass_per_volume, flow, which) -> dict:
    """Check and convert the shared inputs of the sweep and the optimiser (SI)."""
    pc = to_si(chamber_pressure, "pressure", "chamber_pressure", minimum=0.0)
    if (area_ratio is None) == (exit_pressure is None):
        raise InputError("exit", "both" if area_ratio is not None else "neither",
                         "exactly one of area_ratio or exit_pressure")
    if area_ratio is not None:
        ok = isinstance(area_ratio, (int, float)) and not isinstance(area_ratio, bool)
        if not ok or not (math.isfinite(area_ratio) and area_ratio > 1.0):
            raise InputError("area_ratio", area_ratio, "an exit/throat area ratio above 1")
        area_ratio = float(area_ratio)
    pe = None if exit_pressure is None else to_si(exit_pressure, "pressure", "exit_pressure",
                                                  minimum=0.0, maximum=pc)
    if pe is not None and pe == pc:
        raise InputError("exit_pressure", exit_pressure, f"a pressure below {pc:g} Pa")
    return dict(
        chamber_pressure=pc, area_ratio=area_ratio, exit_pressure=pe,
        ambient_pressure=to_si(ambient_pressure, "pressure", "ambient_pressure", minimum=0.0,
                               exclusive=False),
        tank_volume=to_si(tank_volume, "volume", "tank_volume", minimum=0.0),
        payload_mass=to_si(payload_mass, "mass", "payload_mass", minimum=0.0, exclusive=False),
        fixed_dry_mass=to_si(fixed_dry_mass, "mass", "fixed_dry_mass", minimum=0.0),
        tank_mass_per_volume=to_si(tank_mass_per_volume, "density", "tank_mass_per_volume",
                                   minimum=0.0, exclusive=False),
        flow=check_flow(flow), which=_which(which))


def _point(oxidizer, fuel, mixture_ratio, s: dict) -> dict:
    """One operating point and its fixed-tank stage; raises PerfchainError on failure."""
    prop = make_propellant(oxidizer, fuel, mixture_ratio)
    rho = prop.bulk_density
    if rho is None:
        raise InputError("bulk_density", None,
                         f"a known density for both {prop.oxidizer.name} and {prop.fuel.name}")
    perf = performance_of(prop, s["chamber_pressure"], area_ratio=s["area_ratio"],
                          exit_pressure=s["exit_pressure"],
                          ambient_pressure=s["ambient_pressure"], flow=s["flow"])
    c = point_exhaust_velocity(perf, s["which"])
    dv = fixed_tank_delta_v(s["tank_volume"], rho, c, s["payload_mass"], s["fixed_dry_mass"],
                            s["tank_mass_per_volume"])
    return {"isp_vacuum": perf.isp_vacuum, "exhaust_velocity": c, "bulk_density": rho,
            "propellant_mass": rho * s["tank_volume"], "delta_v": dv}


def _ratios_per_pair(pairs, mixture_ratios) -> list[list[float]]:
    """Mixture ratios for each pair: one list for all, a list per pair, or a mapping."""
    def check(values, field):
        if isinstance(values, (str, bytes)) or not isinstance(values, Sequence) or not values:
            raise InputError(field, values, "a non-empty list of O/F values")
        out = []
        for i, r in enumerate(values):
            ok = isinstance(r, (int, float)) and not isinstance(r, bool)
            if not ok or not (math.isfinite(r) and r > 0):
                raise InputError(f"{field}[{i}]", r, "an O/F by mass above 0")
            out.append(float(r))
        return out

    if isinstance(mixture_ratios, Mapping):
        lists = []
        for ox, fu in pairs:
            key = (ox, fu) if (ox, fu) in mixture_ratios else f"{ox}/{fu}"
            if key not in mixture_ratios:
                raise InputError("mixture_ratios", f"no entry for {ox}/{fu}",
                                 "a mapping keyed by (oxidizer, fuel) or 'oxidizer/fuel'")
            lists.append(check(mixture_ratios[key], f"mixture_ratios[{ox}/{fu}]"))
        return lists
    if isinstance(mixture_ratios, Sequence) and mixture_ratios and all(
            isinstance(v, Sequence) and not isinstance(v, str) for v in mixture_ratios):
        if len(mixture_ratios) != len(pairs):
            raise InputError("mixture_ratios", f"{len(mixture_ratios)} lists",
                             f"one list of O/F per pair ({len(pairs)} pairs) or one list for all")
        return [check(v, f"mixture_ratios[{i}]") for i, v in enumerate(mixture_ratios)]
    one = check(mixture_ratios, "mixture_ratios")
    return [one] * len(pairs)


def _pairs(pairs) -> list[tuple]:
    if isinstance(pairs, (str, bytes)) or not isinstance(pairs, Sequence) or not pairs:
        raise InputError("pairs", pairs, "a non-empty list of (oxidizer, fuel) pairs")
    out = []
    for i, pair in enumerate(pairs):
        if isinstance(pair, str) or not isinstance(pair, Sequence) or len(pair) != 2:
            raise InputError(f"pairs[{i}]", pair, "an (oxidizer, fuel) pair")
        get_ingredient(pair[0], field=f"pairs[{i}] oxidizer")
        get_ingredient(pair[1], field=f"pairs[{i}] fuel")
        out.append(tuple(pair))
    return out


def fixed_tank_sweep(pairs, mixture_ratios, *, chamber_pressure, area_ratio=None,
                     exit_pressure=None, tank_volume, payload_mass, fixed_dry_mass,
                     tank_mass_per_volume, ambient_pressure=ONE_ATM, flow: str = "shifting",
                     which: str = "vacuum"):
    """Delta-v against mixture ratio for a stage with tanks of fixed volume, filled full.

    Each point runs the whole chain (ingredients -> chamber -> nozzle) and then
    :func:`~perfchain.vehicle.rocket.fixed_tank_delta_v`: propellant mass
    ``rho_bulk V``, burnout mass ``payload + fixed_dry_mass + k V``.

    Parameters
    ----------
    pairs : list of (oxidizer, fuel)
        Ingredient names or records.
    mixture_ratios : list of float, list of lists, or mapping
        O/F by mass [-]: one list for every pair, one list per pair (same
        order), or a mapping keyed by ``(oxidizer, fuel)`` or ``"oxidizer/fuel"``.
    chamber_pressure : str or float
        [Pa] or text (``"50 bar"``).
    area_ratio : float, optional
        Exit / throat area [-]; exactly one of area_ratio, exit_pressure.
    exit_pressure : str or float, optional
        [Pa] or text.
    tank_volume : str or float
        Propellant volume [m^3] or text (``"2.5 m**3"``).
    payload_mass, fixed_dry_mass : str or float
        [kg] or text; payload may be 0, fixed dry mass above 0.
    tank_mass_per_volume : str or float
        Tank mass per volume of propellant held [kg/m^3] or text; may be 0.
    ambient_pressure : str or float
        [Pa] for ``which="ambient"``; default 1 atm.
    flow : str
        ``"shifting"`` (default), ``"frozen"`` or ``"frozen-throat"``.
    which : str
        ``"vacuum"`` (upper stage) or ``"ambient"`` (first stage) exhaust velocity.

    Returns
    -------
    pandas.DataFrame
        Columns :data:`SWEEP_COLUMNS`: isp_vacuum [s], exhaust_velocity [m/s]
        (the ``which`` one), bulk_density [kg/m^3], propellant_mass [kg],
        delta_v [m/s], status ``"ok"`` or ``"failed"`` and reason (the error
        message of a failed point, whose numbers are NaN).

    Examples
    --------
    Each row obeys the rocket equation (closed form) with burnout mass
    300 + 200 + 20 * 2.5 kg, and the bulk density is
    (1 + r) / (r / rho_o + 1 / rho_f) with LOX 1141 and LH2 70.85 kg/m^3
    (Sutton & Biblarz, ch. 7; densities from memory):

    >>> import math
    >>> t = fixed_tank_sweep([("LOX", "LH2")], [4.0, 6.0], chamber_pressure="50 bar",
    ...                      area_ratio=40, tank_volume="2.5 m**3", payload_mass="300 kg",
    ...                      fixed_dry_mass="200 kg", tank_mass_per_volume="20 kg/m**3")
    >>> list(t.status)
    ['ok', 'ok']
    >>> mf = 300 + 200 + 20 * 2.5
    >>> [round(c * math.log((mf + mp) / mf) - dv, 6) for c, mp, dv in
    ...  zip(t.exhaust_velocity, t.propellant_mass, t.delta_v)]
    [0.0, 0.0]
    >>> round(float(t.bulk_density[0]), 2), round(5 / (4 / 1141 + 1 / 70.85), 2)
    (283.77, 283.77)
    """
    import pandas as pd

    s = _settings(chamber_pressure, area_ratio, exit_pressure, ambient_pressure, tank_volume,
                  payload_mass, fixed_dry_mass, tank_mass_per_volume, flow, which)
    pair_list = _pairs(pairs)
    rows = []
    for (ox, fu), ratios in zip(pair_list, _ratios_per_pair(pair_list, mixture_ratios)):
        rows.extend(_pair_rows(ox, fu, ratios, s))
    return pd.DataFrame(rows, columns=list(SWEEP_COLUMNS))


def _pair_rows(ox, fu, ratios, s: dict) -> list[dict]:
    """The rows of one pair; a failed point keeps its reason and NaN numbers."""
    names = (get_ingredient(ox).name, get_ingredient(fu).name)
    rows = []
    for r in ratios:
        row = dict(zip(SWEEP_COLUMNS[:3], (*names, r)))
        try:
            row.update(_point(ox, fu, r, s), status="ok", reason="")
        except PerfchainError as err:
            row.update({k: math.nan for k in SWEEP_COLUMNS[3:8]}, status="failed", reason=str(err))
        rows.append(row)
    return rows


def best_fixed_tank_mixture_ratio(oxidizer, fuel, *, chamber_pressure, area_ratio=None,
                                  exit_pressure=None, tank_volume, payload_mass, fixed_dry_mass,
                                  tank_mass_per_volume, ambient_pressure=ONE_ATM,
                                  flow: str = "shifting", which: str = "vacuum", bounds=None,
                                  xatol: float = 1e-4) -> dict:
    """The O/F that maximises fixed-tank delta-v, beside the O/F that maximises Isp.

    Both are found with bounded Brent minimisation
    (``scipy.optimize.minimize_scalar(method="bounded")``): of ``-delta_v`` and of
    ``-c`` (the ``which`` exhaust velocity, i.e. Isp times g0). Same inputs as
    :func:`fixed_tank_sweep` for one pair. A failed chain evaluation inside the
    search raises its PerfchainError.

    Parameters
    ----------
    bounds : (float, float), optional
        O/F search interval [-]; default 0.3 to 1.2 times stoichiometric.
    xatol : float
        Absolute O/F tolerance of the search [-].

    Returns
    -------
    dict
        ``oxidizer, fuel, which, bounds``; ``delta_v_mixture_ratio`` [-],
        ``delta_v_max`` [m/s], ``isp_at_delta_v_optimum`` [s] (the ``which``
        Isp), ``bulk_density_at_delta_v_optimum`` [kg/m^3];
        ``isp_mixture_ratio`` [-], ``isp_max`` [s], ``delta_v_at_isp_optimum``
        [m/s]; ``delta_v_gain`` [m/s] (max minus at the Isp optimum, >= 0);
        ``at_bound`` (True if either optimum sits on a bound: widen ``bounds``).

    Examples
    --------
    Closed-form reasoning (see the module text): at the Isp peak the slope of
    delta-v is ``c V rho_bulk' / m0``, positive because LOX is denser than LH2,
    so the delta-v optimum is at a higher O/F and gives more delta-v there:

    >>> b = best_fixed_tank_mixture_ratio("LOX", "LH2", chamber_pressure="50 bar",
    ...     area_ratio=40, tank_volume="2.5 m**3", payload_mass="300 kg",
    ...     fixed_dry_mass="200 kg", tank_mass_per_volume="20 kg/m**3")
    >>> b["delta_v_mixture_ratio"] > b["isp_mixture_ratio"], b["delta_v_gain"] > 0
    (True, True)
    """
    from scipy.optimize import minimize_scalar

    from perfchain.constants import G0

    s = _settings(chamber_pressure, area_ratio, exit_pressure, ambient_pressure, tank_volume,
                  payload_mass, fixed_dry_mass, tank_mass_per_volume, flow, which)
    (ox, fu), = _pairs([(oxidizer, fuel)])
    lo, hi = _search_bounds(ox, fu, bounds)
    tol = {"xatol": _checked_xatol(xatol, hi - lo)}
    cache: dict[float, dict] = {}

    def at(r):
        r = float(r)
        if r not in cache:
            cache[r] = _point(ox, fu, r, s)
        return cache[r]

    best_dv = minimize_scalar(lambda r: -at(r)["delta_v"], bounds=(lo, hi), method="bounded",
                              options=tol)
    best_c = minimize_scalar(lambda r: -at(r)["exhaust_velocity"], bounds=(lo, hi),
                             method="bounded", options=tol)
    p_dv, p_c = at(best_dv.x), at(best_c.x)
    edge = 10.0 * tol["xatol"]
    return {
        "oxidizer": get_ingredient(ox).name, "fuel": get_ingredient(fu).name, "which": which,
        "bounds": (lo, hi),
        "delta_v_mixture_ratio": float(best_dv.x), "delta_v_max": p_dv["delta_v"],
        "isp_at_delta_v_optimum": p_dv["exhaust_velocity"] / G0,
        "bulk_density_at_delta_v_optimum": p_dv["bulk_density"],
        "isp_mixture_ratio": float(best_c.x), "isp_max": p_c["exhaust_velocity"] / G0,
        "delta_v_at_isp_optimum": p_c["delta_v"],
        "delta_v_gain": p_dv["delta_v"] - p_c["delta_v"],
        "at_bound": any(min(x - lo, hi - x) < edge for x in (best_dv.x, best_c.x)),
    }


def _search_bounds(ox, fu, bounds) -> tuple[float, float]:
    """The O/F search interval: as given (checked), or 0.3 to 1.2 times stoichiometric."""
    if bounds is None:
        st = make_propellant(ox, fu, 1.0).stoichiometric_mixture_ratio
        bounds = (0.3 * st, 1.2 * st)
    try:
        lo, hi = (float(b) for b in bounds)
    except (TypeError, ValueError):
        raise InputError("bounds", bounds, "two O/F values, low then high") from None
    if not (math.isfinite(lo) and math.isfinite(hi) and 0 < lo < hi):
        raise InputError("bounds", bounds, "two O/F values with 0 < low < high")
    return lo, hi


def _checked_xatol(xatol, width) -> float:
    ok = isinstance(xatol, (int, float)) and not isinstance(xatol, bool)
    if not ok or not (math.isfinite(xatol) and 0 < xatol < width):
        raise InputError("xatol", xatol, f"an O/F tolerance above 0 and below {width:g}")
    return float(xatol)
