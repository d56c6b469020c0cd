"""The chain for one operating point: ingredients -> chamber -> nozzle -> ideal performance.

A thin composition over the physics steps: :func:`~perfchain.propellants.mixture.make_propellant`,
:func:`~perfchain.nozzle.chamber.chamber_state`, :func:`~perfchain.nozzle.expansion.expand`.
The result is a documented :class:`~perfchain.performance.result.Performance` record in SI
units. Infinite-area points go through :mod:`perfchain.performance.batched` (a batch of one),
finite chambers through :mod:`perfchain.performance.general`; the optional delivered blocks
come from :mod:`perfchain.performance.delivered`.

Ideal means: one-dimensional, steady, adiabatic, isentropic expansion of an
ideal-gas mixture (condensed products in velocity and thermal equilibrium with
the gas, their volume neglected), infinite-area chamber, no friction, no heat
loss, no divergence.
"""

from __future__ import annotations

from dataclasses import replace

from perfchain.atmosphere import pressure as atmosphere_pressure
from perfchain.constants import MAX_ALTITUDE, ONE_ATM
from perfchain.errors import InputError, suggest
from perfchain.nozzle.contraction import check_contraction_ratio
from perfchain.nozzle.expansion import check_flow
from perfchain.performance.ambient import infeasibility, separation_rule
from perfchain.performance.batched import performance_batch
from perfchain.performance.decomposed import decomposed_performance
from perfchain.performance.delivered import deliver
from perfchain.performance.general import performance_general
from perfchain.performance.losses import LossModel
from perfchain.performance.result import OPTIONAL_BLOCKS, Performance
from perfchain.performance.transport import add_transport
from perfchain.propellants.formulation import make_formulation
from perfchain.propellants.mixture import Propellant, make_propellant
from perfchain.thermo.equilibrium import EquilibriumSystem
from perfchain.units import to_si

__all__ = ["Performance", "performance", "performance_of", "performance_batch", "performance_general",
           "OPTIONAL_BLOCKS"]


def _loss_model(losses):
    """``None``, a LossModel, or a dict of LossModel fields -> LossModel or None."""
    if losses is None or isinstance(losses, LossModel):
        return losses
    if not isinstance(losses, dict):
        raise InputError("losses", losses, "a LossModel or a dict of its factors")
    fields = list(LossModel.__dataclass_fields__)
    for key in losses:
        if key not in fields:
            raise InputError("losses", key, f"one of {', '.join(fields)} ({suggest(str(key), fields)})".replace(" ()", ""))
    return LossModel(**losses)


def _pressure(value, field, *, allow_zero=False):
    if value is None:
        return None
    return to_si(value, "pressure", field, minimum=0.0, exclusive=not allow_zero)


