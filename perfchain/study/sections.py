"""A study's comparisons, vehicles and fixed-tank trades, as rows of plain values (SI units).

Composition only: the physics lives in :mod:`perfchain.study.optimum`,
:mod:`perfchain.study.tradeoff` and :mod:`perfchain.vehicle.rocket`.
"""

from __future__ import annotations

import math

from perfchain.constants import ONE_ATM
from perfchain.errors import InputError
from perfchain.study.engines import engine_point, formulation_parts, lookup
from perfchain.study.schema import pair_names

__all__ = ["comparison_rows", "vehicle_rows", "fixed_tank_tables"]


def comparison_rows(spec, index: int, custom: dict) -> list[dict]:
    """The pairs of a ``[[comparison]]``, each at its own optimum O/F, and its formulations, ranked best first.

    Parameters
    ----------
    spec : Comparison
    index : int
        1-based place of the comparison in the study (named in errors).
    custom : dict
        The study's own ingredients (:func:`perfchain.study.engines.resolve_ingredients`).

    Returns
    -------
    list of dict
        ``mixture_ratio`` [-], pressures [Pa], ``chamber_temperature`` [K], ``cstar`` [m/s],
        Isp [s], ``bulk_density`` [kg/m^3], density-Isp [kg s/m^3], ``rank``.

    Examples
    --------
    LOX/LH2 beats LOX/RP-1 on vacuum Isp (Sutton & Biblarz, Rocket Propulsion Elements,
    Table 5-5; from memory):

    >>> from perfchain.study.schema import Comparison
    >>> spec = Comparison(name="c", pairs=["LOX/RP-1", "LOX/LH2"], chamber_pressure="70 bar",
    ...                   area_ratio=40)
    >>> [(r["rank"], r["pair"]) for r in comparison_rows(spec, 1, {})]
    [(1, 'LOX/LH2'), (2, 'LOX/RP-1')]
    """
    from perfchain.atmosphere import pressure
    from perfchain.performance.chain import performance
    from perfchain.study.optimum import NoFullFlowOptimum, optimum_mixture_ratio
    from perfchain.units import to_si

    where = f"comparison[{index}]"
    pa = (float(pressure(to_si(spec.altitude, "length", f"{where}.altitude"))) if spec.altitude is not None
          else to_si(spec.ambient_pressure or ONE_ATM, "pressure", f"{where}.ambient_pressure", minimum=0.0,
                     exclusive=False))
    losses = spec.efficiency.loss_model(f"{where}.efficiency") if spec.efficiency else None
    exit_kw = {"area_ratio": spec.area_ratio} if spec.area_ratio is not None else {"exit_pressure": spec.exit_pressure}
    rows, seen = [], {}
    for j, text in enumerate(spec.pairs, 1):
        ox_name, fu_name = pair_names(text, f"{where}.pairs[{j}]")
        ox = lookup(ox_name, custom, f"{where}.pairs[{j}] oxidizer")
        fu = lookup(fu_name, custom, f"{where}.pairs[{j}] fuel")
        if (ox.name, fu.name) in seen:   # the same ingredients under an alias or another case
            raise InputError(f"{where}.pairs[{j}]", text, f"pairs given once (pairs[{seen[ox.name, fu.name]}] "
                             f"is {ox.name}/{fu.name} too)")
        seen[ox.name, fu.name] = j
        try:
            o = optimum_mixture_ratio(ox, fu, spec.chamber_pressure, ambient_pressure=pa, flow=spec.flow,
                                      objective=spec.objective, **exit_kw)
        except NoFullFlowOptimum:
            rows.append({"comparison": spec.name, "pair": f"{ox.name}/{fu.name}", "objective": spec.objective,
                         "ambient_pressure": pa, "at_bound": False, "note": "no full-flowing O/F in the search range"})
            continue
        rows.append(_comparison_row(spec, o.performance, o.mixture_ratio, o.at_bound, pa, losses))
    names = {}
    for j, given in enumerate(spec.propellants, 1):   # formulations: each one point, no O/F
        parts = formulation_parts(given, custom, f"{where}.propellants[{j}]")
        p = performance(propellant=parts, chamber_pressure=spec.chamber_pressure, ambient_pressure=pa,
                        flow=spec.flow, **exit_kw)
        if p.propellant in names:
            raise InputError(f"{where}.propellants[{j}]", p.propellant,
                             f"propellants given once (propellants[{names[p.propellant]}] is the same)")
        names[p.propellant] = j
        rows.append(_comparison_row(spec, p, None, False, pa, losses))
    key = spec.rank_by or spec.objective
    if rows and all(r.get("note") for r in rows):
        raise InputError(f"{where}.objective", spec.objective, "an objective some pair reaches with a full-flowing "
                         "nozzle (none does in the search range)")
    rows.sort(key=lambda r: -(r[key] if r.get(key) is not None else -math.inf))
    for rank, r in enumerate(rows, 1):
        r["rank"] = rank
    return rows


