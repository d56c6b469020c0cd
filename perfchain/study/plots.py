"""Plots of a study's results (matplotlib, Agg backend): PNG and SVG files.

Every figure is readable in black and white: curves differ by line style and
marker as well as colour (the colour-blind-safe Okabe-Ito palette), bars by
hatching. Axis labels are the labels of :mod:`perfchain.study.labels` with the output
units; each title states the operating context (propellant, chamber pressure, area ratio,
ambient or altitude, flow model), so a PNG read alone says what it shows; labels never
overlap and legends sit outside the data (:mod:`perfchain.study.plot_text`).
Values come in SI from :class:`perfchain.study.runner.StudyResult` and are
converted only for drawing.
"""

from __future__ import annotations

import io
import warnings
from dataclasses import dataclass, field
from pathlib import Path

from perfchain.study.columns import column_kind, to_unit, unit_label
from perfchain.study.labels import label, phrase, value_label
from perfchain.study.plot_text import (COLORS, HATCHES, STYLES, fit_categories, legend_below, overlaps, plain_axes,
                                      pyplot, settle_legends)
from perfchain.study.report_tables import plain

__all__ = ["Figure", "make_plots", "STYLES"]


@dataclass
class Figure:
    """One saved figure: ``key`` (file stem), title, caption, files, PNG bytes for the report."""

    key: str
    title: str
    caption: str
    paths: list = field(default_factory=list)
    png: bytes = b""
    group: str = ""    #: what the figure belongs to, e.g. ``engine:<name>``; the report places it by this


def _save(plt, fig, folder: Path, key: str, title: str, caption: str, formats, inspect=None) -> Figure:
    folder.mkdir(parents=True, exist_ok=True)
    out = Figure(key, title, caption)
    with warnings.catch_warnings():   # a long or non-Latin name: no tight fit, or boxes for glyphs; still drawn
        warnings.simplefilter("ignore", UserWarning)
        for _ in range(2):   # the layout moves the labels a legend sits under, and the legend the layout
            fig.tight_layout()
            settle_legends(fig)
        if inspect is not None:
            inspect(key, fig)
        for fmt in formats:
            path = folder / f"{key}.{fmt}"
            fig.savefig(path, format=fmt, dpi=120, bbox_inches="tight",
                        metadata={"Date": None} if fmt == "svg" else None)
            out.paths.append(path)
        if "png" in formats:
            out.png = (folder / f"{key}.png").read_bytes()
        else:
            buf = io.BytesIO()
            fig.savefig(buf, format="png", dpi=120, bbox_inches="tight")
            out.png = buf.getvalue()
    plt.close(fig)
    return out


def save_figure(plt, fig, folder, key: str, title: str, caption: str, formats=("png",)) -> Figure:
    """Save a matplotlib figure as ``folder/key.<format>`` and close it (the style of every study plot).

    Parameters
    ----------
    plt : module
        matplotlib.pyplot.
    fig : matplotlib.figure.Figure
    folder : str or Path
        Created if missing.
    key, title, caption : str
        File stem, and what the report shows with the figure.
    formats : tuple of str
        Image formats.

    Returns
    -------
    Figure
        With the files written and the PNG bytes for the report.
    """
    return _save(plt, fig, Path(folder), key, title, caption, formats)


def _in(value, column, units):
    """An SI value of ``column`` in the output units (its kind from :mod:`perfchain.study.columns`)."""
    return to_unit(value, column_kind(column), units)


def _q(value, column, units) -> str:
    u = unit_label(column_kind(column), units)
    return plain(_in(value, column, units), 4) + (f" {u}" if u else "")


def _bars(ax, groups: list[str], series: list[tuple[str, list]], ylabel: str):
    """Grouped bars with plain value labels (turned upright where they would run into each other)."""
    import numpy as np

    x = np.arange(len(groups))
    width = 0.8 / max(1, len(series))
    labels = []
    for i, (name, values) in enumerate(series):
        vals = [np.nan if v is None else v for v in values]
        bars = ax.bar(x + (i - (len(series) - 1) / 2) * width, vals, width, label=name,
                      color=COLORS[i % len(COLORS)] if i else "white", edgecolor="black",
                      hatch=HATCHES[i % len(HATCHES)])
        labels += ax.bar_label(bars, labels=[plain(v, 4) if v == v else "" for v in vals], fontsize=7, padding=2)
    fit_categories(ax, groups)
    ax.set_ylabel(ylabel)
    ax.margins(y=0.2)
    plain_axes(ax)
    if overlaps(ax.figure):
        for t in labels:
            t.set_rotation(90)
    legend_below(ax)


