"""The result record of the chain: :class:`Performance`, and how it is assembled.

Shared by the batch path (:mod:`perfchain.performance.batched`), the general path
(:mod:`perfchain.performance.general`) and the delivered blocks
(:mod:`perfchain.performance.delivered`), so none of them imports another to reach it.
"""

from __future__ import annotations

import copy
import math
from dataclasses import dataclass

from perfchain.constants import G0
from perfchain.errors import SolverError
from perfchain.nozzle.stations import Station
from perfchain.performance.ambient import cut_ambient, full_flow_fields, separation_rule

__all__ = ["Performance", "OPTIONAL_BLOCKS", "HYDRAZINE_EQUILIBRIUM_NOTE", "propellant_fields",
           "assemble_performance", "performance_terms"]

#: the optional blocks of a :class:`Performance`, in field order: None unless computed
OPTIONAL_BLOCKS = ("altitude", "finite_chamber", "delivered", "losses", "separation", "sizing",
                   "ammonia_dissociation", "notes")

#: what a point of hydrazine alone in chemical equilibrium says about itself
HYDRAZINE_EQUILIBRIUM_NOTE = (
    "hydrazine alone in chemical equilibrium: its ammonia is almost fully dissociated, so this chamber "
    "is cooler than a real catalytic bed, which runs hotter at partial dissociation; the ammonia "
    "dissociation is a design input (ammonia_dissociation)")


@dataclass(frozen=True)
class Performance:
    """Ideal performance of one operating point (SI units).

    Attributes
    ----------
    propellant : str
        Its name: ``"LOX/RP-1"`` for a bipropellant, the formulation
        (``"AP=0.68, Al=0.18, HTPB=0.14"``) or monopropellant (``"H2O2-98"``) otherwise.
    oxidizer, fuel : str or None
        None for a formulation, which has no oxidizer/fuel split (nor O/F, equivalence
        ratio or fuel per cent: those are None too).
    flow : str
        ``"shifting"``, ``"frozen"`` or ``"frozen-throat"``.
    mixture_ratio [-] (O/F by mass), stoichiometric_mixture_ratio [-],
    equivalence_ratio [-], fuel_percent [%],
    chamber_pressure [Pa], ambient_pressure [Pa],
    reactant_enthalpy [J/kg], bulk_density, oxidizer_density, fuel_density
    [kg/m^3] (None if unknown),
    chamber, throat, exit : Station,
    area_ratio [-] (exit / throat area),
    cstar [m/s] (characteristic velocity p_c A* / mdot),
    cf_vacuum, cf_ambient [-] (thrust coefficients),
    isp_vacuum, isp_ambient [s] (with g0 = 9.80665 m/s^2),
    exhaust_velocity_vacuum, exhaust_velocity_ambient [m/s]
    (effective exhaust velocity = thrust / mass flow),
    exit_ambient_pressure_ratio [-] (p_e / p_a; None in vacuum),
    separation_criterion (``"summerfield k=0.4"`` or ``"schmucker"``),
    flows_full (bool), ambient_model (``"full-flowing"`` or
    ``"separated-cut (<criterion>)"``: how the ambient values were estimated, see the
    module perfchain.performance.ambient), separation_pressure [Pa],
    separation_area_ratio [-], separation_velocity [m/s], separation_mach [-]
    (the station the nozzle was cut at; None when it flows full),
    ammonia_dissociation [-] (X of a catalytic hydrazine chamber of fixed
    composition; None otherwise), notes (what the model assumed where a reader
    must know it; a tuple of text, or None), reactants (what the chamber was given,
    so that anyone can recompute it; a dict of ``enthalpy``, element totals
    ``elements`` per kilogram and ``ingredients``, as ``Propellant.reactants_dict``).
    """

    propellant: str
    oxidizer: str | None
    fuel: str | None
    flow: str
    mixture_ratio: float
    stoichiometric_mixture_ratio: float
    equivalence_ratio: float
    fuel_percent: float
    chamber_pressure: float
    ambient_pressure: float
    reactant_enthalpy: float
    bulk_density: float | None
    oxidizer_density: float | None
    fuel_density: float | None
    chamber: Station
    throat: Station
    exit: Station
    area_ratio: float
    cstar: float
    cf_vacuum: float
    cf_ambient: float
    isp_vacuum: float
    isp_ambient: float
    exhaust_velocity_vacuum: float
    exhaust_velocity_ambient: float
    exit_ambient_pressure_ratio: float | None = None
    separation_criterion: str = "summerfield k=0.4"
    flows_full: bool = True
    ambient_model: str = "full-flowing"
    separation_pressure: float | None = None
    separation_area_ratio: float | None = None
    separation_velocity: float | None = None
    separation_mach: float | None = None
    altitude: float | None = None
    finite_chamber: dict | None = None
    delivered: dict | None = None
    losses: dict | None = None
    separation: dict | None = None
    sizing: dict | None = None
    ammonia_dissociation: float | None = None
    notes: tuple | None = None
    reactants: dict | None = None

    def to_dict(self) -> dict:
        """One JSON-ready dict (SI units); station objects become nested dicts.

        Optional blocks (``altitude``, ``finite_chamber``, ``delivered``,
        ``losses``, ``separation``, ``sizing``, ``ammonia_dissociation``, ``notes``)
        appear only when computed; ``reactants`` is always there (a copy).
        """
        out = {}
        for key in self.__dataclass_fields__:
            value = getattr(self, key)
            if value is None and key in OPTIONAL_BLOCKS:
                continue
            if isinstance(value, Station):
                value = value.to_dict()
            elif key == "reactants":
                value = copy.deepcopy(value)
            elif key == "notes":
                value = list(value)
            out[key] = value
        return out


