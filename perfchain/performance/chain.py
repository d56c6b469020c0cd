"""The chain for one operating point: ingredients -> chamber -> nozzle -> ideal performance.

A thin composition over the physics steps: :func:`~perfchain.propellants.mixture.make_propellant`,
:func:`~perfchain.nozzle.chamber.chamber_state`, :func:`~perfchain.nozzle.expansion.expand`.
The result is a documented :class:`Performance` record in SI units.

Ideal means: one-dimensional, steady, adiabatic, isentropic expansion of an
ideal-gas mixture (condensed products in velocity and thermal equilibrium with
the gas, their volume neglected), infinite-area chamber, no friction, no heat
loss, no divergence.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from functools import lru_cache

import numpy as np

from perfchain.constants import G0
from perfchain.nozzle.chamber import chamber_state
from perfchain.nozzle.contraction import check_contraction_ratio, finite_area_chamber
from perfchain.thermo.equilibrium import EquilibriumSystem
from perfchain.constants import ONE_ATM
from perfchain.errors import InputError, SolverError
from perfchain.nozzle.expansion import FLOW_MODELS, check_flow, expand, throat_of
from perfchain.performance.losses import LossModel
from perfchain.propellants.mixture import Propellant, make_propellant
from perfchain.thermo.pruning import initial_subset, left_out_violations, lift, subset_system
from perfchain.nozzle.stations import Station, make_station
from perfchain.units import to_si

__all__ = ["Performance", "performance", "performance_of", "performance_batch"]



@dataclass(frozen=True)
class Performance:
    """Ideal performance of one operating point (SI units).

    Attributes
    ----------
    oxidizer, fuel : str
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
    (effective exhaust velocity = thrust / mass flow).
    """

    oxidizer: str
    fuel: str
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
    altitude: float | None = None
    finite_chamber: dict | None = None
    delivered: dict | None = None
    losses: dict | None = None
    separation: dict | None = None
    sizing: dict | None = None

    def to_dict(self) -> dict:
        """One JSON-ready dict (SI units); station objects become nested dicts.

        Optional blocks (``altitude``, ``finite_chamber``, ``delivered``,
        ``losses``, ``separation``, ``sizing``) appear only when computed.
        """
        out = {}
        for key in self.__dataclass_fields__:
            value = getattr(self, key)
            if value is None and key in _OPTIONAL:
                continue
            out[key] = value.to_dict() if isinstance(value, Station) else value
        return out


_OPTIONAL = {"altitude", "finite_chamber", "delivered", "losses", "separation", "sizing"}


def _loss_model(losses):
    """``None``, a LossModel, or a dict of LossModel fields -> LossModel or None."""
    if losses is None or isinstance(losses, LossModel):
        return losses
    if not isinstance(losses, dict):
        raise InputError("losses", losses, "a LossModel or a dict of its factors")
    fields = list(LossModel.__dataclass_fields__)
    for key in losses:
        if key not in fields:
            from perfchain.errors import suggest

            raise InputError("losses", key, f"one of {', '.join(fields)} ({suggest(str(key), fields)})".replace(" ()", ""))
    return LossModel(**losses)


def _pressure(value, field, *, allow_zero=False):
    if value is None:
        return None
    return to_si(value, "pressure", field, minimum=0.0, exclusive=not allow_zero)


def performance(oxidizer, fuel, *, chamber_pressure, mixture_ratio=None, equivalence_ratio=None,
                fuel_percent=None, area_ratio=None, exit_pressure=None,
                ambient_pressure=None, flow: str = "shifting", altitude=None,
                contraction_ratio=None, losses=None, thrust=None,
                thrust_at: str = "vacuum") -> Performance:
    """Ideal performance of one operating point.

    Parameters
    ----------
    oxidizer, fuel : str or Ingredient
        Ingredient names (``"LOX"``, ``"RP-1"``...) or records.
    chamber_pressure : str or float
        Chamber pressure, text with a unit (``"1000 psi"``) or [Pa].
    mixture_ratio, equivalence_ratio, fuel_percent : float
        Exactly one: O/F by mass [-], phi [-] or fuel mass per cent [%].
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
    z = None
    if altitude is not None:
        if ambient_pressure is not None:
            raise InputError("altitude", altitude, "either altitude or ambient_pressure, not both")
        from perfchain.atmosphere import MAX_ALTITUDE, pressure as atmosphere_pressure

        z = to_si(altitude, "length", "altitude", minimum=0.0, exclusive=False, maximum=MAX_ALTITUDE)
        pa = float(atmosphere_pressure(z))
    else:
        pa = _pressure(ONE_ATM if ambient_pressure is None else ambient_pressure,
                       "ambient_pressure", allow_zero=True)
    if contraction_ratio is not None:
        contraction_ratio = check_contraction_ratio(contraction_ratio)
    losses = _loss_model(losses)
    if thrust is not None:
        thrust = to_si(thrust, "force", "thrust", minimum=0.0)
    if not pa < pc:
        raise InputError("altitude" if z is not None else "ambient_pressure",
                         altitude if z is not None else ambient_pressure,
                         f"an ambient pressure below the chamber pressure ({pc:.6g} Pa)")
    pe = _pressure(exit_pressure, "exit_pressure")
    if pe is not None and not pe < pc:
        raise InputError("exit_pressure", exit_pressure,
                         f"a pressure below the chamber pressure ({pc:.6g} Pa)")
    if area_ratio is not None:
        if isinstance(area_ratio, bool) or not isinstance(area_ratio, (int, float)) \
                or not float(area_ratio) > 1.0 or area_ratio != area_ratio or area_ratio == float("inf"):
            raise InputError("area_ratio", area_ratio, "an exit/throat area ratio above 1")
        area_ratio = float(area_ratio)
    if (area_ratio is None) == (pe is None):
        raise InputError("exit", "both" if pe is not None else "neither",
                         "exactly one of area_ratio or exit_pressure")
    prop = make_propellant(oxidizer, fuel, mixture_ratio, equivalence_ratio, fuel_percent)
    result = performance_of(prop, pc, area_ratio=area_ratio, exit_pressure=pe,
                            ambient_pressure=pa, flow=flow, contraction_ratio=contraction_ratio)
    if z is not None:
        result = replace(result, altitude=z)
    if losses is not None or thrust is not None:
        from perfchain.performance.delivered import deliver

        result = deliver(result, losses, thrust=thrust, thrust_at=thrust_at)
    return result


