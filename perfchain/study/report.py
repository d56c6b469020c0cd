"""The study report: one self-contained HTML file (no scripts, no external URLs).

Plots are embedded as base64 PNG; styles are inline. The report states the
answers first (Summary), then the inputs, the assumptions, the results and their
provenance, and the safety cautions, so it can be handed on without the rest of the
folder. It prints on A4 or Letter: tables are split into column blocks that fit the
page, figures scale to the page width, nothing scrolls (the print stylesheet).

The body is a list of sections (:data:`SECTIONS`): each builder takes the study result
and a :class:`ReportContext` and returns a :class:`Section` (or None when it has nothing
to show). The table of contents is made from them. To add a part to the report, write a
builder (in its own module) and insert it into :data:`SECTIONS` where it belongs.
"""

from __future__ import annotations

import base64
import re
from dataclasses import dataclass, field

from perfchain.study.report_tables import esc, table_html

__all__ = ["render_report", "SAFETY", "ASSUMPTIONS", "Section", "ReportContext", "SECTIONS", "section_ids",
           "comparison_hidden"]

SAFETY = (
    "Every number in this report is a theoretical estimate from an idealised model, not a measurement and "
    "not a qualification of hardware. Propellants and hot-fire work can kill. Hydrazine, MMH and UDMH are "
    "acutely toxic and suspected carcinogens; nitrogen tetroxide is acutely toxic; liquid oxygen, "
    "concentrated hydrogen peroxide and nitrous oxide are strong oxidizers that turn ordinary materials into "
    "fuel; nitrous oxide can decompose explosively; cryogens cause cold burns and asphyxiation and "
    "over-pressurise closed volumes; solid and hybrid propellant ingredients (ammonium perchlorate, "
    "nitrocellulose, nitroglycerin, metal powders) can ignite or detonate when ground, mixed, cast or cured; "
    "every tank, line and chamber is a pressure vessel. Follow local codes, "
    "your range-safety authority and licensed professional practice; perfchain replaces none of them.")

ASSUMPTIONS = (
    "One-dimensional, steady, adiabatic flow; isentropic expansion; chemical equilibrium in the chamber "
    "(Cantera, NASA Glenn thermodynamic data, gas and condensed products).",
    "Grids, optima and comparisons: infinite-area chamber and ideal nozzle (no friction, heat loss or "
    "divergence). Design points add the engine's contraction ratio and efficiency factors.",
    "Flow models: shifting = equilibrium at every station; frozen = chamber composition throughout; "
    "frozen-throat = equilibrium to the throat, frozen beyond.",
    "Delivered = c* efficiency x ideal c*, and the momentum part of Cf times the divergence, boundary-layer, "
    "kinetic and two-phase factors; the overall Cf efficiency scales the whole vacuum Cf.",
    "Flow separation: Summerfield criterion (Summerfield, Foster & Swan 1954), separation where p/pa < 0.4. "
    "A separated nozzle's ambient values are the cut-nozzle estimate (the nozzle cut at its separation "
    "station, ambient wall pressure downstream; Sutton & Biblarz ch. 3): conservative, not a model of "
    "separated flow. Rows say which (ambient model).",
    "Vehicle delta-v: the ideal rocket equation, no gravity, drag or steering losses. Fixed-tank trades use the "
    "ideal exhaust velocity and tanks filled full (propellant = bulk density x tank volume).",
    "Optimum mixture ratios are ideal: they ignore chamber-temperature, cooling and turbomachinery limits.",
)

