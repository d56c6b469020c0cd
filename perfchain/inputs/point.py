"""A whole operating point: every field checked, then the rules that tie fields together.

:func:`point_args` is what ``perfchain point`` and :func:`perfchain.point` both call, so
the two take the same inputs, refuse the same ones with the same line, and hand
:func:`perfchain.performance.chain.performance` the same SI floats (hence the same
numbers, bit for bit).
"""

from __future__ import annotations

from perfchain.constants import ONE_ATM
from perfchain.errors import InputError, suggest
from perfchain.inputs.fields import choice, exactly_one, ingredient, typed, value
from perfchain.inputs.fields import propellant as check_propellant

__all__ = ["point_args", "propellant_args", "nozzle_args", "loss_args", "EFFICIENCY_KEYWORDS", "THRUST_AT"]

#: keyword of :func:`point_args` -> field of :class:`perfchain.performance.losses.LossModel`
EFFICIENCY_KEYWORDS = {"cstar_efficiency": "cstar_efficiency", "nozzle_half_angle": "conical_half_angle",
                       "divergence_factor": "divergence_factor", "cf_efficiency": "cf_efficiency"}
THRUST_AT = ("vacuum", "ambient")


def point_args(oxidizer=None, fuel=None, *, chamber_pressure, mixture_ratio=None, equivalence_ratio=None,
               fuel_percent=None, area_ratio=None, exit_pressure=None, ambient_pressure=None,
               altitude=None, flow="shifting", contraction_ratio=None, cstar_efficiency=None,
               nozzle_half_angle=None, divergence_factor=None, cf_efficiency=None, losses=None,
               thrust=None, thrust_at="vacuum", propellant=None, ammonia_dissociation=None,
               throat_diameter=None, particle_size=None) -> dict:
    """Check one operating point as typed; return the SI keyword arguments of ``performance``.

    Parameters are those of :func:`perfchain.point` (quantities as text with a
    unit, pint Quantities or SI numbers).

    Returns
    -------
    dict
        Keyword arguments of :func:`perfchain.performance.chain.performance`:
        ingredients as records (or ``propellant`` as a formulation's Propellant),
        pressures [Pa], altitude [m], thrust [N], throat and particle diameters [m], angles [rad],
        ratios and factors [-].

    Examples
    --------
    1000 psi is 6.894757 MPa (NIST SP 811, Appendix B):

    >>> a = point_args("LOX", "RP-1", mixture_ratio="2.56", chamber_pressure="1000 psi", area_ratio=40)
    >>> round(a["chamber_pressure"]), a["mixture_ratio"], a["area_ratio"], a["ambient_pressure"]
    (6894757, 2.56, 40.0, 101325.0)
    >>> point_args("LOX", "RP-1", mixture_ratio=2.56, chamber_pressure="10 bar", exit_pressure="12 bar")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: exit_pressure: got '12 bar'; allowed: a pressure below the chamber pressure (1e+06 Pa)
    """
    mixtures = {"mixture_ratio": mixture_ratio, "equivalence_ratio": equivalence_ratio, "fuel_percent": fuel_percent}
    out = propellant_args(oxidizer, fuel, propellant, mixtures)
    if ammonia_dissociation is not None:
        out["ammonia_dissociation"] = _dissociation(ammonia_dissociation, out)
        if contraction_ratio is not None:
            raise InputError("contraction_ratio", typed(contraction_ratio), "an infinite-area chamber (none given) "
                             "with ammonia_dissociation: the decomposition model has no finite chamber")
    out.update(nozzle_args(chamber_pressure=chamber_pressure, area_ratio=area_ratio, exit_pressure=exit_pressure,
                           ambient_pressure=ambient_pressure, altitude=altitude, flow=flow))
    if contraction_ratio is not None:
        out["contraction_ratio"] = value("contraction_ratio", contraction_ratio)
    out["losses"] = loss_args(losses, cstar_efficiency=cstar_efficiency, nozzle_half_angle=nozzle_half_angle,
                              divergence_factor=divergence_factor, cf_efficiency=cf_efficiency)
    out["thrust"] = None if thrust is None else value("thrust", thrust)
    out["thrust_at"] = choice(thrust_at, "thrust_at", THRUST_AT)
    if throat_diameter is not None:
        if thrust is not None:
            raise InputError("throat_diameter", typed(throat_diameter), "a throat diameter or a thrust to size "
                             "one, not both")
        out["throat_diameter"] = value("throat_diameter", throat_diameter)
    if particle_size is not None:
        out["particle_size"] = value("particle_size", particle_size)
    return out


