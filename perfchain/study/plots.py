"""Plots of a study's results (matplotlib, Agg backend): PNG and SVG files.

Every figure is readable in black and white: curves differ by line style and
marker as well as colour (the colour-blind-safe Okabe-Ito palette), bars by
hatching. Axis labels carry the output units (:mod:`perfchain.study.columns`).
Values come in SI from :class:`perfchain.study.runner.StudyResult` and are
converted only for drawing.
"""

from __future__ import annotations

import io
import warnings
from dataclasses import dataclass, field
from pathlib import Path

from perfchain.study.columns import column_kind, to_unit, unit_label

__all__ = ["Figure", "make_plots", "STYLES"]

G0 = 9.80665  #: [m/s^2] standard gravity (3rd CGPM, 1901)
COLORS = ("#000000", "#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9")
LINES = ("-", "--", ":", "-.", (0, (5, 1, 1, 1)), (0, (1, 3)))
MARKERS = ("o", "s", "^", "D", "v", "P", "X")
HATCHES = ("", "//", "..", "xx", "\\\\", "--", "++")
STYLES = [dict(color=COLORS[i % len(COLORS)], linestyle=LINES[i % len(LINES)],
               marker=MARKERS[i % len(MARKERS)], markersize=5) for i in range(12)]


@dataclass
class Figure:
    """One saved figure: ``key`` (file stem), title, caption, files, PNG bytes for the report."""

    key: str
    title: str
    caption: str
    paths: list = field(default_factory=list)
    png: bytes = b""
    group: str = ""    #: what the figure belongs to, e.g. ``engine:<name>``; the report places it by this


def _pyplot():
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    # text.parse_math off: every label is drawn as text, so a name with $...$ is never read as maths
    plt.rcParams.update({"text.parse_math": False, "font.size": 9, "axes.grid": True, "grid.alpha": 0.35, "legend.fontsize": 8,
                         "svg.hashsalt": "perfchain", "figure.dpi": 100})
    return plt


def _save(plt, fig, folder: Path, key: str, title: str, caption: str, formats) -> Figure:
    folder.mkdir(parents=True, exist_ok=True)
    out = Figure(key, title, caption)
    with warnings.catch_warnings():   # a long or non-Latin name: no tight fit, or boxes for glyphs; still drawn
        warnings.simplefilter("ignore", UserWarning)
        fig.tight_layout()
        for fmt in formats:
            path = folder / f"{key}.{fmt}"
            fig.savefig(path, format=fmt, dpi=120, metadata={"Date": None} if fmt == "svg" else None)
            out.paths.append(path)
    if "png" in formats:
        out.png = (folder / f"{key}.png").read_bytes()
    else:
        buf = io.BytesIO()
        fig.savefig(buf, format="png", dpi=120)
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


def _unit(column, units):
    """The output unit label of ``column``."""
    return unit_label(column_kind(column), units)


def _p(value, units):
    return f"{_in(value, 'chamber_pressure', units):.4g} {_unit('chamber_pressure', units)}"


def _design_slice(df, es, ambient_index=0):
    ok = df[(df["status"] == "ok") & (df["flow"] == es.flow[0])]
    ok = ok[ok[es.exit_key] == es.exits[0]]
    return ok[ok["ambient_pressure"] == es.ambient_pressure[ambient_index]]


