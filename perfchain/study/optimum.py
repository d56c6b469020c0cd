"""Best mixture ratio of a propellant pair, and pairs compared at their own optimum.

The optimum O/F is found by a bounded scalar search (Brent's method on the
mixture ratio, :func:`scipy.optimize.minimize_scalar`) between 0.3 and 3
times the stoichiometric O/F, then refined in a narrow bracket around the
first answer. It is not a grid scan, so it lands on the optimum to the
stated tolerance rather than on a grid value.

Objectives (all to be maximized):

``isp_vacuum`` [s], ``isp_ambient`` [s],
``density_isp`` = bulk density x vacuum Isp [kg s/m^3],
``density_isp_ambient`` = bulk density x ambient Isp [kg s/m^3].

An ambient objective is searched over feasible points whose nozzle flows full at the ambient
pressure only (:mod:`perfchain.performance.ambient`): a separated nozzle's cut-nozzle estimate
is a conservative bound, not a value to optimise. When no O/F the search tries flows full,
:class:`NoFullFlowOptimum` says so in one line.
"""

from __future__ import annotations

from dataclasses import dataclass

from perfchain.constants import ONE_ATM
from perfchain.errors import InputError, PerfchainError

__all__ = ["OBJECTIVES", "AMBIENT_OBJECTIVES", "Optimum", "NoFullFlowOptimum", "optimum_mixture_ratio",
           "compare_pairs", "parse_pair"]

OBJECTIVES = ("isp_vacuum", "isp_ambient", "density_isp", "density_isp_ambient")
#: objectives at the ambient pressure: searched over full-flowing nozzles only
AMBIENT_OBJECTIVES = ("isp_ambient", "density_isp_ambient")


class NoFullFlowOptimum(InputError):
    """No mixture ratio in the search range gives a feasible, full-flowing nozzle for an ambient objective."""
RANKINGS = OBJECTIVES + ("cstar", "chamber_temperature", "bulk_density")


@dataclass(frozen=True)
class Optimum:
    """The best mixture ratio for one objective.

    Attributes
    ----------
    objective : str
    mixture_ratio : float
        Optimum O/F [-].
    value : float
        Objective there ([s] or [kg s/m^3]).
    performance : Performance
        The full point at the optimum.
    evaluations : int
        Points solved by the search.
    at_bound : bool
        True when the optimum sits on the search bracket (then it is a bound, not a peak).
    """

    objective: str
    mixture_ratio: float
    value: float
    performance: object
    evaluations: int
    at_bound: bool


def _value(perf, objective):
    if objective in ("isp_vacuum", "isp_ambient"):
        return getattr(perf, objective)
    if perf.bulk_density is None:
        raise InputError("objective", objective, "isp_vacuum or isp_ambient (no density known for this pair)")
    return perf.bulk_density * (perf.isp_vacuum if objective == "density_isp" else perf.isp_ambient)


