"""``perfchain deltav``: stage and vehicle delta-v from the command line.

Parse -> call :func:`perfchain.api.vehicle.delta_v` (stages checked by :mod:`perfchain.inputs`)
-> print. No physics here.
"""

from __future__ import annotations

import click

from perfchain.cli.edges import json_text, quote_as_typed

__all__ = ["deltav"]


@click.command("deltav")
@click.option("--payload", required=True, help="Payload mass with a unit, e.g. '10 t'.")
@click.option("--stage", "stages", multiple=True, required=True, metavar="SPEC",
              help="One stage, first stage first (repeat the option): key=value pairs, e.g. "
                   "'isp=350 s, dry=28.5 t, propellant=161.5 t'. Keys: isp | exhaust_velocity; "
                   "dry + propellant | mass + propellant_fraction | propellant + structural_ratio; "
                   "optional thrust, name.")
@click.option("--target", default=None, help="Target delta-v with a unit, e.g. '9.3 km/s'.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object in SI units.")
@quote_as_typed
def deltav(payload, stages, target, as_json):
    """Ideal stage and vehicle delta-v from masses and exhaust velocities."""
    from perfchain.api.display import format_delta_v
    from perfchain.api.vehicle import delta_v

    names = {"payload": "--payload", "target": "--target", "stage": "--stage {i}"}
    report = delta_v(list(stages), payload, target=target, names=names).to_dict()
    click.echo(json_text(report) if as_json else format_delta_v(report))