def _isp_vs_mixture_ratio(plt, name, es, df, optima, units):
    sub = _design_slice(df, es)
    panels = [("isp_vacuum", "Vacuum Isp")]
    if es.ambient_pressure[0] > 0:
        panels.append(("isp_ambient", f"Ambient Isp at {_p(es.ambient_pressure[0], units)}"))
    fig, axes = plt.subplots(1, len(panels), figsize=(5.2 * len(panels), 3.8), squeeze=False)
    for ax, (col, label) in zip(axes[0], panels):
        for i, pc in enumerate(es.chamber_pressure):
            line = sub[sub["chamber_pressure"] == pc].sort_values("mixture_ratio")
            ax.plot(line["mixture_ratio"], line[col], label=f"pc {_p(pc, units)}", **STYLES[i])
            if col == "isp_ambient":
                _mark_separated(ax, line, "mixture_ratio", col, first=i == 0)
            for o in optima:
                if o.get("note"):
                    continue
                if o["chamber_pressure"] == pc and o["objective"] == col:
                    ax.plot([o["mixture_ratio"]], [o[col]], marker="*", markersize=13, color=STYLES[i]["color"],
                            markeredgecolor="black", linestyle="none")
                    ax.annotate(f"O/F {o['mixture_ratio']:.2f}", (o["mixture_ratio"], o[col]),
                                textcoords="offset points", xytext=(4, 6), fontsize=7)
        ax.set_xlabel("Mixture ratio O/F [-]")
        ax.set_ylabel(f"{label} [s]")
        ax.set_title(f"{name}: {es.oxidizer.name}/{es.fuel.name}, {es.flow[0]}", fontsize=9)
        ax.legend(title="star: optimum", title_fontsize=7)
    return fig


def _mark_separated(ax, line, x, col, first=True):
    """Grey crosses over the points whose nozzle separates (their value is the cut-nozzle estimate)."""
    if "flows_full" not in line:
        return
    cut = line[line["flows_full"] == False]  # noqa: E712 (a column)
    if len(cut):
        ax.plot(cut[x], cut[col], linestyle="none", marker="X", markersize=9, color="0.55",
                label="separated: cut-nozzle estimate" if first else None)


def _tc_cstar(plt, name, es, df, units):
    sub = _design_slice(df, es)
    fig, axes = plt.subplots(1, 2, figsize=(10.4, 3.8))
    for ax, col, label in ((axes[0], "chamber_temperature", "Chamber temperature Tc"),
                           (axes[1], "cstar", "Characteristic velocity c*")):
        for i, pc in enumerate(es.chamber_pressure):
            line = sub[sub["chamber_pressure"] == pc].sort_values("mixture_ratio")
            ax.plot(line["mixture_ratio"], _in(line[col], col, units), label=f"pc {_p(pc, units)}", **STYLES[i])
        ax.set_xlabel("Mixture ratio O/F [-]")
        ax.set_ylabel(f"{label} [{_unit(col, units)}]")
        ax.set_title(f"{name}: {es.oxidizer.name}/{es.fuel.name}", fontsize=9)
        ax.legend()
    return fig


def _isp_vs_area_ratio(plt, name, es, df, design, units):
    ok = df[(df["status"] == "ok") & (df["flow"] == es.flow[0]) & (df["ambient_pressure"] == es.ambient_pressure[0])]
    if es.propellant is None:
        mr = min(es.mixture_ratio, key=lambda r: abs(r - design.mixture_ratio))
        ok, what = ok[ok["mixture_ratio"] == mr], f"O/F {mr:.3g}"
    else:
        what = es.label   # a formulation: no O/F
    fig, ax = plt.subplots(figsize=(5.6, 3.8))
    k = 0
    for i, pc in enumerate(es.chamber_pressure):
        line = ok[ok["chamber_pressure"] == pc].sort_values("area_ratio")
        ax.plot(line["area_ratio"], line["isp_vacuum"], label=f"vacuum, pc {_p(pc, units)}", **STYLES[k])
        k += 1
        if es.ambient_pressure[0] > 0:
            ax.plot(line["area_ratio"], line["isp_ambient"],
                    label=f"at {_p(es.ambient_pressure[0], units)}, pc {_p(pc, units)}", **STYLES[k])
            _mark_separated(ax, line, "area_ratio", "isp_ambient", first=i == 0)
            k += 1
    ax.set_xscale("log")
    # ticks at the grid's own area ratios, as plain numbers (the default log labels are maths text,
    # which this module never parses)
    from matplotlib.ticker import NullFormatter

    ax.set_xticks(sorted(es.exits), [f"{v:g}" for v in sorted(es.exits)])
    ax.xaxis.set_minor_formatter(NullFormatter())
    ax.set_xlabel("Area ratio Ae/At [-]")
    ax.set_ylabel("Isp [s]")
    ax.set_title(f"{name}: {what}, {es.flow[0]}", fontsize=9)
    ax.legend()
    return fig