def optimum_mixture_ratio(oxidizer, fuel, chamber_pressure, *, area_ratio=None, exit_pressure=None,
                          ambient_pressure=ONE_ATM, flow="shifting", objective="isp_vacuum",
                          bounds=None, xtol=1e-4, separation=None) -> Optimum:
    """Mixture ratio that maximizes an objective at one chamber pressure and nozzle.

    Parameters
    ----------
    oxidizer, fuel : str
    chamber_pressure : str or float
        Text with a unit or [Pa].
    area_ratio : float, optional
        [-]; exactly one of area_ratio, exit_pressure.
    exit_pressure : str or float, optional
        [Pa]
    ambient_pressure : str or float
        [Pa], default 1 atm.
    flow : str
    objective : str
        One of :data:`OBJECTIVES`.
    bounds : (float, float), optional
        O/F bracket [-]; default 0.3 to 3 x stoichiometric.
    xtol : float
        Relative O/F tolerance of the refined search [-].
    separation : str, optional
        Separation criterion (default Summerfield, k = 0.4).

    Returns
    -------
    Optimum

    Raises
    ------
    NoFullFlowOptimum
        For an ambient objective, when no O/F tried gives a nozzle that flows full.

    Examples
    --------
    LOX/RP-1, 1000 psia, expanded to 1 atm, shifting: the sea-level Isp peaks
    near O/F 2.3-2.6 (Sutton & Biblarz, Rocket Propulsion Elements, Table
    5-5; from memory):

    >>> o = optimum_mixture_ratio("LOX", "RP-1", "1000 psi", exit_pressure="1 atm",
    ...                           objective="isp_ambient")
    >>> bool(2.2 < o.mixture_ratio < 2.7), bool(295 < o.value < 305)
    (True, True)
    """
    from scipy.optimize import minimize_scalar

    from perfchain.thermo.flow_models import check_flow
    from perfchain.performance.chain import performance
    from perfchain.units import to_si

    if objective not in OBJECTIVES:
        raise InputError("objective", objective, "one of " + ", ".join(OBJECTIVES))
    flow = check_flow(flow)
    pc = to_si(chamber_pressure, "pressure", "chamber_pressure", minimum=0.0)
    lo, hi, st = _bracket(oxidizer, fuel, bounds)
    cache: dict = {}

    def solve(r):
        if r not in cache:
            try:
                cache[r] = performance(oxidizer, fuel, chamber_pressure=pc, mixture_ratio=r,
                                       area_ratio=area_ratio, exit_pressure=exit_pressure,
                                       ambient_pressure=ambient_pressure, flow=flow, separation=separation)
            except InputError:
                raise
            except PerfchainError:
                cache[r] = None
        return cache[r]

    ambient = objective in AMBIENT_OBJECTIVES

    def usable(perf):
        return perf is not None and (perf.flows_full or not ambient)

    def cost(r):
        perf = solve(float(r))
        return -_value(perf, objective) if usable(perf) else 1e30

    first = minimize_scalar(cost, bounds=(lo, hi), method="bounded", options={"xatol": 1e-2 * st})
    a, b = max(lo, first.x * 0.9), min(hi, first.x * 1.1)
    fine = minimize_scalar(cost, bounds=(a, b), method="bounded", options={"xatol": xtol * first.x})
    best = min((r for r in cache if usable(cache[r])), key=cost, default=None)
    if best is None and ambient and any(p is not None for p in cache.values()):
        some = next(p for p in cache.values() if p is not None)
        raise NoFullFlowOptimum("objective", objective, (
            f"an objective some O/F from {lo:.4g} to {hi:.4g} reaches with a full-flowing nozzle; none of the "
            f"{len(cache)} tried does at ambient {some.ambient_pressure:.6g} Pa ({some.separation_criterion}; "
            f"p_e/p_a {some.exit_ambient_pressure_ratio:.3g} at O/F {some.mixture_ratio:.4g}): use isp_vacuum, a "
            "lower ambient pressure or a smaller area ratio"))
    if best is None:
        raise PerfchainError(f"no mixture ratio between {lo:.4g} and {hi:.4g} could be solved")
    r = float(fine.x) if cost(fine.x) <= cost(best) else best
    at_bound = min(r - lo, hi - r) <= 2 * xtol * r + 1e-2 * st
    return Optimum(objective, r, -cost(r), solve(r), len(cache), bool(at_bound))


_ROW_KEYS = ("pair", "oxidizer", "fuel", "objective", "mixture_ratio", "chamber_temperature", "cstar",
             "isp_vacuum", "isp_ambient", "bulk_density", "density_isp", "density_isp_ambient", "at_bound",
             "flows_full", "ambient_model", "note", "reactants")


