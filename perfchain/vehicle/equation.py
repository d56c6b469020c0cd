"""The rocket equation and its direct variants: one burn, chunked burns, fixed tanks.

``delta_v = c * ln(m0 / mf)`` with ``c`` the effective exhaust velocity
(``c = Isp * g0``, ``g0 = 9.80665 m/s^2`` exact). SI: masses [kg], speeds [m/s].
"""

from __future__ import annotations

import math

from perfchain.constants import G0
from perfchain.errors import InputError
from perfchain.vehicle.inputs import check_positive

__all__ = ["rocket_delta_v", "exhaust_velocity_from_isp", "discrete_burn_delta_v",
           "fixed_tank_delta_v"]


def rocket_delta_v(exhaust_velocity: float, initial_mass: float, final_mass: float) -> float:
    """Ideal delta-v of a burn from the rocket equation.

    Parameters
    ----------
    exhaust_velocity : float
        Effective exhaust velocity ``c`` [m/s].
    initial_mass, final_mass : float
        Mass before and after the burn [kg]; ``0 < final_mass <= initial_mass``.

    Returns
    -------
    float
        ``c * ln(initial_mass / final_mass)`` [m/s].

    Examples
    --------
    Common textbook worked example: mass ratio 10, c = 4500 m/s -> 10,361.6 m/s.

    >>> round(rocket_delta_v(4500.0, 10.0, 1.0), 1)
    10361.6
    """
    c = check_positive("exhaust_velocity", exhaust_velocity, "m/s")
    m0 = check_positive("initial_mass", initial_mass, "kg")
    mf = check_positive("final_mass", final_mass, "kg")
    if mf > m0:
        raise InputError("final_mass", final_mass, f"at most the initial mass {m0:g} kg")
    return c * math.log(m0 / mf)


def exhaust_velocity_from_isp(isp: float) -> float:
    """Effective exhaust velocity [m/s] from specific impulse [s]: ``c = Isp * g0``.

    Examples
    --------
    g0 = 9.80665 m/s^2 exactly (3rd CGPM, 1901), so 350 s -> 3432.3275 m/s:

    >>> exhaust_velocity_from_isp(350.0)
    3432.3275
    """
    return check_positive("isp", isp, "s") * G0


def discrete_burn_delta_v(c, m0, mp, n, *, relative_to="after") -> float:
    """Delta-v [m/s] when propellant ``mp`` leaves in ``n`` equal chunks at speed ``c``.

    Momentum is conserved at each ejection of a chunk ``dm = mp / n``.
    ``relative_to="after"`` (default): the chunk leaves at ``c`` relative to the
    vehicle *after* the ejection (the relative speed of the two pieces once
    apart), so ``dv_k = c dm / m_before``; this under-shoots the rocket equation.
    ``relative_to="before"``: ``c`` relative to the vehicle's speed *before* the
    ejection, so ``dv_k = c dm / (m_before - dm)``; this over-shoots. Both
    converge to ``c ln(m0 / (m0 - mp))`` with an error falling like ``1/n``.

    Examples
    --------
    Rocket-equation worked example (mass ratio 10, c = 4500 m/s -> 10,361.6 m/s),
    approached from below by a million chunks:

    >>> round(discrete_burn_delta_v(4500.0, 10.0, 9.0, 1_000_000), 1)
    10361.6
    """
    import numpy as np

    c = check_positive("c", c, "m/s")
    m0 = check_positive("m0", m0, "kg")
    mp = check_positive("mp", mp, "kg")
    if mp >= m0:
        raise InputError("mp", mp, f"below the initial mass {m0:g} kg")
    if not isinstance(n, (int, np.integer)) or n < 1:
        raise InputError("n", n, "a whole number of chunks, at least 1")
    if relative_to not in ("after", "before"):
        raise InputError("relative_to", relative_to, "'after' or 'before'")
    dm = mp / n
    m_before = m0 - dm * np.arange(n)
    denom = m_before if relative_to == "after" else m_before - dm
    return float(c * dm * np.sum(1.0 / denom))


def fixed_tank_delta_v(tank_volume, bulk_density, exhaust_velocity, payload_mass,
                       fixed_dry_mass, tank_mass_per_volume) -> float:
    """Delta-v [m/s] of a stage whose tanks of fixed volume are filled full.

    Propellant mass = ``tank_volume * bulk_density``; dry mass =
    ``fixed_dry_mass + tank_mass_per_volume * tank_volume`` (tank mass scales with
    the propellant volume it holds). A denser mixture carries more propellant in
    the same tanks, which is the trade the chemistry side sweeps.

    Parameters
    ----------
    tank_volume : float
        Propellant volume [m^3].
    bulk_density : float
        Mixture bulk density [kg/m^3].
    exhaust_velocity : float
        [m/s].
    payload_mass, fixed_dry_mass, tank_mass_per_volume : float
        [kg], [kg], [kg/m^3]; payload and tank coefficient may be 0.

    Examples
    --------
    Closed form (rocket equation): 1 m^3 at 1000 kg/m^3, dry 100 kg + 50 kg/m^3,
    payload 100 kg -> mass ratio 1250/250 = 5; c = 3000 m/s -> 3000 ln 5:

    >>> round(fixed_tank_delta_v(1.0, 1000.0, 3000.0, 100.0, 100.0, 50.0), 1)
    4828.3
    """
    v = check_positive("tank_volume", tank_volume, "m^3")
    rho = check_positive("bulk_density", bulk_density, "kg/m^3")
    c = check_positive("exhaust_velocity", exhaust_velocity, "m/s")
    fixed = check_positive("fixed_dry_mass", fixed_dry_mass, "kg")
    for field, val in (("payload_mass", payload_mass), ("tank_mass_per_volume", tank_mass_per_volume)):
        if not (isinstance(val, (int, float)) and math.isfinite(val) and val >= 0):
            raise InputError(field, val, "a number of at least 0")
    burnout = payload_mass + fixed + tank_mass_per_volume * v
    return c * math.log((burnout + rho * v) / burnout)
