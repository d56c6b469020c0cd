"""Inverse problems of the rocket equation: propellant for a delta-v, largest payload.

SI: masses [kg], speeds [m/s].
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass
from typing import Sequence

from perfchain.errors import InputError
from perfchain.vehicle.inputs import check_fraction, check_positive, raise_shortfall
from perfchain.vehicle.stages import Stage, Vehicle

__all__ = ["SingleStageSizing", "propellant_for_delta_v", "max_payload"]


@dataclass(frozen=True)
class SingleStageSizing:
    """Single stage sized for a delta-v: masses [kg], mass_ratio [-]."""

    propellant_mass: float
    dry_mass: float
    stage_mass: float
    liftoff_mass: float
    mass_ratio: float

    def to_dict(self) -> dict:
        """Plain dict in SI."""
        return asdict(self)


def propellant_for_delta_v(delta_v, exhaust_velocity, structural_ratio,
                           payload_mass) -> SingleStageSizing:
    """Propellant and stage mass one stage needs to give ``delta_v`` to a payload.

    With ``n = exp(delta_v / c)`` and ``eps`` = dry / stage mass, the rocket
    equation solved for propellant (closed form):
    ``mp = (n - 1) (1 - eps) m_payload / (1 - n eps)``. Reachable only if
    ``n < 1/eps``, i.e. ``delta_v < c ln(1/eps)``; otherwise InputError says by
    how much the target is out of reach.

    Parameters
    ----------
    delta_v : float
        Target [m/s].
    exhaust_velocity : float
        [m/s].
    structural_ratio : float
        Dry / (dry + propellant), in (0, 1).
    payload_mass : float
        [kg], above 0.

    Examples
    --------
    Inverse of the Curtis single stage (from memory): 10 t payload, eps 0.15,
    Isp 350 s, 5655.3 m/s needs 161.5 t of propellant:

    >>> s = propellant_for_delta_v(5655.305726, 350 * 9.80665, 0.15, 10000)
    >>> round(s.propellant_mass), round(s.liftoff_mass)
    (161500, 200000)
    """
    dv = check_positive("delta_v", delta_v, "m/s")
    c = check_positive("exhaust_velocity", exhaust_velocity, "m/s")
    eps = check_fraction("structural_ratio", structural_ratio)
    mpl = check_positive("payload_mass", payload_mass, "kg")
    reachable = c * math.log(1.0 / eps)
    if dv >= reachable:
        raise_shortfall("delta_v", dv, reachable)
    n = math.exp(dv / c)
    mp = (n - 1.0) * (1.0 - eps) * mpl / (1.0 - n * eps)
    dry = mp * eps / (1.0 - eps)
    return SingleStageSizing(mp, dry, mp + dry, mp + dry + mpl, n)


def max_payload(stages: Sequence[Stage], delta_v: float) -> float:
    """Largest payload [kg] the given stack can bring to ``delta_v`` [m/s].

    Delta-v falls monotonically as payload grows, so the root is bracketed
    between 0 and a payload large enough, and found with Brent's method. If even
    zero payload cannot reach the target, InputError says by how much it falls short.

    Examples
    --------
    Curtis single stage (from memory): the 190 t stage gives 5655.3 m/s (exact g0)
    to a 10 t payload, so that is the largest payload for that delta-v:

    >>> round(max_payload([Stage.from_isp(350, 28500, 161500)], 5655.305726))
    10000
    """
    from scipy.optimize import brentq

    stack = tuple(stages)
    dv = check_positive("delta_v", delta_v, "m/s")

    def gain(payload):
        return Vehicle(stack, payload).performance().total_delta_v - dv

    best = gain(0.0)
    if best < 0:
        raise_shortfall("delta_v", dv, best + dv)
    hi = sum(s.total_mass for s in stack)
    limit = 1e12 * hi
    while gain(hi) > 0:
        hi *= 2.0
        if hi > limit:
            raise InputError("target", f"{dv:g} m/s", "a delta-v large enough to bound the payload "
                             "(this stack would carry more than 1e12 times its own mass)")
    return brentq(gain, 0.0, hi, xtol=1e-13 * hi, rtol=1e-14)
