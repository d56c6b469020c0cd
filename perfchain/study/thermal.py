"""A study engine's thermal block: chamber design and wall heat flux at its design point.

:func:`thermal_design` runs :func:`perfchain.performance.chamber_design.chamber_design` for an
engine with a ``[engine.thermal]`` table (checked by :func:`perfchain.inputs.chamber_args`, so
the bounds and messages are those of ``perfchain chamber``); :func:`write_thermal` writes its
contour table and figure into the run's ``tables/`` and ``plots/``; :func:`thermal_html` is
its part of the report. Preliminary design estimates: cooling design and hot-fire
qualification follow licensed practice and test.
"""

from __future__ import annotations

import html
from pathlib import Path

from perfchain.errors import InputError
from perfchain.performance.chamber_design import SAFETY_NOTE, ChamberDesign, design_from_args

__all__ = ["thermal_design", "write_thermal", "thermal_html"]

_DIVERGENCE = ("conical_half_angle", "bell_exit_angle", "divergence_factor")


def thermal_design(es, mixture_ratio, index: int) -> ChamberDesign:
    """The chamber design of an engine's thermal block at its design point.

    Parameters
    ----------
    es : perfchain.study.engines.EngineSettings
        The engine (its ``spec.thermal`` set).
    mixture_ratio : float or None
        The design O/F [-] (None for a formulation).
    index : int
        1-based place of the engine in the study (named in errors).

    Returns
    -------
    ChamberDesign
    """
    from perfchain.inputs import chamber_args

    spec, th = es.spec, es.spec.thermal
    where = f"engine[{index}].thermal"
    if es.exit_key != "area_ratio":
        raise InputError(where, "an engine given by exit_pressure", "an engine given by area_ratio (the contour "
                         "is drawn to an area ratio)")
    eff = spec.efficiency.model_dump(exclude_none=True) if spec.efficiency is not None else {}
    for key in _DIVERGENCE:
        if key in eff:
            raise InputError(f"engine[{index}].efficiency.{key}", eff[key],
                             "no divergence input with a thermal block (its contour sets the divergence)")
    kw = es.point_kwargs()
    kw.pop("area_ratio")
    try:
        args = chamber_args(**es.propellant_kwargs(mixture_ratio), **kw, area_ratio=es.exits[0],
                            contraction_ratio=th.contraction_ratio or spec.contraction_ratio,
                            characteristic_length=th.characteristic_length,
                            thrust=None if th.throat_diameter is not None else spec.thrust,
                            throat_diameter=th.throat_diameter, thrust_at=spec.thrust_at, losses=eff or None,
                            contour=th.contour, nozzle_half_angle=th.nozzle_half_angle,
                            bell_length_fraction=th.bell_length_fraction, wall_temperature=th.wall_temperature,
                            points=th.stations)
        return design_from_args(args)
    except InputError as exc:
        field = "thrust or throat_diameter" if exc.field == "throat" else exc.field
        raise InputError(f"{where}.{field}", exc.value, exc.allowed) from None


def write_thermal(designs: dict, stems: dict, stage) -> list:
    """Write each engine's contour table (CSV, Parquet) into ``tables/`` and its figure into ``plots/``.

    Parameters
    ----------
    designs : dict
        Engine name -> ChamberDesign.
    stems : dict
        Engine name -> file stem.
    stage : str or Path
        The run's folder.

    Returns
    -------
    list of perfchain.study.plots.Figure
        One per engine, grouped with it (``engine:<name>``); ``paths`` lists every file written.
    """
    from perfchain.study.chamber_files import heat_flux_figure

    stage = Path(stage)
    (stage / "tables").mkdir(parents=True, exist_ok=True)
    figures = []
    for name, design in designs.items():
        stem = f"engine-{stems[name]}"
        table = design.table()
        csv = stage / "tables" / f"{stem}-contour.csv"
        table.to_csv(csv, index=False)
        parquet = stage / "tables" / f"{stem}-contour.parquet"
        table.to_parquet(parquet, index=False)
        fig = heat_flux_figure(design, stage / "plots", stems[name], title=f"{name}: contour and wall heat flux")
        fig.group = f"engine:{name}"
        fig.paths = [csv, parquet, *fig.paths]
        figures.append(fig)
    return figures


def thermal_html(design: ChamberDesign | None) -> str:
    """The report's thermal section of one engine ('' without a thermal block), SI units.

    Parameters
    ----------
    design : ChamberDesign or None

    Returns
    -------
    str
        HTML.
    """
    if design is None:
        return ""
    d = design.to_dict()
    nz = d["nozzle"]
    rows = [("throat diameter", f"{d['throat_diameter'] * 1e3:.2f} mm"),
            ("chamber diameter", f"{d['chamber_diameter'] * 1e3:.2f} mm"),
            ("chamber length (injector face to throat)", f"{d['chamber_length'] * 1e3:.1f} mm"),
            ("cylinder length", f"{d['cylinder_length'] * 1e3:.1f} mm"),
            ("L*", f"{d['characteristic_length']:.4g} m"), ("contraction ratio", f"{d['contraction_ratio']:.4g}"),
            ("nozzle", f"{nz['kind']}, length {nz['length'] * 1e3:.1f} mm, exit diameter "
                       f"{nz['exit_diameter'] * 1e3:.1f} mm, divergence factor {nz['divergence_factor']:.4f}"),
            ("peak convective heat flux", f"{d['peak_heat_flux'] / 1e6:.2f} MW/m2 at x = "
                                          f"{d['peak_heat_flux_x'] * 1e3:.1f} mm"),
            ("peak radiation (approximate)", f"{d['peak_radiation_heat_flux'] / 1e6:.2f} MW/m2")]
    body = "".join(f"<tr><th>{html.escape(k)}</th><td class=t>{html.escape(v)}</td></tr>" for k, v in rows)
    notes = "".join(f"<p>Note: {html.escape(n)}</p>" for n in d["notes"])
    return (f"<h3>Thrust chamber and wall heat flux</h3><table>{body}</table>{notes}"
            f"<div class=safety><b>Safety.</b> {html.escape(SAFETY_NOTE)}</div>")