def _comparison_row(spec, p, mixture_ratio, at_bound: bool, pa: float, losses) -> dict:
    """One row of a comparison: a pair at its optimum or a formulation as it is (SI units)."""
    from perfchain.performance.delivered import deliver

    rho = p.bulk_density
    row = {"comparison": spec.name, "pair": p.propellant, "objective": spec.objective,
           "mixture_ratio": mixture_ratio, "chamber_pressure": p.chamber_pressure,
           "area_ratio": p.area_ratio, "ambient_pressure": pa,
           "chamber_temperature": p.chamber.temperature, "cstar": p.cstar,
           "isp_vacuum": p.isp_vacuum, "isp_ambient": p.isp_ambient, "bulk_density": rho,
           "density_isp": None if rho is None else rho * p.isp_vacuum,
           "density_isp_ambient": None if rho is None else rho * p.isp_ambient, "at_bound": at_bound,
           "flows_full": p.flows_full, "ambient_model": p.ambient_model}
    if losses is not None:
        d = deliver(p, losses).delivered
        row.update(delivered_isp_vacuum=d["isp_vacuum"], delivered_isp_ambient=d["isp_ambient"])
    return row


def vehicle_rows(spec, index: int, engines: dict, design: dict):
    """A ``[[vehicle]]``'s totals and one row per stage (SI units).

    Parameters
    ----------
    spec : Vehicle
    index : int
        1-based place of the vehicle in the study (named in errors).
    engines : dict
        Engine name -> :class:`~perfchain.study.engines.EngineSettings`.
    design : dict
        Engine name -> its design :class:`~perfchain.performance.chain.Performance`.

    Returns
    -------
    (dict, list of dict)
        ``payload_mass`` [kg], ``total_delta_v`` [m/s], ``liftoff_mass`` [kg],
        ``payload_fraction`` [-] (and ``max_payload`` [kg] for a target); the stage rows.

    Examples
    --------
    One stage of 300 s, 1 t dry and 9 t of propellant, no payload: delta-v =
    300 g0 ln 10 (Tsiolkovsky's rocket equation; g0 = 9.80665 m/s^2 by CGPM 1901):

    >>> import math
    >>> from perfchain.study.schema import Vehicle
    >>> spec = Vehicle(name="V", payload="0 kg", stage=[{"isp": "300 s", "dry": "1 t", "propellant": "9 t"}])
    >>> total, rows = vehicle_rows(spec, 1, {}, {})
    >>> round(total["total_delta_v"] - 300 * 9.80665 * math.log(10), 6), len(rows)
    (0.0, 1)
    """
    from perfchain.units import to_si
    from perfchain.vehicle.rocket import Vehicle, max_payload

    where = f"vehicle[{index}]"
    stages, info = [], []
    for j, s in enumerate(spec.stage, 1):
        stage, pair, mr = _stage(s, j, f"{where}.stage[{j}]", engines, design)
        stages.append(stage)
        info.append({"engine": s.engine or "", "pair": pair, "mixture_ratio": mr, "which": s.which,
                     "isp": stage.isp, "exhaust_velocity": stage.exhaust_velocity, "dry_mass": stage.dry_mass,
                     "propellant_mass": stage.propellant_mass})
    result = {"vehicle": spec.name, "payload_mass": to_si(spec.payload, "mass", f"{where}.payload", minimum=0.0,
                                                         exclusive=False)}
    if not stages:
        return result, []
    r = Vehicle(stages, result["payload_mass"]).performance().to_dict()
    result.update(total_delta_v=r["total_delta_v"], liftoff_mass=r["liftoff_mass"],
                  payload_fraction=r["payload_fraction"])
    if spec.target is not None:
        target = to_si(spec.target, "speed", f"{where}.target", minimum=0.0)
        try:
            best = max_payload(stages, target)
        except InputError as exc:
            raise InputError(f"{where}.target", spec.target, exc.allowed) from None
        result.update(target_delta_v=target, max_payload=best)
    rows = [dict({"vehicle": spec.name, "stage": k}, **st, **extra)
            for k, (st, extra) in enumerate(zip(r["stages"], info), 1)]
    return result, rows