def _isp_vs_altitude(plt, name, es, perf, units):
    import numpy as np

    from perfchain.atmosphere import pressure

    top = max([20000.0] + list(es.altitude or []))
    z = np.linspace(0.0, top, 200)
    pa = pressure(z)
    pc, eps = perf.chamber_pressure, perf.area_ratio
    ideal = perf.isp_vacuum - pa * eps * perf.cstar / pc / G0
    d = perf.delivered
    fig, ax = plt.subplots(figsize=(5.6, 3.8))
    zz = _in(z, "altitude", units)
    sep = perf.separation or {}
    full = sep.get("full_flow_altitude")
    flows = z >= (full or 0.0)   # the full-flowing formula holds only where the nozzle flows full
    ax.plot(zz, np.where(flows, ideal, np.nan), label="ideal", **dict(STYLES[0], marker=None))
    if d:
        ax.plot(zz, np.where(flows, d["isp_vacuum"] - pa * eps * d["cstar"] / pc / G0, np.nan), label="delivered",
                **dict(STYLES[1], marker=None))
    if full:
        ax.plot(zz, np.where(flows, np.nan, ideal), color="0.6", linestyle=":",
                label="full-flowing formula, not valid (separated)")
        ax.axvspan(0, _in(min(full, top), "altitude", units), color="0.85", hatch="//", alpha=0.6,
                   label=f"separation likely (pe/pa < {sep['threshold']:g})")
    ax.set_xlabel(f"Altitude, U.S. Standard Atmosphere 1976 [{_unit('altitude', units)}]")
    ax.set_ylabel("Ambient Isp [s]")
    what = perf.propellant if perf.mixture_ratio is None else f"O/F {perf.mixture_ratio:.3g}"
    ax.set_title(f"{name}: design point {what}, pc {_p(pc, units)}, eps {eps:.3g}", fontsize=9)
    ax.legend()
    return fig


def _bars(ax, groups: list[str], series: list[tuple[str, list]], ylabel: str):
    import numpy as np

    x = np.arange(len(groups))
    width = 0.8 / max(1, len(series))
    for i, (label, values) in enumerate(series):
        vals = [np.nan if v is None else v for v in values]
        bars = ax.bar(x + (i - (len(series) - 1) / 2) * width, vals, width, label=label,
                      color=COLORS[i % len(COLORS)] if i else "white", edgecolor="black",
                      hatch=HATCHES[i % len(HATCHES)])
        ax.bar_label(bars, fmt="%.4g", fontsize=7, padding=2)
    ax.set_xticks(x, groups, rotation=12, ha="right", fontsize=8)
    ax.set_ylabel(ylabel)
    ax.margins(y=0.15)
    ax.legend()


def _delivered_vs_ideal(plt, res):
    names = list(res.design)
    perfs = [res.design[n] for n in names]
    fig, ax = plt.subplots(figsize=(max(5.6, 1.8 * len(names) + 2), 3.8))
    series = [("ideal, vacuum", [p.isp_vacuum for p in perfs]),
              ("delivered, vacuum", [p.delivered["isp_vacuum"] for p in perfs])]
    if any(p.ambient_pressure > 0 for p in perfs):
        series += [("ideal, ambient", [p.isp_ambient for p in perfs]),
                   ("delivered, ambient", [p.delivered["isp_ambient"] for p in perfs])]
    _bars(ax, [f"{n}\n{p.propellant}" for n, p in zip(names, perfs)], series, "Isp at design point [s]")
    ax.set_title("Delivered against ideal Isp (design points)", fontsize=9)
    return fig


