"""How results read for a person: plain text (terminal, ``repr``) and HTML (notebooks).

An operating point reads answer first (:mod:`perfchain.api.point_layout` builds the blocks):
the conditions, the headline figures (Isp, c*, Cf, chamber temperature, O/F, flow model;
ideal and delivered side by side), one row per station, the main products per station, the
finite-chamber, loss and sizing lines when computed, the warnings and the safety caution.
"""

from __future__ import annotations

from html import escape

from perfchain.api.point_layout import CAUTION, MONOPROPELLANT_CAUTION, SOLID_CAUTION, point_layout
from perfchain.constants import G0

__all__ = ["CAUTION", "SOLID_CAUTION", "MONOPROPELLANT_CAUTION", "format_point", "html_point", "format_delta_v",
           "text_table"]


def _columns(rows, left=(0,)) -> list[str]:
    """Rows of cells as aligned text: the columns in ``left`` left-aligned, the others right-aligned."""
    widths = [max(len(r[i]) for r in rows) for i in range(len(rows[0]))]
    return ["  ".join(c.ljust(w) if i in left else c.rjust(w) for i, (c, w) in enumerate(zip(r, widths))).rstrip()
            for r in rows]


def text_table(head, rows, left=(0,), width: int = 10) -> list[str]:
    """A table as aligned text lines, long header labels wrapped over several lines.

    Parameters
    ----------
    head : list of str
        One label per column (from :mod:`perfchain.study.labels`).
    rows : list of list of str
        The cells, already formatted.
    left : tuple of int
        Columns aligned left (the others right, as numbers read).
    width : int
        A label wraps at a column's widest cell, but not narrower than this.

    Returns
    -------
    list of str

    Examples
    --------
    >>> for line in text_table(["Stage", "Delta-v (m/s)"], [["booster", "3885.1"]]):
    ...     print(line)
    Stage    Delta-v
               (m/s)
    booster   3885.1
    """
    import textwrap

    widths = [max([width] + [len(r[i]) for r in rows] + [len(word) for word in h.split()])
              for i, h in enumerate(head)]
    wrapped = [textwrap.wrap(h, w, break_long_words=False) or [""] for h, w in zip(head, widths)]
    depth = max(len(w) for w in wrapped)
    lines = [[w[k] if k < len(w) else "" for w in wrapped] for k in range(depth)]
    return _columns([*lines, *rows], left)


def format_point(r, units: str = "si") -> str:
    """A plain-text summary of a :class:`~perfchain.performance.chain.Performance` for a person.

    The ``perfchain point`` output and the ``repr`` of :func:`perfchain.point` results: the
    answer first, then stations (one row each), products, details, warnings and the caution.

    Parameters
    ----------
    r : Performance
    units : str
        ``si`` (bar, K, m/s) or ``us`` (psia, degR, ft/s).

    Examples
    --------
    >>> import perfchain as pc
    >>> r = pc.point(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.6, chamber_pressure="70 bar",
    ...              area_ratio=40, ambient_pressure="0 Pa")
    >>> for line in format_point(r).splitlines()[:5]:
    ...     print(line)
    perfchain | LOX / RP-1 | shifting flow | chamber 70 bar | area ratio 40 | vacuum
      O/F 2.6 (stoichiometric 3.403, equivalence ratio 1.309, 27.8 % fuel)
    <BLANKLINE>
      Vacuum Isp (s)                    356.98
      Characteristic velocity c* (m/s)  1793.3
    """
    lay = point_layout(r, units)
    head = [("", "ideal", "delivered")] if lay.delivered else []
    headline = [row if lay.delivered else row[:2] for row in lay.headline]
    lines = [lay.title, f"  {lay.mixture}", ""]
    lines += ["  " + x for x in _columns(head + headline, left=(0, 1) if not lay.delivered else (0,))]
    lines.append(f"  {'Flow model':<{max(len(row[0]) for row in headline)}s}  {lay.flow}")
    lines += [""] + ["  " + x for x in text_table(lay.station_head, lay.station_rows)]
    lines += ["", "  main products (mole fraction):"]
    width = max(len(name) for name, _ in lay.products)
    lines += [f"    {name:<{width}s}  {text}" for name, text in lay.products]
    if lay.details:
        lines += [""] + [f"  {x}" for x in lay.details]
    if lay.warnings:
        lines += [""] + [f"  {x}" for x in lay.warnings]
    lines += [""] + ["  " + c for c in lay.cautions]
    return "\n".join(lines)


