"""Text on the study plots: labels placed so they never overlap, thinned ticks, legends off the data, plain numbers.

matplotlib draws text where it is told; these helpers ask its renderer for the box of each
label (``get_window_extent``) and move or drop labels until no two overlap:

- :func:`place_labels` annotates points, trying offsets around each point in turn and keeping
  the first whose box meets no label already placed and no marked point, and stays inside the axes;
- :func:`thin_ticks` keeps the tick labels of an axis that fit side by side (log axes with
  close ticks otherwise run their labels together);
- :func:`legend_below` puts the legend under the axes, outside the data;
- :func:`overlaps` lists the pairs of text boxes that overlap in a figure (the tests use it).

Numbers are written plain (:func:`perfchain.study.report_tables.plain`), never 1.2e+04. The
line styles every plot shares (:data:`STYLES`) and :func:`pyplot` live here too.
"""

from __future__ import annotations

__all__ = ["OFFSETS", "COLORS", "HATCHES", "STYLES", "pyplot", "place_labels", "thin_ticks", "legend_below",
           "overlaps", "plain_axes", "fit_categories",
           "settle_legends"]

COLORS = ("#000000", "#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9")   #: Okabe-Ito
LINES = ("-", "--", ":", "-.", (0, (5, 1, 1, 1)), (0, (1, 3)))
MARKERS = ("o", "s", "^", "D", "v", "P", "X")
HATCHES = ("", "//", "..", "xx", "\\\\", "--", "++")
#: curve styles: colour, line style and marker all differ, so curves read in black and white
STYLES = [dict(color=COLORS[i % len(COLORS)], linestyle=LINES[i % len(LINES)],
               marker=MARKERS[i % len(MARKERS)], markersize=5) for i in range(12)]


def pyplot():
    """matplotlib's pyplot on the Agg backend, with perfchain's plot settings (text never read as maths)."""
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    # text.parse_math off: every label is drawn as text, so a name with $...$ is never read as maths
    plt.rcParams.update({"text.parse_math": False, "font.size": 9, "axes.grid": True, "grid.alpha": 0.35,
                         "legend.fontsize": 8, "svg.hashsalt": "perfchain", "figure.dpi": 100,
                         "axes.formatter.useoffset": False, "axes.formatter.limits": (-7, 9)})
    return plt

#: offsets tried around a point, in points (right-above first, then around, then further out)
OFFSETS = ((8, 6), (8, -14), (-8, 6), (-8, -14), (8, 18), (-8, 18), (8, -26), (-8, -26), (12, 30), (-12, 30),
           (12, -38), (-12, -38), (20, 42), (-20, 42), (20, -50), (-20, -50))


def _renderer(fig):
    fig.canvas.draw_idle()
    return fig.canvas.get_renderer()


def _meets(box, boxes, pad: float = 1.0) -> bool:
    return any(box.x0 < b.x1 + pad and b.x0 < box.x1 + pad and box.y0 < b.y1 + pad and b.y0 < box.y1 + pad
               for b in boxes)


