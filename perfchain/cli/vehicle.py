"""``perfchain deltav``: stage and vehicle delta-v from the command line.

Parse -> call :func:`perfchain.api.vehicle.delta_v` (stages checked by :mod:`perfchain.inputs`)
-> print. No physics here.
"""

from __future__ import annotations

import click

from perfchain.cli.edges import check_output, json_text, out_option, quote_as_typed, units_option
from perfchain.cli.uncertainty import uncertainty_options

#: under every readable delta-v table: what the number leaves out, and who decides on flight
DELTA_V_CAUTION = ("Ideal delta-v from the rocket equation: gravity, drag and steering losses are not "
                   "included. An estimate for sizing, not a flight plan: flight and test work follow range "
                   "safety, local codes and licensed practice.")

__all__ = ["deltav"]


@click.command("deltav")
@click.option("--payload", required=True, help="Payload mass with a unit, e.g. '10 t'.")
@click.option("--stage", "stages", multiple=True, required=True, metavar="SPEC",
              help="One stage, first stage first (repeat the option): key=value pairs, e.g. "
                   "'isp=350 s, dry=28.5 t, propellant=161.5 t'. Keys: isp | exhaust_velocity | an engine "
                   "(oxidizer, fuel, mixture_ratio | formulation=AP=0.86, HTPB=0.14 (a grain or monopropellant; "
                   "ammonia_dissociation for N2H4), chamber_pressure, area_ratio | exit_pressure; optional "
                   "ambient_pressure | altitude, flow, contraction_ratio, cstar_efficiency, cf_efficiency, "
                   "nozzle_half_angle | divergence_factor, which=vacuum|ambient); "
                   "dry + propellant | mass + propellant_fraction | propellant + structural_ratio; "
                   "optional thrust (gives burn time and thrust-to-weight), name.")
@click.option("--target", default=None, help="Target delta-v with a unit, e.g. '9.3 km/s'.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object in SI units.")
@uncertainty_options("sobol")
@out_option
@units_option
@quote_as_typed
def deltav(payload, stages, target, as_json, vary, samples, seed, sensitivity, samples_out, out, units):
    """Ideal stage and vehicle delta-v from masses and exhaust velocities.

    A stage's exhaust velocity is given (isp, exhaust_velocity) or computed here from its
    engine as a propellant point: delivered with efficiencies, else ideal; vacuum unless
    which=ambient. --vary "stage1.isp=+/-1%" (keys: payload, stageN.KEY with a key the stage
    is given by) adds the spread of total_delta_v, payload_fraction and liftoff_mass.
    """
    from perfchain.api.display import format_delta_v
    from perfchain.api.vehicle import delta_v

    path, units = check_output(out, units)
    names = {"payload": "--payload", "target": "--target", "stage": "--stage {i}"}
    if vary:
        from perfchain.api.uncertainty import delta_v_uncertainty
        from perfchain.cli.uncertainty import print_uncertain

        if target is not None:
            from perfchain.errors import InputError

            raise InputError("--target", target, "no target with --vary (the spread is of the delta-v itself)")
        u = delta_v_uncertainty(list(stages), payload, vary=list(vary), samples=samples, seed=seed,
                                sensitivity=sensitivity, names=names)
        report = u.nominal.to_dict()          # --out writes the nominal vehicle
        print_uncertain(u, as_json, samples_out,
                        "" if as_json else format_delta_v(report, units or "si") + "\n\n" + DELTA_V_CAUTION)
    else:
        report = delta_v(list(stages), payload, target=target, names=names).to_dict()
        click.echo(json_text(report) if as_json else format_delta_v(report, units or "si") + "\n\n" + DELTA_V_CAUTION)
    if path is not None:
        from perfchain.study.outfiles import write_rows

        totals = {k: report[k] for k in ("payload_mass", "liftoff_mass", "payload_fraction", "total_delta_v")}
        totals.update(report.get("target") or {})
        rows = [{"stage": i, **s, **totals} for i, s in enumerate(report["stages"], 1)]
        inputs = {"payload": payload, "stages": list(stages), "target": target, "units": units}
        click.echo(f"wrote {len(rows)} stages to {write_rows(path, rows, units=units, inputs=inputs)}", err=True)