def html_point(r, units: str = "si") -> str:
    """The same summary as an HTML fragment (a notebook's rich display).

    >>> import perfchain as pc
    >>> r = pc.point(oxidizer="LOX", fuel="RP-1", mixture_ratio=2.6, chamber_pressure="70 bar", area_ratio=40)
    >>> html = html_point(r)
    >>> html.startswith("<div") and "LOX / RP-1" in html and "licensed practice" in html
    True
    """
    lay = point_layout(r, units)
    cell = 'style="text-align:right;padding:0 0.6em"'

    def table(rows, head=None):
        th = "".join(f"<th {cell}>{escape(h)}</th>" for h in head) if head else ""
        body = "".join("<tr>" + "".join(f"<td {cell}>{escape(c)}</td>" for c in row) + "</tr>" for row in rows)
        return f"<table>{f'<thead><tr>{th}</tr></thead>' if th else ''}<tbody>{body}</tbody></table>"

    headline = [row if lay.delivered else row[:2] for row in lay.headline]
    products = "".join(f"<li>{escape(n)}: {escape(t)}</li>" for n, t in lay.products)
    extra = "".join(f"<p>{escape(x)}</p>" for x in lay.details + lay.warnings)
    notes = "".join(f"<p><i>{escape(c)}</i></p>" for c in lay.cautions)
    return (f'<div class="perfchain-point"><b>{escape(lay.title)}</b><br>{escape(lay.mixture)}'
            f"{table(headline, ('', 'ideal', 'delivered') if lay.delivered else None)}<p>Flow model: {escape(lay.flow)}</p>"
            f"{table(lay.station_rows, lay.station_head)}"
            f"<p>Main products (mole fraction):</p><ul>{products}</ul>{extra}{notes}</div>")


def format_delta_v(r: dict, units: str = "si") -> str:
    """The ``perfchain deltav`` table of a :meth:`perfchain.api.vehicle.DeltaV.to_dict` (SI values in).

    Parameters
    ----------
    r : dict
        SI values.
    units : str
        ``si`` (kg, m/s) or ``us`` (lbm, ft/s) for the table.

    Examples
    --------
    Closed form: 3000 m/s x ln 10 = 6907.8 m/s; T/W at ignition 2 kN / (100 kg x g0) = 2.04:

    >>> r = {"payload_mass": 10.0, "liftoff_mass": 100.0, "payload_fraction": 0.1, "total_delta_v": 6907.8,
    ...      "stages": [{"name": "s1", "exhaust_velocity": 3000.0, "initial_mass": 100.0, "burnout_mass": 10.0,
    ...                  "mass_ratio": 10.0, "delta_v": 6907.8, "burn_time": 135.0, "thrust_to_weight": 2.0394,
    ...                  "thrust_to_weight_burnout": 20.394}]}
    >>> print(format_delta_v(r).splitlines()[-1])
    total delta-v 6907.8 m/s
    >>> print(format_delta_v(r).splitlines()[5])
    s1       3000.0    305.9    100.0     10.0  10.0000   6907.8     135.0              2.04             20.39
    """
    from perfchain.study.columns import to_unit, unit_label
    from perfchain.study.labels import label

    m, v = unit_label("mass", units), unit_label("speed", units)

    def mass(x):
        return f"{to_unit(x, 'mass', units):.1f}"

    def speed(x):
        return f"{to_unit(x, 'speed', units):.1f}"

    lines = [f"Ideal delta-v (rocket equation, no losses); payload {mass(r['payload_mass'])} {m}, "
             f"lift-off {mass(r['liftoff_mass'])} {m}, payload fraction {r['payload_fraction']:.4f}", ""]
    keys = ("name", "exhaust_velocity", "isp", "initial_mass", "burnout_mass", "mass_ratio", "delta_v", "burn_time",
            "thrust_to_weight", "thrust_to_weight_burnout")
    head = ["Stage"] + [label(k, units) for k in keys[1:]]
    rows = []
    for s in r["stages"]:
        burn, tw = s.get("burn_time"), s.get("thrust_to_weight")
        rows.append([s["name"], speed(s["exhaust_velocity"]), f"{s['exhaust_velocity'] / G0:.1f}",
                     mass(s["initial_mass"]), mass(s["burnout_mass"]), f"{s['mass_ratio']:.4f}",
                     speed(s["delta_v"]), "-" if burn is None else f"{burn:.1f}",
                     "-" if tw is None else f"{tw:.2f}", "-" if tw is None else f"{s['thrust_to_weight_burnout']:.2f}"])
    lines += text_table(head, rows, width=8)
    lines += [f"  {s['name']}: {s['engine']}" for s in r["stages"] if s.get("engine")]
    lines.append(f"total delta-v {speed(r['total_delta_v'])} {v}")
    t = r.get("target")
    if t:
        lines.append(f"for {speed(t['target_delta_v'])} {v}: largest payload {mass(t['max_payload'])} {m}")
        if "propellant_needed" in t:
            lines.append(f"  this stage's exhaust velocity and structural ratio with the given payload "
                         f"need {mass(t['propellant_needed'])} {m} propellant, stage "
                         f"{mass(t['stage_mass_needed'])} {m}, lift-off {mass(t['liftoff_mass_needed'])} {m}")
    return "\n".join(lines)
