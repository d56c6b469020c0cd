"""Staging: a stack sized for a given delta-v split, and the split that minimises lift-off mass.

SI: masses [kg], speeds [m/s]; the Lagrange multiplier in [s/m].
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass

from perfchain.errors import InputError
from perfchain.vehicle.inputs import check_fraction, check_positive, raise_shortfall
from perfchain.vehicle.stages import Stage, Vehicle

__all__ = ["StagingResult", "stack_for_delta_v_split", "optimal_staging"]


@dataclass(frozen=True)
class StagingResult:
    """A stack sized for a delta-v split: per-stage lists first stage first; masses [kg]."""

    mass_ratios: tuple[float, ...]
    delta_v_split: tuple[float, ...]
    exhaust_velocities: tuple[float, ...]
    dry_masses: tuple[float, ...]
    propellant_masses: tuple[float, ...]
    stage_masses: tuple[float, ...]
    payload_mass: float
    liftoff_mass: float
    lagrange_multiplier: float | None = None

    def vehicle(self) -> Vehicle:
        """The sized stack as a :class:`Vehicle`."""
        stages = [Stage(c, d, p) for c, d, p in
                  zip(self.exhaust_velocities, self.dry_masses, self.propellant_masses)]
        return Vehicle(stages, self.payload_mass)

    def to_dict(self) -> dict:
        """Plain dict in SI (tuples as lists)."""
        return {k: list(v) if isinstance(v, tuple) else v for k, v in asdict(self).items()}


def _stack_inputs(exhaust_velocities, structural_ratios, payload_mass):
    cs = [check_positive(f"exhaust_velocities[{i}]", c, "m/s") for i, c in enumerate(exhaust_velocities)]
    es = [check_fraction(f"structural_ratios[{i}]", e) for i, e in enumerate(structural_ratios)]
    if not cs or len(cs) != len(es):
        raise InputError("structural_ratios", len(es), f"one per stage ({len(cs)} stages)")
    return cs, es, check_positive("payload_mass", payload_mass, "kg")


def stack_for_delta_v_split(delta_v_split, exhaust_velocities, structural_ratios,
                            payload_mass, *, lagrange_multiplier=None) -> StagingResult:
    """Size a stack, top down, so that stage ``i`` gives ``delta_v_split[i]``.

    Stage ``i`` with mass ratio ``n`` carrying ``M`` above it has stage mass
    ``(n - 1) M / (1 - n eps)`` (closed form from the rocket equation).

    Examples
    --------
    Curtis two equal stages (from memory): each 3703.4 m/s at Isp 350 s with
    g0 = 9.81, eps 0.15 and 10 t payload -> lift-off mass 200 t:

    >>> r = stack_for_delta_v_split([3703.42877] * 2, [350 * 9.81] * 2, [0.15] * 2, 10000)
    >>> round(r.liftoff_mass, -1)
    200000.0
    """
    cs, es, mpl = _stack_inputs(exhaust_velocities, structural_ratios, payload_mass)
    dvs = [check_positive(f"delta_v_split[{i}]", d, "m/s") for i, d in enumerate(delta_v_split)]
    if len(dvs) != len(cs):
        raise InputError("delta_v_split", len(dvs), f"one value per stage ({len(cs)} stages)")
    ns = [math.exp(d / c) for d, c in zip(dvs, cs)]
    dry, prop, total, above = [], [], [], mpl
    for i in reversed(range(len(cs))):
        n, eps = ns[i], es[i]
        if n * eps >= 1.0:
            raise_shortfall(f"delta_v_split[{i}]", dvs[i], cs[i] * math.log(1.0 / eps))
        m = (n - 1.0) * above / (1.0 - n * eps)
        dry.insert(0, eps * m)
        prop.insert(0, (1.0 - eps) * m)
        total.insert(0, m)
        above += m
    return StagingResult(tuple(ns), tuple(dvs), tuple(cs), tuple(dry), tuple(prop),
                         tuple(total), mpl, above, lagrange_multiplier)


def optimal_staging(delta_v, exhaust_velocities, structural_ratios, payload_mass) -> StagingResult:
    """Delta-v split among stages that minimises lift-off mass (Lagrange multiplier).

    Classical method (Curtis, Orbital Mechanics for Engineering Students, section
    on optimal staging; from memory, re-derived here): minimise
    ``ln(m0/m_payload) = sum ln[n_i (1 - eps_i) / (1 - n_i eps_i)]`` subject to
    ``sum c_i ln n_i = delta_v``. Stationarity gives
    ``n_i = (c_i eta - 1) / (c_i eps_i eta)``; the multiplier ``eta`` [s/m] is the
    root of the constraint, found with Brent's method on
    ``eta > max 1 / (c_i (1 - eps_i))`` (where every ``n_i > 1``).

    Parameters
    ----------
    delta_v : float
        Target [m/s].
    exhaust_velocities : sequence of float
        [m/s], first stage first.
    structural_ratios : sequence of float
        Dry / stage mass per stage, in (0, 1).
    payload_mass : float
        [kg].

    Examples
    --------
    Curtis (from memory): two identical stages, Isp 350 s (g0 = 9.81), eps 0.15,
    10 t payload, 7.407 km/s -> 200 t lift-off, equal split:

    >>> r = optimal_staging(7406.85755, [350 * 9.81] * 2, [0.15] * 2, 10000)
    >>> round(r.liftoff_mass, -1), [round(d, 2) for d in r.delta_v_split]
    (200000.0, [3703.43, 3703.43])
    """
    from scipy.optimize import brentq

    cs, es, mpl = _stack_inputs(exhaust_velocities, structural_ratios, payload_mass)
    dv = check_positive("delta_v", delta_v, "m/s")
    reachable = sum(c * math.log(1.0 / e) for c, e in zip(cs, es))
    if dv >= reachable:
        raise_shortfall("delta_v", dv, reachable)

    def split(eta):
        return [c * math.log((c * eta - 1.0) / (c * e * eta)) for c, e in zip(cs, es)]

    lo = max(1.0 / (c * (1.0 - e)) for c, e in zip(cs, es))
    if sum(split(lo)) > dv:
        raise InputError("delta_v", f"{dv:.1f} m/s",
                         f"above {sum(split(lo)):.1f} m/s for this stack; below it the "
                         "optimum drops a stage: use fewer stages")
    hi = 2.0 * lo
    while sum(split(hi)) < dv:
        hi *= 2.0
    eta = brentq(lambda x: sum(split(x)) - dv, lo, hi, xtol=1e-15 * hi, rtol=1e-14)
    return stack_for_delta_v_split(split(eta), cs, es, mpl, lagrange_multiplier=eta)