CSS = """
body{font-family:system-ui,-apple-system,Segoe UI,Helvetica,Arial,sans-serif;margin:1.5em auto;max-width:72em;
padding:0 1em;color:#111;line-height:1.4}
h1{font-size:1.6em}h2{border-bottom:1px solid #999;margin-top:1.6em}h3{margin-bottom:.3em}h4{margin:.8em 0 .2em}
table{border-collapse:collapse;margin:.4em 0 .8em;font-size:.85em}th,td{border:1px solid #bbb;padding:.2em .45em;
text-align:right;vertical-align:top}th{background:#eee;font-weight:600}td.t,th.t{text-align:left}
table.data th{text-align:center}table.data th.t{text-align:left}table.data th .u{font-weight:normal;white-space:nowrap}
table.kv th{text-align:left;font-weight:normal;background:#f4f4f4}table.kv thead th{font-weight:600;background:#e4e4e4}
td.u{color:#333}.kvs{display:flex;flex-wrap:wrap;gap:0 1.2em;align-items:flex-start}
.pivots{display:flex;flex-wrap:wrap;gap:0 1.4em;align-items:flex-start}.pivots p.cap{margin:.2em 0 0}
td.best{font-weight:700;background:#fff1c4}td.opt{font-style:italic}td.na{color:#777}
p.cap{margin:.6em 0 .1em;font-weight:600}
.safety{border:3px solid #000;background:#fff4d6;padding:.6em 1em;margin:1em 0}
.warn{border-left:4px solid #b00;padding-left:.6em}
.summary{border:1px solid #888;background:#f3f7fb;padding:.2em 1em .6em;margin:1em 0}
.note{color:#333;font-size:.9em}figure{margin:1em 0}figure img{max-width:100%;height:auto;border:1px solid #ddd}
figcaption{font-size:.9em}
nav.toc ol{columns:2;column-gap:2em;margin:.3em 0}nav.toc li{break-inside:avoid}nav.toc ol ol{columns:1}
pre{background:#f6f6f6;padding:.6em;overflow-x:auto;font-size:.85em;white-space:pre-wrap;word-break:break-word}
@media print{
@page{margin:14mm 12mm}
body{max-width:none;margin:0;padding:0;font-size:9.5pt}
h2{break-after:avoid;page-break-after:avoid}h3,h4,p.cap{break-after:avoid;page-break-after:avoid}
table{font-size:8pt;max-width:100%;break-inside:auto}tr,figure,.kv,.safety,.summary li{break-inside:avoid}
thead{display:table-header-group}th,td{padding:.1em .3em;overflow-wrap:break-word}
figure{break-inside:avoid;page-break-inside:avoid}figure img{max-width:100%;max-height:21cm;border:0}
pre{overflow:visible;font-size:7.5pt}nav.toc a{color:#000;text-decoration:none}
}
"""


def _figures(figs, group) -> str:
    out = []
    for f in figs:
        if f.group != group:
            continue
        data = base64.b64encode(f.png).decode("ascii")
        width = int.from_bytes(f.png[16:20], "big") if f.png[:8] == b"\x89PNG\r\n\x1a\n" else 0   # IHDR width
        size = f" style='width:{round(width / 1.35)}px'" if width else ""
        out.append(f"<figure><img alt='{esc(f.title)}'{size} src='data:image/png;base64,{data}'>"
                   f"<figcaption><b>{esc(f.title)}.</b> {esc(f.caption)}</figcaption></figure>")
    return "".join(out)


def _efficiency_text(spec) -> str:
    from perfchain.study.labels import LOSS_LABELS

    if spec.efficiency is None:
        return "none (delivered = ideal)"
    return ", ".join(f"{LOSS_LABELS.get(k, k.replace('_', ' '))} {v}"
                     for k, v in spec.efficiency.model_dump(exclude_none=True).items())


# --------------------------------------------------------------------------- sections
@dataclass
class Section:
    """One part of the report: an anchor, a heading, its HTML, and subsections listed in the contents."""

    key: str
    title: str
    body: str
    subsections: list = field(default_factory=list)   #: (anchor, title) of its h3 headings


@dataclass
class ReportContext:
    """What every section builder may read besides the study result."""

    units: str
    figures: list
    meta: dict
    study_text: str
    files: list
    ids: dict = field(default_factory=dict)   #: name -> anchor, for the subsections


