"""Stage and vehicle delta-v: the rocket equation, staging and its inverses.

Pure numpy/scipy; never imports Cantera. SI inside: masses [kg], speeds
[m/s], thrust [N], times [s]. The rocket equation is
``delta_v = c * ln(m0 / mf)`` with ``c`` the effective exhaust velocity
(``c = Isp * g0``, ``g0 = 9.80665 m/s^2`` exact).

Mass vocabulary (one stage): *dry mass* = everything but propellant (tanks,
engines, structure); *stage mass* = dry + propellant; *propellant fraction*
= propellant / stage mass; *structural ratio* ``eps`` = dry / stage mass.
The payload of stage ``i`` is everything stacked above it.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass
from typing import Sequence

from perfchain.constants import G0
from perfchain.errors import InputError

__all__ = [
    "rocket_delta_v", "exhaust_velocity_from_isp", "Stage", "make_stage", "Vehicle",
    "StageResult", "VehicleResult", "SingleStageSizing", "propellant_for_delta_v",
    "max_payload", "StagingResult", "stack_for_delta_v_split", "optimal_staging",
    "discrete_burn_delta_v", "fixed_tank_delta_v",
]


def _positive(field: str, value, unit: str) -> float:
    if isinstance(value, bool):
        raise InputError(field, value, f"a number above 0 {unit}")
    try:
        number = float(value)
    except (TypeError, ValueError):
        raise InputError(field, value, f"a number above 0 {unit}") from None
    if not (math.isfinite(number) and number > 0):
        raise InputError(field, value, f"a number above 0 {unit}")
    return number


def _fraction(field: str, value) -> float:
    try:
        number = float(value)
    except (TypeError, ValueError):
        raise InputError(field, value, "a fraction strictly between 0 and 1") from None
    if not (0.0 < number < 1.0):
        raise InputError(field, value, "a fraction strictly between 0 and 1")
    return number


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
    c = _positive("exhaust_velocity", exhaust_velocity, "m/s")
    m0 = _positive("initial_mass", initial_mass, "kg")
    mf = _positive("final_mass", final_mass, "kg")
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
    return _positive("isp", isp, "s") * G0


@dataclass(frozen=True)
class Stage:
    """One stage: exhaust velocity, dry and propellant masses, optional thrust.

    Parameters
    ----------
    exhaust_velocity : float
        Effective exhaust velocity [m/s].
    dry_mass, propellant_mass : float
        [kg], both above 0.
    thrust : float, optional
        Constant thrust [N]; gives the burn time ``propellant * c / thrust``.
    name : str
        Label for tables.

    Examples
    --------
    Curtis, Orbital Mechanics for Engineering Students, rocket vehicle dynamics
    chapter (from memory): 190 t of stage with structural ratio 0.15.

    >>> s = Stage.from_structural_ratio(exhaust_velocity_from_isp(350), 161500.0, 0.15)
    >>> round(s.dry_mass, 6), s.total_mass
    (28500.0, 190000.0)
    """

    exhaust_velocity: float
    dry_mass: float
    propellant_mass: float
    thrust: float | None = None
    name: str = ""

    def __post_init__(self):
        _positive("exhaust_velocity", self.exhaust_velocity, "m/s")
        _positive("dry_mass", self.dry_mass, "kg")
        _positive("propellant_mass", self.propellant_mass, "kg")
        if self.thrust is not None:
            _positive("thrust", self.thrust, "N")

    @classmethod
    def from_isp(cls, isp, dry_mass, propellant_mass, thrust=None, name=""):
        """Stage from specific impulse [s] and dry/propellant masses [kg]."""
        return cls(exhaust_velocity_from_isp(isp), dry_mass, propellant_mass, thrust, name)

    @classmethod
    def from_propellant_fraction(cls, exhaust_velocity, total_mass, propellant_fraction,
                                 thrust=None, name=""):
        """Stage from stage mass [kg] and propellant fraction (propellant / stage mass)."""
        total = _positive("total_mass", total_mass, "kg")
        frac = _fraction("propellant_fraction", propellant_fraction)
        return cls(exhaust_velocity, total * (1.0 - frac), total * frac, thrust, name)

    @classmethod
    def from_structural_ratio(cls, exhaust_velocity, propellant_mass, structural_ratio,
                              thrust=None, name=""):
        """Stage from propellant mass [kg] and structural ratio dry / (dry + propellant)."""
        mp = _positive("propellant_mass", propellant_mass, "kg")
        eps = _fraction("structural_ratio", structural_ratio)
        return cls(exhaust_velocity, mp * eps / (1.0 - eps), mp, thrust, name)

    @property
    def total_mass(self) -> float:
        """Dry plus propellant mass [kg]."""
        return self.dry_mass + self.propellant_mass

    @property
    def structural_ratio(self) -> float:
        """Dry mass / stage mass [-]."""
        return self.dry_mass / self.total_mass

    @property
    def isp(self) -> float:
        """Specific impulse [s]."""
        return self.exhaust_velocity / G0


def make_stage(*, isp=None, exhaust_velocity=None, dry_mass=None, propellant_mass=None,
               total_mass=None, propellant_fraction=None, structural_ratio=None,
               thrust=None, name="") -> Stage:
    """Build a :class:`Stage` from any one accepted way of stating it.

    Exactly one of ``isp`` [s] / ``exhaust_velocity`` [m/s], and exactly one mass
    set: ``dry_mass + propellant_mass``, ``total_mass + propellant_fraction`` or
    ``propellant_mass + structural_ratio`` (masses [kg]).

    Examples
    --------
    The same Curtis stage (from memory) stated three ways:

    >>> a = make_stage(isp=350, dry_mass=28500, propellant_mass=161500)
    >>> b = make_stage(isp=350, total_mass=190000, propellant_fraction=0.85)
    >>> c = make_stage(isp=350, propellant_mass=161500, structural_ratio=0.15)
    >>> round(b.dry_mass, 6) == round(c.dry_mass, 6) == a.dry_mass
    True
    """
    if (isp is None) == (exhaust_velocity is None):
        raise InputError("isp/exhaust_velocity", (isp, exhaust_velocity), "exactly one of the two")
    c = exhaust_velocity_from_isp(isp) if isp is not None else exhaust_velocity
    given = {k for k, v in (("dry_mass", dry_mass), ("propellant_mass", propellant_mass),
                            ("total_mass", total_mass), ("propellant_fraction", propellant_fraction),
                            ("structural_ratio", structural_ratio)) if v is not None}
    if given == {"dry_mass", "propellant_mass"}:
        return Stage(c, dry_mass, propellant_mass, thrust, name)
    if given == {"total_mass", "propellant_fraction"}:
        return Stage.from_propellant_fraction(c, total_mass, propellant_fraction, thrust, name)
    if given == {"propellant_mass", "structural_ratio"}:
        return Stage.from_structural_ratio(c, propellant_mass, structural_ratio, thrust, name)
    raise InputError("masses", ", ".join(sorted(given)) or "none",
                     "dry_mass + propellant_mass, total_mass + propellant_fraction, "
                     "or propellant_mass + structural_ratio")


@dataclass(frozen=True)
class StageResult:
    """Per-stage result, SI: masses [kg], delta_v [m/s], burn_time [s] or None."""

    name: str
    initial_mass: float
    burnout_mass: float
    mass_ratio: float
    delta_v: float
    burn_time: float | None = None

    def to_dict(self) -> dict:
        """Plain dict; ``burn_time`` only when thrust was given."""
        out = asdict(self)
        if out["burn_time"] is None:
            del out["burn_time"]
        return out


@dataclass(frozen=True)
class VehicleResult:
    """Whole-vehicle result: stages, total_delta_v [m/s], payload_fraction [-], liftoff_mass [kg]."""

    stages: tuple[StageResult, ...]
    total_delta_v: float
    payload_fraction: float
    liftoff_mass: float
    payload_mass: float

    def to_dict(self) -> dict:
        """Plain dict in SI (keys as the attributes)."""
        out = asdict(self)
        out["stages"] = [s.to_dict() for s in self.stages]
        return out


@dataclass(frozen=True)
class Vehicle:
    """A stack of stages (first stage first) and a payload [kg] (0 allowed).

    Examples
    --------
    Curtis, Orbital Mechanics for Engineering Students (from memory): payload
    10 t, payload ratio 0.05 of lift-off mass, structural ratio 0.15,
    Isp 350 s -> 5.657 km/s with g0 rounded to 9.81; with exact g0:

    >>> v = Vehicle([Stage.from_isp(350, 28500, 161500)], 10000)
    >>> r = v.performance()
    >>> round(r.total_delta_v / 1000, 3), r.payload_fraction
    (5.655, 0.05)
    """

    stages: Sequence[Stage]
    payload_mass: float = 0.0

    def __post_init__(self):
        object.__setattr__(self, "stages", tuple(self.stages))
        if not self.stages:
            raise InputError("stages", "none", "at least one stage")
        if not all(isinstance(s, Stage) for s in self.stages):
            raise InputError("stages", self.stages, "Stage objects, first stage first")
        p = self.payload_mass
        if not (isinstance(p, (int, float)) and math.isfinite(p) and p >= 0):
            raise InputError("payload_mass", p, "a mass of at least 0 kg")

    @property
    def liftoff_mass(self) -> float:
        """Payload plus all stages [kg]."""
        return self.payload_mass + sum(s.total_mass for s in self.stages)

    def performance(self) -> VehicleResult:
        """Per-stage and total ideal delta-v (no losses) -> :class:`VehicleResult`."""
        results = []
        for i, s in enumerate(self.stages, start=1):
            # burnout mass summed from its parts (never m0 - propellant, which cancels to 0
            # in floating point when the propellant dwarfs everything above it)
            mf = self.payload_mass + s.dry_mass + sum(u.total_mass for u in self.stages[i:])
            m0 = mf + s.propellant_mass
            if not (math.isfinite(m0) and math.isfinite(mf) and mf > 0 and math.isfinite(m0 / mf)):
                raise InputError(f"stage {i}", f"{m0:g} kg / {mf:g} kg",
                                 "masses whose mass ratio is a finite number")
            burn = s.propellant_mass * s.exhaust_velocity / s.thrust if s.thrust else None
            results.append(StageResult(s.name or f"stage {i}", m0, mf, m0 / mf,
                                       s.exhaust_velocity * math.log(m0 / mf), burn))
        total = sum(r.delta_v for r in results)
        return VehicleResult(tuple(results), total, self.payload_mass / self.liftoff_mass,
                             self.liftoff_mass, self.payload_mass)


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


def _shortfall(field, target, reachable):
    raise InputError(field, f"{target:.1f} m/s",
                     f"at most {reachable:.1f} m/s (the vehicle falls short of the target "
                     f"by {target - reachable:.1f} m/s)")


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
    dv = _positive("delta_v", delta_v, "m/s")
    c = _positive("exhaust_velocity", exhaust_velocity, "m/s")
    eps = _fraction("structural_ratio", structural_ratio)
    mpl = _positive("payload_mass", payload_mass, "kg")
    reachable = c * math.log(1.0 / eps)
    if dv >= reachable:
        _shortfall("delta_v", dv, reachable)
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
    dv = _positive("delta_v", delta_v, "m/s")

    def gain(payload):
        return Vehicle(stack, payload).performance().total_delta_v - dv

    best = gain(0.0)
    if best < 0:
        _shortfall("delta_v", dv, best + dv)
    hi = sum(s.total_mass for s in stack)
    limit = 1e12 * hi
    while gain(hi) > 0:
        hi *= 2.0
        if hi > limit:
            raise InputError("target", f"{dv:g} m/s", "a delta-v large enough to bound the payload "
                             "(this stack would carry more than 1e12 times its own mass)")
    return brentq(gain, 0.0, hi, xtol=1e-13 * hi, rtol=1e-14)


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
    cs = [_positive(f"exhaust_velocities[{i}]", c, "m/s") for i, c in enumerate(exhaust_velocities)]
    es = [_fraction(f"structural_ratios[{i}]", e) for i, e in enumerate(structural_ratios)]
    if not cs or len(cs) != len(es):
        raise InputError("structural_ratios", len(es), f"one per stage ({len(cs)} stages)")
    return cs, es, _positive("payload_mass", payload_mass, "kg")


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
    dvs = [_positive(f"delta_v_split[{i}]", d, "m/s") for i, d in enumerate(delta_v_split)]
    if len(dvs) != len(cs):
        raise InputError("delta_v_split", len(dvs), f"one value per stage ({len(cs)} stages)")
    ns = [math.exp(d / c) for d, c in zip(dvs, cs)]
    dry, prop, total, above = [], [], [], mpl
    for i in reversed(range(len(cs))):
        n, eps = ns[i], es[i]
        if n * eps >= 1.0:
            _shortfall(f"delta_v_split[{i}]", dvs[i], cs[i] * math.log(1.0 / eps))
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
    dv = _positive("delta_v", delta_v, "m/s")
    reachable = sum(c * math.log(1.0 / e) for c, e in zip(cs, es))
    if dv >= reachable:
        _shortfall("delta_v", dv, reachable)

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

    c = _positive("c", c, "m/s")
    m0 = _positive("m0", m0, "kg")
    mp = _positive("mp", mp, "kg")
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
    v = _positive("tank_volume", tank_volume, "m^3")
    rho = _positive("bulk_density", bulk_density, "kg/m^3")
    c = _positive("exhaust_velocity", exhaust_velocity, "m/s")
    fixed = _positive("fixed_dry_mass", fixed_dry_mass, "kg")
    for field, val in (("payload_mass", payload_mass), ("tank_mass_per_volume", tank_mass_per_volume)):
        if not (isinstance(val, (int, float)) and math.isfinite(val) and val >= 0):
            raise InputError(field, val, "a number of at least 0")
    burnout = payload_mass + fixed + tank_mass_per_volume * v
    return c * math.log((burnout + rho * v) / burnout)