def optimum_row(o: Optimum) -> dict:
    """One comparison row of an :class:`Optimum` (SI units).

    Parameters
    ----------
    o : Optimum

    Returns
    -------
    dict
        The keys of :func:`compare_pairs` but ``rank``; ``note`` None; ``reactants`` the
        point's reactants block (enthalpy [J/kg], element totals [kmol/kg], ingredients).

    Examples
    --------
    Closed form: density-Isp is bulk density x Isp:

    >>> o = optimum_mixture_ratio("LOX", "RP-1", "70 bar", area_ratio=10)
    >>> r = optimum_row(o)
    >>> r["density_isp"] == r["bulk_density"] * r["isp_vacuum"], r["note"]
    (True, None)
    """
    p = o.performance
    rho = p.bulk_density
    return {"pair": p.propellant, "oxidizer": p.oxidizer, "fuel": p.fuel,
            "objective": o.objective, "mixture_ratio": o.mixture_ratio,
            "chamber_temperature": p.chamber.temperature, "cstar": p.cstar,
            "isp_vacuum": p.isp_vacuum, "isp_ambient": p.isp_ambient, "bulk_density": rho,
            "density_isp": None if rho is None else rho * p.isp_vacuum,
            "density_isp_ambient": None if rho is None else rho * p.isp_ambient,
            "at_bound": o.at_bound, "flows_full": p.flows_full, "ambient_model": p.ambient_model, "note": None,
            "reactants": p.reactants}


def _bracket(oxidizer, fuel, bounds):
    """The O/F search bracket (default 0.3 to 3 x stoichiometric) and the stoichiometric O/F."""
    from perfchain.propellants.mixture import make_propellant, stoichiometric_mixture_ratio

    probe = make_propellant(oxidizer, fuel, 1.0)
    st = stoichiometric_mixture_ratio(probe.oxidizer, probe.fuel)
    lo, hi = bounds if bounds is not None else (0.3 * st, 3.0 * st)
    if not 0 < lo < hi:
        raise InputError("bounds", bounds, "two O/F values 0 < low < high")
    return lo, hi, st


def _ingredient_key(x):
    """The record name of an ingredient (names, aliases and case alike), or the folded text if unknown."""
    from perfchain.propellants.ingredients import get_ingredient

    try:
        return get_ingredient(x).name
    except PerfchainError:
        return str(x).casefold().strip()


def _formulation_rows(propellants, chamber_pressure, objective, nozzle: dict) -> list:
    """Comparison rows of formulations: each one point, its objective as it is (no O/F to optimize)."""
    from perfchain.inputs import propellant as check_propellant
    from perfchain.performance.chain import performance

    checked = [check_propellant(p, "propellants") for p in propellants]
    names = [p.name for p in checked]
    if len(set(names)) != len(names):
        raise InputError("propellants", ", ".join(names), "distinct propellants")
    rows = []
    for prop in checked:
        p = performance(propellant=prop, chamber_pressure=chamber_pressure, **nozzle)
        row = optimum_row(Optimum(objective, None, _value(p, objective), p, 1, False))
        if objective in ("isp_ambient", "density_isp_ambient") and not p.flows_full:
            row["note"] = "the nozzle separates at this ambient pressure: ambient values are the cut-nozzle estimate"
        rows.append(row)
    return rows


def parse_pair(text: str):
    """``"LOX/RP-1"`` -> ``("LOX", "RP-1")``.

    >>> parse_pair(" N2O4 / MMH ")
    ('N2O4', 'MMH')
    """
    from perfchain.inputs import pair

    return pair(str(text), "pair")


