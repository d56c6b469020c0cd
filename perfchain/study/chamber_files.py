"""Files of a thrust-chamber design: the contour table (CSV, Parquet), its JSON and the plots.

Used by ``perfchain chamber --out DIR`` and by a study's thermal blocks (the report shows the
contour and heat-flux figure). The table columns and units are
:data:`perfchain.performance.chamber_design.CONTOUR_COLUMNS` (SI).
"""

from __future__ import annotations

import json
import math
from pathlib import Path

from perfchain.performance.chamber_design import CONTOUR_COLUMNS, SAFETY_NOTE, ChamberDesign
from perfchain.study.plots import Figure, save_figure

__all__ = ["write_chamber", "heat_flux_figure"]


def heat_flux_figure(design: ChamberDesign, folder, stem: str = "chamber", title: str = "",
                     formats=("png",)) -> Figure:
    """Draw the wall contour and q, h_g along x (throat marked); save it as ``{stem}-heat-flux.*``.

    Parameters
    ----------
    design : ChamberDesign
    folder : str or Path
    stem : str
        File stem.
    title : str
        Figure title (default: the propellant).
    formats : tuple of str
        Image formats.

    Returns
    -------
    perfchain.study.plots.Figure
    """
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    st = design.stations
    x = [s["x"] for s in st]
    fig, (ax_r, ax_q) = plt.subplots(2, 1, sharex=True, figsize=(7.0, 6.0),
                                     gridspec_kw={"height_ratios": [1, 2]})
    ax_r.plot(x, [s["radius"] for s in st], color="#000000")
    ax_r.plot(x, [-s["radius"] for s in st], color="#000000")
    ax_r.set_ylabel("radius [m]")
    ax_q.plot(x, [s["heat_flux"] / 1e6 for s in st], color="#D55E00", label="convective q (Bartz)")
    ax_q.plot(x, [s["radiation_heat_flux"] / 1e6 for s in st], color="#D55E00", linestyle=":",
              label="radiation (approximate)")
    ax_q.set_ylabel("heat flux [MW/m2]")
    ax_q.set_xlabel("x from the injector face [m]")
    ax_h = ax_q.twinx()
    ax_h.plot(x, [s["heat_transfer_coefficient"] / 1e3 for s in st], color="#0072B2", linestyle="--",
              label="h_g")
    ax_h.set_ylabel("h_g [kW/(m2 K)]")
    x_t = design.geometry.chamber_length
    for ax in (ax_r, ax_q):
        ax.axvline(x_t, color="#777777", linewidth=0.8)
    ax_q.annotate("throat", (x_t, 0), xytext=(3, 3), textcoords="offset points", fontsize=8)
    lines = ax_q.get_lines()[:2] + ax_h.get_lines()
    ax_q.legend(lines, [ln.get_label() for ln in lines], loc="upper right", fontsize=8)
    ax_r.set_title((title or design.performance.propellant or "thrust chamber")
                   + " (preliminary design estimate)", fontsize=10)
    return save_figure(plt, fig, folder, f"{stem}-heat-flux", title or "Contour and wall heat flux",
                       "Wall contour, convective heat flux and heat transfer coefficient (Bartz 1957) along the "
                       "chamber and nozzle, throat marked, with an approximate H2O/CO2 radiation estimate. "
                       + SAFETY_NOTE, formats)


def _finite(data):
    """Plain data with every non-finite float as None (JSON has no NaN or Infinity)."""
    if isinstance(data, dict):
        return {k: _finite(v) for k, v in data.items()}
    if isinstance(data, (list, tuple)):
        return [_finite(v) for v in data]
    return None if isinstance(data, float) and not math.isfinite(data) else data


def write_chamber(design: ChamberDesign, folder, stem: str = "chamber", formats=("png",)) -> list[Path]:
    """Write ``{stem}-contour.csv``, ``{stem}-contour.parquet``, ``{stem}.json`` and the heat-flux plot.

    Parameters
    ----------
    design : ChamberDesign
    folder : str or Path
        Created if missing.
    stem : str
        File stem.
    formats : tuple of str
        Image formats of the plot.

    Returns
    -------
    list of Path
        The files written.

    Examples
    --------
    >>> import tempfile
    >>> from perfchain.propellants.mixture import make_propellant
    >>> from perfchain.performance.chamber_design import chamber_design
    >>> d = chamber_design(make_propellant("LOX", "RP-1", 2.6), 5e6, area_ratio=8.0, contraction_ratio=4.0,
    ...                    characteristic_length=1.1, thrust=1e4, points=20)
    >>> with tempfile.TemporaryDirectory() as tmp:
    ...     sorted(p.name for p in write_chamber(d, tmp))
    ['chamber-contour.csv', 'chamber-contour.parquet', 'chamber-heat-flux.png', 'chamber.json']
    """
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    table = design.table()
    header = "# " + ", ".join(f"{k} [{u}]" for k, u in CONTOUR_COLUMNS.items()) + "\n# " + SAFETY_NOTE + "\n"
    csv = folder / f"{stem}-contour.csv"
    csv.write_text(header + table.to_csv(index=False), encoding="utf-8")
    parquet = folder / f"{stem}-contour.parquet"
    table.attrs["units"] = dict(CONTOUR_COLUMNS)
    table.attrs["safety"] = SAFETY_NOTE
    table.to_parquet(parquet, index=False)
    js = folder / f"{stem}.json"
    js.write_text(json.dumps(_finite(design.to_dict()), indent=2, allow_nan=False), encoding="utf-8")
    fig = heat_flux_figure(design, folder, stem, formats=formats)
    return [csv, parquet, js, *fig.paths]
