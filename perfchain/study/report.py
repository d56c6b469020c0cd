"""The study report: one self-contained HTML file (no scripts, no external URLs).

Plots are embedded as base64 PNG; styles are inline. The report states the
inputs, the assumptions, the results and their provenance, and the safety
cautions, so it can be handed on without the rest of the folder.
"""

from __future__ import annotations

import base64
import html

from perfchain.study.columns import column_kind, convert_frame, unit_label

__all__ = ["render_report", "SAFETY", "ASSUMPTIONS"]

SAFETY = (
    "Every number in this report is a theoretical estimate from an idealised model, not a measurement and "
    "not a qualification of hardware. Propellants and hot-fire work can kill. Hydrazine, MMH and UDMH are "
    "acutely toxic and suspected carcinogens; nitrogen tetroxide is acutely toxic; liquid oxygen, "
    "concentrated hydrogen peroxide and nitrous oxide are strong oxidizers that turn ordinary materials into "
    "fuel; nitrous oxide can decompose explosively; cryogens cause cold burns and asphyxiation and "
    "over-pressurise closed volumes; every tank, line and chamber is a pressure vessel. Follow local codes, "
    "your range-safety authority and licensed professional practice; perfchain replaces none of them.")

ASSUMPTIONS = (
    "One-dimensional, steady, adiabatic flow; isentropic expansion; chemical equilibrium in the chamber "
    "(Cantera, NASA Glenn thermodynamic data, gas and condensed products).",
    "Grids, optima and comparisons: infinite-area chamber and ideal nozzle (no friction, heat loss or "
    "divergence). Design points add the engine's contraction ratio and efficiency factors.",
    "Flow models: shifting = equilibrium at every station; frozen = chamber composition throughout; "
    "frozen-throat = equilibrium to the throat, frozen beyond.",
    "Delivered = c* efficiency x ideal c*, and the momentum part of Cf times the divergence, boundary-layer, "
    "kinetic and two-phase factors; the overall Cf efficiency (cf_efficiency) scales the whole vacuum Cf.",
    "Flow separation: Summerfield criterion (Summerfield, Foster & Swan 1954), separation where p/pa < 0.4. "
    "A separated nozzle's ambient values are the cut-nozzle estimate (the nozzle cut at its separation "
    "station, ambient wall pressure downstream; Sutton & Biblarz ch. 3): conservative, not a model of "
    "separated flow. Rows say which (ambient_model).",
    "Vehicle delta-v: the ideal rocket equation, no gravity, drag or steering losses. Fixed-tank trades use the "
    "ideal exhaust velocity and tanks filled full (propellant = bulk density x tank volume).",
    "Optimum mixture ratios are ideal: they ignore chamber-temperature, cooling and turbomachinery limits.",
)

CSS = """
body{font-family:system-ui,-apple-system,Segoe UI,Helvetica,Arial,sans-serif;margin:1.5em auto;max-width:72em;
padding:0 1em;color:#111;line-height:1.4}
h1{font-size:1.6em}h2{border-bottom:1px solid #999;margin-top:1.6em}h3{margin-bottom:.3em}
table{border-collapse:collapse;margin:.5em 0 1em;font-size:.85em}th,td{border:1px solid #bbb;padding:.2em .45em;
text-align:right}th{background:#eee}td.t{text-align:left}
.scroll{overflow-x:auto;max-width:100%}
.safety{border:3px solid #000;background:#fff4d6;padding:.6em 1em;margin:1em 0}
.note{color:#444;font-size:.9em}figure{margin:1em 0}figure img{max-width:100%;height:auto;border:1px solid #ddd}
pre{background:#f6f6f6;padding:.6em;overflow-x:auto;font-size:.85em}
"""

_SHOWN_GRID = ("mixture_ratio", "chamber_pressure", "area_ratio", "ambient_pressure", "altitude", "flow",
               "chamber_temperature", "cstar", "isp_vacuum", "isp_ambient", "delivered_isp_vacuum",
               "delivered_isp_ambient", "exit_pressure", "exit_mach", "ambient_model", "status")


def _e(text) -> str:
    return html.escape(str(text), quote=True)


def _cell(value) -> str:
    if value is None:
        return "<td></td>"
    if isinstance(value, bool):
        return f"<td class=t>{'yes' if value else 'no'}</td>"
    if isinstance(value, (int, float)):
        if value != value:
            return "<td>-</td>"
        return f"<td>{value:.5g}</td>"
    return f"<td class=t>{_e(value)}</td>"