def performance_of(propellant: Propellant, chamber_pressure: float, *, area_ratio=None,
                   exit_pressure=None, ambient_pressure: float = ONE_ATM,
                   flow: str = "shifting", system: EquilibriumSystem | None = None,
                   contraction_ratio: float | None = None) -> Performance:
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
    """
    if contraction_ratio is None:
        exit_key = "area_ratio" if area_ratio is not None else "exit_pressure"
        x = area_ratio if area_ratio is not None else exit_pressure
        res = performance_batch([(propellant, chamber_pressure, x)], exit_key=exit_key,
                                ambient_pressure=ambient_pressure, system=system, flow=flow)[0]
        if isinstance(res, Exception):
            raise res
        return res
    return _general(propellant, chamber_pressure, area_ratio=area_ratio, exit_pressure=exit_pressure,
                    ambient_pressure=ambient_pressure, flow=flow, system=system,
                    contraction_ratio=contraction_ratio)


def performance_batch(points, *, exit_key: str = "area_ratio", ambient_pressure: float = ONE_ATM,
                      system: EquilibriumSystem | None = None, flow: str = "shifting") -> list:
    """Performance of many points at once (infinite-area chamber, SI).

    Parameters
    ----------
    points : list of (Propellant, chamber pressure [Pa], exit value)
        The exit value is an area ratio [-] or an exit pressure [Pa], by ``exit_key``.
    exit_key : str
        ``"area_ratio"`` or ``"exit_pressure"``.
    ambient_pressure : float
        [Pa]
    system : EquilibriumSystem, optional
        A system of the points' elements, reused.
    flow : str
        ``"shifting"``, ``"frozen"`` or ``"frozen-throat"`` (all points).

    Returns
    -------
    list
        Per point a :class:`Performance`, or the
        :class:`~perfchain.errors.PerfchainError` that stopped it.

    Every point gets the numbers it gets alone (:mod:`perfchain.thermo.batch` keeps
    rows apart); points sharing propellant and chamber pressure share one
    chamber and throat solve. ``flow`` is checked by the caller.

    Examples
    --------
    LOX/RP-1 at O/F 2.56 and 1000 psia expanded to 1 atm gives about 300 s at
    sea level (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5; from
    memory, +/- 1 %); an exit pressure above the chamber's keeps its place as
    an error:

    >>> from perfchain.propellants.mixture import make_propellant
    >>> p = make_propellant("LOX", "RP-1", 2.56)
    >>> a, b = performance_batch([(p, 6894757.29, 101325.0), (p, 6894757.29, 8e6)],
    ...                          exit_key="exit_pressure")
    >>> abs(a.isp_ambient / 300 - 1) < 0.01, type(b).__name__
    (True, 'InputError')
    """
    from perfchain.thermo import batch
    from perfchain.errors import PerfchainError

    out: list = [None] * len(points)
    groups: dict = {}
    elements = {}
    for k, (prop, _, _) in enumerate(points):
        if id(prop) not in elements:
            elements[id(prop)] = prop.elements
        key = frozenset(e for e, n in elements[id(prop)].items() if n > 0)
        groups.setdefault(key, []).append(k)
    for ks in groups.values():
        prop0 = points[ks[0]][0]
        full = system if system is not None and len(groups) == 1 else _template(frozenset(
            e for e, n in elements[id(prop0)].items() if n > 0))
        tab = batch.tables_for(full)
        chambers: dict = {}
        source = []
        for k in ks:
            prop, pc, _ = points[k]
            el = elements[id(prop)]
            key = (tuple(float(el.get(e, 0.0)) for e in tab.element_names), prop.enthalpy, pc)
            source.append(chambers.setdefault(key, len(chambers)))
        keys = list(chambers)
        nz = stations = None
        if tab.supported:
            nz = batch.nozzle(tab, [k[0] for k in keys], np.array([k[1] for k in keys]),
                              np.array([k[2] for k in keys]), np.array(source), flow=flow,
                              **{exit_key: np.array([float(points[k][2]) for k in ks])})
            stations = _batch_stations(nz, full)
        fixed: dict = {}
        for j, k in enumerate(ks):
            prop, pc, x = points[k]
            try:
                if nz is not None and nz.ok[j]:
                    if id(prop) not in fixed:
                        fixed[id(prop)] = _propellant_fields(prop)
                    ci = int(nz.source[j])
                    out[k] = _assemble(fixed[id(prop)], pc, ambient_pressure, flow,
                                       stations[0][ci], stations[1][ci], stations[2][j],
                                       float(nz.throat_mass_flux[ci]), float(nz.exit_velocity[j]),
                                       float(nz.exit.p[j]), float(nz.area_ratio[j]), None,
                                       lambda: f"{prop.describe()}, chamber pressure {pc:.6g} Pa, {flow} flow")
                else:   # handed back: the general path, on a system of this point's own elements
                    same = np.array_equal(full.b, [float(elements[id(prop)].get(e, 0.0))
                                                   for e in full.element_names])
                    out[k] = _general(prop, pc, ambient_pressure=ambient_pressure, flow=flow,
                                      system=full if same else None, **{exit_key: x})
            except PerfchainError as exc:
                out[k] = exc
    return out


@lru_cache(maxsize=32)
def _template(elements: frozenset) -> EquilibriumSystem:
    """A system over the products of these elements (its element totals are placeholders):
    species lists and tables for the batch solver, shared by every mixture of them."""
    return EquilibriumSystem({e: 1.0 for e in elements})


def _batch_stations(nz, full):
    """Chamber, throat and exit :class:`~perfchain.nozzle.stations.Station` lists of a solved batch nozzle
    (rows the batch handed back get None)."""
    from perfchain.nozzle.stations import COMPOSITION_THRESHOLD, Station

    n_ch = len(nz.chamber.T)
    specs = (("chamber", nz.chamber, nz.chamber_props, nz.chamber_deriv, np.zeros(n_ch), None),
             ("throat", nz.throat, nz.throat_props, nz.throat_deriv, nz.throat_velocity, 1.0),
             ("exit", nz.exit, nz.exit_props, nz.exit_deriv, nz.exit_velocity, nz.area_ratio))
    names = full.species_names
    cnames = full.cond_names
    out = []
    for name, bt, pr, d, vel, eps in specs:
        ok = bt.ok
        ng = pr["n_gas"]
        nc = np.where(bt.act, bt.nc, 0.0)
        total = ng + nc.sum(-1)
        with np.errstate(all="ignore"):
            xg = (pr["nj"] / ng[:, None]) * ng[:, None] / total[:, None]
            xc = nc / total[:, None]
            cmf = (nc * full.cond_mw[None, :]).sum(-1) if len(cnames) else np.zeros(len(ng))
            a = d["sound_speed"]
            gamma = pr["density"] * a * a / bt.p
            mach = vel / a
            gf = pr["cp_frozen"] / pr["cv_frozen"]
        cols = [c.tolist() for c in (bt.p, bt.T, pr["density"], pr["h"], pr["s"], 1.0 / ng, gamma, gf, d["cp"],
                                     pr["cp_frozen"], a, vel, mach, cmf)]
        eps_list = [eps] * len(ng) if not isinstance(eps, np.ndarray) else eps.tolist()
        above_g = xg > COMPOSITION_THRESHOLD
        above_c = xc > COMPOSITION_THRESHOLD
        rows = []
        for i in range(len(ng)):
            if not ok[i]:
                rows.append(None)
                continue
            comp = {names[k]: float(xg[i, k]) for k in np.nonzero(above_g[i])[0]}
            for c in np.nonzero(above_c[i])[0]:
                comp[cnames[c]] = comp.get(cnames[c], 0.0) + float(xc[i, c])
            comp = dict(sorted(comp.items(), key=lambda kv: -kv[1]))
            (p_, T_, rho, h, s_, mm, g_, gf_, cp, cpf, a_, u, m_, cmf_) = (col[i] for col in cols)
            rows.append(Station(name=name, pressure=p_, temperature=T_, density=rho, enthalpy=h, entropy=s_,
                                molar_mass=mm, gamma=g_, gamma_frozen=gf_, cp=cp, cp_frozen=cpf,
                                sound_speed=a_, velocity=u, mach=m_, area_ratio=eps_list[i],
                                condensed_mass_fraction=cmf_, composition=comp))
        out.append(rows)
    return out


def _propellant_fields(prop) -> dict:
    """The propellant's entries of a :class:`Performance` (computed once per propellant)."""
    return dict(oxidizer=prop.oxidizer.name, fuel=prop.fuel.name, mixture_ratio=prop.mixture_ratio,
                stoichiometric_mixture_ratio=prop.stoichiometric_mixture_ratio,
                equivalence_ratio=prop.equivalence_ratio, fuel_percent=prop.fuel_percent,
                reactant_enthalpy=prop.enthalpy, bulk_density=prop.bulk_density,
                oxidizer_density=prop.oxidizer.density, fuel_density=prop.fuel.density)


