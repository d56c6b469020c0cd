"""The engine plots of a study: Isp against O/F, area ratio and altitude, chamber temperature and c*, flow models.

Each figure's title states its operating context (propellant, area ratio or exit pressure,
ambient pressure or altitude, flow model, and chamber pressure where it is fixed), so a PNG
pasted alone still says what it shows. Values come in SI and are converted for drawing only;
optimum labels are placed by :func:`perfchain.study.plot_text.place_labels` (never over one
another), legends sit below the plotting area, numbers are plain.
"""

from __future__ import annotations

from perfchain.study.columns import column_kind, to_unit, unit_label
from perfchain.study.labels import label, value_label
from perfchain.study.plot_text import STYLES, legend_below, place_labels, plain_axes, thin_ticks
from perfchain.study.report_tables import plain

__all__ = ["context", "isp_vs_mixture_ratio", "tc_cstar", "isp_vs_area_ratio", "isp_vs_altitude", "flow_models",
           "G0"]

G0 = 9.80665  #: [m/s^2] standard gravity (3rd CGPM, 1901)


def _in(value, column, units):
    return to_unit(value, column_kind(column), units)


def _q(value, column, units, digits=4) -> str:
    u = unit_label(column_kind(column), units)
    return plain(_in(value, column, units), digits) + (f" {u}" if u else "")


def context(es, units: str, *, exit_value=None, ambient_index=0, flow=None, pc=None, mixture_ratio=None) -> str:
    """The operating context of an engine's plot in words.

    >>> from types import SimpleNamespace as N
    >>> es = N(label="LOX/LCH4", exit_key="area_ratio", exits=[80.0], ambient_pressure=[0.0], altitude=None,
    ...        flow=["shifting"])
    >>> context(es, "si")
    'LOX/LCH4, area ratio 80, vacuum, shifting equilibrium'
    >>> context(es, "si", pc=5e6, mixture_ratio=3.4, exit_value=False)
    'LOX/LCH4 at O/F 3.4, chamber pressure 50 bar, vacuum, shifting equilibrium'
    """
    parts = [es.label + (f" at O/F {plain(mixture_ratio, 3)}" if mixture_ratio is not None else "")]
    if pc is not None:
        parts.append(f"chamber pressure {_q(pc, 'chamber_pressure', units)}")
    if exit_value is not False:
        value = es.exits[0] if exit_value is None else exit_value
        parts.append(f"area ratio {plain(value, 4)}" if es.exit_key == "area_ratio" else
                     f"exit pressure {_q(value, 'exit_pressure', units)}")
    if ambient_index is not None:
        pa = es.ambient_pressure[ambient_index]
        if es.altitude is not None:
            parts.append(f"altitude {_q(es.altitude[ambient_index], 'altitude', units)}")
        else:
            parts.append("vacuum" if pa <= 0 else f"ambient {_q(pa, 'ambient_pressure', units)}")
    if flow is not False:
        parts.append(value_label(flow or es.flow[0]))
    return ", ".join(parts)


def _slice(df, es, flow=None, ambient_index=0):
    ok = df[(df["status"] == "ok") & (df["flow"] == (flow or es.flow[0]))]
    ok = ok[ok[es.exit_key] == es.exits[0]]
    return ok[ok["ambient_pressure"] == es.ambient_pressure[ambient_index]]


def _mark_separated(ax, line, x, col, first=True):
    """Grey crosses over the points whose nozzle separates (their value is the cut-nozzle estimate)."""
    if "flows_full" not in line:
        return
    cut = line[line["flows_full"] == False]  # noqa: E712 (a column)
    if len(cut):
        ax.plot(cut[x], cut[col], linestyle="none", marker="X", markersize=9, color="0.55",
                label="separated: cut-nozzle estimate" if first else None)


def _title(fig, name, what, ctx):
    fig.suptitle(f"{name}: {what}\n{ctx}", fontsize=9)


def isp_vs_mixture_ratio(plt, name, es, df, optima, units):
    """Ideal Isp against O/F, one curve per chamber pressure; each searched optimum starred and labelled."""
    sub = _slice(df, es)
    panels = ["isp_vacuum"] + (["isp_ambient"] if es.ambient_pressure[0] > 0 else [])
    fig, axes = plt.subplots(1, len(panels), figsize=(5.2 * len(panels), 4.2), squeeze=False)
    for ax, col in zip(axes[0], panels):
        marks = []
        for i, pc in enumerate(es.chamber_pressure):
            line = sub[sub["chamber_pressure"] == pc].sort_values("mixture_ratio")
            ax.plot(line["mixture_ratio"], line[col], label=f"pc {_q(pc, 'chamber_pressure', units)}", **STYLES[i])
            if col == "isp_ambient":
                _mark_separated(ax, line, "mixture_ratio", col, first=i == 0)
            for o in optima:
                if not o.get("note") and o["chamber_pressure"] == pc and o["objective"] == col:
                    ax.plot([o["mixture_ratio"]], [o[col]], marker="*", markersize=13, color=STYLES[i]["color"],
                            markeredgecolor="black", linestyle="none", label="optimum (searched)" if not marks else None)
                    marks.append((o["mixture_ratio"], o[col], f"O/F {plain(o['mixture_ratio'], 3)}",
                                  STYLES[i]["color"]))
        ax.margins(y=0.18)
        ax.set_xlabel(label("mixture_ratio", units))
        ax.set_ylabel(label(col, units))
        plain_axes(ax)
        place_labels(ax, marks)
        legend_below(ax)
    _title(fig, name, "ideal Isp against mixture ratio", context(es, units))
    return fig