def _comparison(plt, name, rows, units):
    fig, axes = plt.subplots(1, 2, figsize=(10.4, 3.8))
    pairs = [r["pair"] for r in rows]
    series = [("ideal vacuum", [r["isp_vacuum"] for r in rows])]
    if "delivered_isp_vacuum" in rows[0]:
        series.append(("delivered vacuum", [r["delivered_isp_vacuum"] for r in rows]))
    _bars(axes[0], pairs, series, "Isp at each pair's optimum [s]")
    _bars(axes[1], pairs, [("density x vacuum Isp", [_in(r["density_isp"], "density_isp", units)
                                                     for r in rows])],
          f"Density-Isp [{_unit('density_isp', units)}]")
    axes[0].set_title(f"{name}: {rows[0]['objective']} optimum", fontsize=9)
    axes[1].set_title("bulk density x Isp", fontsize=9)
    return fig


def _delta_v_bars(plt, res, units):
    import numpy as np

    panels = int(bool(res.vehicles)) + int(bool(res.fixed_tank_best))
    fig, axes = plt.subplots(1, panels, figsize=(5.6 * panels, 4.0), squeeze=False)
    lab = f"Delta-v [{_unit('delta_v', units)}]"
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
            ax.annotate(f"{total:.4g}", (x, total), ha="center", va="bottom", fontsize=7)
        labels = []
        for n in names:
            pairs = [r["pair"] for r in res.stages if r["vehicle"] == n and r["pair"]]
            labels.append(n + ("\n" + ", ".join(dict.fromkeys(pairs)) if pairs else ""))
        ax.set_xticks(range(len(names)), labels, rotation=12, ha="right", fontsize=8)
        ax.set_ylabel(lab)
        ax.set_title("Vehicle delta-v by stage (rocket equation)", fontsize=9)
        ax.margins(y=0.12)
        ax.legend()
    if res.fixed_tank_best:
        ax = axes[0][k]
        rows = res.fixed_tank_best
        _bars(ax, [f"{r['pair']}\n({r['vehicle']})" for r in rows],
              [("at the delta-v optimum O/F", [_in(r["delta_v_max"], "delta_v_max", units) for r in rows]),
               ("at the Isp optimum O/F", [_in(r["delta_v_at_isp_optimum"], "delta_v_at_isp_optimum", units) for r in rows])], lab)
        ax.set_title("Fixed tank volume: delta-v per propellant pair", fontsize=9)
    return fig


def _fixed_tank(plt, df, best, units):
    fig, ax = plt.subplots(figsize=(5.8, 3.9))
    for i, ((vehicle, engine), part) in enumerate(df.groupby(["vehicle", "engine"], sort=False)):
        part = part[part["status"] == "ok"].sort_values("mixture_ratio")
        pair = f"{part['oxidizer'].iloc[0]}/{part['fuel'].iloc[0]}" if len(part) else engine
        ax.plot(part["mixture_ratio"], _in(part["delta_v"], "delta_v", units), label=f"{pair} ({engine})",
                **STYLES[i])
        for b in best:
            if b["vehicle"] == vehicle and b["engine"] == engine:
                ax.plot([b["delta_v_mixture_ratio"]], [_in(b["delta_v_max"], "delta_v_max", units)], marker="*",
                        markersize=13, color=STYLES[i]["color"], markeredgecolor="black", linestyle="none")
                ax.plot([b["isp_mixture_ratio"]], [_in(b["delta_v_at_isp_optimum"], "delta_v_at_isp_optimum", units)],
                        marker="|", markersize=14, color=STYLES[i]["color"], linestyle="none")
    ax.set_xlabel("Mixture ratio O/F [-]")
    ax.set_ylabel(f"Ideal stage delta-v [{_unit('delta_v', units)}]")
    ax.set_title("Fixed tank volume: star = best delta-v, bar = best Isp", fontsize=9)
    ax.legend()
    return fig


