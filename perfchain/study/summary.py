"""The answers of a study in sentences: who wins each comparison, by how much, and why; vehicles against targets.

The report opens with these (its Summary section); they are built from the same SI rows the
tables show, with the labels of :mod:`perfchain.study.labels`, so a sentence and a table never
disagree. A comparison is won on its ranking (``rank_by``, else its objective); the margin is
the winner's lead over the runner-up, and the sentence names what drives it:

- on an Isp, the split of the Isp ratio into a c* ratio and a thrust-coefficient ratio
  (Isp = c* Cf / g0, a definition);
- on a density-Isp, the split into a bulk-density ratio and an Isp ratio
  (density-Isp = bulk density x Isp, a definition);
- on c*, chamber temperature or bulk density, the value itself.
"""

from __future__ import annotations

import math

from perfchain.study.columns import column_kind, to_unit, unit_label
from perfchain.study.labels import phrase
from perfchain.study.report_tables import plain

__all__ = ["MARGIN_COLUMNS", "comparison_summary", "vehicle_sentence", "engine_sentence", "margin_rows"]

#: the quantities on which every comparison's margins are shown, when its rows have them
MARGIN_COLUMNS = ("isp_vacuum", "isp_ambient", "delivered_isp_vacuum", "delivered_isp_ambient", "density_isp",
                  "density_isp_ambient", "cstar", "bulk_density", "chamber_temperature")


def _q(value, column, units) -> str:
    """A value of ``column`` with its unit, in the output units."""
    kind = column_kind(column)
    u = unit_label(kind, units)
    return plain(to_unit(value, kind, units), 4) + (f" {u}" if u else "")


def _pct(a, b) -> float:
    return 100.0 * (a / b - 1.0)


def _ok(row, key) -> bool:
    v = row.get(key)
    return v is not None and isinstance(v, (int, float)) and math.isfinite(v)


def _driver(win: dict, run: dict, key: str, units: str) -> str:
    """Why the winner leads on ``key``: the factor of the definition that moves most."""
    base = key.replace("delivered_", "")
    if base.startswith("density_isp") and _ok(win, "bulk_density") and _ok(run, "bulk_density"):
        isp = "isp_ambient" if base.endswith("ambient") else "isp_vacuum"
        d_rho = math.log(win["bulk_density"] / run["bulk_density"])
        d_isp = math.log(win[isp] / run[isp])
        rho = (f"bulk density ({_q(win['bulk_density'], 'bulk_density', units)} against "
               f"{_q(run['bulk_density'], 'bulk_density', units)})")
        isp_text = f"{phrase(isp)} ({plain(win[isp], 4)} s against {plain(run[isp], 4)} s)"
        if abs(d_rho) >= abs(d_isp):   # the larger term of a winning sum is positive
            return f"its denser propellant drives it: {rho}" + \
                (f", which outweighs its lower {isp_text}" if d_isp < 0 else f", helped by its {isp_text}")
        return (f"its higher {isp_text} drives it" + (f", which outweighs its lower {rho}" if d_rho < 0
                                                      else f", helped by its {rho}"))
    if base.startswith("isp") and _ok(win, "cstar") and _ok(run, "cstar"):
        isp = base
        d_c = math.log(win["cstar"] / run["cstar"])
        d_cf = math.log(win[isp] / run[isp]) - d_c
        cstar = f"c* {_q(win['cstar'], 'cstar', units)} against {_q(run['cstar'], 'cstar', units)}"
        if abs(d_c) >= abs(d_cf) and d_c > 0:
            why = ""
            if _ok(win, "chamber_temperature") and _ok(run, "chamber_temperature"):
                tw, tr = win["chamber_temperature"], run["chamber_temperature"]
                why = (f"; its chamber is cooler ({_q(tw, 'chamber_temperature', units)} against "
                       f"{_q(tr, 'chamber_temperature', units)}), so its products are lighter" if tw < tr else
                       f", with a hotter chamber ({_q(tw, 'chamber_temperature', units)} against "
                       f"{_q(tr, 'chamber_temperature', units)})")
            return f"its higher characteristic velocity drives it ({cstar}{why})"
        return (f"its nozzle's thrust coefficient drives it ({plain(100 * (math.exp(d_cf) - 1), 2)} % higher; "
                f"{cstar})")
    return f"its {phrase(key)} {_q(win[key], key, units)} against {_q(run[key], key, units)}"