def propellant_fields(prop) -> dict:
    """The propellant's entries of a :class:`Performance` (computed once per propellant).

    Parameters
    ----------
    prop : Propellant
        A mixture from :func:`~perfchain.propellants.mixture.make_propellant`, or a
        formulation from :func:`~perfchain.propellants.formulation.make_formulation`.

    Returns
    -------
    dict
        Names, mixture ratios [-], fuel per cent [%], reactant enthalpy [J/kg] and
        densities [kg/m^3] (None where unknown or, for a formulation, undefined), the
        notes a point of it carries, and the reactants block, keyed as the record's fields.

    Examples
    --------
    Closed form: at phi = 1 the O/F is the stoichiometric one, and the fuel mass per
    cent is 100 / (1 + O/F):

    >>> from perfchain.propellants.mixture import make_propellant
    >>> f = propellant_fields(make_propellant("LOX", "LH2", equivalence_ratio=1.0))
    >>> f["mixture_ratio"] == f["stoichiometric_mixture_ratio"]
    True
    >>> round(f["fuel_percent"] - 100 / (1 + f["mixture_ratio"]), 12)
    0.0
    """
    from perfchain.propellants.decomposition import is_hydrazine

    ox, fu = prop.oxidizer, prop.fuel   # None for a formulation (no oxidizer/fuel split)
    return dict(propellant=prop.name, oxidizer=ox and ox.name, fuel=fu and fu.name,
                mixture_ratio=prop.mixture_ratio, stoichiometric_mixture_ratio=prop.stoichiometric_mixture_ratio,
                equivalence_ratio=prop.equivalence_ratio, fuel_percent=prop.fuel_percent,
                reactant_enthalpy=prop.enthalpy, bulk_density=prop.bulk_density,
                oxidizer_density=ox and ox.density, fuel_density=fu and fu.density,
                notes=(HYDRAZINE_EQUILIBRIUM_NOTE,) if is_hydrazine(prop) else None,
                reactants=prop.reactants_dict())