def _assemble(fields, pc, pa, flow, chamber, throat, exit_, G, u_e, p_e, eps, finite, point):
    """A :class:`Performance` from its stations and flow quantities; ``fields`` from
    :func:`_propellant_fields` (or a Propellant)."""
    if not isinstance(fields, dict):
        fields = _propellant_fields(fields)
    cstar = pc / G  # referred to the injector face
    c_vac = u_e + (p_e - 0.0) * eps / G
    c_amb = u_e + (p_e - pa) * eps / G
    if not all(math.isfinite(v) for v in (cstar, c_vac, c_amb)):
        raise SolverError("performance is not a finite number", point() if callable(point) else point)
    return Performance(
        **fields, flow=flow, chamber_pressure=pc, ambient_pressure=pa,
        chamber=chamber, throat=throat, exit=exit_, area_ratio=eps, cstar=cstar,
        cf_vacuum=c_vac / cstar, cf_ambient=c_amb / cstar,
        isp_vacuum=c_vac / G0, isp_ambient=c_amb / G0,
        exhaust_velocity_vacuum=c_vac, exhaust_velocity_ambient=c_amb, finite_chamber=finite,
    )


def _general(propellant: Propellant, chamber_pressure: float, *, area_ratio=None,
             exit_pressure=None, ambient_pressure: float = ONE_ATM,
             flow: str = "shifting", system: EquilibriumSystem | None = None,
             contraction_ratio: float | None = None) -> Performance:
    """The general path: pruned species sets on Cantera, any flow model, finite chambers."""
    point = (f"{propellant.describe()}, chamber pressure {chamber_pressure:.6g} Pa, "
             f"{flow} flow")
    full = system or EquilibriumSystem(propellant.elements, point=point)
    full.point = point
    system, exit_system, ch, finite, ex = _solve_pruned(
        full, propellant.enthalpy, chamber_pressure, flow, contraction_ratio, area_ratio, exit_pressure)
    before, after = FLOW_MODELS[flow]

    def cp(sys_, st, shifting):
        return sys_.cp_equilibrium(st) if shifting else st.cp_frozen

    throat_state = _unlift(ex.throat, exit_system, system)
    chamber = make_station(system, ch, "chamber", 0.0, ex.chamber_sound_speed, cp(system, ch, before), None)
    throat = make_station(system, throat_state, "throat", ex.throat_velocity, ex.throat_sound_speed,
                          cp(system, throat_state, before), 1.0)
    exit_ = make_station(exit_system, ex.exit, "exit", ex.exit_velocity, ex.exit_sound_speed,
                         cp(exit_system, ex.exit, after), ex.area_ratio)
    return _assemble(propellant, chamber_pressure, ambient_pressure, flow, chamber, throat, exit_,
                     ex.throat_mass_flux, ex.exit_velocity, ex.exit.p, ex.area_ratio, finite, point)