def _delivered_vs_ideal(plt, res, units):
    names = list(res.design)
    perfs = [res.design[n] for n in names]
    fig, ax = plt.subplots(figsize=(max(5.8, 2.0 * len(names) + 2), 4.4))
    series = [("ideal, vacuum", [p.isp_vacuum for p in perfs]),
              ("delivered, vacuum", [p.delivered["isp_vacuum"] for p in perfs])]
    if any(p.ambient_pressure > 0 for p in perfs):
        series += [("ideal, ambient", [p.isp_ambient for p in perfs]),
                   ("delivered, ambient", [p.delivered["isp_ambient"] for p in perfs])]

    def group(n, p):
        what = p.propellant + (f", O/F {plain(p.mixture_ratio, 3)}" if p.mixture_ratio is not None else "")
        amb = "vacuum" if p.ambient_pressure <= 0 else f"pa {_q(p.ambient_pressure, 'ambient_pressure', units)}"
        return f"{n}\n{what}\npc {_q(p.chamber_pressure, 'chamber_pressure', units)}, eps {plain(p.area_ratio, 3)}\n{amb}"

    _bars(ax, [group(n, p) for n, p in zip(names, perfs)], series, "Isp at the design point (s)")
    flows = ", ".join(dict.fromkeys(value_label(p.flow) for p in perfs))
    fig.suptitle(f"Delivered against ideal Isp at each engine's design point\n{flows}", fontsize=9)
    return fig


def _comparison(plt, name, rows, units):
    fig, axes = plt.subplots(1, 2, figsize=(10.4, 4.4))
    pairs = [r["pair"] + (f"\nO/F {plain(r['mixture_ratio'], 3)}" if r.get("mixture_ratio") is not None else "")
             for r in rows]
    series = [("ideal vacuum", [r.get("isp_vacuum") for r in rows])]
    if "delivered_isp_vacuum" in rows[0]:
        series.append(("delivered vacuum", [r.get("delivered_isp_vacuum") for r in rows]))
    _bars(axes[0], pairs, series, "Isp at each pair's optimum (s)")
    _bars(axes[1], pairs, [("bulk density x ideal vacuum Isp", [None if r.get("density_isp") is None else
                                                                _in(r["density_isp"], "density_isp", units)
                                                                for r in rows])], label("density_isp", units))
    r0 = next(r for r in rows if r.get("chamber_pressure") is not None)
    pa = r0["ambient_pressure"]
    ctx = (f"chamber pressure {_q(r0['chamber_pressure'], 'chamber_pressure', units)}, area ratio "
           f"{plain(r0['area_ratio'], 4)}, " + ("vacuum" if pa <= 0 else f"ambient {_q(pa, 'ambient_pressure', units)}"))
    fig.suptitle(f"{name}: each pair at its optimum O/F for {phrase(rows[0]['objective'])}\n{ctx}",
                 fontsize=9)
    return fig