def section_ids(names, prefix: str) -> dict:
    """Anchors for named subsections, distinct and HTML-safe.

    >>> section_ids(["Moth-M", "moth m"], "engine")
    {'Moth-M': 'engine-moth-m', 'moth m': 'engine-moth-m-2'}
    """
    from perfchain.study.names import slug

    out, seen = {}, set()
    for n in names:
        base = f"{prefix}-{slug(n) or 'x'}"
        key, k = base, 1
        while key in seen:
            k += 1
            key = f"{base}-{k}"
        seen.add(key)
        out[n] = key
    return out


def _summary(res, ctx) -> Section | None:
    import pandas as pd

    from perfchain.study.labels import name
    from perfchain.study.report_tables import plain
    from perfchain.study.summary import comparison_summary, engine_sentence, margin_rows, vehicle_sentence

    parts = []
    for cname, rows in res.comparisons.items():
        s = comparison_summary(rows, ctx.units)
        parts.append(f"<h3>{esc(cname)}</h3><p class=sentence>{esc(s['sentence'])}</p>")
        margins = margin_rows(rows, s["key"])
        if len(margins) > 1:
            lines = "".join(
                f"<tr><th class=t>{esc(name(m['column']))}{' (ranking)' if m['column'] == s['key'] else ''}</th>"
                f"<td>{plain(m['lead_percent'], 3)} %</td><td class=t>{esc(m['other_pair'])}</td>"
                f"<td class=t>{esc(m['leader'])}</td></tr>" for m in margins)
            parts.append(f"<table class=data><thead><tr><th>Quantity</th><th>Lead of {esc(s['winner'])}</th>"
                         f"<th>Over the best other</th><th>Best on it</th></tr></thead><tbody>{lines}</tbody></table>")
    if res.design:
        parts.append("<h3>Engines at their design points</h3><ul>" + "".join(
            f"<li>{esc(engine_sentence(n, p, ctx.units))}</li>" for n, p in res.design.items()) + "</ul>")
    if res.vehicles:
        parts.append("<h3>Vehicles</h3><ul>" + "".join(f"<li>{esc(vehicle_sentence(v, ctx.units))}</li>"
                                                      for v in res.vehicles) + "</ul>")
    if res.fixed_tank_best:
        t = pd.DataFrame(res.fixed_tank_best)
        parts.append("<h3>Fixed tank volume</h3>" + table_html(
            t, ctx.units, ["vehicle", "pair", "delta_v_mixture_ratio", "delta_v_max", "isp_mixture_ratio",
                           "delta_v_at_isp_optimum", "delta_v_gain"]))
    if not parts:
        return None
    return Section("summary", "Summary", "<div class=summary>" + "".join(parts) + "</div>")


def _assumptions(res, ctx) -> Section:
    body = "<ul>" + "".join(f"<li>{esc(a)}</li>" for a in ASSUMPTIONS) + "</ul>"
    if res.engines:
        rows = "".join(f"<tr><td class=t>{esc(n)}</td><td class=t>{esc(', '.join(es.flow))}</td>"
                       f"<td class=t>{esc(_efficiency_text(es.spec))}</td>"
                       f"<td class=t>{esc(es.spec.contraction_ratio or 'infinite')}</td></tr>"
                       for n, es in res.engines.items())
        body += ("<table class=data><thead><tr><th>Engine</th><th>Flow models</th><th>Efficiencies used</th>"
                 f"<th>Contraction ratio</th></tr></thead><tbody>{rows}</tbody></table>")
    return Section("assumptions", "Assumptions", body)