def make_plots(res, folder, units: str, formats=("png", "svg")) -> list[Figure]:
    """Draw every figure a study's results support; returns them in report order."""
    from perfchain.study.names import file_stems

    plt = _pyplot()
    folder = Path(folder)
    figs = []
    stems = {"engine": file_stems(res.engines), "comparison": file_stems(res.comparisons)}

    def add(fig, key, title, caption, group=""):
        figs.append(_save(plt, fig, folder, key, title, caption, formats))
        figs[-1].group = group or key

    for name, es in res.engines.items():
        df, s = res.grids[name], stems["engine"][name]
        if not (df["status"] == "ok").any():
            continue
        if es.propellant is None:   # a formulation has no O/F axis to plot against
            add(_isp_vs_mixture_ratio(plt, name, es, df, res.optima[name], units), f"{s}-isp",
                f"{name}: Isp against mixture ratio",
                "Ideal Isp, one curve per chamber pressure, at the first area ratio/exit pressure; the star marks "
                "the optimum O/F found by a bounded search (not a grid point).", f"engine:{name}")
            add(_tc_cstar(plt, name, es, df, units), f"{s}-tc-cstar", f"{name}: chamber temperature and c*",
                "Adiabatic chamber temperature and ideal characteristic velocity against mixture ratio.",
                f"engine:{name}")
        if len(es.exits) > 1:
            add(_isp_vs_area_ratio(plt, name, es, df, res.design[name], units), f"{s}-isp-area-ratio",
                f"{name}: Isp against area ratio", "Ideal Isp at the grid mixture ratio nearest the design point."
                if es.propellant is None else f"Ideal Isp of {es.label}.", f"engine:{name}")
        if es.altitude is not None or max(es.ambient_pressure) > 0:
            add(_isp_vs_altitude(plt, name, es, res.design[name], units), f"{s}-isp-altitude",
                f"{name}: Isp against altitude",
                "Design point; ambient Isp from the thrust equation with the 1976 standard atmosphere. The hatched "
                "band is where the Summerfield criterion predicts flow separation; there the full-flowing curve is "
                "greyed out (not valid). In the Isp plots, grey crosses mark separated points, whose ambient Isp is the "
                "cut-nozzle estimate.",
                f"engine:{name}")
    if res.design:
        add(_delivered_vs_ideal(plt, res), "delivered-vs-ideal", "Delivered against ideal Isp",
            "Each engine's design point; delivered applies the efficiency factors stated in the study.")
    for name, rows in res.comparisons.items():
        add(_comparison(plt, name, rows, units), f"comparison-{stems['comparison'][name]}",
            f"Comparison {name}", "Each pair at its own optimum O/F, same chamber pressure and nozzle.",
            f"comparison:{name}")
    if res.vehicles or res.fixed_tank_best:
        add(_delta_v_bars(plt, res, units), "delta-v", "Delta-v comparison",
            "Ideal rocket-equation delta-v (no gravity, drag or steering losses).")
    if res.fixed_tank:
        import pandas as pd

        add(_fixed_tank(plt, pd.concat(res.fixed_tank, ignore_index=True), res.fixed_tank_best, units),
            "fixed-tank-delta-v", "Delta-v against mixture ratio, fixed tank volume",
            "Tanks of fixed volume filled full: a denser mixture carries more propellant, so the best O/F for "
            "delta-v differs from the best O/F for Isp.")
    if getattr(res, "uncertainty", None):
        from perfchain.study.uncertainty_report import uncertainty_figures

        for fig, key, title, caption, group in uncertainty_figures(plt, res, units):
            add(fig, key, title, caption, group)
    return figs
