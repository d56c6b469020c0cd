"""Tables of the study report: labelled headers, column blocks that fit a page, grouped key-value lists, pivots.

Every header is a human label from :mod:`perfchain.study.labels` with the unit of the
output system (values are converted by :mod:`perfchain.study.columns`). A table wider
than :data:`MAX_COLUMNS` is split into blocks of columns, each repeating the key columns
(the pair, the engine), so that a printed page never cuts a column off. Columns with no
value in any row are left out. Engine grids are shown as pivot tables: the engine's
objective against O/F (rows) and chamber pressure (columns), one table per area ratio (or
exit pressure), the best grid value of each column marked and the searched optimum below.
"""

from __future__ import annotations

import html
import math

from perfchain.study.columns import column_kind, convert_frame, to_unit
from perfchain.study.labels import label, name, unit, value_label

__all__ = ["MAX_COLUMNS", "esc", "plain", "cell", "table_html", "key_value_html", "pivot_html"]

MAX_COLUMNS = 9    #: most columns of one printed table block (key columns included)
#: columns that name a row; repeated at the left of every block of a split table
KEY_COLUMNS = ("rank", "pair", "engine", "vehicle", "comparison")


def esc(text) -> str:
    """HTML-escaped text (quotes too).

    >>> esc("O/F < 3 & 'x'")
    'O/F &lt; 3 &amp; &#x27;x&#x27;'
    """
    return html.escape(str(text), quote=True)


def plain(value, digits: int = 5) -> str:
    """A number in plain notation with about ``digits`` significant digits (never 1.2e+04).

    >>> plain(11670.4), plain(364.684), plain(0.0054984), plain(3.0), plain(-0.5), plain(364.684, 4)
    ('11670', '364.68', '0.0054984', '3', '-0.5', '364.7')
    """
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "-"
    v = float(value)
    if v == 0:
        return "0"
    places = max(0, digits - 1 - math.floor(math.log10(abs(v))))
    text = f"{v:.{places}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def _empty(value) -> bool:
    return value is None or (isinstance(value, float) and math.isnan(value)) or value == ""


def cell(value, css: str = "") -> str:
    """One table cell: numbers plain and right-aligned, text left-aligned, booleans yes/no.

    >>> cell(1.5), cell(True), cell("LOX/RP-1")
    ('<td>1.5</td>', "<td class='t'>yes</td>", "<td class='t'>LOX/RP-1</td>")
    """
    cls = f" class='{css}'" if css else ""
    if _empty(value):
        return f"<td{cls}>-</td>"
    if isinstance(value, bool) or type(value).__name__ == "bool_":
        return f"<td class='t{(' ' + css) if css else ''}'>{'yes' if value else 'no'}</td>"
    if isinstance(value, (int, float)) or hasattr(value, "dtype"):
        return f"<td{cls}>{plain(value)}</td>"
    return f"<td class='t{(' ' + css) if css else ''}'>{esc(value_label(value))}</td>"


def _header(column: str, units: str, shown_unit: str | None = None) -> str:
    u = unit(column, units) if shown_unit is None else shown_unit
    return f"<th>{esc(name(column))}" + (f" <span class=u>({esc(u)})</span>" if u else "") + "</th>"


def _blocks(columns: list, max_columns: int, keys=KEY_COLUMNS) -> list[list]:
    """Columns split into blocks of at most ``max_columns``, each starting with the key columns."""
    keys = [c for c in keys if c in columns][:3]
    rest = [c for c in columns if c not in keys]
    room = max(1, max_columns - len(keys))
    return [keys + rest[i:i + room] for i in range(0, len(rest), room)] or [keys]


#: columns left out of a table when every row holds this value (they would say nothing)
QUIET = {"at_bound": False, "flows_full": True, "ambient_model": "full-flowing"}


def table_html(df, units: str, columns=None, *, drop=(), caption: str = "", max_columns: int = MAX_COLUMNS,
               keys=KEY_COLUMNS) -> str:
    """A result table (SI) in the output units with labelled headers, split into column blocks.

    Parameters
    ----------
    df : pandas.DataFrame
        SI values, one row per item.
    units : {"si", "us"}
    columns : list of str, optional
        Columns to show, in order (default: all).
    drop : iterable of str
        Columns never shown.
    caption : str
        Shown above the first block.
    max_columns : int
        Most columns per block.
    keys : tuple of str
        Columns that name a row, repeated at the left of every block.

    Returns
    -------
    str
        HTML; columns empty in every row, and those of :data:`QUIET` at their quiet value in
        every row, are left out.

    Examples
    --------
    >>> import pandas as pd
    >>> t = table_html(pd.DataFrame({"pair": ["LOX/LH2"], "isp_vacuum": [455.2], "note": [None]}), "si")
    >>> "Vacuum Isp" in t and "note" not in t.lower()
    True
    """
    cols = [c for c in (columns if columns is not None else df.columns) if c in df.columns and c not in drop]
    cols = [c for c in cols if not all(_empty(v) for v in df[c].astype(object))
            and not (c in QUIET and all(v == QUIET[c] for v in df[c].astype(object)))]
    shown, col_units = convert_frame(df[cols], units)
    objective = list(df["objective"].dropna().unique()) if "objective" in df.columns else []
    parts = [f"<p class=cap>{esc(caption)}</p>"] if caption else []
    for block in _blocks(cols, max_columns, keys):
        head = "".join(_header(c, units, col_units[c] if c == "objective_value" and len(objective) > 1 else
                               (unit(c, units, objective[0] if objective else None))) for c in block)
        body = "".join("<tr>" + "".join(cell(v) for v in row) + "</tr>"
                       for row in shown[block].astype(object).itertuples(index=False))
        parts.append(f"<table class=data><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>")
    return "".join(parts)