def performance(oxidizer=None, fuel=None, *, chamber_pressure, mixture_ratio=None, equivalence_ratio=None,
                fuel_percent=None, area_ratio=None, exit_pressure=None,
                ambient_pressure=None, flow: str = "shifting", altitude=None,
                contraction_ratio=None, losses=None, thrust=None,
                thrust_at: str = "vacuum", separation=None, propellant=None,
                ammonia_dissociation=None, transport: bool = False, throat_diameter=None,
                particle_size=None) -> Performance:
    """Ideal performance of one operating point.

    Parameters
    ----------
    oxidizer, fuel : str or Ingredient
        Ingredient names (``"LOX"``, ``"RP-1"``...) or records; or ``propellant`` instead.
    chamber_pressure : str or float
        Chamber pressure, text with a unit (``"1000 psi"``) or [Pa].
    mixture_ratio, equivalence_ratio, fuel_percent : float
        Exactly one (with oxidizer and fuel): O/F by mass [-], phi [-] or fuel mass per cent [%].
    propellant : str, Mapping, Ingredient or Propellant, optional
        Instead of oxidizer, fuel and mixture: a formulation by mass fraction
        (``"AP=0.68, Al=0.18, HTPB=0.14"``, ``{"AP": 0.68, ...}``) or a monopropellant
        (``"H2O2-98"``); see :func:`~perfchain.propellants.formulation.make_formulation`.
    ammonia_dissociation : float, optional
        For hydrazine alone: the ammonia dissociation X in [0, 1] [-] of a catalytic bed;
        the chamber composition is then fixed, its temperature follows from the energy
        balance and the nozzle is frozen (:mod:`perfchain.performance.decomposed`).
    area_ratio : float, optional
        Exit / throat area [-], > 1.
    exit_pressure : str or float, optional
        Exit pressure [Pa]; exactly one of area_ratio, exit_pressure.
    ambient_pressure : str or float
        Ambient pressure for the ambient Isp [Pa]; 0 is vacuum. Default 1 atm.
    flow : str
        ``"shifting"`` (default), ``"frozen"`` or ``"frozen-throat"``.
    altitude : str or float, optional
        Instead of ambient_pressure: geometric altitude [m] in the U.S.
        Standard Atmosphere 1976 (0-86 km).
    contraction_ratio : float, optional
        Chamber / throat area [-] (> 1); default infinite-area chamber.
    losses : LossModel or dict, optional
        Efficiency factors (see :mod:`perfchain.performance.losses`); with ``thrust`` or
        ``losses`` the result carries ``delivered``, ``losses``, ``separation``
        (and ``sizing``) blocks.
    thrust : str or float, optional
        Thrust to size the chamber for [N], at ``thrust_at`` (``"vacuum"`` or
        ``"ambient"``).
    throat_diameter, particle_size : float, optional
        Throat diameter and mean condensed-particle diameter [m] of the default two-phase
        flow loss (:mod:`perfchain.performance.losses_two_phase`; condensed products only): the
        throat instead of one sized from ``thrust``, the particles instead of Hermsen's
        correlation. Either adds the delivered values.
    separation : str, optional
        Separation criterion: ``"summerfield"`` (default, k = 0.4), ``"summerfield:K"`` or
        ``"schmucker"``. A nozzle that separates at the ambient pressure gets its ambient
        values from the cut-nozzle estimate (:mod:`perfchain.performance.ambient`).
    transport : bool
        Also compute the gas transport properties (viscosity, conductivity, Prandtl numbers)
        at chamber, throat and exit (:mod:`perfchain.performance.transport`; a few ms).

    Returns
    -------
    Performance

    Examples
    --------
    LOX/RP-1 at O/F 2.56, 1000 psia, expanded to 1 atm, shifting: Tc 3676 K,
    c* 1799 m/s, Isp 300 s at sea level (Sutton & Biblarz, Rocket Propulsion
    Elements, Table 5-5; from memory, so +/- 1 %):

    >>> r = performance("LOX", "RP-1", mixture_ratio=2.56, chamber_pressure="1000 psi",
    ...                 exit_pressure="1 atm")
    >>> abs(r.chamber.temperature / 3676 - 1) < 0.01, abs(r.cstar / 1799 - 1) < 0.01
    (True, True)
    >>> abs(r.isp_ambient / 300 - 1) < 0.01
    True
    """
    flow = check_flow(flow)
    pc = _pressure(chamber_pressure, "chamber_pressure")
    if pc is None:
        raise InputError("chamber_pressure", None, "a pressure above 0 Pa")
    z, pa = _ambient(altitude, ambient_pressure)
    if contraction_ratio is not None:
        contraction_ratio = check_contraction_ratio(contraction_ratio)
    losses = _loss_model(losses)
    if thrust is not None:
        thrust = to_si(thrust, "force", "thrust", minimum=0.0)
    rule = separation_rule(separation)
    bad = infeasibility(pc, pa, ambient_field="altitude" if z is not None else "ambient_pressure",
                        ambient_value=altitude if z is not None else ambient_pressure)
    if bad is not None:
        raise bad
    area_ratio, pe = _exit(area_ratio, exit_pressure, pc)
    prop = _propellant(oxidizer, fuel, propellant, mixture_ratio, equivalence_ratio, fuel_percent)
    if ammonia_dissociation is not None:
        if contraction_ratio is not None:
            raise InputError("contraction_ratio", contraction_ratio, "an infinite-area chamber (none given) "
                             "with ammonia_dissociation: the decomposition model has no finite chamber")
        result = decomposed_performance(prop, ammonia_dissociation, pc, area_ratio=area_ratio, exit_pressure=pe,
                                        ambient_pressure=pa, separation=rule)
    else:
        result = performance_of(prop, pc, area_ratio=area_ratio, exit_pressure=pe,
                                ambient_pressure=pa, flow=flow, contraction_ratio=contraction_ratio,
                                separation=rule)
    if z is not None:
        result = replace(result, altitude=z)
    if losses is not None or thrust is not None or throat_diameter is not None or particle_size is not None:
        result = deliver(result, losses, thrust=thrust, thrust_at=thrust_at, separation=rule,
                         throat_diameter=throat_diameter, particle_size=particle_size)
    if transport:
        result = add_transport(result)
    return result