def place_labels(ax, points, fontsize: float = 7, avoid=(), clear: float = 7.0) -> list:
    """Annotate ``(x, y, text)`` points so that no label overlaps another label or any of the points.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
    points : iterable of (float, float, str) or (float, float, str, color)
        Data coordinates and the text of each label (and its colour, default black).
    fontsize : float
        [pt]
    avoid : iterable of matplotlib.transforms.Bbox
        Further boxes (display coordinates) the labels must not cover.
    clear : float
        Half-size of the box kept free around each point [display px] (its marker).

    Returns
    -------
    list of matplotlib.text.Annotation
        The labels placed, each inside the axes where an offset allows, else clear of the
        others outside it (else at the last offset tried).

    Examples
    --------
    Two optima 0.03 apart in O/F get labels that do not overlap:

    >>> import matplotlib; matplotlib.use("Agg")
    >>> import matplotlib.pyplot as plt
    >>> fig, ax = plt.subplots(); _ = ax.plot([3.0, 4.0], [379.0, 382.0])
    >>> labels = place_labels(ax, [(3.51, 380.40, "O/F 3.51"), (3.54, 380.45, "O/F 3.54")])
    >>> overlaps(fig)
    []
    >>> plt.close(fig)
    """
    from matplotlib.transforms import Bbox

    fig = ax.figure
    renderer = _renderer(fig)
    frame = ax.get_window_extent(renderer)
    points = [tuple(p) + ("black",) * (4 - len(p)) for p in points]
    marks = [ax.transData.transform((x, y)) for x, y, _, _ in points]
    boxes = list(avoid) + [Bbox.from_extents(u - clear, v - clear, u + clear, v + clear) for u, v in marks]
    placed = []
    for x, y, text, color in points:
        def draw(dx, dy):
            return ax.annotate(text, (x, y), textcoords="offset points", xytext=(dx, dy), fontsize=fontsize,
                               color=color, ha="left" if dx >= 0 else "right", va="bottom", annotation_clip=False,
                               bbox=dict(boxstyle="round,pad=0.15", fc="white", ec="none", alpha=0.85))

        ann, fallback = None, None
        for dx, dy in OFFSETS:
            trial = draw(dx, dy)
            box = trial.get_window_extent(renderer)
            inside = frame.x0 <= box.x0 and box.x1 <= frame.x1 and frame.y0 <= box.y0 and box.y1 <= frame.y1
            free = not _meets(box, boxes)
            if inside and free:
                ann = trial
                break
            fallback = fallback or ((dx, dy) if free else None)
            trial.remove()
        if ann is None:   # nowhere inside the axes: clear of the others outside it, else the last offset
            ann = draw(*(fallback or OFFSETS[-1]))
        boxes.append(ann.get_window_extent(renderer))
        placed.append(ann)
    return placed


def thin_ticks(ax, values, axis: str = "x", fmt=None):
    """Ticks at ``values`` (sorted), labelled plainly, dropping labels that would run into a kept one.

    The first and last values are kept; the others in order while their label clears the previous
    one. Minor tick labels are switched off (log axes).

    >>> import matplotlib; matplotlib.use("Agg")
    >>> import matplotlib.pyplot as plt
    >>> fig, ax = plt.subplots(figsize=(3, 2)); ax.set_xscale("log"); _ = ax.plot([3, 200], [1, 2])
    >>> thin_ticks(ax, [3, 3.5, 4, 4.5, 5, 6, 8, 10, 200])
    >>> overlaps(fig)
    []
    >>> plt.close(fig)
    """
    from matplotlib.ticker import NullFormatter

    from perfchain.study.report_tables import plain

    fmt = fmt or (lambda v: plain(v, 4))
    values = sorted(values)
    target = ax.xaxis if axis == "x" else ax.yaxis
    setter = ax.set_xticks if axis == "x" else ax.set_yticks
    setter(values, [fmt(v) for v in values])
    target.set_minor_formatter(NullFormatter())
    renderer = _renderer(ax.figure)
    labels = [t for t in target.get_ticklabels() if t.get_text()]
    boxes = [t.get_window_extent(renderer) for t in labels]
    keep = [0]
    for i in range(1, len(values)):
        if not _meets(boxes[i], [boxes[keep[-1]]], pad=3.0):
            keep.append(i)
    if len(values) > 1 and keep[-1] != len(values) - 1:   # the last value wins over the one before it
        keep[-1] = len(values) - 1
        while len(keep) > 1 and _meets(boxes[keep[-1]], [boxes[keep[-2]]], pad=3.0):
            keep.pop(-2)
    shown = set(keep)
    setter(values, [fmt(v) if i in shown else "" for i, v in enumerate(values)])


def fit_categories(ax, labels, width: int = 18):
    """Category tick labels on the x axis, each line wrapped at ``width`` characters; the figure widens
    (up to twice) until no two labels overlap.

    >>> plt = pyplot()
    >>> fig, ax = plt.subplots(figsize=(3, 2)); _ = ax.bar([0, 1, 2], [1, 2, 3])
    >>> fit_categories(ax, ["N2O4/MMH (Burdock, 0.25 m^3 of tanks)"] * 3)
    >>> overlaps(fig), bool(fig.get_figwidth() > 3)
    ([], True)
    >>> plt.close(fig)
    """
    import textwrap

    text = ["\n".join(textwrap.fill(line, width) for line in str(s).split("\n")) for s in labels]
    ax.set_xticks(range(len(text)), text, fontsize=8)
    fig = ax.figure
    start = fig.get_figwidth()
    while overlaps(fig) and fig.get_figwidth() < 2 * start:
        fig.set_figwidth(fig.get_figwidth() * 1.25)