def _delta_v_bars(plt, res, units):
    import numpy as np

    panels = int(bool(res.vehicles)) + int(bool(res.fixed_tank_best))
    fig, axes = plt.subplots(1, panels, figsize=(5.8 * panels, 4.6), squeeze=False)
    lab = label("delta_v", units)
    k = 0
    if res.vehicles:
        ax = axes[0][k]
        k += 1
        names = [v["vehicle"] for v in res.vehicles]
        bottom = np.zeros(len(names))
        depth = max(r["stage"] for r in res.stages)
        for s in range(1, depth + 1):
            vals = np.array([next((_in(r["delta_v"], "delta_v", units) for r in res.stages
                                   if r["vehicle"] == n and r["stage"] == s), 0.0) for n in names])
            ax.bar(names, vals, bottom=bottom, label=f"stage {s}", color=COLORS[s % len(COLORS)] if s > 1 else "white",
                   edgecolor="black", hatch=HATCHES[(s - 1) % len(HATCHES)])
            bottom += vals
        for x, total in enumerate(bottom):
            ax.annotate(plain(total, 4), (x, total), ha="center", va="bottom", fontsize=7)
        targets = [(x, _in(v["target_delta_v"], "delta_v", units)) for x, v in enumerate(res.vehicles)
                   if v.get("target_delta_v") is not None]
        if targets:
            ax.plot([x for x, _ in targets], [t for _, t in targets], linestyle="none", marker="_", markersize=30,
                    color="#D55E00", markeredgewidth=2, label="target")
        labels = []
        for n in names:
            pairs = [r["pair"] for r in res.stages if r["vehicle"] == n and r["pair"]]
            labels.append(n + ("\n" + ", ".join(dict.fromkeys(pairs)) if pairs else ""))
        fit_categories(ax, labels)
        ax.set_ylabel(lab)
        ax.set_title("Vehicle delta-v by stage (ideal rocket equation)", fontsize=9)
        ax.margins(y=0.12)
        plain_axes(ax)
        legend_below(ax, ncol=3)
    if res.fixed_tank_best:
        ax = axes[0][k]
        rows = res.fixed_tank_best
        _bars(ax, [f"{r['pair']}\n({r['vehicle']})" for r in rows],
              [("at the delta-v optimum O/F", [_in(r["delta_v_max"], "delta_v_max", units) for r in rows]),
               ("at the Isp optimum O/F", [_in(r["delta_v_at_isp_optimum"], "delta_v_at_isp_optimum", units)
                                           for r in rows])], lab)
        ax.set_title("Fixed tank volume: delta-v per propellant pair", fontsize=9)
    return fig


def _fixed_tank(plt, df, best, res, units):
    fig, ax = plt.subplots(figsize=(6.0, 4.6))
    for i, ((vehicle, engine), part) in enumerate(df.groupby(["vehicle", "engine"], sort=False)):
        part = part[part["status"] == "ok"].sort_values("mixture_ratio")
        pair = f"{part['oxidizer'].iloc[0]}/{part['fuel'].iloc[0]}" if len(part) else engine
        es = res.engines.get(engine)
        where = "" if es is None else (f", pc {_q(es.chamber_pressure[0], 'chamber_pressure', units)}, "
                                       + (f"eps {plain(es.exits[0], 4)}" if es.exit_key == "area_ratio" else
                                          f"pe {_q(es.exits[0], 'exit_pressure', units)}"))
        ax.plot(part["mixture_ratio"], _in(part["delta_v"], "delta_v", units), label=f"{pair} ({engine}{where})",
                **STYLES[i])
        for b in best:
            if b["vehicle"] == vehicle and b["engine"] == engine:
                ax.plot([b["delta_v_mixture_ratio"]], [_in(b["delta_v_max"], "delta_v_max", units)], marker="*",
                        markersize=13, color=STYLES[i]["color"], markeredgecolor="black", linestyle="none")
                ax.plot([b["isp_mixture_ratio"]], [_in(b["delta_v_at_isp_optimum"], "delta_v_at_isp_optimum", units)],
                        marker="|", markersize=14, color=STYLES[i]["color"], linestyle="none")
    ax.set_xlabel(label("mixture_ratio", units))
    ax.set_ylabel(f"Ideal stage delta-v ({unit_label('speed', units)})")
    vehicles = ", ".join(dict.fromkeys(df["vehicle"]))
    ax.set_title(f"Fixed tank volume ({vehicles}): star = best delta-v, bar = best Isp", fontsize=9)
    plain_axes(ax)
    legend_below(ax, ncol=1)
    return fig