def propellant_args(oxidizer, fuel, propellant, mixtures: dict) -> dict:
    """The propellant of a point, checked: ``oxidizer`` and ``fuel`` records and one mixture
    keyword, or a formulation as ``propellant`` (then no oxidizer, fuel or mixture).

    Parameters
    ----------
    oxidizer, fuel : str, Ingredient or None
    propellant : str, Mapping, Ingredient, Propellant or None
    mixtures : dict
        ``mixture_ratio``, ``equivalence_ratio``, ``fuel_percent`` as typed (None where not given).

    Returns
    -------
    dict
        ``{"oxidizer", "fuel", <mixture keyword>}`` or ``{"propellant": Propellant}``.

    Examples
    --------
    >>> propellant_args(None, None, "H2O2-98", {"mixture_ratio": None})["propellant"].name
    'H2O2-98'
    >>> propellant_args("LOX", None, "H2O2-98", {})
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: propellant: got 'H2O2-98'; allowed: either propellant or oxidizer and fuel, not both
    """
    from perfchain.propellants.mixture import stoichiometric_mixture_ratio

    if propellant is not None:
        if oxidizer is not None or fuel is not None:
            raise InputError("propellant", _shown(propellant), "either propellant or oxidizer and fuel, not both")
        for key, x in mixtures.items():
            if x is not None:
                raise InputError(key, typed(x), "only with oxidizer and fuel (a formulation has no O/F)")
        return {"propellant": check_propellant(propellant)}
    for key, x in (("oxidizer", oxidizer), ("fuel", fuel)):
        if x is None:
            raise InputError(key, None, f"an ingredient name (with {'fuel' if key == 'oxidizer' else 'oxidizer'} and "
                             "a mixture), or propellant instead: a formulation such as 'AP=0.68, Al=0.18, "
                             "HTPB=0.14' or a monopropellant such as 'H2O2-98'")
    ox, fu = ingredient(oxidizer, "oxidizer"), ingredient(fuel, "fuel")
    stoichiometric_mixture_ratio(ox, fu)   # an oxidizer and a fuel, in that order
    mixture = exactly_one("mixture", **mixtures)
    return {"oxidizer": ox, "fuel": fu, mixture: value(mixture, mixtures[mixture])}


def _shown(x):
    """A propellant as typed, for messages (a mapping as its text form)."""
    if isinstance(x, str):
        return x
    if hasattr(x, "items"):
        return ", ".join(f"{getattr(k, 'name', k)}={typed(v)}" for k, v in x.items())
    return getattr(x, "name", x)


def _dissociation(x, args: dict) -> float:
    """The ammonia dissociation X [-]: 0 to 1, and only for hydrazine alone."""
    from perfchain.propellants.decomposition import check_ammonia_dissociation
    from perfchain.propellants.mixture import Propellant

    v = value("ammonia_dissociation", x)
    prop = args.get("propellant") or Propellant(args["oxidizer"], args["fuel"], None)
    try:
        return check_ammonia_dissociation(v, prop)
    except InputError as exc:
        raise InputError(exc.field, typed(x), exc.allowed) from None