def _propellant(oxidizer, fuel, propellant, mixture_ratio, equivalence_ratio, fuel_percent) -> Propellant:
    """The Propellant of a point: a formulation (``propellant``) or oxidizer and fuel at one mixture."""
    if propellant is None:
        return make_propellant(oxidizer, fuel, mixture_ratio, equivalence_ratio, fuel_percent)
    if oxidizer is not None or fuel is not None:
        shown = propellant if isinstance(propellant, str) else getattr(propellant, "name", "given")
        raise InputError("propellant", shown, "either propellant or oxidizer and fuel, not both")
    for key, v in (("mixture_ratio", mixture_ratio), ("equivalence_ratio", equivalence_ratio),
                   ("fuel_percent", fuel_percent)):
        if v is not None:
            raise InputError(key, v, "only with oxidizer and fuel (a formulation has no O/F)")
    if isinstance(propellant, Propellant):
        return propellant
    return make_formulation(propellant)


def _ambient(altitude, ambient_pressure):
    """(altitude [m] or None, ambient pressure [Pa]) from at most one of the two; default 1 atm."""
    if altitude is None:
        return None, _pressure(ONE_ATM if ambient_pressure is None else ambient_pressure,
                               "ambient_pressure", allow_zero=True)
    if ambient_pressure is not None:
        raise InputError("altitude", altitude, "either altitude or ambient_pressure, not both")
    z = to_si(altitude, "length", "altitude", minimum=0.0, exclusive=False, maximum=MAX_ALTITUDE)
    return z, float(atmosphere_pressure(z))


def _exit(area_ratio, exit_pressure, pc):
    """(area ratio [-] or None, exit pressure [Pa] or None): exactly one, checked against ``pc``."""
    pe = _pressure(exit_pressure, "exit_pressure")
    bad = None if pe is None else infeasibility(pc, 0.0, pe, exit_value=exit_pressure)
    if bad is not None:
        raise bad
    if area_ratio is not None:
        if isinstance(area_ratio, bool) or not isinstance(area_ratio, (int, float)) \
                or not float(area_ratio) > 1.0 or area_ratio != area_ratio or area_ratio == float("inf"):
            raise InputError("area_ratio", area_ratio, "an exit/throat area ratio above 1")
        area_ratio = float(area_ratio)
    if (area_ratio is None) == (pe is None):
        raise InputError("exit", "both" if pe is not None else "neither",
                         "exactly one of area_ratio or exit_pressure")
    return area_ratio, pe


def performance_of(propellant: Propellant, chamber_pressure: float, *, area_ratio=None,
                   exit_pressure=None, ambient_pressure: float = ONE_ATM,
                   flow: str = "shifting", system: EquilibriumSystem | None = None,
                   contraction_ratio: float | None = None, separation=None) -> Performance:
    """The chain from a :class:`~perfchain.propellants.mixture.Propellant` on, SI floats only.

    An infinite-area chamber goes through the batch solver of :mod:`perfchain.thermo.batch`
    (a batch of one: the same numbers a sweep gives for this point); a finite
    chamber, and any point the batch solver hands back, through the general path
    of :mod:`perfchain.thermo.equilibrium`.

    Parameters
    ----------
    propellant : Propellant
    chamber_pressure : float
        [Pa]
    area_ratio : float, optional
        [-]
    exit_pressure : float, optional
        [Pa]
    ambient_pressure : float
        [Pa]
    flow : str
    system : EquilibriumSystem, optional
        Reuse a system built for this propellant's element totals.
    contraction_ratio : float, optional
        Chamber / throat area [-]; ``chamber_pressure`` is then the injector-face
        pressure and c* and Cf refer to it. Default: infinite-area chamber.
    separation : str or SeparationRule, optional
        Separation criterion (default Summerfield, k = 0.4).

    Returns
    -------
    Performance

    Examples
    --------
    LOX/RP-1 at O/F 2.56 and 1000 psia expanded to 1 atm: c* 1799 m/s, Isp 300 s at sea
    level (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5; from memory, +/- 1 %):

    >>> r = performance_of(make_propellant("LOX", "RP-1", 2.56), 6894757.29,
    ...                    exit_pressure=101325.0)
    >>> abs(r.cstar / 1799 - 1) < 0.01, abs(r.isp_ambient / 300 - 1) < 0.01
    (True, True)
    """
    if contraction_ratio is None:
        exit_key = "area_ratio" if area_ratio is not None else "exit_pressure"
        x = area_ratio if area_ratio is not None else exit_pressure
        res = performance_batch([(propellant, chamber_pressure, x)], exit_key=exit_key,
                                ambient_pressure=ambient_pressure, system=system, flow=flow,
                                separation=separation)[0]
        if isinstance(res, Exception):
            raise res
        return res
    return performance_general(propellant, chamber_pressure, area_ratio=area_ratio,
                               exit_pressure=exit_pressure, ambient_pressure=ambient_pressure,
                               flow=flow, system=system, contraction_ratio=contraction_ratio,
                               separation=separation)