def table_html(df, units: str, columns=None, max_rows: int = 60) -> str:
    """A result table (SI) in the output units, headers with units; long tables are cut with a note."""
    if columns is not None:
        df = df[[c for c in columns if c in df.columns]]
    shown, col_units = convert_frame(df.head(max_rows), units)
    head = "".join(f"<th>{_e(c)}" + (f"<br>[{_e(col_units[c])}]" if col_units[c] else "") + "</th>"
                   for c in shown.columns)
    body = "".join("<tr>" + "".join(_cell(v) for v in row) + "</tr>"
                   for row in shown.astype(object).itertuples(index=False))
    note = "" if len(df) <= max_rows else f"<p class=note>First {max_rows} of {len(df)} rows; all rows are in the table files.</p>"
    return f"<div class=scroll><table><tr>{head}</tr>{body}</table></div>{note}"


def _kv(pairs: list, units: str) -> str:
    rows = []
    for key, value in pairs:
        kind = column_kind(key)
        if isinstance(value, (int, float)) and not isinstance(value, bool) and kind is not None:
            from perfchain.study.columns import to_unit

            value = to_unit(value, kind, units)
        label = unit_label(kind, units) if isinstance(value, (int, float)) and not isinstance(value, bool) else ""
        rows.append(f"<tr><th>{_e(key)}</th>{_cell(value)}<td class=t>{_e(label)}</td></tr>")
    return "<table>" + "".join(rows) + "</table>"


def _design_section(name, es, perf, units) -> str:
    d = perf.to_dict()
    pairs = [("propellant", d["propellant"])]
    if d["mixture_ratio"] is not None:   # a formulation has no oxidizer, fuel or O/F
        pairs += [("oxidizer", d["oxidizer"]), ("fuel", d["fuel"]), ("mixture_ratio", d["mixture_ratio"])]
    pairs += [("flow", d["flow"]), ("chamber_pressure", d["chamber_pressure"]),
             ("area_ratio", d["area_ratio"]), ("ambient_pressure", d["ambient_pressure"])]
    if d.get("altitude") is not None:
        pairs.append(("altitude", d["altitude"]))
    pairs += [("chamber_temperature", d["chamber"]["temperature"]), ("exit_pressure", d["exit"]["pressure"]),
              ("exit_mach", d["exit"]["mach"]), ("cstar", d["cstar"]), ("isp_vacuum", d["isp_vacuum"]),
              ("isp_ambient", d["isp_ambient"])]
    for k in ("cstar", "isp_vacuum", "isp_ambient"):
        pairs.append((f"delivered_{k}", d["delivered"][k]))
    pairs.append(("total_isp_vacuum_loss", d["losses"]["total_isp_vacuum_loss"]))
    sep = d["separation"]
    pairs += [("separation_flag", bool(sep["flag"])), ("separation_pressure_ratio", sep["pressure_ratio"]),
              ("separation_full_flow_altitude", sep["full_flow_altitude"]), ("ambient_model", d["ambient_model"])]
    if not d["flows_full"]:
        pairs += [("separation_pressure", d["separation_pressure"]),
                  ("separation_area_ratio", d["separation_area_ratio"])]
    for k, v in (d.get("finite_chamber") or {}).items():
        pairs.append((f"finite_chamber_{k}", v))
    for k, v in (d.get("sizing") or {}).items():
        pairs.append((f"sizing_{k}", v))
    text = f"<h3>Design point</h3>{_kv(pairs, units)}"
    text += "".join(f"<p>Note: {_e(n)}</p>" for n in d.get("notes") or ())
    if sep["flag"]:
        text += ("<p><b>Flow separation is likely at this ambient pressure</b> (pe/pa = "
                 f"{sep['pressure_ratio']:.3g} below {sep['threshold']:g}): the ambient values are the cut-nozzle "
                 "estimate (the nozzle cut at its separation station, ambient wall pressure downstream), a "
                 "conservative estimate, not a full-flowing nozzle's.</p>")
    return text


def _figures(figs, group) -> str:
    out = []
    for f in figs:
        if f.group != group:
            continue
        data = base64.b64encode(f.png).decode("ascii")
        out.append(f"<figure><img alt='{_e(f.title)}' src='data:image/png;base64,{data}'>"
                   f"<figcaption><b>{_e(f.title)}.</b> {_e(f.caption)}</figcaption></figure>")
    return "".join(out)


def _efficiency_text(spec) -> str:
    if spec.efficiency is None:
        return "none (delivered = ideal)"
    return ", ".join(f"{k} = {v}" for k, v in spec.efficiency.model_dump(exclude_none=True).items())


