"""Uncertainty of a vehicle's delta-v: stage inputs sampled, the rocket equation on arrays.

``stage1.isp=+/-1%``, ``stage2.structural_ratio=0.08..0.1``, ``payload=+/-5%``: each varied
input is one the stage was stated with (its ``--stage`` key or keyword). Every sample goes
through :func:`perfchain.vehicle.sampled.stack_delta_v` at once (vectorised numpy), the same
arithmetic as the one-vehicle path.
"""

from __future__ import annotations

import re

import numpy as np

from perfchain.errors import InputError
from perfchain.inputs.uncertainty import check_draws, check_name, distribution, inside, vary_items
from perfchain.inputs.vehicle import STAGE_KEYS
from perfchain.uncertainty.propagation import propagate

__all__ = ["vehicle_uncertainty", "VEHICLE_OUTPUTS"]

VEHICLE_OUTPUTS = ("total_delta_v", "payload_fraction", "liftoff_mass")
_NAME = re.compile(r"^stage\s*(?P<i>\d+)\.(?P<key>\w+)$", re.IGNORECASE)
_STAGE_FIELDS = ("isp", "exhaust_velocity", "dry_mass", "propellant_mass", "total_mass", "propellant_fraction",
                 "structural_ratio")


def _target(name: str, stage_args: list) -> tuple:
    """``"stage1.isp"`` -> (stage index, keyword); ``"payload"`` -> (None, "payload")."""
    if name == "payload":
        return None, "payload"
    m = _NAME.match(name)
    allowed = ["payload"] + [f"stage{i}.{k}" for i, a in enumerate(stage_args, 1) for k in
                             [t for t, kw in STAGE_KEYS.items() if kw in a and kw in _STAGE_FIELDS]]
    if not m or not 1 <= int(m["i"]) <= len(stage_args):
        check_name(name, allowed)
    i, key = int(m["i"]) - 1, m["key"].lower()
    kw = STAGE_KEYS.get(key, key)
    if kw not in stage_args[i] or kw not in _STAGE_FIELDS:
        check_name(name, allowed)
    return i, kw


def vehicle_uncertainty(stage_args: list, payload: float, vary, *, samples=None, seed=None,
                        sensitivity="sobol"):
    """Spread of a vehicle's delta-v and payload fraction when stage inputs are uncertain.

    Parameters
    ----------
    stage_args : list of dict
        Each stage's checked keywords (:func:`perfchain.inputs.vehicle.stage_args`), first stage first.
    payload : float
        Payload mass [kg].
    vary : mapping or list of str
        ``{"stage1.isp": "+/-1%"}`` or ``["stage1.isp=+/-1%"]``; keys are ``payload`` and
        ``stageN.KEY`` with KEY one the stage was stated with (``isp``, ``dry``, ``propellant``,
        ``mass``, ``propellant_fraction``, ``structural_ratio``, ``exhaust_velocity`` or the
        keyword names ``dry_mass``...).
    samples, seed, sensitivity
        As in :func:`perfchain.study.uncertainty.point_uncertainty` (default ``"sobol"``
        here: the samples are cheap).

    Returns
    -------
    Propagation

    Examples
    --------
    Closed form: Isp 350 s +/- 1 % (normal, 2 sigma) on the Curtis stage (from memory;
    mass ratio 200/38.5) gives delta-v std g0 * 1.75 s * ln(200/38.5) = 28.3 m/s:

    >>> s = {"isp": 350.0, "dry_mass": 28500.0, "propellant_mass": 161500.0}
    >>> p = vehicle_uncertainty([s], 10000.0, {"stage1.isp": "+/-1%"}, samples=4096)
    >>> round(p.uncertainty_block()["total_delta_v"]["std"], 1)
    28.3
    """
    from perfchain.vehicle.sampled import stack_delta_v, stage_arrays

    n, seed, method = check_draws(samples, seed, sensitivity)
    names, dists, nominal, targets = [], [], [], []
    for key, spec in vary_items(vary):
        i, kw = _target(key, stage_args)
        x0 = payload if i is None else stage_args[i][kw]
        field = "payload" if i is None else kw
        dists.append(distribution(spec, field, x0, name=key))
        names.append(key)
        nominal.append(x0)
        targets.append((i, kw))
    if not names:
        raise InputError("vary", vary, "at least one input and its distribution, e.g. 'stage1.isp=+/-1%'")

    def model(X):
        per_stage = [dict(a) for a in stage_args]
        mass = np.full(len(X), float(payload))
        ok = np.ones(len(X), bool)
        for j, (i, kw) in enumerate(targets):
            ok &= inside("payload" if i is None else kw, X[:, j])
            if i is None:
                mass = X[:, j]
            else:
                per_stage[i][kw] = X[:, j]
        got = stack_delta_v([stage_arrays(a) for a in per_stage], mass)
        out = {k: np.where(ok, got[k], np.nan) for k in VEHICLE_OUTPUTS}
        bad = ~np.isfinite(out["total_delta_v"])
        reasons = [None] * len(X)
        for r in np.nonzero(bad)[0]:
            reasons[r] = "an input outside its allowed range" if not ok[r] else "masses with no finite mass ratio"
        return out, reasons

    return propagate(model, names, dists, nominal, samples=n, seed=seed, method=method)
