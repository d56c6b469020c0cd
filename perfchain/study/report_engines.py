"""The engine part of the study report: each design point in labelled groups, its c* reference, and the grids as pivots.

A design point is shown as groups of labelled rows (operating point, ideal, delivered,
nozzle flow, finite chamber, sizing); rows without a value are left out. Where the
engine has a finite contraction ratio, its c* is referred to the injector-face pressure,
while grid, optimum and comparison values are infinite-area-chamber values: a note gives the
c* referred to the nozzle-inlet stagnation pressure too, so the two are not confused.
A grid is shown as pivot tables of the engine's objective (:mod:`perfchain.study.report_tables`).
"""

from __future__ import annotations

from perfchain.performance.losses_two_phase import two_phase_note
from perfchain.study.labels import label, value_label
from perfchain.study.report_tables import esc, key_value_html, pivot_html, plain

__all__ = ["design_html", "cstar_note", "grid_html", "MAX_SLICES"]

MAX_SLICES = 6   #: most (flow, ambient) slices of one grid shown as pivots; all are in the table files


def _rows(d: dict, block: str, keys) -> list:
    return [(f"{block}_{k}", (d.get(block) or {}).get(k)) for k in keys]


def cstar_note(perf, units: str) -> str:
    """The sentence that says which pressure a finite-chamber c* is referred to ('' for an infinite chamber).

    c* = p A* / mdot (definition) with p the injector-face pressure or the nozzle-inlet stagnation
    pressure: the two differ by the ratio of the two pressures.

    >>> from types import SimpleNamespace as N
    >>> p = N(cstar=1800.0, finite_chamber=dict(injector_pressure=5e6, nozzle_inlet_stagnation_pressure=4.9e6,
    ...       contraction_ratio=3.0))
    >>> cstar_note(p, "si")[:76]
    'c* here is referred to the injector-face pressure (50 bar): 1800 m/s. Referr'
    """
    fc = getattr(perf, "finite_chamber", None)
    if not fc or not fc.get("injector_pressure") or not fc.get("nozzle_inlet_stagnation_pressure"):
        return ""
    from perfchain.study.columns import to_unit, unit_label

    pu = unit_label("pressure", units)
    vu = unit_label("speed", units)
    p_inj, p_0 = fc["injector_pressure"], fc["nozzle_inlet_stagnation_pressure"]
    inlet = perf.cstar * p_0 / p_inj
    return (f"c* here is referred to the injector-face pressure ({plain(to_unit(p_inj, 'pressure', units))} {pu}): "
            f"{plain(to_unit(perf.cstar, 'speed', units))} {vu}. Referred to the nozzle-inlet stagnation pressure "
            f"({plain(to_unit(p_0, 'pressure', units))} {pu}, after the Rayleigh-flow loss of the contraction "
            f"ratio {plain(fc.get('contraction_ratio'), 3)} chamber) it is {plain(to_unit(inlet, 'speed', units))} {vu}. "
            "The grid, optimum and comparison c* are infinite-area-chamber values.")


def design_html(perf, units: str) -> str:
    """An engine's design point as labelled groups, its notes, c* reference and separation warning.

    Parameters
    ----------
    perf : Performance
        The design point (SI).
    units : {"si", "us"}

    Returns
    -------
    str
    """
    d = perf.to_dict()
    ex = d["exit"]
    point = [("propellant", d["propellant"]), ("oxidizer", d["oxidizer"]), ("fuel", d["fuel"]),
             ("mixture_ratio", d["mixture_ratio"]), ("flow", d["flow"]), ("chamber_pressure", d["chamber_pressure"]),
             ("area_ratio", d["area_ratio"]), ("ambient_pressure", d["ambient_pressure"]),
             ("altitude", d.get("altitude")), ("finite_chamber_contraction_ratio",
                                               (d.get("finite_chamber") or {}).get("contraction_ratio"))]
    ideal = [("chamber_temperature", d["chamber"]["temperature"]), ("cstar", d["cstar"]),
             ("cf_vacuum", d["cf_vacuum"]), ("isp_vacuum", d["isp_vacuum"]),
             ("isp_ambient", d["isp_ambient"] if d["ambient_pressure"] > 0 else None),
             ("exit_pressure", ex["pressure"]), ("exit_temperature", ex["temperature"]), ("exit_mach", ex["mach"])]
    delivered = _rows(d, "delivered", ("cstar", "cf_vacuum", "isp_vacuum")) + \
        ([("delivered_isp_ambient", d["delivered"]["isp_ambient"])] if d.get("delivered") and d["ambient_pressure"] > 0
         else [])
    losses = d.get("losses") or {}
    delivered.append(("total_isp_vacuum_loss", losses.get("total_isp_vacuum_loss")))
    delivered += [(f"losses_isp_vacuum_loss_{k}", v) for k, v in (losses.get("isp_vacuum_loss") or {}).items()
                  if v]
    sep = d.get("separation") or {}
    nozzle = [("ambient_model", d["ambient_model"]), ("exit_ambient_pressure_ratio", d["exit_ambient_pressure_ratio"]),
              ("separation_flag", bool(sep["flag"]) if "flag" in sep else None),
              ("separation_full_flow_altitude", sep.get("full_flow_altitude") if d["ambient_pressure"] > 0 else None),
              ("separation_pressure", d["separation_pressure"]), ("separation_area_ratio", d["separation_area_ratio"])]
    chamber = _rows(d, "finite_chamber", ("injector_pressure", "nozzle_inlet_stagnation_pressure",
                                          "nozzle_inlet_pressure", "nozzle_inlet_temperature", "nozzle_inlet_mach"))
    sizing = _rows(d, "sizing", ("thrust", "thrust_at", "throat_diameter", "exit_diameter", "throat_area",
                                 "exit_area", "mass_flow", "oxidizer_mass_flow", "fuel_mass_flow",
                                 "oxidizer_volume_flow", "fuel_volume_flow"))
    text = key_value_html([("Operating point", point), ("Ideal performance", ideal),
                           ("Delivered performance", delivered), ("Nozzle flow", nozzle),
                           ("Finite chamber", chamber), ("Sizing", sizing)], units)
    note = cstar_note(perf, units)
    if note:
        text += f"<p class=note><b>c* reference.</b> {esc(note)}</p>"
    tp = losses.get("two_phase")
    if tp and tp.get("throat_diameter"):
        from perfchain.study.columns import to_unit, unit_label

        throat = f"{plain(to_unit(tp['throat_diameter'], 'diameter', units))} {unit_label('diameter', units)}"
    notes = [*(d.get("notes") or ()), *filter(None, [two_phase_note(tp, tp and tp.get("throat_diameter") and throat)])]
    text += "".join(f"<p class=note>Note: {esc(n)}</p>" for n in notes)
    if sep.get("flag"):
        text += ("<p class=warn><b>Flow separation is likely at this ambient pressure</b> (pe/pa = "
                 f"{plain(sep['pressure_ratio'], 3)} below {sep['threshold']:g}): the ambient values are the cut-nozzle "
                 "estimate (the nozzle cut at its separation station, ambient wall pressure downstream), a "
                 "conservative estimate, not a full-flowing nozzle's.</p>")
    return text