def _chamber_and_throat(system, enthalpy, pc, flow, contraction_ratio):
    """Chamber (and finite chamber) and throat on one system, memoised on it."""
    memo = system.__dict__.setdefault("_memo", {})
    key = (enthalpy, pc, flow, contraction_ratio)
    if key not in memo:
        ch = chamber_state(system, enthalpy, pc)
        finite, stagnation = None, ch
        if contraction_ratio is not None:
            fc = finite_area_chamber(system, enthalpy, pc, contraction_ratio)
            stagnation = fc.stagnation
            finite = {"contraction_ratio": fc.contraction_ratio, "injector_pressure": pc,
                      "nozzle_inlet_stagnation_pressure": fc.stagnation_pressure,
                      "nozzle_inlet_pressure": fc.inlet.p, "nozzle_inlet_temperature": fc.inlet.T,
                      "nozzle_inlet_velocity": fc.inlet_velocity,
                      "nozzle_inlet_mach": fc.inlet_velocity / system.sound_speed(fc.inlet, True)}
        memo[key] = (ch, stagnation, finite, throat_of(system, stagnation, flow))
        if len(memo) > 64:
            memo.pop(next(iter(memo)))
    return memo[key]


def _solve_pruned(full, enthalpy, pc, flow, contraction_ratio, area_ratio, exit_pressure):
    """Solve on pruned species sets and prove the left-out species negligible.

    Chamber and throat use a set that is a pure function of (propellant, pressure,
    flow): the species of the full-set chamber solved from a cold start, plus any
    a check at chamber or throat asks for. The exit may add species of its own
    (cold exits form new ones) without touching chamber, throat or c*, so every
    area ratio of a chamber shares them exactly and no result depends on what
    was solved before.
    """
    memo = full.__dict__.setdefault("_memo", {})
    key = ("full-chamber", enthalpy, pc)
    if key not in memo:
        memo[key] = chamber_state(full, enthalpy, pc)
        if len(memo) > 64:
            memo.pop(next(iter(memo)))
    names = initial_subset(full, [memo[key]])
    for _ in range(4):
        work = subset_system(full, names)
        ch, stagnation, finite, throat = _chamber_and_throat(work, enthalpy, pc, flow, contraction_ratio)
        bad = left_out_violations(full, work, [ch, stagnation, throat[0]])
        if not bad:
            break
        names = list(work.species_names) + bad
    else:
        work = full
        ch, stagnation, finite, throat = _chamber_and_throat(full, enthalpy, pc, flow, contraction_ratio)
    exit_work = work
    for _ in range(4):
        stag = lift(stagnation, work, exit_work)
        th = (lift(throat[0], work, exit_work), *throat[1:])
        ex = expand(exit_work, stag, flow, area_ratio=area_ratio, exit_pressure=exit_pressure, throat=th)
        bad = left_out_violations(full, exit_work, [ex.exit])
        if not bad:
            return work, exit_work, ch, finite, ex
        exit_work = subset_system(full, list(exit_work.species_names) + bad)
    stag, th = lift(stagnation, work, full), (lift(throat[0], work, full), *throat[1:])
    ex = expand(full, stag, flow, area_ratio=area_ratio, exit_pressure=exit_pressure, throat=th)
    return work, full, ch, finite, ex


def _unlift(st, src, dst):
    """A state of ``src`` (a superset) back over ``dst``'s species: the inverse of ``lift``."""
    if src is dst:
        return st
    index = {n: k for k, n in enumerate(src.species_names)}
    return replace(st, X=st.X[[index[n] for n in dst.species_names]])