def comparison_summary(rows: list, units: str) -> dict:
    """The winner of one comparison, its margin and the sentence that says so.

    Parameters
    ----------
    rows : list of dict
        A comparison's rows (:func:`perfchain.study.sections.comparison_rows`), SI, ranked.
    units : {"si", "us"}

    Returns
    -------
    dict
        ``winner`` (the pair), ``key`` (the ranking column), ``margin_percent`` (None alone),
        ``mixture_ratio``, ``sentence``.

    Examples
    --------
    Made-up rows; density-Isp = bulk density x Isp (definition):

    >>> rows = [dict(rank=1, pair="A/B", objective="density_isp", mixture_ratio=2.0, isp_vacuum=300.0,
    ...              bulk_density=1200.0, density_isp=360000.0, cstar=1700.0),
    ...         dict(rank=2, pair="C/D", objective="density_isp", mixture_ratio=5.0, isp_vacuum=330.0,
    ...              bulk_density=1000.0, density_isp=330000.0, cstar=1750.0)]
    >>> s = comparison_summary(rows, "si")
    >>> s["winner"], round(s["margin_percent"], 2)
    ('A/B', 9.09)
    >>> s["sentence"][:60]
    'A/B wins on density-Isp, vacuum by 9.09 % over C/D, at O/F 2'
    """
    ranked = sorted((r for r in rows if r.get("rank") is not None), key=lambda r: r["rank"])
    key = _ranking_key(ranked)
    win = ranked[0]
    at = f", at O/F {plain(win['mixture_ratio'], 3)}" if win.get("mixture_ratio") is not None else ""
    runners = [r for r in ranked[1:] if _ok(r, key)]
    if not runners or not _ok(win, key):
        sentence = f"{win['pair']} is the only candidate with a value of {phrase(key)}{at}."
        return {"winner": win["pair"], "key": key, "margin_percent": None, "mixture_ratio": win.get("mixture_ratio"),
                "sentence": sentence}
    run = runners[0]
    margin = _pct(win[key], run[key])
    sentence = (f"{win['pair']} wins on {phrase(key)} by {plain(margin, 3)} % over {run['pair']}{at} "
                f"({_q(win[key], key, units)} against {_q(run[key], key, units)}): {_driver(win, run, key, units)}.")
    return {"winner": win["pair"], "key": key, "margin_percent": margin, "mixture_ratio": win.get("mixture_ratio"),
            "sentence": sentence}


def _ranking_key(ranked: list) -> str:
    """The column the ranks follow: the one whose order they are (rank_by is not stored in the rows)."""
    objective = ranked[0].get("objective") or "isp_vacuum"
    for key in (objective,) + MARGIN_COLUMNS:
        vals = [r.get(key) for r in ranked]
        if all(v is not None and math.isfinite(v) for v in vals) and vals == sorted(vals, reverse=True):
            return key
    return objective


def margin_rows(rows: list, key: str) -> list[dict]:
    """For each quantity the rows hold: the winner's value, the best other and the winner's lead [%].

    >>> m = margin_rows([dict(rank=1, pair="A", isp_vacuum=300.0), dict(rank=2, pair="B", isp_vacuum=310.0)],
    ...                 "isp_vacuum")
    >>> m[0]["leader"], round(m[0]["lead_percent"], 2)
    ('B', -3.23)
    """
    ranked = sorted((r for r in rows if r.get("rank") is not None), key=lambda r: r["rank"])
    win, out = ranked[0], []
    vacuum = all((r.get("ambient_pressure") or 0.0) <= 0 for r in ranked)   # ambient values repeat vacuum ones
    for col in dict.fromkeys((key,) + MARGIN_COLUMNS):
        if vacuum and col.endswith("_ambient") and col != key:
            continue
        have = [r for r in ranked if _ok(r, col)]
        if not _ok(win, col) or len(have) < 2:
            continue
        others = [r for r in have if r is not win]
        best_other = max(others, key=lambda r: r[col])
        leader = max(have, key=lambda r: r[col])
        out.append({"column": col, "winner": win[col], "other": best_other[col], "other_pair": best_other["pair"],
                    "lead_percent": _pct(win[col], best_other[col]), "leader": leader["pair"]})
    return out


