"""The general path of the chain: pruned species sets on Cantera, any flow model, finite chambers.

Used for a finite-area chamber and for every point the batch solver hands back
(:mod:`perfchain.performance.batched`). Species sets are a pure function of the point, so a
result never depends on what was solved before (:mod:`perfchain.thermo.pruning`).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from perfchain.constants import ONE_ATM
from perfchain.nozzle.chamber import chamber_state
from perfchain.nozzle.contraction import finite_area_chamber
from perfchain.nozzle.expansion import FLOW_MODELS, expand, throat_of
from perfchain.nozzle.stations import make_station
from perfchain.performance.ambient import infeasibility, separation_pressures, separation_rule
from perfchain.performance.result import Performance, assemble_performance
from perfchain.propellants.mixture import Propellant
from perfchain.thermo.equilibrium import EquilibriumSystem
from perfchain.thermo.pruning import initial_subset, left_out_violations, lift, subset_system

__all__ = ["performance_general"]


def performance_general(propellant: Propellant, chamber_pressure: float, *, area_ratio=None,
                        exit_pressure=None, ambient_pressure: float = ONE_ATM,
                        flow: str = "shifting", system: EquilibriumSystem | None = None,
                        contraction_ratio: float | None = None, separation=None) -> Performance:
    """One point on the general path: pruned species sets on Cantera, any flow model.

    Parameters
    ----------
    propellant : Propellant
    chamber_pressure : float
        Chamber (injector-face) pressure [Pa].
    area_ratio : float, optional
        Exit / throat area [-]; exactly one of area_ratio, exit_pressure.
    exit_pressure : float, optional
        [Pa]
    ambient_pressure : float
        [Pa]
    flow : str
        ``"shifting"``, ``"frozen"`` or ``"frozen-throat"`` (checked by the caller).
    system : EquilibriumSystem, optional
        A system of this propellant's element totals, reused.
    contraction_ratio : float, optional
        Chamber / throat area [-]; default infinite-area chamber.
    separation : str or SeparationRule, optional
        Separation criterion (:func:`~perfchain.performance.ambient.separation_rule`); a
        separated nozzle's ambient values are the cut-nozzle estimate, its separation station
        solved on this path (chamber and throat memoised, so only that exit is new).

    Returns
    -------
    Performance

    Raises
    ------
    PerfchainError
        An infeasible point (:func:`~perfchain.performance.ambient.infeasibility`) or one the
        solver cannot settle.

    Examples
    --------
    LOX/RP-1 at O/F 2.56, 1000 psia, expanded to 1 atm, shifting: c* 1799 m/s and
    Isp 300 s at sea level (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5;
    from memory, so +/- 1 %):

    >>> from perfchain.propellants.mixture import make_propellant
    >>> r = performance_general(make_propellant("LOX", "RP-1", 2.56), 6894757.29,
    ...                         exit_pressure=101325.0)
    >>> abs(r.cstar / 1799 - 1) < 0.01, abs(r.isp_ambient / 300 - 1) < 0.01
    (True, True)
    """
    rule = separation_rule(separation)
    bad = infeasibility(chamber_pressure, ambient_pressure, exit_pressure)
    if bad is not None:
        raise bad
    point = (f"{propellant.describe()}, chamber pressure {chamber_pressure:.6g} Pa, "
             f"{flow} flow")
    full = system or EquilibriumSystem(propellant.elements, point=point)
    full.point = point
    system, exit_system, ch, finite, ex = _solve_pruned(
        full, propellant.enthalpy, chamber_pressure, flow, contraction_ratio, area_ratio, exit_pressure)
    before, after = FLOW_MODELS[flow]
    cut = _cut_station(full, propellant.enthalpy, chamber_pressure, flow, contraction_ratio, ex,
                       ambient_pressure, rule)

    def cp(sys_, st, shifting):
        return sys_.cp_equilibrium(st) if shifting else st.cp_frozen

    throat_state = _unlift(ex.throat, exit_system, system)
    chamber = make_station(system, ch, "chamber", 0.0, ex.chamber_sound_speed, cp(system, ch, before), None)
    throat = make_station(system, throat_state, "throat", ex.throat_velocity, ex.throat_sound_speed,
                          cp(system, throat_state, before), 1.0)
    exit_ = make_station(exit_system, ex.exit, "exit", ex.exit_velocity, ex.exit_sound_speed,
                         cp(exit_system, ex.exit, after), ex.area_ratio)
    return assemble_performance(propellant, chamber_pressure, ambient_pressure, flow, chamber, throat,
                                exit_, ex.throat_mass_flux, ex.exit_velocity, ex.exit.p, ex.area_ratio,
                                finite, point, rule, cut)


def _cut_station(full, enthalpy, pc, flow, contraction_ratio, ex, pa, rule):
    """The separation station of a separated nozzle on this path (None when it flows full)."""
    exit_mach = ex.exit_velocity / ex.exit_sound_speed
    if not rule.separates(ex.exit.p, pa, exit_mach):
        return None

    def solve_at(idx, pressures):
        e = [_solve_pruned(full, enthalpy, pc, flow, contraction_ratio, None, float(p))[4] for p in pressures]
        return {"velocity": np.array([x.exit_velocity for x in e]),
                "area_ratio": np.array([x.area_ratio for x in e]),
                "mach": np.array([x.exit_velocity / x.exit_sound_speed for x in e]),
                "ok": np.ones(len(e), bool), "why": {}}

    cut = separation_pressures(solve_at, [ex.exit.p], [ex.throat.p], [exit_mach], [pa], rule)[0]
    if isinstance(cut, Exception):
        raise cut
    return cut


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
