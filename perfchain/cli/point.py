"""``perfchain point``: one operating point, as a table for a person or as JSON."""

from __future__ import annotations


import click

from perfchain.api.display import format_point
from perfchain.cli.edges import check_output, json_text, out_option, quote_as_typed, units_option
from perfchain.cli.uncertainty import uncertainty_options
from perfchain.inputs import point_args

__all__ = ["point", "format_point", "ingredients", "point_options", "delivered_options"]


def point_options(f):
    """The options that state one operating point (shared with later commands)."""
    opts = [
        click.option("--oxidizer", help="Oxidizer name, e.g. LOX, N2O4, H2O2-98, 'LOX @ 80 K'."),
        click.option("--fuel", help="Fuel name, e.g. RP-1, LH2, LCH4, MMH, paraffin."),
        click.option("--propellant", help="Instead of --oxidizer/--fuel/mixture: a formulation by mass, "
                     "'AP=0.68, Al=0.18, HTPB=0.14', or a monopropellant, e.g. H2O2-98."),
        click.option("--mixture-ratio", help="O/F by mass."),
        click.option("--equivalence-ratio", help="Equivalence ratio (>1 fuel-rich)."),
        click.option("--fuel-percent", help="Fuel mass per cent."),
        click.option("--chamber-pressure", required=True, help="With a unit: '1000 psi', '20 bar', '7 MPa'."),
        click.option("--area-ratio", help="Exit/throat area ratio (> 1)."),
        click.option("--exit-pressure", help="Exit pressure with a unit, e.g. '1 atm'."),
        click.option("--ambient-pressure", default=None,
                     help="Ambient pressure with a unit; '0 Pa' is vacuum. [default: 1 atm]"),
        click.option("--flow", default="shifting", show_default=True,
                     help="Composition model: shifting, frozen or frozen-throat."),
    ]
    for opt in reversed(opts):
        f = opt(f)
    return f


def delivered_options(f):
    """Options for delivered performance, finite chamber, altitude and sizing."""
    opts = [
        click.option("--cstar-efficiency", help="Combustion (c*) efficiency in (0, 1]."),
        click.option("--nozzle-half-angle", help="Conical nozzle half-angle with a unit, e.g. '15deg'."),
        click.option("--divergence-factor", help="Divergence factor in (0, 1] (instead of the half-angle)."),
        click.option("--cf-efficiency", help="Overall Cf efficiency in (0, 1]: delivered over ideal vacuum Cf, the whole Cf "
                     "scaled (pressure part included); ambient Cf = vacuum Cf - (pa/pc) eps."),
        click.option("--contraction-ratio", help="Chamber/throat area ratio (> 1); default infinite."),
        click.option("--altitude", help="Altitude with a unit, e.g. '11 km' (instead of --ambient-pressure)."),
        click.option("--thrust", help="Thrust to size the chamber for, with a unit, e.g. '5 kN'; with condensed "
                     "products (aluminized grains) its throat also sets the default two-phase flow loss."),
        click.option("--thrust-at", type=click.Choice(["vacuum", "ambient"]), default="vacuum",
                     show_default=True, help="Where the thrust is given."),
        click.option("--throat-diameter", help="Throat diameter with a unit, e.g. '45 mm', for the default "
                     "two-phase flow loss of condensed products (instead of one sized from --thrust)."),
        click.option("--particle-size", help="Mean condensed-particle diameter with a unit, e.g. '3 um', for the "
                     "two-phase flow loss (default: Hermsen's correlation)."),
    ]
    for opt in reversed(opts):
        f = opt(f)
    return f


@click.command("point")
@point_options
@delivered_options
@click.option("--separation", help="Flow-separation criterion for the ambient values: summerfield "
              "(default, k=0.4), summerfield:K (K from 0.25 to 0.5) or schmucker; a separated nozzle "
              "gets the cut-nozzle estimate.")
@click.option("--ammonia-dissociation", help="Hydrazine alone (--propellant N2H4): the ammonia dissociation "
              "of a catalytic bed, 0 to 1; fixes the chamber composition, frozen nozzle.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object (SI units).")
@uncertainty_options("local")
@click.option("--workers", default="1", show_default=True, help="Worker processes for the --vary samples.")
@out_option
@units_option
@quote_as_typed
def point(as_json, separation, vary, samples, seed, sensitivity, samples_out, workers, out, units, **options):
    """Performance of one operating point (chamber, throat, exit, c*, Cf, Isp).

    The propellant is --oxidizer and --fuel at one mixture, or --propellant: a solid
    grain or other formulation by mass fraction, or a monopropellant. Ideal by default;
    efficiency options add delivered values, and --thrust sizes the thrust chamber.
    """
    path, units = check_output(out, units)
    if vary:
        from perfchain.api.uncertainty import point_uncertainty
        from perfchain.cli.uncertainty import print_uncertain
        from perfchain.inputs import count

        u = point_uncertainty(**options, separation=separation, vary=list(vary), samples=samples, seed=seed,
                              sensitivity=sensitivity,
                              workers=count(workers, "--workers", "a whole number of worker processes, at least 1", 1))
        print_uncertain(u, as_json, samples_out, "" if as_json else format_point(u.nominal, units or "si"))
        result = u.nominal            # --out writes the nominal point
    else:
        from perfchain.performance.chain import performance

        result = performance(**point_args(**options), separation=separation, transport=True)
        click.echo(json_text(result.to_dict()) if as_json else format_point(result, units or "si"))
    if path is not None:
        from perfchain.study.outfiles import write_rows
        from perfchain.study.rows import flatten_result

        inputs = {k: v for k, v in {**options, "separation": separation, "units": units}.items() if v is not None}
        path = write_rows(path, [flatten_result(result.to_dict())], units=units, inputs=inputs)
        click.echo(f"wrote 1 point to {path}", err=True)


@click.command("ingredients")
@click.option("--json", "as_json", is_flag=True, help="Print JSON (SI units).")
def ingredients(as_json):
    """List the bundled ingredients with their storage state and sources."""
    from perfchain.api.ingredients import ingredient_rows

    rows = ingredient_rows()
    if as_json:
        click.echo(json_text(rows))
        return
    click.echo(f"{'name':12s} {'role':9s} {'T [K]':>8s} {'h [kJ/kg]':>11s} {'rho [kg/m3]':>12s}  aliases")
    for r in rows:
        click.echo(f"{r['name']:12s} {r['role']:9s} {r['temperature']:8.2f} {r['enthalpy'] / 1e3:11.1f} "
                   f"{r['density']:12.4g}  {', '.join(r['aliases'])}")
    click.echo("\nHandle every propellant under your site's safety rules: hydrazines and N2O4 are toxic "
               "(hydrazines are suspected carcinogens), cryogens burn and asphyxiate, N2O can decompose "
               "explosively, concentrated H2O2 and oxygen feed fires; AP, AN, KN, nitrocellulose, "
               "nitroglycerin, ADN and metal powders can ignite or detonate when ground, mixed, cast or "
               "cured (licensed practice and local explosives law only).")
