"""A stage as typed: keywords or the ``--stage`` text, checked into the SI arguments of a Stage.

:func:`stage_args` serves :func:`perfchain.stage`, :func:`perfchain.delta_v` and ``perfchain
deltav``; :func:`parse_stage_text` reads the command line's ``key=value`` text first.
"""

from __future__ import annotations

from perfchain.errors import InputError, suggest
from perfchain.inputs.fields import value

__all__ = ["stage_args", "parse_stage_text", "engine_args", "STAGE_KEYS", "ENGINE_KEYS", "MASS_SETS", "WHICH"]

#: key of a ``--stage`` text -> keyword of :func:`stage_args`
STAGE_KEYS = {
    "isp": "isp", "exhaust_velocity": "exhaust_velocity", "dry": "dry_mass", "propellant": "propellant_mass",
    "mass": "total_mass", "propellant_fraction": "propellant_fraction", "structural_ratio": "structural_ratio",
    "thrust": "thrust", "name": "name",
}
#: keys that state a stage's engine as a propellant point instead of ``isp`` / ``exhaust_velocity``
#: (the ``point`` options; ``which``: the vacuum or the ambient exhaust velocity)
ENGINE_KEYS = ("oxidizer", "fuel", "mixture_ratio", "formulation", "ammonia_dissociation", "chamber_pressure",
               "area_ratio", "exit_pressure", "ambient_pressure", "altitude", "flow", "contraction_ratio",
               "cstar_efficiency", "cf_efficiency", "nozzle_half_angle", "divergence_factor", "which")
WHICH = ("vacuum", "ambient")
#: the three ways of stating a stage's masses (keywords of :func:`stage_args`)
MASS_SETS = ({"dry_mass", "propellant_mass"}, {"total_mass", "propellant_fraction"},
             {"propellant_mass", "structural_ratio"})


def stage_args(*, isp=None, exhaust_velocity=None, dry_mass=None, propellant_mass=None, total_mass=None,
               propellant_fraction=None, structural_ratio=None, thrust=None, name="", keys=None,
               prefix="", where="stage") -> dict:
    """Check one stage; return the SI keyword arguments of :func:`perfchain.vehicle.rocket.make_stage`.

    Parameters
    ----------
    isp, exhaust_velocity : str, Quantity or float
        Exactly one: specific impulse [s] or effective exhaust velocity [m/s].
    dry_mass, propellant_mass, total_mass : str, Quantity or float
        [kg]; with the fractions, one of :data:`MASS_SETS`.
    propellant_fraction, structural_ratio : float or str
        In (0, 1), or a percentage text (``"85 %"``).
    thrust : str, Quantity or float, optional
        [N]
    name : str
    keys : dict, optional
        keyword -> the key the user typed, for messages (the CLI's ``dry``, ``propellant``...).
    prefix : str
        Put before a key in messages (the CLI's ``"--stage 1: "``).
    where : str
        Name of the whole stage in messages about its set of keys.

    Returns
    -------
    dict

    Examples
    --------
    The Curtis stage (from memory): Isp 350 s, 161.5 t of propellant at structural ratio 0.15:

    >>> a = stage_args(isp="350 s", propellant_mass="161.5 t", structural_ratio="15 %")
    >>> a["isp"], a["propellant_mass"], a["structural_ratio"]
    (350.0, 161500.0, 0.15)
    >>> stage_args(isp="350 s", propellant_mass="2 t")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: stage: got 'propellant_mass'; allowed: dry_mass + propellant_mass, or total_mass + propellant_fraction, or propellant_mass + structural_ratio
    """
    given = {k: v for k, v in dict(isp=isp, exhaust_velocity=exhaust_velocity, dry_mass=dry_mass,
                                    propellant_mass=propellant_mass, total_mass=total_mass,
                                    propellant_fraction=propellant_fraction, structural_ratio=structural_ratio,
                                    thrust=thrust).items() if v is not None}
    keys = keys or {}

    def key(k):
        return keys.get(k, k)

    out = {k: value(k, v, name=prefix + key(k)) for k, v in given.items()}
    speeds = [k for k in ("isp", "exhaust_velocity") if k in given]
    if len(speeds) != 1:
        raise InputError(where, " and ".join(key(k) for k in speeds) or "neither",
                         f"exactly one of {key('isp')}, {key('exhaust_velocity')}")
    masses = set(given) - {"isp", "exhaust_velocity", "thrust"}
    if masses not in MASS_SETS:
        raise InputError(where, ", ".join(sorted(key(k) for k in masses)) or "no masses",
                         ", or ".join(" + ".join(key(k) for k in s) for s in _ORDERED_SETS))
    out["name"] = str(name)
    return out


_ORDERED_SETS = (("dry_mass", "propellant_mass"), ("total_mass", "propellant_fraction"),
                 ("propellant_mass", "structural_ratio"))


