"""``perfchain deltav``: stage and vehicle delta-v from the command line.

Parse -> call :mod:`perfchain.vehicle.rocket` -> print. No physics here.
"""

from __future__ import annotations

import json

import click

from perfchain.constants import G0
from perfchain.errors import InputError, suggest
from perfchain.units import to_si
from perfchain.vehicle.rocket import Stage, Vehicle, make_stage, max_payload, propellant_for_delta_v

__all__ = ["parse_stage", "deltav_report", "deltav"]

#: stage key -> (unit kind for perfchain.units.to_si, or None for a plain fraction)
STAGE_KEYS = {
    "isp": "time", "exhaust_velocity": "speed", "dry": "mass", "propellant": "mass",
    "mass": "mass", "propellant_fraction": None, "structural_ratio": None, "thrust": "force",
    "name": "text",
}
_MASS_SETS = ({"dry", "propellant"}, {"mass", "propellant_fraction"},
              {"propellant", "structural_ratio"})
_MASS_KEYS = set().union(*_MASS_SETS)
_ALLOWED_MASSES = "dry + propellant, or mass + propellant_fraction, or propellant + structural_ratio"


def _fraction(text: str, field: str) -> float:
    raw = text.strip()
    scale = 1.0
    if raw.endswith("%"):
        raw, scale = raw[:-1].strip(), 0.01
    try:
        value = float(raw) * scale
    except ValueError:
        raise InputError(field, text, "a fraction between 0 and 1 (exclusive), e.g. '0.85' or '85 %'") from None
    if not 0.0 < value < 1.0:
        raise InputError(field, text, "a fraction between 0 and 1 (exclusive), e.g. '0.85' or '85 %'")
    return value


def parse_stage(text: str, index: int = 1) -> Stage:
    """Turn one ``--stage`` text into a :class:`~perfchain.vehicle.rocket.Stage` (SI inside).

    Comma-separated ``key=value`` pairs. Keys: ``isp`` [time] or
    ``exhaust_velocity`` [speed]; masses as ``dry`` + ``propellant``, or ``mass`` +
    ``propellant_fraction``, or ``propellant`` + ``structural_ratio``; optional
    ``thrust`` [force] and ``name``. Masses, speeds, Isp and thrust need units.

    Examples
    --------
    Curtis, Orbital Mechanics for Engineering Students (from memory): Isp 350 s,
    structural ratio 0.15, 161.5 t of propellant -> 28.5 t dry:

    >>> s = parse_stage("isp=350 s, propellant=161.5 t, structural_ratio=0.15")
    >>> round(s.dry_mass, 6), round(s.exhaust_velocity, 4)
    (28500.0, 3432.3275)
    """
    values = _stage_values(text, index)
    return make_stage(isp=values.get("isp"), exhaust_velocity=values.get("exhaust_velocity"),
                      dry_mass=values.get("dry"), propellant_mass=values.get("propellant"),
                      total_mass=values.get("mass"),
                      propellant_fraction=values.get("propellant_fraction"),
                      structural_ratio=values.get("structural_ratio"),
                      thrust=values.get("thrust"), name=values.get("name", f"stage {index}"))


def _stage_values(text: str, index: int) -> dict:
    """The checked ``key -> SI value`` dict of one ``--stage`` text."""
    where = f"--stage {index}"
    values: dict[str, object] = {}
    for piece in text.split(","):
        if not piece.strip():
            continue
        key, sep, raw = piece.partition("=")
        key = key.strip().lower()
        if not sep or not raw.strip():
            raise InputError(where, piece.strip(), "key=value pairs separated by commas, "
                             "e.g. 'isp=350 s, dry=28.5 t, propellant=161.5 t'")
        if key not in STAGE_KEYS:
            hint = suggest(key, STAGE_KEYS)
            raise InputError(where, key, "one of " + ", ".join(STAGE_KEYS) + ("; " + hint if hint else ""))
        if key in values:
            raise InputError(f"{where}: {key}", raw.strip(), "each key once per stage")
        field, kind = f"{where}: {key}", STAGE_KEYS[key]
        if kind == "text":
            values[key] = raw.strip()
        elif kind is None:
            values[key] = _fraction(raw, field)
        else:
            values[key] = to_si(raw.strip(), kind, field, minimum=0.0)
    given = set(values)
    if len(given & {"isp", "exhaust_velocity"}) != 1:
        raise InputError(where, " and ".join(sorted(given & {"isp", "exhaust_velocity"})) or "neither",
                         "exactly one of isp, exhaust_velocity")
    masses = given & _MASS_KEYS
    if masses not in _MASS_SETS:
        raise InputError(where, ", ".join(sorted(masses)) or "no masses", _ALLOWED_MASSES)
    return values