def assemble_performance(fields, pc, pa, flow, chamber, throat, exit_, G, u_e, p_e, eps, finite,
                         point, rule=None, cut=None) -> Performance:
    """A :class:`Performance` from its stations and flow quantities.

    Parameters
    ----------
    fields : dict or Propellant
        From :func:`propellant_fields` (or the Propellant itself).
    pc, pa : float
        Chamber (injector-face) and ambient pressures [Pa].
    flow : str
        Flow model name.
    chamber, throat, exit_ : Station
    G : float
        Throat mass flux [kg/(m^2 s)].
    u_e, p_e : float
        Exit velocity [m/s] and exit pressure [Pa].
    eps : float
        Exit / throat area ratio [-].
    finite : dict or None
        The finite-chamber block.
    point : str or callable
        Description of the point for an error message (called only on failure).
    rule : SeparationRule, optional
        The separation criterion (default Summerfield, k = 0.4).
    cut : dict, optional
        The separation station of a separated nozzle
        (:func:`perfchain.performance.ambient.separation_pressures`); the ambient values are
        then the cut-nozzle estimate.

    Returns
    -------
    Performance
        c* = pc / G [m/s]; exhaust velocity u_e + (p_e - p_a) eps / G [m/s] (full-flowing)
        or u_sep + (p_sep - p_a) eps_sep / G (cut at the separation station);
        Cf = c / c* [-]; Isp = c / g0 [s].

    Raises
    ------
    SolverError
        A non-finite result, or an ambient thrust that is not positive.

    Examples
    --------
    Closed form: pc 70 bar through 4000 kg/(m^2 s) gives c* = 1750 m/s; u_e 3000 m/s with
    p_e = 0.1 bar on eps 40 adds 0.1e5 * 40 / 4000 = 100 m/s in vacuum, so Isp =
    3100 / 9.80665 s and Cf = 3100 / 1750:

    >>> from perfchain.propellants.mixture import make_propellant
    >>> r = assemble_performance(make_propellant("LOX", "RP-1", 2.56), 70e5, 0.0, "shifting",
    ...                          None, None, None, 4000.0, 3000.0, 1e4, 40.0, None, "example")
    >>> r.cstar, round(r.isp_vacuum, 3), round(r.cf_vacuum, 6)
    (1750.0, 316.112, 1.771429)
    """
    if not isinstance(fields, dict):
        fields = propellant_fields(fields)
    return Performance(
        **fields, flow=flow, chamber_pressure=pc, ambient_pressure=pa,
        chamber=chamber, throat=throat, exit=exit_, finite_chamber=finite,
        **performance_terms(pc, pa, G, u_e, p_e, eps, point, rule, cut),
    )


def performance_terms(pc, pa, G, u_e, p_e, eps, point, rule=None, cut=None) -> dict:
    """The flow results of a point: c*, vacuum and ambient Cf, Isp and exhaust velocity.

    Parameters
    ----------
    pc, pa, G, u_e, p_e, eps, point, rule, cut
        As in :func:`assemble_performance`.

    Returns
    -------
    dict
        ``area_ratio`` [-], ``cstar``, ``exhaust_velocity_vacuum``,
        ``exhaust_velocity_ambient`` [m/s], ``cf_vacuum``, ``cf_ambient`` [-], ``isp_vacuum``,
        ``isp_ambient`` [s] and the ambient-model fields
        (:data:`perfchain.performance.ambient.AMBIENT_FIELDS`): the entries of a
        :class:`Performance` that :func:`assemble_performance` computes (and raises as it does).

    Examples
    --------
    Closed form as in :func:`assemble_performance`: c* = 70e5 / 4000 = 1750 m/s and
    c_vac = 3000 + 1e4 x 40 / 4000 = 3100 m/s:

    >>> t = performance_terms(70e5, 0.0, 4000.0, 3000.0, 1e4, 40.0, "example")
    >>> t["cstar"], t["exhaust_velocity_vacuum"], t["flows_full"]
    (1750.0, 3100.0, True)
    """
    cstar = pc / G  # referred to the injector face
    c_vac = u_e + (p_e - 0.0) * eps / G
    c_amb = u_e + (p_e - pa) * eps / G
    if not all(math.isfinite(v) for v in (cstar, c_vac, c_amb)):
        raise SolverError("performance is not a finite number", point() if callable(point) else point)
    rule = separation_rule(rule)
    if cut is None:
        ambient = dict(full_flow_fields(p_e, pa, rule, c_amb), cf_ambient=c_amb / cstar, isp_ambient=c_amb / G0,
                       exhaust_velocity_ambient=c_amb)
    else:
        ambient = cut_ambient(cut, G, cstar, p_e, pa, rule)
        del ambient["ambient_pressure"]
    return dict(area_ratio=eps, cstar=cstar, cf_vacuum=c_vac / cstar, isp_vacuum=c_vac / G0,
                exhaust_velocity_vacuum=c_vac, **ambient)