def make_plots(res, folder, units: str, formats=("png", "svg"), inspect=None) -> list[Figure]:
    """Draw every figure a study's results support; returns them in report order.

    ``inspect(key, figure)``, if given, sees each matplotlib figure before it is saved (the tests
    check its text boxes with :func:`perfchain.study.plot_text.overlaps`).
    """
    from perfchain.study import plots_engines as pe
    from perfchain.study.names import file_stems

    plt = pyplot()
    folder = Path(folder)
    figs = []
    stems = {"engine": file_stems(res.engines), "comparison": file_stems(res.comparisons)}

    def add(fig, key, title, caption, group=""):
        figs.append(_save(plt, fig, folder, key, title, caption, formats, inspect))
        figs[-1].group = group or key

    for name, es in res.engines.items():
        df, s, design = res.grids[name], stems["engine"][name], res.design[name]
        if not (df["status"] == "ok").any():
            continue
        where = pe.context(es, units)
        if es.propellant is None:   # a formulation has no O/F axis to plot against
            add(pe.isp_vs_mixture_ratio(plt, name, es, df, res.optima[name], units), f"{s}-isp",
                f"{name}: Isp against mixture ratio",
                f"{where}. Ideal Isp, one curve per chamber pressure; the star marks the optimum O/F found by a "
                "bounded search (not a grid point).", f"engine:{name}")
            from perfchain.study.report_engines import cstar_note

            note = cstar_note(design, units)
            add(pe.tc_cstar(plt, name, es, df, design, units), f"{s}-tc-cstar", f"{name}: chamber temperature and c*",
                f"{es.label}, {value_label(es.flow[0])}. Adiabatic chamber temperature and ideal characteristic "
                "velocity against mixture ratio, infinite-area chamber." + (f" {note}" if note else ""),
                f"engine:{name}")
            if len(es.flow) > 1:
                add(pe.flow_models(plt, name, es, df, units), f"{s}-flow-models", f"{name}: shifting against frozen",
                    f"{pe.context(es, units, flow=False)}. Ideal Isp of each flow model computed, at the first "
                    "chamber pressure: shifting equilibrium is the upper bound, frozen the lower.", f"engine:{name}")
        if len(es.exits) > 1:
            add(pe.isp_vs_area_ratio(plt, name, es, df, design, units), f"{s}-isp-area-ratio",
                f"{name}: Isp against area ratio", "Ideal Isp at the grid mixture ratio nearest the design point."
                if es.propellant is None else f"Ideal Isp of {es.label}.", f"engine:{name}")
        if es.altitude is not None or max(es.ambient_pressure) > 0:
            add(pe.isp_vs_altitude(plt, name, es, design, units), f"{s}-isp-altitude",
                f"{name}: Isp against altitude",
                "Design point; ambient Isp from the thrust equation with the 1976 standard atmosphere. The hatched "
                "band is where the Summerfield criterion predicts flow separation; there the full-flowing curve is "
                "greyed out (not valid). In the Isp plots, grey crosses mark separated points, whose ambient Isp is the "
                "cut-nozzle estimate.",
                f"engine:{name}")
    if res.design:
        add(_delivered_vs_ideal(plt, res, units), "delivered-vs-ideal", "Delivered against ideal Isp",
            "Each engine's design point (propellant, O/F, chamber pressure, area ratio and ambient under its name); "
            "delivered applies the efficiency factors stated in the study.")
    for name, rows in res.comparisons.items():
        add(_comparison(plt, name, rows, units), f"comparison-{stems['comparison'][name]}",
            f"Comparison {name}", "Each pair at its own optimum O/F, same chamber pressure, nozzle and ambient "
            "(in the title).", f"comparison:{name}")
    if res.vehicles or res.fixed_tank_best:
        add(_delta_v_bars(plt, res, units), "delta-v", "Delta-v comparison",
            "Ideal rocket-equation delta-v (no gravity, drag or steering losses); the bar marks each vehicle's target.")
    if res.fixed_tank:
        import pandas as pd

        add(_fixed_tank(plt, pd.concat(res.fixed_tank, ignore_index=True), res.fixed_tank_best, res, units),
            "fixed-tank-delta-v", "Delta-v against mixture ratio, fixed tank volume",
            "Tanks of fixed volume filled full: a denser mixture carries more propellant, so the best O/F for "
            "delta-v differs from the best O/F for Isp.")
    if getattr(res, "uncertainty", None):
        from perfchain.study.uncertainty_report import uncertainty_figures

        for fig, key, title, caption, group in uncertainty_figures(plt, res, units):
            add(fig, key, title, caption, group)
    return figs