def deltav_report(payload: str, stages: list[str], target: str | None = None) -> dict:
    """The ``deltav`` result as a plain dict in SI units (what ``--json`` prints).

    Keys: ``payload_mass``, ``liftoff_mass`` [kg], ``payload_fraction`` [-],
    ``total_delta_v`` [m/s], ``stages`` (list, first stage first: ``name``,
    ``exhaust_velocity`` [m/s], ``dry_mass``, ``propellant_mass``,
    ``initial_mass``, ``burnout_mass`` [kg], ``mass_ratio`` [-], ``delta_v``
    [m/s], ``burn_time`` [s] on stages with a thrust), and with a target
    ``target``: ``target_delta_v`` [m/s], ``max_payload`` [kg], and for one stage
    given by structural ratio ``propellant_needed``, ``stage_mass_needed``,
    ``liftoff_mass_needed`` [kg] for the given payload.

    Examples
    --------
    Curtis single stage (from memory; 5.657 km/s with g0 rounded to 9.81):

    >>> r = deltav_report("10 t", ["isp=350 s, dry=28.5 t, propellant=161.5 t"])
    >>> round(r["total_delta_v"], 1), r["payload_fraction"]
    (5655.3, 0.05)
    """
    payload_mass = to_si(payload, "mass", "--payload", minimum=0.0, exclusive=False)
    if not stages:
        raise InputError("--stage", "none", "at least one --stage, first stage first")
    stack = [parse_stage(text, i) for i, text in enumerate(stages, start=1)]
    result = Vehicle(stack, payload_mass).performance()
    out = result.to_dict()
    for row, stage in zip(out["stages"], stack):
        row.update(exhaust_velocity=stage.exhaust_velocity, dry_mass=stage.dry_mass,
                   propellant_mass=stage.propellant_mass)
    if target is not None:
        dv = to_si(target, "speed", "--target", minimum=0.0)
        try:
            best = max_payload(stack, dv)
        except InputError as exc:
            raise InputError("--target", target, exc.allowed) from None
        out["target"] = {"target_delta_v": dv, "max_payload": best}
        if len(stack) == 1 and "structural_ratio" in _stage_values(stages[0], 1):
            if payload_mass <= 0:
                raise InputError("--payload", payload, "a mass above 0 kg to size the "
                                 "propellant for --target")
            need = propellant_for_delta_v(dv, stack[0].exhaust_velocity,
                                          stack[0].structural_ratio, payload_mass)
            out["target"].update(propellant_needed=need.propellant_mass,
                                 stage_mass_needed=need.stage_mass,
                                 liftoff_mass_needed=need.liftoff_mass)
    return out


def _table(r: dict) -> str:
    lines = [f"Ideal delta-v (rocket equation, no losses); payload {r['payload_mass']:.1f} kg, "
             f"lift-off {r['liftoff_mass']:.1f} kg, payload fraction {r['payload_fraction']:.4f}", ""]
    head = ("stage", "c [m/s]", "Isp [s]", "m0 [kg]", "mf [kg]", "m0/mf", "dv [m/s]", "burn [s]")
    rows = []
    for s in r["stages"]:
        burn = s.get("burn_time")
        rows.append((s["name"], f"{s['exhaust_velocity']:.1f}", f"{s['exhaust_velocity'] / G0:.1f}",
                     f"{s['initial_mass']:.1f}", f"{s['burnout_mass']:.1f}", f"{s['mass_ratio']:.4f}",
                     f"{s['delta_v']:.1f}", "-" if burn is None else f"{burn:.1f}"))
    widths = [max(len(x[i]) for x in [head, *rows]) for i in range(len(head))]
    for row in [head, *rows]:
        lines.append("  ".join(cell.ljust(w) if i == 0 else cell.rjust(w)
                               for i, (cell, w) in enumerate(zip(row, widths))))
    lines.append(f"total delta-v {r['total_delta_v']:.1f} m/s")
    t = r.get("target")
    if t:
        lines.append(f"for {t['target_delta_v']:.1f} m/s: largest payload {t['max_payload']:.1f} kg")
        if "propellant_needed" in t:
            lines.append(f"  this stage's exhaust velocity and structural ratio with the given payload "
                         f"need {t['propellant_needed']:.1f} kg propellant, stage "
                         f"{t['stage_mass_needed']:.1f} kg, lift-off {t['liftoff_mass_needed']:.1f} kg")
    return "\n".join(lines)


@click.command("deltav")
@click.option("--payload", required=True, help="Payload mass with a unit, e.g. '10 t'.")
@click.option("--stage", "stages", multiple=True, required=True, metavar="SPEC",
              help="One stage, first stage first (repeat the option): key=value pairs, e.g. "
                   "'isp=350 s, dry=28.5 t, propellant=161.5 t'. Keys: isp | exhaust_velocity; "
                   "dry + propellant | mass + propellant_fraction | propellant + structural_ratio; "
                   "optional thrust, name.")
@click.option("--target", default=None, help="Target delta-v with a unit, e.g. '9.3 km/s'.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object in SI units.")
def deltav(payload, stages, target, as_json):
    """Ideal stage and vehicle delta-v from masses and exhaust velocities."""
    report = deltav_report(payload, list(stages), target)
    click.echo(json.dumps(report, indent=2) if as_json else _table(report))