def nozzle_args(*, chamber_pressure, area_ratio=None, exit_pressure=None, ambient_pressure=None,
                altitude=None, flow="shifting", exit_required: bool = True) -> dict:
    """Chamber pressure, exit, ambient and flow of one point, checked as typed, in SI.

    Returns ``chamber_pressure`` [Pa], ``area_ratio`` [-] or ``exit_pressure`` [Pa],
    ``ambient_pressure`` [Pa] or ``altitude`` [m], and ``flow``; with
    ``exit_required=False`` neither exit is also allowed.

    >>> nozzle_args(chamber_pressure="70 bar", area_ratio="40", altitude="0 m")
    {'chamber_pressure': 7000000.0, 'area_ratio': 40.0, 'altitude': 0.0, 'flow': 'shifting'}
    """
    from perfchain.thermo.flow_models import check_flow

    if chamber_pressure is None:
        raise InputError("chamber_pressure", None, "a pressure above 0 Pa")
    pc = value("chamber_pressure", chamber_pressure)
    out = {"chamber_pressure": pc}
    if exit_required or area_ratio is not None or exit_pressure is not None:
        exit_key = exactly_one("exit", area_ratio=area_ratio, exit_pressure=exit_pressure)
        if exit_key == "area_ratio":
            out["area_ratio"] = value("area_ratio", area_ratio)
        else:
            pe = out["exit_pressure"] = value("exit_pressure", exit_pressure)
            if not pe < pc:
                raise InputError("exit_pressure", typed(exit_pressure),
                                 f"a pressure below the chamber pressure ({pc:.6g} Pa)")
    out.update(_ambient(ambient_pressure, altitude, pc))
    out["flow"] = check_flow(flow)
    return out


def _ambient(ambient_pressure, altitude, pc: float) -> dict:
    """``{"ambient_pressure": Pa}`` or ``{"altitude": m}``, below the chamber pressure."""
    if altitude is not None:
        if ambient_pressure is not None:
            raise InputError("altitude", typed(altitude), "either altitude or ambient_pressure, not both")
        from perfchain.atmosphere import pressure

        z = value("altitude", altitude)
        pa, out, field, given = float(pressure(z)), {"altitude": z}, "altitude", altitude
    else:
        given = "1 atm (the default)" if ambient_pressure is None else ambient_pressure
        pa = value("ambient_pressure", ONE_ATM if ambient_pressure is None else ambient_pressure)
        out, field = {"ambient_pressure": pa}, "ambient_pressure"
    if not pa < pc:
        raise InputError(field, typed(given), f"an ambient pressure below the chamber pressure ({pc:.6g} Pa)")
    return out


def loss_args(losses=None, **keywords) -> dict | None:
    """Efficiency factors as a dict of :class:`~perfchain.performance.losses.LossModel` fields (SI).

    Parameters
    ----------
    losses : LossModel or dict, optional
        Any LossModel fields; angles may be text with a unit (``"15 deg"``).
    **keywords
        The single efficiency options of the CLI (:data:`EFFICIENCY_KEYWORDS`);
        ``nozzle_half_angle`` is the LossModel's ``conical_half_angle``.

    Returns
    -------
    dict or None
        None when no factor is given.

    Examples
    --------
    >>> loss_args({"kinetic": 0.99}, cstar_efficiency="0.97")
    {'kinetic': 0.99, 'cstar_efficiency': 0.97}
    """
    from perfchain.performance.losses import LossModel

    fields = list(LossModel.__dataclass_fields__)
    if isinstance(losses, LossModel):
        if any(v is not None for v in keywords.values()):
            raise InputError("losses", "a LossModel and efficiency keywords",
                             "either a LossModel or the single efficiency keywords")
        return {k: getattr(losses, k) for k in fields}
    if losses is not None and not isinstance(losses, dict):
        raise InputError("losses", losses, "a LossModel or a dict of its factors")
    out = {}
    for key, x in (losses or {}).items():
        if key not in fields:
            hint = suggest(str(key), fields)
            raise InputError("losses", key, f"one of {', '.join(fields)}" + (f" ({hint})" if hint else ""))
        if x is not None:
            out[key] = value(key, x)
    for key, x in keywords.items():
        if x is None:
            continue
        target = EFFICIENCY_KEYWORDS[key]
        if target in out:
            raise InputError(key, typed(x), f"given once (losses already holds {target})")
        out[target] = value(key, x)
    return out or None