def compare_pairs(pairs, chamber_pressure, *, area_ratio=None, exit_pressure=None, ambient_pressure=ONE_ATM,
                  flow="shifting", objective="isp_vacuum", rank_by=None, separation=None, propellants=()) -> list:
    """Each pair at its own optimum O/F, and each formulation as it is, ranked best first.

    Parameters
    ----------
    pairs : sequence of str or (str, str)
        ``"LOX/RP-1"`` or (oxidizer, fuel).
    propellants : sequence of str, Mapping or Ingredient
        Formulations and monopropellants to stand beside the pairs (``"AP=0.86, HTPB=0.14"``,
        ``"H2O2-98"``): each is one point (no O/F to optimize); its row's ``pair`` is its
        name and its ``oxidizer``, ``fuel`` and ``mixture_ratio`` are None.
    chamber_pressure, area_ratio, exit_pressure, ambient_pressure, flow, objective
        As in :func:`optimum_mixture_ratio`.
    rank_by : str, optional
        One of ``RANKINGS``; default the objective. Larger ranks higher.
    separation : str, optional
        Separation criterion (default Summerfield, k = 0.4).

    Returns
    -------
    list of dict
        ``rank``, ``pair``, ``oxidizer``, ``fuel``, ``objective``,
        ``mixture_ratio`` [-], ``chamber_temperature`` [K], ``cstar`` [m/s],
        ``isp_vacuum``, ``isp_ambient`` [s], ``bulk_density`` [kg/m^3],
        ``density_isp``, ``density_isp_ambient`` [kg s/m^3], ``at_bound``,
        ``flows_full``, ``ambient_model``, ``note`` and ``reactants`` (what the chamber was
        given: enthalpy [J/kg], element totals [kmol/kg] and ingredients, as a point's JSON has
        it, so each row can be recomputed from it alone; None without an optimum). A pair with no full-flowing O/F for an
        ambient objective keeps a row of None values with the reason in ``note``, ranked last;
        when no pair has one, :class:`NoFullFlowOptimum` is raised.

    Examples
    --------
    LOX/LH2 beats LOX/RP-1 on vacuum Isp and loses on density-Isp (Sutton &
    Biblarz, Rocket Propulsion Elements, Table 5-5; from memory):

    >>> rows = compare_pairs(["LOX/RP-1", "LOX/LH2"], "70 bar", area_ratio=40, rank_by="isp_vacuum")
    >>> [r["pair"] for r in rows]
    ['LOX/LH2', 'LOX/RP-1']
    >>> rows[0]["density_isp"] < rows[1]["density_isp"]
    True
    """
    if objective not in OBJECTIVES:
        raise InputError("objective", objective, "one of " + ", ".join(OBJECTIVES))
    rank_by = rank_by or objective
    if rank_by not in RANKINGS:
        raise InputError("rank_by", rank_by, "one of " + ", ".join(RANKINGS))
    pairs, propellants = list(pairs or ()), list(propellants or ())
    if not pairs and not propellants:
        raise InputError("pair", "none", "at least one OXIDIZER/FUEL pair or one propellant (a formulation)")
    parsed = [parse_pair(p) if isinstance(p, str) else tuple(p) for p in pairs]
    keys = [tuple(_ingredient_key(x) for x in p) for p in parsed]   # LOX/RP-1 = lox/kerosene
    if len(set(keys)) != len(keys):
        raise InputError("pair", ", ".join("/".join(map(str, p)) for p in parsed), "distinct pairs")
    rows, none = _formulation_rows(propellants, chamber_pressure, objective, dict(
        area_ratio=area_ratio, exit_pressure=exit_pressure, ambient_pressure=ambient_pressure, flow=flow,
        separation=separation)), []
    for ox, fu in parsed:
        try:
            o = optimum_mixture_ratio(ox, fu, chamber_pressure, area_ratio=area_ratio, exit_pressure=exit_pressure,
                                      ambient_pressure=ambient_pressure, flow=flow, objective=objective,
                                      separation=separation)
        except NoFullFlowOptimum as exc:
            none.append(exc)
            rows.append(dict.fromkeys(_ROW_KEYS, None) | {
                "pair": f"{ox}/{fu}", "oxidizer": ox, "fuel": fu, "objective": objective,
                "at_bound": False, "note": "no full-flowing O/F in the search range"})
            continue
        rows.append(optimum_row(o))
    if len(none) == len(rows):
        raise none[0]
    rows.sort(key=lambda r: -(r[rank_by] if r[rank_by] is not None else float("-inf")))
    for i, r in enumerate(rows, 1):
        r["rank"] = i
    return [dict(rank=r.pop("rank"), **r) for r in rows]