def _stage(s, j: int, f: str, engines: dict, design: dict):
    """One ``[[vehicle.stage]]`` as a Stage, with its pair and O/F ('' and None without an engine)."""
    from perfchain.study.tradeoff import stage_from_point
    from perfchain.units import to_si
    from perfchain.vehicle.rocket import make_stage

    def m(key):
        v = getattr(s, key)
        return None if v is None else to_si(v, "mass", f"{f}.{key}", minimum=0.0)

    masses = dict(dry_mass=m("dry"), propellant_mass=m("propellant"), total_mass=m("mass"),
                  propellant_fraction=s.propellant_fraction, structural_ratio=s.structural_ratio)
    thrust = None if s.thrust is None else to_si(s.thrust, "force", f"{f}.thrust", minimum=0.0)
    name = s.name or (f"stage {j} ({s.engine})" if s.engine else f"stage {j}")
    if s.engine is not None:
        es = engines[s.engine]
        perf = design[s.engine] if s.mixture_ratio is None else engine_point(es, s.mixture_ratio)
        stage = stage_from_point(perf, which=s.which, thrust=thrust, name=name, **masses)
        return stage, perf.propellant, perf.mixture_ratio
    speed = dict(isp=to_si(s.isp, "time", f"{f}.isp", minimum=0.0)) if s.isp is not None else \
        dict(exhaust_velocity=to_si(s.exhaust_velocity, "speed", f"{f}.exhaust_velocity", minimum=0.0))
    return make_stage(thrust=thrust, name=name, **speed, **masses), "", None


def fixed_tank_tables(spec, engines: dict) -> tuple[list, list]:
    """A vehicle's fixed-tank trade: delta-v against O/F per engine, and each engine's best O/F.

    Parameters
    ----------
    spec : Vehicle
        With a ``fixed_tank`` section.
    engines : dict
        Engine name -> :class:`~perfchain.study.engines.EngineSettings`.

    Returns
    -------
    (list of pandas.DataFrame, list of dict)
        The trade table (columns of :data:`perfchain.study.tradeoff.SWEEP_COLUMNS`, SI) and
        one summary per engine (:func:`perfchain.study.tradeoff.best_fixed_tank_mixture_ratio`).

    Examples
    --------
    With LOX denser than LH2 the delta-v optimum lies above the Isp optimum (closed-form
    argument in :mod:`perfchain.study.tradeoff`):

    >>> from perfchain.study.engines import engine_settings, resolve_ingredients
    >>> from perfchain.study.schema import parse_study
    >>> s = parse_study('[study]\\ntitle = "t"\\n[[engine]]\\nname = "H"\\noxidizer = "LOX"\\n'
    ...                 'fuel = "LH2"\\nmixture_ratio = [4.0, 6.0]\\nchamber_pressure = "50 bar"\\n'
    ...                 'area_ratio = 40\\n[[vehicle]]\\nname = "V"\\npayload = "300 kg"\\n'
    ...                 '[vehicle.fixed_tank]\\nengines = ["H"]\\ntank_volume = "2.5 m**3"\\n'
    ...                 'fixed_dry_mass = "200 kg"\\ntank_mass_per_volume = "20 kg/m**3"\\n')
    >>> engines = {"H": engine_settings(s.engine[0], 1, resolve_ingredients(s), None)}
    >>> tables, best = fixed_tank_tables(s.vehicle[0], engines)
    >>> len(tables[0]), best[0]["delta_v_mixture_ratio"] > best[0]["isp_mixture_ratio"]
    (2, True)
    """
    import pandas as pd

    from perfchain.study.tradeoff import best_fixed_tank_mixture_ratio, fixed_tank_sweep

    ft = spec.fixed_tank
    tables, best = [], []
    for name in ft.engines:
        es = engines[name]
        kw = dict(chamber_pressure=es.chamber_pressure[0], **{es.exit_key: es.exits[0]},
                  tank_volume=ft.tank_volume, payload_mass=spec.payload, fixed_dry_mass=ft.fixed_dry_mass,
                  tank_mass_per_volume=ft.tank_mass_per_volume, ambient_pressure=es.ambient_pressure[0],
                  flow=es.flow[0], which=ft.which)
        t = fixed_tank_sweep([(es.oxidizer, es.fuel)], es.mixture_ratio, **kw)
        t.insert(0, "engine", name)
        t.insert(0, "vehicle", spec.name)
        tables.append(t)
        b = best_fixed_tank_mixture_ratio(es.oxidizer, es.fuel, **kw)
        b["bounds"] = f"{b['bounds'][0]:.4g}-{b['bounds'][1]:.4g}"
        best.append(dict({"vehicle": spec.name, "engine": name, "pair": f"{b['oxidizer']}/{b['fuel']}"}, **b))
    return [pd.concat(tables, ignore_index=True)], best

