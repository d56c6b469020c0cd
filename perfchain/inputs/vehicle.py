"""A stage as typed: keywords or the ``--stage`` text, checked into the SI arguments of a Stage.

:func:`stage_args` serves :func:`perfchain.stage`, :func:`perfchain.delta_v` and ``perfchain
deltav``; :func:`parse_stage_text` reads the command line's ``key=value`` text first.
"""

from __future__ import annotations

from perfchain.errors import InputError, suggest
from perfchain.inputs.fields import value

__all__ = ["stage_args", "parse_stage_text", "STAGE_KEYS", "MASS_SETS"]

#: key of a ``--stage`` text -> keyword of :func:`stage_args`
STAGE_KEYS = {
    "isp": "isp", "exhaust_velocity": "exhaust_velocity", "dry": "dry_mass", "propellant": "propellant_mass",
    "mass": "total_mass", "propellant_fraction": "propellant_fraction", "structural_ratio": "structural_ratio",
    "thrust": "thrust", "name": "name",
}
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

    Examples
    --------
    >>> parse_stage_text("isp=350 s, dry=28.5 t, propellant=161.5 t")
    {'isp': '350 s', 'dry_mass': '28.5 t', 'propellant_mass': '161.5 t'}
    """
    if not isinstance(text, str):
        raise InputError(where, text, "key=value pairs separated by commas")
    out: dict = {}
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
        if STAGE_KEYS[key] in out:
            raise InputError(f"{where}: {key}", raw.strip(), "each key once per stage")
        out[STAGE_KEYS[key]] = raw.strip()
    return out