def tc_cstar(plt, name, es, df, design, units):
    """Chamber temperature and c* against O/F (infinite-area chamber), with the design point's c* where it differs."""
    sub = _slice(df, es)
    fig, axes = plt.subplots(1, 2, figsize=(10.4, 4.2))
    for ax, col in zip(axes, ("chamber_temperature", "cstar")):
        for i, pc in enumerate(es.chamber_pressure):
            line = sub[sub["chamber_pressure"] == pc].sort_values("mixture_ratio")
            ax.plot(line["mixture_ratio"], _in(line[col], col, units),
                    label=f"pc {_q(pc, 'chamber_pressure', units)}", **STYLES[i])
        ax.set_xlabel(label("mixture_ratio", units))
        ax.set_ylabel(label(col, units))
    fc = design.finite_chamber if design is not None else None
    if fc and fc.get("injector_pressure") and design.mixture_ratio is not None:
        inlet = design.cstar * fc["nozzle_inlet_stagnation_pressure"] / fc["injector_pressure"]
        ax = axes[1]
        ax.plot([design.mixture_ratio], [_in(design.cstar, "cstar", units)], marker="v", color="#D55E00",
                linestyle="none", markersize=8, label="design point, referred to injector pressure")
        ax.plot([design.mixture_ratio], [_in(inlet, "cstar", units)], marker="^", color="#009E73",
                linestyle="none", markersize=8, label="design point, referred to nozzle-inlet pressure")
    for ax in axes:
        ax.margins(y=0.1)
        plain_axes(ax)
        legend_below(ax, ncol=1 if fc else None)
    _title(fig, name, "chamber temperature and c* against mixture ratio (infinite-area chamber)",
           context(es, units, exit_value=False, ambient_index=None))
    return fig


def isp_vs_area_ratio(plt, name, es, df, design, units):
    """Ideal Isp against area ratio (log axis, ticks at the grid's area ratios), vacuum and ambient."""
    ok = df[(df["status"] == "ok") & (df["flow"] == es.flow[0]) & (df["ambient_pressure"] == es.ambient_pressure[0])]
    mr = None
    if es.propellant is None:
        mr = min(es.mixture_ratio, key=lambda r: abs(r - design.mixture_ratio))
        ok = ok[ok["mixture_ratio"] == mr]
    fig, ax = plt.subplots(figsize=(5.8, 4.4))
    k = 0
    for i, pc in enumerate(es.chamber_pressure):
        line = ok[ok["chamber_pressure"] == pc].sort_values("area_ratio")
        ax.plot(line["area_ratio"], line["isp_vacuum"], label=f"vacuum, pc {_q(pc, 'chamber_pressure', units)}",
                **STYLES[k])
        k += 1
        if es.ambient_pressure[0] > 0:
            ax.plot(line["area_ratio"], line["isp_ambient"],
                    label=f"ambient, pc {_q(pc, 'chamber_pressure', units)}", **STYLES[k])
            _mark_separated(ax, line, "area_ratio", "isp_ambient", first=i == 0)
            k += 1
    ax.set_xscale("log")
    ax.set_xlabel(label("area_ratio", units) + ", log scale")
    ax.set_ylabel("Ideal Isp (s)")
    plain_axes(ax)
    thin_ticks(ax, es.exits)
    legend_below(ax)
    _title(fig, name, "ideal Isp against area ratio", context(es, units, exit_value=False, mixture_ratio=mr))
    return fig


def isp_vs_altitude(plt, name, es, perf, units):
    """Ambient Isp of the design point against altitude (U.S. Standard Atmosphere 1976), separation band hatched."""
    import numpy as np

    from perfchain.atmosphere import pressure

    top = max([20000.0] + list(es.altitude or []))
    z = np.linspace(0.0, top, 200)
    pa = pressure(z)
    pc, eps = perf.chamber_pressure, perf.area_ratio
    ideal = perf.isp_vacuum - pa * eps * perf.cstar / pc / G0
    d = perf.delivered
    fig, ax = plt.subplots(figsize=(5.8, 4.4))
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
    ax.set_xlabel(f"Altitude, U.S. Standard Atmosphere 1976 ({unit_label('altitude', units)})")
    ax.set_ylabel(label("isp_ambient", units))
    plain_axes(ax)
    legend_below(ax)
    what = perf.propellant if perf.mixture_ratio is None else f"{perf.propellant} at O/F {plain(perf.mixture_ratio, 3)}"
    ctx = (f"{what}, chamber pressure {_q(pc, 'chamber_pressure', units)}, area ratio {plain(eps, 4)}, "
           f"{value_label(perf.flow)}")
    fig.suptitle(f"{name}: design point's ambient Isp against altitude\n{ctx}", fontsize=9)
    return fig


def flow_models(plt, name, es, df, units):
    """Ideal Isp against O/F for every flow model computed (shifting against frozen), first chamber pressure."""
    pc = es.chamber_pressure[0]
    panels = ["isp_vacuum"] + (["isp_ambient"] if es.ambient_pressure[0] > 0 else [])
    fig, axes = plt.subplots(1, len(panels), figsize=(5.2 * len(panels), 4.2), squeeze=False)
    for ax, col in zip(axes[0], panels):
        for i, flow in enumerate(es.flow):
            line = _slice(df, es, flow)
            line = line[line["chamber_pressure"] == pc].sort_values("mixture_ratio")
            ax.plot(line["mixture_ratio"], line[col], label=value_label(flow), **STYLES[i])
        ax.set_xlabel(label("mixture_ratio", units))
        ax.set_ylabel(label(col, units))
        ax.margins(y=0.1)
        plain_axes(ax)
        legend_below(ax)
    _title(fig, name, "ideal Isp by flow model", context(es, units, pc=pc, flow=False))
    return fig
