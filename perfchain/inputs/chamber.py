"""A thrust-chamber design as typed: the operating point plus geometry, contour and wall inputs.

:func:`chamber_args` is what ``perfchain chamber``, :func:`perfchain.chamber` and a study's
thermal block call, so the three refuse the same inputs with the same line and hand
:func:`perfchain.performance.chamber_design.chamber_design` the same SI floats.
"""

from __future__ import annotations

from perfchain.errors import InputError
from perfchain.inputs.fields import choice, count, exactly_one, typed, value
from perfchain.inputs.point import point_args

__all__ = ["chamber_args", "CONTOURS"]

CONTOURS = ("bell", "conical")


def _wall(wall_temperature):
    """One wall temperature [K], or (x [m], T [K]) pairs, each checked."""
    if isinstance(wall_temperature, (list, tuple)):
        if len(wall_temperature) < 2:
            raise InputError("wall_temperature", typed(wall_temperature),
                             "a temperature, or at least two (x, T) pairs")
        out = []
        for pair in wall_temperature:
            if not isinstance(pair, (list, tuple)) or len(pair) != 2:
                raise InputError("wall_temperature", typed(pair), "an (x, T) pair, e.g. ('0.3 m', '900 K')")
            out.append((value("axial_position", pair[0], name="wall_temperature x"),
                        value("wall_temperature", pair[1])))
        if any(b[0] <= a[0] for a, b in zip(out, out[1:])):
            raise InputError("wall_temperature", typed(wall_temperature), "(x, T) pairs with x increasing")
        return out
    return value("wall_temperature", wall_temperature)


def chamber_args(oxidizer=None, fuel=None, *, chamber_pressure, contraction_ratio, characteristic_length=None,
                 thrust=None, throat_diameter=None, thrust_at="vacuum", area_ratio=None, propellant=None,
                 mixture_ratio=None, equivalence_ratio=None, fuel_percent=None, ambient_pressure=None,
                 altitude=None, flow="shifting", cstar_efficiency=None, cf_efficiency=None, losses=None,
                 contour="bell", nozzle_half_angle=None, bell_length_fraction=None, wall_temperature="800 K",
                 points=60, separation=None) -> dict:
    """Check a thrust-chamber design as typed; return the SI keyword arguments of ``chamber_design``.

    Parameters are those of :func:`perfchain.chamber` (quantities as text with a unit, pint
    Quantities or SI numbers).

    Returns
    -------
    dict
        Keyword arguments of :func:`perfchain.performance.chamber_design.chamber_design`
        (``propellant`` a Propellant; pressures [Pa], lengths [m], temperatures [K], angles
        [rad]) and ``characteristic_length_source`` (``"given"`` or ``"typical"``).

    Examples
    --------
    L* defaults to the middle of the pair's typical range (common practice; LOX/RP-1 1.02-1.27 m,
    Sutton & Biblarz, from memory):

    >>> a = chamber_args("LOX", "RP-1", mixture_ratio=2.6, chamber_pressure="70 bar", area_ratio=12,
    ...                  contraction_ratio=4, thrust="50 kN")
    >>> round(a["characteristic_length"], 3), a["characteristic_length_source"], a["contour"]
    (1.145, 'typical', 'bell')
    >>> chamber_args("LOX", "RP-1", mixture_ratio=2.6, chamber_pressure="70 bar", area_ratio=12,
    ...              contraction_ratio="-2", thrust="50 kN")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: contraction_ratio: got '-2'; allowed: a chamber/throat area ratio above 1 and at most 10000 (beyond that the chamber is infinite for all practical purposes)
    """
    from perfchain.nozzle.geometry import typical_characteristic_length
    from perfchain.propellants.mixture import make_propellant

    if contraction_ratio is None:
        raise InputError("contraction_ratio", None, "a chamber/throat area ratio above 1 (required)")
    if area_ratio is None:
        raise InputError("area_ratio", None, "an exit/throat area ratio above 1 (required: the contour needs it)")
    sized_by = exactly_one("throat", thrust=thrust, throat_diameter=throat_diameter)
    args = point_args(oxidizer, fuel, chamber_pressure=chamber_pressure, propellant=propellant,
                      mixture_ratio=mixture_ratio, equivalence_ratio=equivalence_ratio, fuel_percent=fuel_percent,
                      area_ratio=area_ratio, ambient_pressure=ambient_pressure, altitude=altitude, flow=flow,
                      contraction_ratio=contraction_ratio, cstar_efficiency=cstar_efficiency,
                      cf_efficiency=cf_efficiency, losses=losses, thrust=thrust, thrust_at=thrust_at)
    if "altitude" in args:
        from perfchain.atmosphere import pressure

        args["ambient_pressure"] = float(pressure(args.pop("altitude")))
    out = {"chamber_pressure": args["chamber_pressure"], "area_ratio": args["area_ratio"],
           "contraction_ratio": args["contraction_ratio"], "ambient_pressure": args["ambient_pressure"],
           "flow": args["flow"], "losses": args["losses"], "thrust_at": args["thrust_at"],
           "separation": separation}
    if "propellant" in args:
        out["propellant"] = args["propellant"]
    else:
        mix = next(k for k in ("mixture_ratio", "equivalence_ratio", "fuel_percent") if k in args)
        out["propellant"] = make_propellant(args["oxidizer"], args["fuel"], **{mix: args[mix]})
    if sized_by == "thrust":
        out["thrust"] = args["thrust"]
    else:
        out["throat_diameter"] = value("throat_diameter", throat_diameter)
    if characteristic_length is None:
        if "propellant" in args:
            raise InputError("characteristic_length", None, "a length above 0 m (required for a formulation)")
        out["characteristic_length"] = typical_characteristic_length(args["oxidizer"].name, args["fuel"].name)
        out["characteristic_length_source"] = "typical"
    else:
        out["characteristic_length"] = value("characteristic_length", characteristic_length)
        out["characteristic_length_source"] = "given"
    out["contour"] = choice(contour, "contour", CONTOURS)
    if nozzle_half_angle is not None:
        if out["contour"] != "conical":
            raise InputError("nozzle_half_angle", typed(nozzle_half_angle), "only with contour conical")
        out["nozzle_half_angle"] = value("cone_half_angle", nozzle_half_angle, name="nozzle_half_angle")
    if bell_length_fraction is not None:
        if out["contour"] != "bell":
            raise InputError("bell_length_fraction", typed(bell_length_fraction), "only with contour bell")
        out["bell_length_fraction"] = value("bell_length_fraction", bell_length_fraction)
    out["wall_temperature"] = _wall(wall_temperature)
    out["points"] = count(points, "points", "a whole number of contour stations, at least 20", 20)
    return out
