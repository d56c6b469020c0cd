"""Delivered performance: ideal point -> efficiency factors, separation, sizing.

A thin layer over :mod:`perfchain.performance.losses`, :mod:`perfchain.performance.separation` and
:mod:`perfchain.performance.sizing` that fills the optional blocks of a
:class:`~perfchain.performance.result.Performance` record.
"""

from __future__ import annotations

import math
from dataclasses import replace

from perfchain.errors import InputError
from perfchain.performance.ambient import separation_rule
from perfchain.performance.losses import LossModel, apply_losses
from perfchain.performance.losses_two_phase import with_two_phase
from perfchain.performance.result import Performance
from perfchain.performance.separation import separation as separation_check
from perfchain.performance.sizing import size_thrust_chamber

__all__ = ["deliver", "THRUST_AT"]

THRUST_AT = ("vacuum", "ambient")


def _finite(d: dict) -> dict:
    return {k: (None if isinstance(v, float) and not math.isfinite(v) else v) for k, v in d.items()}


def _rule_of(perf: Performance) -> str:
    """The rule a result was solved with, from its label (``"summerfield k=0.4"`` -> ``"summerfield:0.4"``)."""
    return perf.separation_criterion.replace(" k=", ":")


def deliver(perf: Performance, losses: LossModel | None = None, *, thrust: float | None = None,
            thrust_at: str = "vacuum", separation=None, throat_diameter: float | None = None,
            particle_size: float | None = None) -> Performance:
    """Add delivered values, the loss breakdown, a separation check and sizing.

    Parameters
    ----------
    perf : Performance
        An ideal operating point.
    losses : LossModel, optional
        Efficiency factors; default none (delivered = ideal).
    thrust : float, optional
        Thrust to size the chamber for [N], > 0.
    thrust_at : str
        ``"vacuum"`` or ``"ambient"`` (at the point's ambient pressure).
    separation : str or SeparationRule, optional
        Separation criterion (:func:`~perfchain.performance.ambient.separation_rule`);
        default the one ``perf`` was solved with.
    throat_diameter, particle_size : float, optional
        [m]; for the two-phase loss applied by default when the chamber holds condensed
        products (:mod:`perfchain.performance.losses_two_phase`); the throat defaults to the
        one sized for ``thrust``.

    Returns
    -------
    Performance
        A copy with ``delivered``, ``losses``, ``separation`` (and ``sizing``). A separated
        nozzle's delivered ambient values apply the factors to the nozzle cut at its
        separation station (the cut-nozzle estimate of :mod:`perfchain.performance.ambient`).

    Examples
    --------
    A 15 deg conical nozzle loses (1 - cos 15 deg)/2 = 1.70 % of the momentum
    thrust (Malina 1940; Sutton & Biblarz ch. 3, from memory):

    >>> import math
    >>> from perfchain.performance.chain import performance
    >>> p = performance("N2O4", "MMH", mixture_ratio=2.0, chamber_pressure="10 bar",
    ...                 area_ratio=20, ambient_pressure="0 Pa")
    >>> d = deliver(p, LossModel(conical_half_angle=math.radians(15)))
    >>> round(d.losses["factors"]["divergence"], 4)
    0.983
    """
    model = losses or LossModel()
    pc = perf.chamber_pressure
    rule = separation_rule(separation if separation is not None else _rule_of(perf))
    model, two_phase = with_two_phase(perf, model, throat_diameter, particle_size,
                                      _sized_throat(perf, model, thrust, thrust_at))
    dv = apply_losses(perf.cstar, perf.cf_vacuum, perf.area_ratio, perf.exit.pressure, pc,
                      perf.ambient_pressure, model)
    delivered = dv.to_dict()
    breakdown = delivered.pop("breakdown")
    if not perf.flows_full:   # the cut nozzle: its own vacuum Cf, exit pressure and area ratio
        eps, p_sep = perf.separation_area_ratio, perf.separation_pressure
        cut = apply_losses(perf.cstar, (perf.separation_velocity + p_sep * eps * perf.cstar / pc) / perf.cstar,
                           eps, p_sep, pc, perf.ambient_pressure, model)
        delivered.update(cf_ambient=cut.cf_ambient, isp_ambient=cut.isp_ambient,
                         exhaust_velocity_ambient=cut.exhaust_velocity_ambient)
    sep = separation_check(perf.exit.pressure, perf.ambient_pressure, rule.criterion,
                           exit_mach=perf.exit.mach, threshold=rule.threshold)
    sizing = None
    if thrust is not None:
        if thrust_at not in THRUST_AT:
            raise InputError("thrust_at", thrust_at, "one of " + ", ".join(THRUST_AT))
        if isinstance(thrust, bool) or not isinstance(thrust, (int, float)) or not thrust > 0:
            raise InputError("thrust", thrust, "a thrust above 0 N")
        isp = delivered["isp_vacuum"] if thrust_at == "vacuum" else delivered["isp_ambient"]
        if not isp > 0:
            raise InputError("thrust_at", thrust_at,
                             "a condition where the engine gives positive thrust (ambient Isp is not positive)")
        sizing = size_thrust_chamber(thrust, isp, dv.cstar, pc, perf.area_ratio, perf.mixture_ratio,
                                     perf.oxidizer_density, perf.fuel_density).to_dict()
        sizing["thrust"] = float(thrust)
        sizing["thrust_at"] = thrust_at
    return replace(perf, delivered=delivered,
                   losses={"factors": model.factors(), "isp_vacuum_loss": breakdown,
                           "total_isp_vacuum_loss": perf.isp_vacuum - dv.isp_vacuum,
                           **({"two_phase": two_phase} if two_phase is not None else {})},
                   separation=_finite(sep.to_dict()), sizing=sizing)


def _sized_throat(perf, model, thrust, thrust_at):
    """A callable giving the throat diameter [m] sized for ``thrust`` [N] without the two-phase
    loss, A_t = F / (p_c Cf) (closed form), or None when no valid thrust is given."""
    if isinstance(thrust, bool) or not isinstance(thrust, (int, float)) or not thrust > 0 \
            or thrust_at not in THRUST_AT:
        return None

    def sized():
        dv = apply_losses(perf.cstar, perf.cf_vacuum, perf.area_ratio, perf.exit.pressure,
                          perf.chamber_pressure, perf.ambient_pressure, model)
        cf = dv.cf_vacuum if thrust_at == "vacuum" else dv.cf_ambient
        return math.sqrt(4.0 * thrust / (perf.chamber_pressure * cf) / math.pi) if cf > 0 else None
    return sized