def _below(ax, renderer) -> float:
    """Axes fraction just under the tick and axis labels of the x axis."""
    frame = ax.get_window_extent(renderer)
    below = min([frame.y0] + [t.get_window_extent(renderer).y0 for t in ax.get_xticklabels() if t.get_text()]
                + ([ax.xaxis.label.get_window_extent(renderer).y0] if ax.xaxis.label.get_text() else []))
    return (below - frame.y0) / frame.height - 0.03


def legend_below(ax, ncol: int | None = None, **kw):
    """The axes' legend under the plotting area and its tick and axis labels, outside the data.

    Returns None when nothing is labelled. Call :func:`settle_legends` after the figure's
    layout changes (``tight_layout``), which moves the labels it was placed under.
    """
    handles, labels = ax.get_legend_handles_labels()
    if not handles:
        return None
    ncol = ncol or min(len(handles), 2)
    legend = ax.legend(loc="upper center", bbox_to_anchor=(0.5, _below(ax, _renderer(ax.figure))), ncol=ncol,
                       frameon=False, **kw)
    legend.set_gid("perfchain-below")
    return legend


def settle_legends(fig):
    """Place again, under their axes' labels, the legends :func:`legend_below` made (after a layout change)."""
    renderer = _renderer(fig)
    for ax in fig.axes:
        legend = ax.get_legend()
        if legend is not None and legend.get_gid() == "perfchain-below":
            legend.set_bbox_to_anchor((0.5, _below(ax, renderer)), transform=ax.transAxes)


def plain_axes(ax):
    """Axis numbers without an offset or a power of ten (1167 m/s, not 1.167e3)."""
    for axis in (ax.xaxis, ax.yaxis):
        fmt = axis.get_major_formatter()
        if hasattr(fmt, "set_useOffset"):
            fmt.set_useOffset(False)
            fmt.set_scientific(False)


def overlaps(fig, pad: float = -0.5) -> list:
    """Pairs of texts of each axes whose boxes overlap: annotations and tick labels with each other,
    and the legend with the plotting area, the annotations and the tick labels.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
    pad : float
        Boxes closer than this [display px] count as overlapping (negative: they must truly cross).

    Returns
    -------
    list of (str, str)
        The texts of each overlapping pair (empty when every text stands clear).
    """
    renderer = _renderer(fig)
    out = []
    for ax in fig.axes:
        notes = [t for t in ax.texts if t.get_visible() and t.get_text().strip()]
        ticks = [[t for t in axis.get_ticklabels() if t.get_visible() and t.get_text().strip()]
                 for axis in (ax.xaxis, ax.yaxis)]
        boxes = [(t.get_text(), t.get_window_extent(renderer)) for t in notes + ticks[0] + ticks[1]]
        done = set()
        # notes against every text; tick labels against those of their own axis (an x and a y label
        # may touch at the corner of the axes, which matplotlib's own layout allows)
        for group in ([notes, notes + ticks[0] + ticks[1]], [ticks[0], ticks[0]], [ticks[1], ticks[1]]):
            for a in group[0]:
                for b in group[1]:
                    if a is b or (id(b), id(a)) in done or (id(a), id(b)) in done:
                        continue
                    done.add((id(a), id(b)))
                    p, q = a.get_window_extent(renderer), b.get_window_extent(renderer)
                    if p.x0 < q.x1 + pad and q.x0 < p.x1 + pad and p.y0 < q.y1 + pad and q.y0 < p.y1 + pad:
                        out.append((a.get_text(), b.get_text()))
        legend = ax.get_legend()
        if legend is not None and legend.get_visible():
            box = legend.get_window_extent(renderer)
            for name, other in [("plotting area", ax.get_window_extent(renderer))] + boxes:
                if box.x0 < other.x1 and other.x0 < box.x1 and box.y0 < other.y1 and other.y0 < box.y1:
                    out.append(("legend", name))
    return out