def _engines(res, ctx) -> Section | None:
    import pandas as pd

    from perfchain.study.report_engines import design_html, grid_html

    if not res.engines:
        return None
    ids = section_ids(res.engines, "engine")
    parts, subs = [], []
    for name, es in res.engines.items():
        subs.append((ids[name], f"{name}: {es.label}"))
        parts.append(f"<h3 id='{ids[name]}'>{esc(name)}: {esc(es.label)}</h3><h4>Design point</h4>")
        parts.append(design_html(res.design[name], ctx.units))
        if name in getattr(res, "thermal", {}):   # the chamber's contour and wall heat flux
            from perfchain.study.thermal import thermal_html

            parts.append(thermal_html(res.thermal[name]))
        if res.optima[name]:   # none for a formulation (no O/F)
            parts.append("<h4>Optimum mixture ratios</h4>" + table_html(
                pd.DataFrame(res.optima[name]), ctx.units, drop=("engine", "objective_value"),
                keys=("chamber_pressure", "objective")))
        parts.append(_figures(ctx.figures, f"engine:{name}"))
        df = res.grids[name]
        parts.append(f"<h4>Grid: {len(df)} points</h4>" + grid_html(es, df, res.optima[name], ctx.units))
    if res.design:
        parts.append(_figures(ctx.figures, "delivered-vs-ideal"))
    return Section("engines", "Engines", "".join(parts), subs)


def _comparisons(res, ctx) -> Section | None:
    import pandas as pd

    from perfchain.study.labels import phrase

    if not res.comparisons:
        return None
    ids = section_ids(res.comparisons, "comparison")
    parts, subs = [], []
    for cname, rows in res.comparisons.items():
        subs.append((ids[cname], cname))
        objective = rows[0].get("objective")
        cap = f"Each pair at its own optimum O/F for {phrase(objective)}, ranked best first."
        parts.append(f"<h3 id='{ids[cname]}'>{esc(cname)}</h3>" + table_html(
            pd.DataFrame(rows), ctx.units, drop=comparison_hidden(rows), caption=cap))
        parts.append(_figures(ctx.figures, f"comparison:{cname}"))
    return Section("comparisons", "Comparisons", "".join(parts), subs)


def comparison_hidden(rows: list) -> tuple:
    """Columns of a comparison the report leaves out: its name and objective (in the heading and caption),
    and in vacuum the ambient values (equal to the vacuum ones).

    >>> comparison_hidden([{"ambient_pressure": 0.0}])[-1]
    'delivered_isp_ambient'
    """
    hidden = ("comparison", "objective")
    if all((r.get("ambient_pressure") or 0.0) <= 0 for r in rows):
        hidden += ("isp_ambient", "density_isp_ambient", "delivered_isp_ambient")
    return hidden


def _vehicles(res, ctx) -> Section | None:
    import pandas as pd

    if not (res.vehicles or res.fixed_tank_best):
        return None
    parts = []
    if res.vehicles:
        parts.append(table_html(pd.DataFrame(res.vehicles), ctx.units))
        parts.append("<h3>Stages</h3>" + table_html(pd.DataFrame(res.stages), ctx.units))
    if res.fixed_tank_best:
        parts.append("<h3>Fixed tank volume: best mixture ratio for delta-v and for Isp</h3>"
                     + table_html(pd.DataFrame(res.fixed_tank_best), ctx.units))
    parts.append(_figures(ctx.figures, "delta-v") + _figures(ctx.figures, "fixed-tank-delta-v"))
    if res.fixed_tank:
        n = sum(len(t) for t in res.fixed_tank)
        parts.append(f"<p class=note>The fixed-tank sweep ({n} points) is in the fixed-tank table file and in the "
                     "figure above.</p>")
    return Section("vehicles", "Vehicle budgets", "".join(parts))


def _inputs(res, ctx) -> Section:
    return Section("inputs", "Inputs", "<p class=note>The study file as given (data only; nothing in it is "
                   f"executed).</p><pre>{esc(ctx.study_text)}</pre>")


def _files(res, ctx) -> Section:
    return Section("files", "Files", "<ul>" + "".join(f"<li><code>{esc(f)}</code></li>" for f in ctx.files)
                   + "<li><code>study.toml</code> (this study with provenance), <code>provenance.json</code></li></ul>")


