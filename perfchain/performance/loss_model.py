"""Named efficiency factors of an engine: the registry and the :class:`LossModel` record.

Each factor is a number in (0, 1] acting on c*, on the momentum part of the thrust
coefficient, or (``cf_efficiency``) on the whole vacuum thrust coefficient; how they are applied (and the breakdown of the vacuum Isp loss) is
:mod:`perfchain.performance.losses`. To add a loss model, add one entry to
:data:`LOSS_FACTORS` and the field of the same name to :class:`LossModel`; validation, the
product and the breakdown follow.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from perfchain.errors import InputError

__all__ = [
    "LossFactor", "LOSS_FACTORS", "list_loss_factors", "conical_divergence_factor",
    "bell_divergence_factor", "LossModel", "cf_efficiency",
]


class LossFactor(NamedTuple):
    """One named efficiency factor: what it is, where it acts, its usual range, its source."""

    description: str
    acts_on: str  # "cstar", "cf_momentum" or "cf" (the whole vacuum Cf)
    typical: str
    source: str


#: name -> LossFactor; the order is the order of the breakdown.
LOSS_FACTORS: dict[str, LossFactor] = {
    "cstar_efficiency": LossFactor(
        "combustion (c*) efficiency, measured c* over ideal c*, given directly",
        "cstar", "0.92-0.99 liquids, 0.95-0.99 solids",
        "Sutton & Biblarz, Rocket Propulsion Elements, ch. 3 (from memory); common practice"),
    "divergence": LossFactor(
        "exit-flow divergence: conical lambda = (1 + cos a)/2 of the half-angle a; "
        "bell: same formula on the exit-lip angle (an approximation); or given directly",
        "cf_momentum", "0.983 at 15 deg conical; 0.99-0.995 bell",
        "Malina, J. Franklin Inst. 230 (1940); Sutton & Biblarz ch. 3 (from memory)"),
    "boundary_layer": LossFactor(
        "wall friction and boundary-layer displacement, Cf factor given directly",
        "cf_momentum", "0.98-0.995", "common practice; Sutton & Biblarz ch. 3 (from memory)"),
    "kinetic": LossFactor(
        "finite-rate chemistry (recombination lag) in the nozzle, Cf factor given directly",
        "cf_momentum", "0.97-1.0 (nearer 1 at high chamber pressure)", "common practice"),
    "two_phase": LossFactor(
        "condensed-phase velocity and thermal lag (metallised propellants): given directly, or by "
        "default from the SPP correlation of condensed mass fraction, particle size, chamber "
        "pressure, area ratio and throat diameter when the chamber holds condensed products "
        "(perfchain.performance.losses_two_phase; valid for aluminised AP composites, 200-2000 psia, "
        "throats 0.5-60 in)",
        "cf_momentum", "0.90-0.99 with aluminium, 1 without condensed phase",
        "Solid Performance Program (SPP) correlation as given in Sutton & Biblarz; particle size "
        "after Hermsen, J. Spacecraft Rockets 18 (1981) (both from memory)"),
    "cf_efficiency": LossFactor(
        "overall thrust-coefficient efficiency: delivered over ideal vacuum Cf, the whole Cf "
        "(pressure part included) scaled, given directly (use it alone when only a measured total "
        "is known); the ambient Cf follows from the thrust equation",
        "cf", "0.95-0.99", "Sutton & Biblarz, Rocket Propulsion Elements, ch. 3 (from memory); common practice"),
}


def list_loss_factors() -> dict[str, dict[str, str]]:
    """The registry of loss factors as plain dicts, in breakdown order.

    Returns
    -------
    dict
        name -> {"description", "acts_on", "typical", "source"}.

    Examples
    --------
    >>> list(list_loss_factors())
    ['cstar_efficiency', 'divergence', 'boundary_layer', 'kinetic', 'two_phase', 'cf_efficiency']
    """
    return {name: f._asdict() for name, f in LOSS_FACTORS.items()}


def conical_divergence_factor(half_angle):
    """Divergence factor of a conical nozzle, lambda = (1 + cos a) / 2.

    Parameters
    ----------
    half_angle : float or array_like
        Cone half-angle [rad].

    Returns
    -------
    float or ndarray
        lambda [-].

    Examples
    --------
    15 deg half-angle: 0.9830 (Malina 1940; Sutton & Biblarz Table 3-3, from memory)

    >>> round(conical_divergence_factor(math.radians(15.0)), 4)
    0.983
    """
    out = 0.5 * (1.0 + np.cos(np.asarray(half_angle, dtype=float)))
    return float(out) if np.ndim(half_angle) == 0 else out


def bell_divergence_factor(exit_angle):
    """Approximate divergence factor of a bell nozzle from its exit-lip angle.

    The conical formula (1 + cos theta_e)/2 applied to the wall angle at the
    exit lip; a common approximation (the flow angle varies across the exit of
    a bell, so this brackets rather than predicts the true value).

    Parameters
    ----------
    exit_angle : float or array_like
        Wall angle at the exit lip [rad].

    Returns
    -------
    float or ndarray
        lambda [-].

    Examples
    --------
    An exit angle of 8 deg (closed form: (1 + cos 8 deg)/2 = 0.99513):

    >>> round(bell_divergence_factor(math.radians(8.0)), 5)
    0.99513
    """
    return conical_divergence_factor(exit_angle)


def _factor(name, value):
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not (0.0 < value <= 1.0):
        raise InputError(name, value, "a factor in (0, 1]")
    return float(value)


def _angle(name, value):
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not (0.0 < value < math.pi / 4):
        raise InputError(name, value, "an angle in rad between 0 and 45 deg (0.7854 rad), exclusive")
    return float(value)


@dataclass(frozen=True)
class LossModel:
    """The efficiency factors of one engine; every default is 1 (no loss).

    Divergence is given by at most one of ``conical_half_angle``,
    ``bell_exit_angle`` [rad] or ``divergence_factor``; none means lambda = 1.

    Examples
    --------
    >>> m = LossModel(cstar_efficiency=0.97, conical_half_angle=math.radians(15.0))
    >>> round(m.divergence, 4), round(m.cf_factor, 4)
    (0.983, 0.983)
    >>> LossModel(kinetic=1.2)
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: kinetic: got 1.2; allowed: a factor in (0, 1]
    """

    cstar_efficiency: float = 1.0
    conical_half_angle: float | None = None
    bell_exit_angle: float | None = None
    divergence_factor: float | None = None
    boundary_layer: float = 1.0
    kinetic: float = 1.0
    two_phase: float = 1.0
    cf_efficiency: float = 1.0

    def __post_init__(self):
        given = [n for n in ("conical_half_angle", "bell_exit_angle", "divergence_factor")
                 if getattr(self, n) is not None]
        if len(given) > 1:
            raise InputError("divergence", ", ".join(given),
                             "one of conical_half_angle, bell_exit_angle, divergence_factor")
        for n in ("conical_half_angle", "bell_exit_angle"):
            if getattr(self, n) is not None:
                object.__setattr__(self, n, _angle(n, getattr(self, n)))
        if self.divergence_factor is not None:
            object.__setattr__(self, "divergence_factor",
                               _factor("divergence_factor", self.divergence_factor))
        for n in LOSS_FACTORS:
            if n != "divergence":
                object.__setattr__(self, n, _factor(n, getattr(self, n)))

    @property
    def divergence(self) -> float:
        """Divergence factor lambda [-]."""
        if self.conical_half_angle is not None:
            return conical_divergence_factor(self.conical_half_angle)
        if self.bell_exit_angle is not None:
            return bell_divergence_factor(self.bell_exit_angle)
        return 1.0 if self.divergence_factor is None else self.divergence_factor

    def factors(self) -> dict[str, float]:
        """name -> factor value, in breakdown order."""
        return {n: (self.divergence if n == "divergence" else getattr(self, n)) for n in LOSS_FACTORS}

    @property
    def cf_factor(self) -> float:
        """Product of the factors acting on the momentum part of Cf [-] (``cf_efficiency`` apart)."""
        return cf_efficiency(self)


def cf_efficiency(model: LossModel) -> float:
    """Combined momentum-Cf factor lambda * eta_bl * eta_kin * eta_tp.

    Parameters
    ----------
    model : LossModel

    Returns
    -------
    float
        Combined factor [-].

    Examples
    --------
    Closed form: 0.99 * 0.98 = 0.9702

    >>> round(cf_efficiency(LossModel(divergence_factor=0.99, boundary_layer=0.98)), 6)
    0.9702
    """
    return math.prod(v for n, v in model.factors().items() if LOSS_FACTORS[n].acts_on == "cf_momentum")
