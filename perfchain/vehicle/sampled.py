"""Stage and vehicle delta-v of many samples at once: the rocket equation on numpy arrays.

The same arithmetic, in the same order, as :meth:`perfchain.vehicle.stages.Vehicle.performance`
and the stage constructors of :mod:`perfchain.vehicle.stages`, so a sample gives the bits the
one-vehicle path gives; a sample whose masses or speeds are not positive and finite gives NaN.
"""

from __future__ import annotations

import numpy as np

from perfchain.constants import G0

__all__ = ["stage_arrays", "stack_delta_v"]


def stage_arrays(args: dict) -> tuple:
    """(exhaust velocity [m/s], dry mass [kg], propellant mass [kg]) arrays of one stage's samples.

    Parameters
    ----------
    args : dict
        The keywords of :func:`perfchain.vehicle.stages.make_stage` (one of ``isp`` [s] /
        ``exhaust_velocity`` [m/s] and one mass set), each a float or an array of samples.

    Returns
    -------
    tuple of numpy.ndarray

    Examples
    --------
    Curtis, Orbital Mechanics for Engineering Students (from memory): 161.5 t of propellant at
    structural ratio 0.15 is 28.5 t dry:

    >>> c, dry, mp = stage_arrays({"isp": np.array([350.0]), "propellant_mass": 161500.0,
    ...                            "structural_ratio": 0.15})
    >>> round(float(dry[0]), 6), float(mp[0])
    (28500.0, 161500.0)
    """
    a = {k: np.asarray(v, dtype=float) for k, v in args.items() if k not in ("name", "thrust")}
    c = a["isp"] * G0 if "isp" in a else a["exhaust_velocity"]
    if "dry_mass" in a:
        dry, mp = a["dry_mass"], a["propellant_mass"]
    elif "total_mass" in a:
        dry, mp = a["total_mass"] * (1.0 - a["propellant_fraction"]), a["total_mass"] * a["propellant_fraction"]
    else:
        mp = a["propellant_mass"]
        dry = mp * a["structural_ratio"] / (1.0 - a["structural_ratio"])
    c, dry, mp = np.broadcast_arrays(c, dry, mp)
    return c, dry, mp


def stack_delta_v(stages, payload_mass) -> dict:
    """Ideal delta-v of a stack for every sample (rocket equation, no losses).

    Parameters
    ----------
    stages : sequence of (exhaust velocity, dry mass, propellant mass)
        First stage first, each an array of samples [m/s], [kg], [kg] (:func:`stage_arrays`).
    payload_mass : float or array_like
        [kg], 0 or more.

    Returns
    -------
    dict
        ``total_delta_v`` [m/s], ``payload_fraction`` [-], ``liftoff_mass`` [kg], and
        ``delta_v`` [m/s] of each stage (shape (stages, samples)); NaN where a sample's
        inputs are not physical.

    Examples
    --------
    The Curtis stage (from memory): 350 s, 28.5 t dry, 161.5 t propellant, 10 t payload:
    350 g0 ln(200/38.5) = 5655.3 m/s and payload fraction 0.05 (closed form):

    >>> r = stack_delta_v([stage_arrays({"isp": [350.0], "dry_mass": 28500.0,
    ...                                  "propellant_mass": 161500.0})], 10000.0)
    >>> round(float(r["total_delta_v"][0]), 1), float(r["payload_fraction"][0])
    (5655.3, 0.05)
    """
    stages = [tuple(np.asarray(x, dtype=float) for x in s) for s in stages]
    payload = np.asarray(payload_mass, dtype=float)
    totals = [dry + mp for _, dry, mp in stages]
    dvs, total = [], 0.0
    ok = np.isfinite(payload) & (payload >= 0)
    for i, (c, dry, mp) in enumerate(stages):
        above = 0.0
        for t in totals[i + 1:]:
            above = above + t
        mf = payload + dry + above
        m0 = mf + mp
        with np.errstate(all="ignore"):
            dv = c * np.log(m0 / mf)
        ok = ok & (c > 0) & (dry > 0) & (mp > 0) & np.isfinite(dv)
        dvs.append(dv)
        total = total + dv
    stack = 0.0
    for t in totals:
        stack = stack + t
    liftoff = payload + stack
    with np.errstate(all="ignore"):
        fraction = payload / liftoff
    nan = np.where(ok, 1.0, np.nan)
    return {"total_delta_v": total * nan, "payload_fraction": fraction * nan, "liftoff_mass": liftoff * nan,
            "delta_v": np.array(dvs) * nan}