def _provenance(res, ctx) -> Section:
    meta = ctx.meta
    prov = [("perfchain", meta["perfchain"]), ("Cantera", meta["cantera"]), ("Python", meta["python"]),
            ("Thermodynamic data", f"{meta['thermo_data']['gas']}, {meta['thermo_data']['condensed']} "
                                   f"({meta['thermo_data']['source']})"),
            ("Ingredient data", f"{meta['ingredient_data']['file']} (sha256 {meta['ingredient_data']['sha256'][:16]}...)"),
            ("Study file", f"{meta['study_file']} (sha256 {meta['study_sha256'][:16]}...)"), ("Date (UTC)", meta["date"])]
    return Section("provenance", "Provenance", "<table class=kv>" + "".join(
        f"<tr><th>{esc(k)}</th><td class=t>{esc(v)}</td></tr>" for k, v in prov) + "</table>")


def _uncertainty(res, ctx) -> Section | None:
    """The uncertainty and sensitivity of the study's engines and vehicles (perfchain.study.uncertainty_report)."""
    if not getattr(res, "uncertainty", None):
        return None
    from perfchain.study.uncertainty_report import uncertainty_html

    body = uncertainty_html(res, ctx.units, ctx.figures, table_html, _figures)
    body = re.sub(r"^<h2>[^<]*</h2>", "", body)   # the heading comes from the section
    return Section("uncertainty", "Uncertainty and sensitivity", body)


#: the report's sections in order; each builder is ``(StudyResult, ReportContext) -> Section | None``
SECTIONS = [_summary, _assumptions, _engines, _comparisons, _vehicles, _uncertainty, _inputs, _files, _provenance]


def _contents(sections: list) -> str:
    items = []
    for s in sections:
        sub = "".join(f"<li><a href='#{k}'>{esc(t)}</a></li>" for k, t in s.subsections)
        items.append(f"<li><a href='#{s.key}'>{esc(s.title)}</a>" + (f"<ol>{sub}</ol>" if sub else "") + "</li>")
    return f"<nav class=toc><h2 id=contents>Contents</h2><ol>{''.join(items)}</ol></nav>"


def render_report(res, *, units: str, figures: list, meta: dict, study_text: str, files: list) -> str:
    """The whole report as one HTML string: head, safety, the sections of :data:`SECTIONS` and their contents."""
    ctx = ReportContext(units, figures, meta, study_text, files)
    sections = [s for s in (build(res, ctx) for build in SECTIONS) if s is not None]
    st = res.study
    parts = [f"<!DOCTYPE html><html lang=en><head><meta charset=utf-8><title>{esc(st.study.title)}</title>"
             f"<meta name=viewport content='width=device-width, initial-scale=1'><style>{CSS}</style></head><body>",
             f"<h1>{esc(st.study.title)}</h1>"]
    if st.study.description:
        parts.append(f"<p>{esc(st.study.description)}</p>")
    if st.study.author:
        parts.append(f"<p class=note>Author: {esc(st.study.author)}</p>")
    parts.append(f"<div class=safety><b>Safety.</b> {esc(SAFETY)}</div>")
    parts.append(f"<p class=note>Units: {'SI (pressures in bar)' if units == 'si' else 'US customary (psia, degR, ft/s, lbm, lbf, in, ft)'}; "
                 "Isp in s (g0 = 9.80665 m/s<sup>2</sup>)."
                 + (f" <b>Lists capped at {res.cap} values</b> (a reduced run)." if res.cap else "") + "</p>")
    if sections and sections[0].key == "summary":
        first = sections[0]
        parts.append(f"<h2 id='{first.key}'>{esc(first.title)}</h2>{first.body}")
    parts.append(_contents(sections))
    for s in sections:
        if s.key != "summary":
            parts.append(f"<h2 id='{s.key}'>{esc(s.title)}</h2>{s.body}")
    parts.append(f"<div class=safety><b>Safety.</b> {esc(SAFETY)}</div></body></html>\n")
    return "".join(parts)