def parse_stage_text(text: str, where: str = "--stage 1") -> dict:
    """``"isp=350 s, dry=28.5 t, propellant=161.5 t"`` -> the keywords of :func:`stage_args` (as typed).

    Parameters
    ----------
    text : str
        Comma-separated ``key=value`` pairs; keys of :data:`STAGE_KEYS`.
    where : str
        Name of this stage in messages.

    ``formulation=`` (an engine burning a solid grain or other formulation, the ``--propellant``
    of ``perfchain point``; ``propellant`` is the stage's propellant mass here) takes the
    ``NAME=FRACTION`` pieces after it, up to the next key.

    Examples
    --------
    >>> parse_stage_text("isp=350 s, dry=28.5 t, propellant=161.5 t")
    {'isp': '350 s', 'dry_mass': '28.5 t', 'propellant_mass': '161.5 t'}
    >>> parse_stage_text("formulation=AP=0.86, HTPB=0.14, chamber_pressure=50 bar")
    {'formulation': 'AP=0.86, HTPB=0.14', 'chamber_pressure': '50 bar'}
    """
    if not isinstance(text, str):
        raise InputError(where, text, "key=value pairs separated by commas")
    out: dict = {}
    last = None
    for piece in text.split(","):
        if not piece.strip():
            continue
        key, sep, raw = piece.partition("=")
        key = key.strip().lower()
        if last == "formulation" and sep and key not in STAGE_KEYS and key not in ENGINE_KEYS:
            out["formulation"] += ", " + piece.strip()   # the next part of the formulation
            continue
        last = key
        if not sep or not raw.strip():
            raise InputError(where, piece.strip(), "key=value pairs separated by commas, "
                             "e.g. 'isp=350 s, dry=28.5 t, propellant=161.5 t'")
        if key not in STAGE_KEYS and key not in ENGINE_KEYS:
            known = list(STAGE_KEYS) + list(ENGINE_KEYS)
            hint = suggest(key, known)
            raise InputError(where, key, "one of " + ", ".join(known) + ("; " + hint if hint else ""))
        keyword = STAGE_KEYS.get(key, key)
        if keyword in out:
            raise InputError(f"{where}: {key}", raw.strip(), "each key once per stage")
        out[keyword] = raw.strip()
    return out


def engine_args(engine: dict, prefix: str = "") -> tuple[dict, str]:
    """A stage's engine (keys of :data:`ENGINE_KEYS`, as typed) -> the SI point arguments and ``which``.

    Parameters
    ----------
    engine : dict
        ``oxidizer``, ``fuel``, ``mixture_ratio``, ``chamber_pressure``, an exit, and optionally
        ambient, flow, contraction ratio, efficiencies and ``which`` (``vacuum``, the default, or
        ``ambient``), as :func:`perfchain.inputs.point_args` takes them.
    prefix : str
        Put before a key in messages (the CLI's ``"--stage 1: "``).

    Returns
    -------
    (dict, str)
        The keyword arguments of :func:`perfchain.performance.chain.performance`, and ``which``.

    Examples
    --------
    1000 psi is 6.894757 MPa (NIST SP 811, Appendix B):

    >>> args, which = engine_args({"oxidizer": "LOX", "fuel": "RP-1", "mixture_ratio": "2.56",
    ...                            "chamber_pressure": "1000 psi", "area_ratio": "40"})
    >>> round(args["chamber_pressure"]), args["area_ratio"], which
    (6894757, 40.0, 'vacuum')
    >>> engine_args({"oxidizer": "LOX", "fuel": "RP-1", "mixture_ratio": "2.56", "area_ratio": "40"}, "--stage 1: ")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: --stage 1: chamber_pressure: got 'missing'; allowed: a chamber pressure with a unit, e.g. '70 bar' (an engine needs oxidizer, fuel and mixture_ratio, or a formulation; chamber_pressure and an exit)
    """
    from perfchain.inputs.fields import choice
    from perfchain.inputs.point import point_args

    given = dict(engine)
    which = given.pop("which", "vacuum")
    if "formulation" in given:
        given["propellant"] = given.pop("formulation")
    if given.get("chamber_pressure") is None:
        raise InputError(prefix + "chamber_pressure", "missing", "a chamber pressure with a unit, e.g. '70 bar' "
                         "(an engine needs oxidizer, fuel and mixture_ratio, or a formulation; chamber_pressure "
                         "and an exit)")
    try:
        which = choice(which, "which", WHICH)
        return point_args(chamber_pressure=given.pop("chamber_pressure", None), **given), which
    except InputError as exc:   # the stage's own key for the point's propellant
        field = "formulation" + str(exc.field)[10:] if str(exc.field).startswith("propellant") else str(exc.field)
        raise InputError(prefix + field, exc.value, exc.allowed.replace("either propellant", "either formulation")
                         .replace("propellant N2H4", "formulation N2H4")) from None
