"""Delivered performance: named efficiency factors applied to the ideal c* and Cf.

Convention (one, used everywhere in perfchain)
----------------------------------------------
The ideal thrust coefficient splits into a momentum part and a pressure part
(Sutton & Biblarz, "Rocket Propulsion Elements", ch. 3; from memory):

    Cf_vac = Cf_mom + pe/pc * eps,        Cf_amb = Cf_vac - pa/pc * eps.

The named physical losses reduce the jet momentum, not the exit-plane pressure force, so the
divergence factor lambda and the boundary-layer, kinetic and two-phase factors multiply the
MOMENTUM part only (thrust F = lambda * mdot * ve + (pe - pa) Ae, Sutton & Biblarz eq. 3-34;
from memory). ``cf_efficiency`` is the usual overall thrust-coefficient efficiency, delivered
over ideal vacuum Cf: it scales the WHOLE vacuum Cf, pressure part included. With
eta_m = lambda * eta_bl * eta_kin * eta_tp:

    c*_del     = eta_c* * c*
    Cf_vac,del = eta_cf * (eta_m * Cf_mom + pe/pc * eps)
    Cf_amb,del = Cf_vac,del - pa/pc * eps          (the thrust equation)
    Isp_del    = c*_del * Cf_del / g0,    c_del = Isp_del * g0

``pc`` is the nozzle-inlet stagnation pressure; ``pe`` the ideal exit pressure.

Breakdown: the factors are applied one at a time in the order of
:data:`LOSS_FACTORS` (c* efficiency first, then divergence, boundary layer,
kinetic, two-phase); each factor's share is the vacuum Isp it removes at that
step, so the shares add up to the total loss. The factors themselves, their registry and
:class:`LossModel` live in :mod:`perfchain.performance.loss_model` (re-exported here).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from perfchain.constants import G0
from perfchain.errors import InputError
from perfchain.performance.loss_model import (
    LOSS_FACTORS, LossFactor, LossModel, bell_divergence_factor, cf_efficiency,
    conical_divergence_factor, list_loss_factors,
)

__all__ = [
    "LossFactor", "LOSS_FACTORS", "list_loss_factors", "conical_divergence_factor",
    "bell_divergence_factor", "LossModel", "cf_efficiency", "delivered",
    "isp_loss_breakdown", "Delivered", "apply_losses",
]


def _inputs(cstar, cf_vacuum, area_ratio, exit_pressure, chamber_pressure, ambient_pressure):
    arrs = [np.asarray(v, dtype=float) for v in
            (cstar, cf_vacuum, area_ratio, exit_pressure, chamber_pressure, ambient_pressure)]
    c, cf, eps, pe, pc, pa = arrs
    rules = [("cstar", c, c > 0, "a speed above 0 m/s"),
             ("area_ratio", eps, eps >= 1, "an area ratio of 1 or more"),
             ("chamber_pressure", pc, pc > 0, "a pressure above 0 Pa"),
             ("exit_pressure", pe, (pe >= 0) & (pe < pc), "a pressure from 0 Pa to below chamber_pressure"),
             ("ambient_pressure", pa, pa >= 0, "a pressure of 0 Pa or more")]
    pterm = pe / np.where(pc > 0, pc, 1.0) * eps
    rules.append(("cf_vacuum", cf, cf > pterm, "a vacuum Cf above its pressure part pe/pc*eps"))
    for name, arr, ok, allowed in rules:
        bad = ~(np.isfinite(arr) & ok)
        if np.any(bad):
            raise InputError(name, float(np.broadcast_to(arr, bad.shape)[bad].flat[0]), allowed)
    return c, cf - pterm, pterm, pa / pc * eps


def delivered(cstar, cf_vacuum, area_ratio, exit_pressure, chamber_pressure,
              ambient_pressure, model: LossModel | None = None) -> dict:
    """Delivered c*, Cf, Isp and exhaust velocity; works on floats or numpy arrays.

    Parameters
    ----------
    cstar : float or array_like
        Ideal characteristic velocity [m/s].
    cf_vacuum : float or array_like
        Ideal vacuum thrust coefficient [-] (momentum part + pe/pc * eps).
    area_ratio : float or array_like
        Ae/At [-].
    exit_pressure, chamber_pressure, ambient_pressure : float or array_like
        Ideal exit, nozzle-inlet stagnation and ambient pressures [Pa].
    model : LossModel, optional
        The factors (default: no loss).

    Returns
    -------
    dict
        cstar [m/s], cf_vacuum, cf_ambient [-], isp_vacuum, isp_ambient [s],
        exhaust_velocity_vacuum, exhaust_velocity_ambient [m/s].

    Examples
    --------
    Closed form: c* 1500 m/s, Cf_vac 1.8, eps 10, pe/pc 0.01 (pressure part 0.1),
    eta_c* 0.98, lambda 0.99: Cf_vac,del = 0.99 * 1.7 + 0.1 = 1.783,
    Isp = 1470 * 1.783 / 9.80665 = 267.27 s

    >>> d = delivered(1500.0, 1.8, 10.0, 1.0e4, 1.0e6, 0.0,
    ...               LossModel(cstar_efficiency=0.98, divergence_factor=0.99))
    >>> round(d["cf_vacuum"], 4), round(d["isp_vacuum"], 2)
    (1.783, 267.27)
    """
    model = model or LossModel()
    c, mom, pterm, aterm = _inputs(cstar, cf_vacuum, area_ratio, exit_pressure,
                                   chamber_pressure, ambient_pressure)
    c_del = model.cstar_efficiency * c
    cf_vac = model.cf_efficiency * (model.cf_factor * mom + pterm)
    cf_amb = cf_vac - aterm
    out = {"cstar": c_del, "cf_vacuum": cf_vac, "cf_ambient": cf_amb,
           "isp_vacuum": c_del * cf_vac / G0, "isp_ambient": c_del * cf_amb / G0}
    out["exhaust_velocity_vacuum"] = out["isp_vacuum"] * G0
    out["exhaust_velocity_ambient"] = out["isp_ambient"] * G0
    scalar = all(np.ndim(v) == 0 for v in (cstar, cf_vacuum, area_ratio, exit_pressure,
                                             chamber_pressure, ambient_pressure))
    return {k: (float(v) if scalar else v) for k, v in out.items()}


def isp_loss_breakdown(cstar, cf_vacuum, area_ratio, exit_pressure, chamber_pressure,
                       model: LossModel | None = None) -> dict:
    """Vacuum Isp removed by each factor, applied one at a time in registry order.

    Parameters
    ----------
    cstar, cf_vacuum, area_ratio, exit_pressure, chamber_pressure
        As in :func:`delivered` [m/s], [-], [-], [Pa], [Pa].
    model : LossModel, optional

    Returns
    -------
    dict
        factor name -> Isp loss [s]; the values add up to ideal minus delivered vacuum Isp.

    Examples
    --------
    Closed form, the case of :func:`delivered`: ideal Isp 1500 * 1.8 / g0 = 275.33 s;
    c* step removes 2 %, 5.51 s; divergence removes 1470 * 0.01 * 1.7 / g0 = 2.55 s

    >>> b = isp_loss_breakdown(1500.0, 1.8, 10.0, 1.0e4, 1.0e6,
    ...                        LossModel(cstar_efficiency=0.98, divergence_factor=0.99))
    >>> round(b["cstar_efficiency"], 2), round(b["divergence"], 2), b["kinetic"]
    (5.51, 2.55, 0.0)
    """
    model = model or LossModel()
    c, mom, pterm, _ = _inputs(cstar, cf_vacuum, area_ratio, exit_pressure, chamber_pressure, 0.0)
    isp_ideal = c * (mom + pterm) / G0
    total = isp_ideal - delivered(cstar, cf_vacuum, area_ratio, exit_pressure, chamber_pressure,
                                  0.0, model)["isp_vacuum"]
    shares, isp, whole = {}, isp_ideal, 1.0
    names = list(LOSS_FACTORS)
    for n, f in model.factors().items():
        on = LOSS_FACTORS[n].acts_on
        if on == "cstar":
            c = c * f
        elif on == "cf":
            whole = whole * f
        else:
            mom = mom * f
        new = c * whole * (mom + pterm) / G0
        shares[n] = isp - new
        isp = new
    # the last share closes the sum exactly (up to one rounding)
    shares[names[-1]] = total - sum(shares[n] for n in names[:-1])
    scalar = np.ndim(total) == 0
    return {k: (float(v) if scalar else v) for k, v in shares.items()}


@dataclass(frozen=True)
class Delivered:
    """Delivered performance of one operating point (SI; Isp in s)."""

    cstar: float
    cf_vacuum: float
    cf_ambient: float
    isp_vacuum: float
    isp_ambient: float
    exhaust_velocity_vacuum: float
    exhaust_velocity_ambient: float
    breakdown: dict = field(default_factory=dict)

    def to_dict(self) -> dict:
        """All fields; ``breakdown`` as a nested dict name -> vacuum Isp loss [s]."""
        out = {k: getattr(self, k) for k in self.__dataclass_fields__ if k != "breakdown"}
        out["breakdown"] = dict(self.breakdown)
        return out


def apply_losses(cstar: float, cf_vacuum: float, area_ratio: float, exit_pressure: float,
                 chamber_pressure: float, ambient_pressure: float,
                 model: LossModel | None = None) -> Delivered:
    """Apply a :class:`LossModel` to one ideal operating point.

    Parameters
    ----------
    cstar : float
        Ideal characteristic velocity [m/s].
    cf_vacuum : float
        Ideal vacuum thrust coefficient [-].
    area_ratio : float
        Ae/At [-].
    exit_pressure, chamber_pressure, ambient_pressure : float
        Ideal exit, nozzle-inlet stagnation and ambient pressures [Pa].
    model : LossModel, optional
        The factors (default: no loss).

    Returns
    -------
    Delivered
        Delivered values and the vacuum-Isp breakdown by factor.

    Examples
    --------
    Closed form as in :func:`delivered`, at pa = 0.5 bar: Cf_amb,del = 1.783 - 0.05 * 10
    = 1.283; total vacuum loss 275.33 - 267.27 = 5.51 + 2.55 = 8.05 s

    >>> d = apply_losses(1500.0, 1.8, 10.0, 1.0e4, 1.0e6, 5.0e4,
    ...                  LossModel(cstar_efficiency=0.98, divergence_factor=0.99))
    >>> round(d.cf_ambient, 4), round(sum(d.breakdown.values()), 2)
    (1.283, 8.05)
    """
    values = (cstar, cf_vacuum, area_ratio, exit_pressure, chamber_pressure, ambient_pressure)
    if any(np.ndim(v) != 0 for v in values):
        raise InputError("apply_losses", "an array", "scalars; use delivered() for arrays")
    d = delivered(*values, model)
    b = isp_loss_breakdown(*values[:5], model)
    return Delivered(breakdown=b, **d)