def key_value_html(groups: list, units: str) -> str:
    """Grouped ``(column, SI value)`` lists as labelled two-column tables side by side; empty rows left out.

    Parameters
    ----------
    groups : list of (str, list of (str, object))
        A heading and its rows; a row's key is a column name (its label and unit come from it)
        or a ready label starting with a capital letter, given with text as value.
    units : {"si", "us"}

    Returns
    -------
    str

    Examples
    --------
    >>> t = key_value_html([("Ideal", [("isp_vacuum", 380.4), ("separation_pressure_ratio", None)])], "si")
    >>> "Vacuum Isp" in t and "380.4" in t and "pe/pa" not in t
    True
    """
    out = []
    for heading, rows in groups:
        kept = [(k, v) for k, v in rows if not _empty(v)]
        if not kept:
            continue
        body = []
        for key, value in kept:
            kind = column_kind(key)
            numeric = isinstance(value, (int, float)) and not isinstance(value, bool)
            shown = to_unit(value, kind, units) if numeric else value
            u = unit(key, units) if numeric else ""
            body.append(f"<tr><th>{esc(name(key))}</th>{cell(shown)}<td class='t u'>{esc(u)}</td></tr>")
        out.append(f"<table class=kv><thead><tr><th colspan=3>{esc(heading)}</th></tr></thead>"
                   f"<tbody>{''.join(body)}</tbody></table>")
    return f"<div class=kvs>{''.join(out)}</div>"


def _objective_values(df, objective: str):
    if objective in df.columns:
        return df[objective]
    base = "isp_ambient" if objective.endswith("ambient") else "isp_vacuum"
    return df["bulk_density"] * df[base]     # density-Isp = bulk density x Isp (definition)


def pivot_html(df, objective: str, units: str, *, rows: str, cols: str, optimum: dict | None = None,
               caption: str = "") -> str:
    """One pivot table: ``objective`` with ``rows`` down and ``cols`` across, the best of each column marked.

    Parameters
    ----------
    df : pandas.DataFrame
        One slice of a grid (SI): a single value of every other axis.
    objective : str
        Column shown in the cells (density-Isp is computed from bulk density and Isp).
    units : {"si", "us"}
    rows, cols : str
        Grid columns down and across (``mixture_ratio``, ``chamber_pressure``, ``area_ratio``...).
    optimum : dict, optional
        ``{column value: (row value, objective value)}`` of a searched optimum, shown as a last row.
    caption : str

    Returns
    -------
    str

    Examples
    --------
    >>> import pandas as pd
    >>> g = pd.DataFrame({"mixture_ratio": [2.0, 3.0, 2.0, 3.0], "chamber_pressure": [5e6, 5e6, 8e6, 8e6],
    ...                   "isp_vacuum": [300.0, 310.0, 305.0, 303.0], "status": ["ok"] * 4})
    >>> t = pivot_html(g, "isp_vacuum", "si", rows="mixture_ratio", cols="chamber_pressure")
    >>> t.count("class='best'"), "Chamber pressure (bar)" in t
    (2, True)
    """
    kind = column_kind(objective)
    ok = df[df["status"] == "ok"] if "status" in df.columns else df
    values = to_unit(_objective_values(ok, objective), kind, units)
    across = sorted(df[cols].dropna().unique())
    down = sorted(df[rows].dropna().unique())
    best = {c: values[ok[cols] == c].max() for c in across}
    cut = set()
    if "flows_full" in ok.columns:
        cut = {(r, c) for r, c, f in zip(ok[rows], ok[cols], ok["flows_full"]) if f is False or f == 0}
    table = {(r, c): v for r, c, v in zip(ok[rows], ok[cols], values)}
    col_head = "".join(f"<th>{esc(plain(to_unit(c, column_kind(cols), units)))}</th>" for c in across)
    body = []
    for r in down:
        cells = []
        for c in across:
            v = table.get((r, c))
            if v is None:
                cells.append("<td class=na>failed</td>")
                continue
            mark = "&#9733; " if v == best[c] else ""
            sep = "&#8224;" if (r, c) in cut else ""
            cells.append(f"<td class='{'best' if mark else ''}'>{mark}{plain(v)}{sep}</td>")
        body.append(f"<tr><th>{esc(plain(to_unit(r, column_kind(rows), units)))}</th>{''.join(cells)}</tr>")
    if optimum:
        cells = "".join(f"<td class=opt>{esc(_opt(optimum.get(c), kind, units))}</td>" for c in across)
        body.append(f"<tr><th class=t>Searched optimum</th>{cells}</tr>")
    head = (f"<tr><th rowspan=2>{esc(label(rows, units))}</th><th colspan={len(across)}>{esc(label(cols, units))}"
            f"</th></tr><tr>{col_head}</tr>")
    text = f"<p class=cap>{esc(caption)}</p>" if caption else ""
    return (f"{text}<table class='data pivot'><thead>{head}</thead><tbody>{''.join(body)}</tbody></table>")


def _opt(found, kind, units) -> str:
    if not found:
        return "-"
    mr, value = found
    return f"{plain(to_unit(value, kind, units))} at O/F {plain(mr, 3)}"