def render_report(res, *, units: str, figures: list, meta: dict, study_text: str, files: list) -> str:
    """The whole report as one HTML string."""
    import pandas as pd

    st = res.study
    parts = [f"<!DOCTYPE html><html lang=en><head><meta charset=utf-8><title>{_e(st.study.title)}</title>"
             f"<meta name=viewport content='width=device-width, initial-scale=1'><style>{CSS}</style></head><body>",
             f"<h1>{_e(st.study.title)}</h1>"]
    if st.study.description:
        parts.append(f"<p>{_e(st.study.description)}</p>")
    if st.study.author:
        parts.append(f"<p class=note>Author: {_e(st.study.author)}</p>")
    parts.append(f"<div class=safety><b>Safety.</b> {_e(SAFETY)}</div>")
    parts.append(f"<p class=note>Units: {'SI (pressures in bar)' if units == 'si' else 'US customary (psia, degR, ft/s, lbm, lbf, in, ft)'}; "
                 "Isp in s (g0 = 9.80665 m/s<sup>2</sup>)."
                 + (f" <b>Lists capped at {res.cap} values</b> (a reduced run)." if res.cap else "") + "</p>")
    # assumptions
    parts.append("<h2>Assumptions</h2><ul>" + "".join(f"<li>{_e(a)}</li>" for a in ASSUMPTIONS) + "</ul>")
    if res.engines:
        rows = "".join(f"<tr><td class=t>{_e(n)}</td><td class=t>{_e(', '.join(es.flow))}</td>"
                       f"<td class=t>{_e(_efficiency_text(es.spec))}</td>"
                       f"<td class=t>{_e(es.spec.contraction_ratio or 'infinite')}</td></tr>"
                       for n, es in res.engines.items())
        parts.append("<table><tr><th>engine</th><th>flow</th><th>efficiencies used</th>"
                     f"<th>contraction ratio</th></tr>{rows}</table>")
    # engines
    if res.engines:
        parts.append("<h2>Engines</h2>")
    for name, es in res.engines.items():
        s = es.spec
        parts.append(f"<h3>{_e(name)}: {_e(es.label)}</h3>")
        parts.append(_design_section(name, es, res.design[name], units))
        if name in getattr(res, "thermal", {}):
            from perfchain.study.thermal import thermal_html

            parts.append(thermal_html(res.thermal[name]))
        if res.optima[name]:   # none for a formulation (no O/F)
            parts.append("<h3>Optimum mixture ratios</h3>" + table_html(pd.DataFrame(res.optima[name]), units))
        parts.append(_figures(figures, f"engine:{name}"))
        parts.append(f"<h3>Grid ({len(res.grids[name])} points, {_e(s.objective)} objective)</h3>"
                     + table_html(res.grids[name], units, _SHOWN_GRID))
    if res.design:
        parts.append(_figures(figures, "delivered-vs-ideal"))
    # comparisons
    if res.comparisons:
        parts.append("<h2>Comparisons</h2>")
    for name, rows in res.comparisons.items():
        parts.append(f"<h3>{_e(name)}</h3>" + table_html(pd.DataFrame(rows), units))
        parts.append(_figures(figures, f"comparison:{name}"))
    # vehicles
    if res.vehicles or res.fixed_tank_best:
        parts.append("<h2>Vehicle budgets</h2>")
    if res.vehicles:
        parts.append(table_html(pd.DataFrame(res.vehicles), units))
        parts.append("<h3>Stages</h3>" + table_html(pd.DataFrame(res.stages), units))
    if res.fixed_tank_best:
        parts.append("<h3>Fixed tank volume: best mixture ratio for delta-v and for Isp</h3>"
                     + table_html(pd.DataFrame(res.fixed_tank_best), units))
    parts.append(_figures(figures, "delta-v") + _figures(figures, "fixed-tank-delta-v"))
    if res.fixed_tank:
        parts.append("<h3>Fixed-tank sweep</h3>" + table_html(pd.concat(res.fixed_tank, ignore_index=True), units))
    if getattr(res, "uncertainty", None):
        from perfchain.study.uncertainty_report import uncertainty_html

        parts.append(uncertainty_html(res, units, figures, table_html, _figures))
    # inputs, files, provenance
    parts.append(f"<h2>Inputs</h2><p class=note>The study file as given (data only; nothing in it is executed).</p>"
                 f"<pre>{_e(study_text)}</pre>")
    parts.append("<h2>Files</h2><ul>" + "".join(f"<li><code>{_e(f)}</code></li>" for f in files)
                 + "<li><code>study.toml</code> (this study with provenance), <code>provenance.json</code></li></ul>")
    prov = [("perfchain", meta["perfchain"]), ("Cantera", meta["cantera"]), ("Python", meta["python"]),
            ("thermodynamic data", f"{meta['thermo_data']['gas']}, {meta['thermo_data']['condensed']} "
                                   f"({meta['thermo_data']['source']})"),
            ("ingredient data", f"{meta['ingredient_data']['file']} (sha256 {meta['ingredient_data']['sha256'][:16]}...)"),
            ("study file", f"{meta['study_file']} (sha256 {meta['study_sha256'][:16]}...)"), ("date (UTC)", meta["date"])]
    parts.append("<h2>Provenance</h2><table>" + "".join(f"<tr><th>{_e(k)}</th><td class=t>{_e(v)}</td></tr>"
                                                       for k, v in prov) + "</table>")
    parts.append(f"<div class=safety><b>Safety.</b> {_e(SAFETY)}</div></body></html>\n")
    return "".join(parts)
