"""``perfchain chamber``: thrust-chamber geometry, wall contour and wall heat flux of one point."""

from __future__ import annotations

import click

from perfchain.cli.edges import json_text, quote_as_typed
from perfchain.cli.point import point_options
from perfchain.errors import InputError

__all__ = ["chamber", "format_chamber"]


def format_chamber(design) -> str:
    """The design as a short table for a person (SI, lengths in mm, heat flux in MW/m^2).

    Parameters
    ----------
    design : perfchain.performance.chamber_design.ChamberDesign

    Returns
    -------
    str
    """
    d = design.to_dict()
    nz = d["nozzle"]
    rows = [
        f"throat diameter      {d['throat_diameter'] * 1e3:10.2f} mm",
        f"chamber diameter     {d['chamber_diameter'] * 1e3:10.2f} mm   (contraction ratio {d['contraction_ratio']:.4g})",
        f"chamber length       {d['chamber_length'] * 1e3:10.2f} mm   (injector face to throat; cylinder "
        f"{d['cylinder_length'] * 1e3:.1f} mm, L* {d['characteristic_length']:.4g} m)",
        f"nozzle               {nz['kind']}, area ratio {nz['area_ratio']:.4g}, length {nz['length'] * 1e3:.1f} mm, "
        f"exit diameter {nz['exit_diameter'] * 1e3:.1f} mm, divergence factor {nz['divergence_factor']:.4f}",
        f"peak heat flux       {d['peak_heat_flux'] / 1e6:10.2f} MW/m2 at x = {d['peak_heat_flux_x'] * 1e3:.1f} mm",
        f"peak radiation       {d['peak_radiation_heat_flux'] / 1e6:10.2f} MW/m2 (approximate, not in the above)",
        "",
        f"{'x [mm]':>8s} {'r [mm]':>8s} {'A/At':>7s} {'p [bar]':>8s} {'T [K]':>7s} {'Mach':>6s} "
        f"{'h_g [kW/m2K]':>12s} {'T_aw [K]':>8s} {'q [MW/m2]':>9s}",
    ]
    st = d["contour"]
    step = max(1, len(st) // 20)
    pick = sorted(set(range(0, len(st), step)) | {design.contour.throat_index, len(st) - 1})
    for k in pick:
        s = st[k]
        rows.append(f"{s['x'] * 1e3:8.1f} {s['radius'] * 1e3:8.2f} {s['area_ratio']:7.3f} {s['pressure'] / 1e5:8.3f} "
                    f"{s['temperature']:7.0f} {s['mach']:6.3f} {s['heat_transfer_coefficient'] / 1e3:12.2f} "
                    f"{s['adiabatic_wall_temperature']:8.0f} {s['heat_flux'] / 1e6:9.3f}")
    rows += [""] + [f"note: {n}" for n in d["notes"]] + [d["safety"]]
    return "\n".join(rows)


@click.command("chamber")
@point_options
@click.option("--contraction-ratio", required=True, help="Chamber/throat area ratio (> 1).")
@click.option("--characteristic-length", help="L* with a unit, e.g. '1.1 m'; default the pair's typical value.")
@click.option("--thrust", help="Thrust to size the throat for, with a unit, e.g. '50 kN'.")
@click.option("--throat-diameter", help="Instead of --thrust: the throat diameter, e.g. '72 mm'.")
@click.option("--thrust-at", type=click.Choice(["vacuum", "ambient"]), default="vacuum", show_default=True,
              help="Where the thrust is given.")
@click.option("--altitude", help="Altitude with a unit (instead of --ambient-pressure).")
@click.option("--cstar-efficiency", help="Combustion (c*) efficiency in (0, 1].")
@click.option("--cf-efficiency", help="Overall Cf efficiency in (0, 1].")
@click.option("--contour", default="bell", show_default=True, help="Nozzle contour: bell or conical.")
@click.option("--nozzle-half-angle", help="Cone half-angle (conical), e.g. '15deg' [default: 15 deg].")
@click.option("--bell-length-fraction", help="Bell length / 15 deg cone length, 0.6 to 0.9 [default: 0.8].")
@click.option("--wall-temperature", default="800 K", show_default=True,
              help="Hot-gas-side wall temperature with a unit.")
@click.option("--stations", "points", default="60", show_default=True, help="About how many contour stations.")
@click.option("--separation", help="Flow-separation criterion, as in perfchain point.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object (SI units).")
@click.option("--out", "out_dir", type=click.Path(file_okay=False), help="Write the contour table (CSV, Parquet), "
              "the JSON and the heat-flux plot into this folder.")
@quote_as_typed
def chamber(as_json, out_dir, exit_pressure, **options):
    """Thrust-chamber geometry, wall contour and wall heat flux of one operating point.

    Chamber volume from L*, diameter from the contraction ratio, a conical or bell contour,
    the gas along it (shifting or frozen), the Bartz heat transfer coefficient and heat
    flux for a given wall temperature. Preliminary design estimates: cooling design and
    hot-fire qualification follow licensed practice and test.
    """
    from perfchain.performance.chamber_design import design_from_args
    from perfchain.inputs import chamber_args

    if exit_pressure is not None:
        raise InputError("exit_pressure", exit_pressure, "not with perfchain chamber: give --area-ratio "
                         "(the contour is drawn to an area ratio)")
    design = design_from_args(chamber_args(**options))
    if out_dir is not None:
        from perfchain.study.chamber_files import write_chamber

        paths = write_chamber(design, out_dir)
        if not as_json:
            click.echo("wrote " + ", ".join(str(p) for p in paths))
    if as_json:
        click.echo(json_text(design.to_dict()))
    else:
        click.echo(format_chamber(design))