def _ambient_text(es, i: int, units: str) -> str:
    from perfchain.study.columns import to_unit, unit_label

    pa = es.ambient_pressure[i]
    if es.altitude is not None:
        return (f"altitude {plain(to_unit(es.altitude[i], 'altitude', units))} {unit_label('altitude', units)} "
                f"({plain(to_unit(pa, 'pressure', units))} {unit_label('pressure', units)})")
    return "vacuum" if pa <= 0 else f"ambient {plain(to_unit(pa, 'pressure', units))} {unit_label('pressure', units)}"


def _exit_text(es, value, units: str) -> str:
    if es.exit_key == "area_ratio":
        return f"Area ratio {plain(value, 4)}"
    from perfchain.study.columns import to_unit, unit_label

    return f"Exit pressure {plain(to_unit(value, 'pressure', units))} {unit_label('pressure', units)}"


def grid_html(es, df, optima: list, units: str) -> str:
    """An engine's grid as pivot tables of its objective: O/F down, chamber pressure across, one per exit.

    Slices: every ambient pressure of the first flow model, then the first ambient pressure of
    every other flow model (shifting against frozen), at most :data:`MAX_SLICES`.

    Parameters
    ----------
    es : EngineSettings
    df : pandas.DataFrame
        The engine's grid (SI).
    optima : list of dict
        The engine's searched optima (:func:`perfchain.study.engines.engine_optima`).
    units : {"si", "us"}

    Returns
    -------
    str
    """
    objective = es.spec.objective
    slices = [(es.flow[0], i) for i in range(len(es.ambient_pressure))] + [(f, 0) for f in es.flow[1:]]
    formulation = es.propellant is not None
    rows, cols = ("chamber_pressure", es.exit_key) if formulation else ("mixture_ratio", "chamber_pressure")
    parts = []
    for flow, i in slices[:MAX_SLICES]:
        part = df[(df["flow"] == flow) & (df["ambient_pressure"] == es.ambient_pressure[i])]
        head = f"{label(objective, units)}: {value_label(flow)}, {_ambient_text(es, i, units)}"
        tables = []
        for value in ([None] if formulation else es.exits):
            sub = part if value is None else part[part[es.exit_key] == value]
            best = None
            if value == es.exits[0] and flow == es.flow[0] and i == 0:
                best = {o["chamber_pressure"]: (o["mixture_ratio"], o["objective_value"]) for o in optima
                        if o["objective"] == objective and not o.get("note")}
            cap = "" if value is None else _exit_text(es, value, units)
            tables.append(f"<div>{pivot_html(sub, objective, units, rows=rows, cols=cols, optimum=best, caption=cap)}"
                          "</div>")
        parts.append(f"<h4>{esc(head)}</h4><div class=pivots>{''.join(tables)}</div>")
    more = len(slices) - MAX_SLICES
    foot = ("&#9733; best grid value of each column; the searched optimum (a bounded search between grid points) "
            "is the last row where one was searched. &#8224; separated nozzle: cut-nozzle estimate. "
            f"All {len(df)} grid points, with every output, are in the engine's grid table file.")
    if more > 0:
        foot += f" {more} further flow/ambient combinations are in the table file only."
    return "".join(parts) + f"<p class=note>{foot}</p>"
