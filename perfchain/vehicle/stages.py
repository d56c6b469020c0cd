"""Stages and vehicles: the three ways of stating a stage's masses, and a stack's delta-v.

Mass vocabulary (one stage): *dry mass* = everything but propellant (tanks,
engines, structure); *stage mass* = dry + propellant; *propellant fraction*
= propellant / stage mass; *structural ratio* ``eps`` = dry / stage mass.
The payload of stage ``i`` is everything stacked above it. SI: masses [kg],
speeds [m/s], thrust [N], times [s].
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass
from typing import Sequence

from perfchain.constants import G0
from perfchain.errors import InputError
from perfchain.vehicle.equation import exhaust_velocity_from_isp
from perfchain.vehicle.inputs import check_fraction, check_positive

__all__ = ["Stage", "make_stage", "StageResult", "VehicleResult", "Vehicle"]


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
        check_positive("exhaust_velocity", self.exhaust_velocity, "m/s")
        check_positive("dry_mass", self.dry_mass, "kg")
        check_positive("propellant_mass", self.propellant_mass, "kg")
        if self.thrust is not None:
            check_positive("thrust", self.thrust, "N")

    @classmethod
    def from_isp(cls, isp, dry_mass, propellant_mass, thrust=None, name=""):
        """Stage from specific impulse [s] and dry/propellant masses [kg]."""
        return cls(exhaust_velocity_from_isp(isp), dry_mass, propellant_mass, thrust, name)

    @classmethod
    def from_propellant_fraction(cls, exhaust_velocity, total_mass, propellant_fraction,
                                 thrust=None, name=""):
        """Stage from stage mass [kg] and propellant fraction (propellant / stage mass)."""
        total = check_positive("total_mass", total_mass, "kg")
        frac = check_fraction("propellant_fraction", propellant_fraction)
        return cls(exhaust_velocity, total * (1.0 - frac), total * frac, thrust, name)

    @classmethod
    def from_structural_ratio(cls, exhaust_velocity, propellant_mass, structural_ratio,
                              thrust=None, name=""):
        """Stage from propellant mass [kg] and structural ratio dry / (dry + propellant)."""
        mp = check_positive("propellant_mass", propellant_mass, "kg")
        eps = check_fraction("structural_ratio", structural_ratio)
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
    """Per-stage result, SI: masses [kg], delta_v [m/s]; with a thrust, burn_time [s] and the
    thrust-to-weight ratios at ignition and at burnout [-] (thrust / (mass x g0)), else None."""

    name: str
    initial_mass: float
    burnout_mass: float
    mass_ratio: float
    delta_v: float
    burn_time: float | None = None
    thrust_to_weight: float | None = None
    thrust_to_weight_burnout: float | None = None

    def to_dict(self) -> dict:
        """Plain dict; ``burn_time`` and the thrust-to-weight ratios only when thrust was given."""
        out = asdict(self)
        for key in ("burn_time", "thrust_to_weight", "thrust_to_weight_burnout"):
            if out[key] is None:
                del out[key]
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
            weight = (s.thrust / (m0 * G0), s.thrust / (mf * G0)) if s.thrust else (None, None)
            results.append(StageResult(s.name or f"stage {i}", m0, mf, m0 / mf,
                                       s.exhaust_velocity * math.log(m0 / mf), burn, *weight))
        total = sum(r.delta_v for r in results)
        return VehicleResult(tuple(results), total, self.payload_mass / self.liftoff_mass,
                             self.liftoff_mass, self.payload_mass)