def vehicle_sentence(row: dict, units: str) -> str:
    """A vehicle's delta-v and payload against its target, in one sentence.

    Tsiolkovsky's rocket equation gives the totals; this only words them:

    >>> vehicle_sentence(dict(vehicle="V", total_delta_v=9400.0, payload_mass=150.0, target_delta_v=9000.0,
    ...                       max_payload=231.0, payload_fraction=0.004), "si")
    'V: delta-v 9400 m/s with 150 kg of payload, 400 m/s above the 9000 m/s target; the target allows up to 231 kg of payload.'
    """
    if not _ok(row, "total_delta_v"):
        return f"{row['vehicle']}: no stages, no delta-v."
    text = (f"{row['vehicle']}: delta-v {_q(row['total_delta_v'], 'delta_v', units)} with "
            f"{_q(row['payload_mass'], 'payload_mass', units)} of payload")
    if _ok(row, "target_delta_v"):
        gap = row["total_delta_v"] - row["target_delta_v"]
        side = "above" if gap >= 0 else "SHORT of"
        text += f", {_q(abs(gap), 'delta_v', units)} {side} the {_q(row['target_delta_v'], 'delta_v', units)} target"
        if row.get("max_payload") is not None:
            mp = row["max_payload"]
            text += (f"; the target allows up to {_q(mp, 'payload_mass', units)} of payload" if mp > 0 else
                     "; the target cannot be reached with any payload")
    elif _ok(row, "payload_fraction"):
        text += f" (payload fraction {plain(100 * row['payload_fraction'], 3)} %)"
    return text + "."


def engine_sentence(engine: str, perf, units: str) -> str:
    """An engine's design point in one sentence: delivered Isp, the point, and thrust and throat if sized.

    >>> from types import SimpleNamespace as N
    >>> p = N(propellant="LOX/RP-1", mixture_ratio=2.6, chamber_pressure=7e6, area_ratio=40.0, ambient_pressure=0.0,
    ...       altitude=None, flow="shifting", isp_vacuum=340.0, isp_ambient=340.0, delivered=None, sizing=None)
    >>> engine_sentence("E", p, "si")
    'E (LOX/RP-1, shifting): vacuum Isp 340 s (ideal) at O/F 2.6, chamber pressure 70 bar, area ratio 40, in vacuum.'
    """
    d = perf.delivered or {}
    ideal = not d
    isp_v = perf.isp_vacuum if ideal else d["isp_vacuum"]
    text = f"{engine} ({perf.propellant}, {perf.flow}): vacuum Isp {plain(isp_v, 4)} s ({'ideal' if ideal else 'delivered'})"
    if perf.ambient_pressure > 0:
        isp_a = perf.isp_ambient if ideal else d["isp_ambient"]
        where = (f"at {_q(perf.altitude, 'altitude', units)} altitude" if perf.altitude is not None else
                 f"at {_q(perf.ambient_pressure, 'ambient_pressure', units)}")
        text += f", {plain(isp_a, 4)} s {where}"
    if perf.mixture_ratio is not None:
        text += f" at O/F {plain(perf.mixture_ratio, 3)}"
    text += (f", chamber pressure {_q(perf.chamber_pressure, 'chamber_pressure', units)}, "
             f"area ratio {plain(perf.area_ratio, 3)}")
    if perf.ambient_pressure <= 0:
        text += ", in vacuum"
    s = perf.sizing or {}
    if s.get("thrust") is not None:
        text += (f"; {_q(s['thrust'], 'sizing_thrust', units)} of thrust from a "
                 f"{_q(s['throat_diameter'], 'sizing_throat_diameter', units)} throat")
    return text + "."
