"""A catalytic hydrazine thruster at a fixed ammonia dissociation, as a Performance record.

The chamber composition is fixed by the design input X,

    3 N2H4 -> 4 (1 - X) NH3 + (1 + 2 X) N2 + 6 X H2,

its temperature follows from the energy balance, and the nozzle expands that composition
frozen, the usual assumption for these thrusters (Sutton & Biblarz, Rocket Propulsion
Elements, monopropellant chapter; from memory). The thermochemistry is
:mod:`perfchain.thermo.decomposition`; this module builds the chamber, throat and exit
stations, the ambient values (with the separation-aware cut-nozzle estimate of
:mod:`perfchain.performance.ambient` where the nozzle separates) and the record's notes.
"""

from __future__ import annotations

import numpy as np

from perfchain.constants import ONE_ATM
from perfchain.nozzle.stations import COMPOSITION_THRESHOLD, Station
from perfchain.performance.ambient import separation_pressures, separation_rule
from perfchain.performance.result import Performance, assemble_performance, propellant_fields
from perfchain.propellants.decomposition import check_ammonia_dissociation
from perfchain.thermo.decomposition import FrozenExpansion, frozen_nozzle, hydrazine_decomposition

__all__ = ["decomposed_performance", "decomposition_notes"]


def decomposition_notes(x: float) -> tuple:
    """What a point at a fixed ammonia dissociation ``x`` [-] assumed, as the record's notes.

    >>> decomposition_notes(0.4)[0][:60]
    'chamber composition fixed by the ammonia dissociation X = 0.'
    """
    return (f"chamber composition fixed by the ammonia dissociation X = {x:g} "
            f"(3 N2H4 -> 4(1-X) NH3 + (1+2X) N2 + 6X H2), temperature from the energy balance",
            "expansion frozen at the chamber composition, by assumption (the usual model of catalytic "
            "hydrazine thrusters), whatever flow model is asked for")


def _station(name: str, st, molar_mass: float, composition: dict) -> Station:
    """A :class:`Station` of a frozen state (no condensed phase; frozen and flow-model values agree)."""
    shown = {k: v for k, v in composition.items() if v >= COMPOSITION_THRESHOLD}
    return Station(name=name, pressure=st.pressure, temperature=st.temperature, density=st.density,
                   enthalpy=st.enthalpy, entropy=st.entropy, molar_mass=molar_mass,
                   gamma=st.density * st.sound_speed ** 2 / st.pressure, gamma_frozen=st.gamma,
                   cp=st.cp, cp_frozen=st.cp, sound_speed=st.sound_speed, velocity=st.velocity,
                   mach=st.mach, area_ratio=None if name == "chamber" else st.area_ratio,
                   condensed_mass_fraction=0.0, composition=shown)


def decomposed_performance(propellant, ammonia_dissociation, chamber_pressure: float, *, area_ratio=None,
                           exit_pressure=None, ambient_pressure: float = ONE_ATM,
                           separation=None) -> Performance:
    """Ideal performance of hydrazine decomposed to a fixed ammonia dissociation, frozen nozzle.

    Parameters
    ----------
    propellant : Propellant
        Hydrazine alone (``make_formulation("N2H4")``, conditioned or not).
    ammonia_dissociation : float
        X in [0, 1] [-].
    chamber_pressure : float
        [Pa]
    area_ratio : float, optional
        Exit / throat area [-], > 1.
    exit_pressure : float, optional
        [Pa]; exactly one of ``area_ratio``, ``exit_pressure``.
    ambient_pressure : float
        [Pa]
    separation : str or SeparationRule, optional
        Separation criterion (default Summerfield, k = 0.4).

    Returns
    -------
    Performance
        ``flow`` ``"frozen"``, ``ammonia_dissociation`` X and ``notes`` saying what was assumed.

    Examples
    --------
    No ammonia dissociated (X = 0): about 1650 K in the chamber (Sutton & Biblarz, Rocket
    Propulsion Elements, hydrazine decomposition figure; from memory, +/- 40 K):

    >>> from perfchain.propellants.formulation import make_formulation
    >>> r = decomposed_performance(make_formulation("N2H4"), 0.0, 1e6, area_ratio=50, ambient_pressure=0.0)
    >>> abs(r.chamber.temperature - 1650) < 40, r.flow, r.ammonia_dissociation
    (True, 'frozen', 0.0)
    """
    x = check_ammonia_dissociation(ammonia_dissociation, propellant)
    chamber = hydrazine_decomposition(x, propellant)
    pc, pa = float(chamber_pressure), float(ambient_pressure)
    nozzle = frozen_nozzle(chamber, pc, area_ratio=area_ratio, exit_pressure=exit_pressure,
                           ambient_pressure=pa)
    comp, mw = dict(chamber.mole_fractions), chamber.molar_mass
    ch, th, ex = (_station(n, st, mw, comp) for n, st in zip(("chamber", "throat", "exit"), nozzle.states))
    rule = separation_rule(separation)
    G = nozzle.mass_flux
    cut = None
    if rule.separates(ex.pressure, pa, ex.mach):
        line = FrozenExpansion(chamber, pc)

        def solve_at(idx, pressures):
            states = [line.at(p, G) for p in pressures]
            return {"velocity": np.array([s.velocity for s in states]),
                    "area_ratio": np.array([s.area_ratio for s in states]),
                    "mach": np.array([s.mach for s in states]), "ok": np.ones(len(states), bool), "why": {}}

        cut = separation_pressures(solve_at, [ex.pressure], [th.pressure], [ex.mach], [pa], rule)[0]
        if isinstance(cut, Exception):
            raise cut
    fields = dict(propellant_fields(propellant), ammonia_dissociation=x, notes=decomposition_notes(x))
    return assemble_performance(fields, pc, pa, "frozen", ch, th, ex, G, ex.velocity, ex.pressure,
                                ex.area_ratio, None, lambda: f"hydrazine at ammonia dissociation {x:g}", rule, cut)
