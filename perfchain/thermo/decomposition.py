"""Catalytic hydrazine decomposition at a fixed ammonia dissociation, and its frozen nozzle.

A catalytic hydrazine thruster does not reach chemical equilibrium: the bed fixes the
products by

    3 N2H4 -> 4 (1 - X) NH3 + (1 + 2 X) N2 + 6 X H2

with the ammonia dissociation fraction X a design input
(:mod:`perfchain.propellants.decomposition` checks it). The chamber temperature follows
from the energy balance (adiabatic, products as ideal gases with the NASA Glenn data
Cantera ships) and the nozzle expansion is frozen at that composition, the usual
assumption for these thrusters (Sutton & Biblarz, Rocket Propulsion Elements,
monopropellant chapter; from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from types import MappingProxyType
from typing import Mapping

from scipy.optimize import brentq

from perfchain.constants import G0, ONE_ATM
from perfchain.errors import InputError, SolverError
from perfchain.propellants.decomposition import check_ammonia_dissociation, decomposition_moles
from perfchain.thermo.gas import per_thread_cache
from perfchain.thermo.products import gas_species

__all__ = ["DecompositionChamber", "FrozenState", "FrozenExpansion", "FrozenNozzle", "hydrazine_decomposition",
           "frozen_nozzle"]

_SPECIES = ("NH3", "N2", "H2")


@dataclass(frozen=True)
class DecompositionChamber:
    """Products of hydrazine decomposition at a fixed ammonia dissociation.

    Attributes
    ----------
    ammonia_dissociation : float
        X [-].
    temperature : float
        Adiabatic chamber temperature [K].
    mole_fractions : Mapping[str, float]
        NH3, N2, H2 [-] (zero entries dropped).
    molar_mass : float
        [kg/kmol]
    enthalpy : float
        Of the reactant, equal to that of the products [J/kg].
    """

    ammonia_dissociation: float
    temperature: float
    mole_fractions: Mapping[str, float]
    molar_mass: float
    enthalpy: float


def hydrazine_decomposition(ammonia_dissociation, propellant=None) -> DecompositionChamber:
    """Chamber temperature and composition of hydrazine decomposed to a fixed X.

    Parameters
    ----------
    ammonia_dissociation : float
        X in [0, 1] [-].
    propellant : Propellant, optional
        Hydrazine alone (``make_formulation("N2H4")``, possibly conditioned); default
        the bundled liquid at 298.15 K.

    Returns
    -------
    DecompositionChamber

    Examples
    --------
    Full dissociation gives N2 + 2 H2 (1/3 and 2/3 by moles, molar mass 10.68); about
    870 K (Sutton & Biblarz, Rocket Propulsion Elements, hydrazine decomposition
    figure; from memory, +/- 30 K):

    >>> c = hydrazine_decomposition(1.0)
    >>> {k: round(v, 4) for k, v in c.mole_fractions.items()}, round(c.molar_mass, 2)
    ({'N2': 0.3333, 'H2': 0.6667}, 10.68)
    >>> abs(c.temperature - 870) < 30
    True
    """
    from perfchain.propellants.formulation import make_formulation

    propellant = make_formulation("N2H4") if propellant is None else propellant
    x = check_ammonia_dissociation(ammonia_dissociation, propellant)
    moles = {k: v for k, v in decomposition_moles(x).items() if v > 0}
    mass = sum(n * _molar_mass(k) for k, n in moles.items())     # kg per 3 kmol N2H4
    h_target = propellant.enthalpy * mass                            # J per 3 kmol N2H4

    def excess(t):
        return sum(n * gas_species(k).thermo.h(t) for k, n in moles.items()) - h_target

    lo = max(gas_species(k).thermo.min_temp for k in moles)
    hi = min(gas_species(k).thermo.max_temp for k in moles)
    if not excess(lo) < 0 < excess(hi):
        raise SolverError(f"no decomposition temperature within the species data ({lo:g}-{hi:g} K)",
                          f"hydrazine at ammonia dissociation {x:g}")
    t = brentq(excess, lo, hi, xtol=1e-9, rtol=1e-14)
    total = sum(moles.values())
    return DecompositionChamber(x, t, MappingProxyType({k: n / total for k, n in moles.items()}),
                                mass / total, propellant.enthalpy)


def _molar_mass(name):
    return gas_species(name).molecular_weight


@per_thread_cache(maxsize=1)   # a Cantera phase holds a state: one per thread
def _gas():
    import cantera as ct

    return ct.Solution(thermo="ideal-gas", species=[gas_species(k) for k in _SPECIES])


@dataclass(frozen=True)
class FrozenState:
    """One state of the frozen expansion (SI): ``pressure`` [Pa], ``temperature`` [K],
    ``density`` [kg/m^3], ``enthalpy`` [J/kg], ``entropy`` [J/(kg K)], ``cp`` [J/(kg K)],
    ``gamma`` [-] (cp/cv of the fixed composition), ``sound_speed`` [m/s] (frozen),
    ``velocity`` [m/s] (from the chamber enthalpy), ``area_ratio`` [-] (A/A*; None in the
    chamber), ``mach`` [-]."""

    pressure: float
    temperature: float
    density: float
    enthalpy: float
    entropy: float
    cp: float
    gamma: float
    sound_speed: float
    velocity: float
    area_ratio: float | None = None

    @property
    def mach(self) -> float:
        """Flow speed over the frozen sound speed [-]."""
        return self.velocity / self.sound_speed


class FrozenExpansion:
    """The isentrope of a decomposition chamber with its composition held (frozen).

    Parameters
    ----------
    chamber : DecompositionChamber
    chamber_pressure : float
        [Pa]

    Examples
    --------
    At the chamber pressure the state is the chamber itself, at rest:

    >>> e = FrozenExpansion(hydrazine_decomposition(0.4), 1e6)
    >>> st = e.at(1e6)
    >>> st.temperature == e.chamber.temperature, st.velocity
    (True, 0.0)
    """

    def __init__(self, chamber: DecompositionChamber, chamber_pressure: float):
        self.chamber, self.chamber_pressure = chamber, float(chamber_pressure)
        self.x = [chamber.mole_fractions.get(k, 0.0) for k in _SPECIES]
        gas = _gas()
        gas.TPX = chamber.temperature, self.chamber_pressure, self.x
        self.h0, self.s0 = gas.h, gas.s

    def at(self, p: float, mass_flux: float | None = None) -> FrozenState:
        """The state at pressure ``p`` [Pa] on the isentrope; with the throat ``mass_flux``
        [kg/(m^2 s)] its area ratio too."""
        gas = _gas()
        if p == self.chamber_pressure:               # the chamber itself, exactly
            gas.TPX = self.chamber.temperature, self.chamber_pressure, self.x
        else:
            gas.SPX = self.s0, float(p), self.x      # composition held: frozen
        u = math.sqrt(max(2.0 * (self.h0 - gas.h), 0.0))
        eps = None if mass_flux is None or u == 0.0 else mass_flux / (gas.density * u)
        return FrozenState(float(p), gas.T, gas.density, gas.h, gas.s, gas.cp_mass, gas.cp_mass / gas.cv_mass,
                           gas.sound_speed, u, eps)


@dataclass(frozen=True)
class FrozenNozzle:
    """Ideal frozen expansion of a fixed composition (SI).

    Attributes
    ----------
    chamber_pressure, throat_pressure, exit_pressure [Pa]; throat_temperature,
    exit_temperature [K]; area_ratio [-]; cstar, exit_velocity [m/s];
    isp_vacuum, isp_ambient [s]; mass_flux [kg/(m^2 s)] at the throat; states, the
    chamber, throat and exit states (FrozenState records).
    """

    chamber_pressure: float
    throat_pressure: float
    throat_temperature: float
    exit_pressure: float
    exit_temperature: float
    area_ratio: float
    cstar: float
    exit_velocity: float
    isp_vacuum: float
    isp_ambient: float
    mass_flux: float = math.nan
    states: tuple = ()


def frozen_nozzle(chamber: DecompositionChamber, chamber_pressure: float, *, area_ratio=None,
                  exit_pressure=None, ambient_pressure: float = ONE_ATM) -> FrozenNozzle:
    """Frozen isentropic expansion of the decomposition products (infinite-area chamber).

    The throat is where the flow speed equals the frozen sound speed; the exit is given
    by its area ratio (supersonic branch) or its pressure.

    Parameters
    ----------
    chamber : DecompositionChamber
    chamber_pressure : float
        [Pa]
    area_ratio : float, optional
        Exit / throat area [-], > 1.
    exit_pressure : float, optional
        [Pa]; exactly one of area_ratio, exit_pressure.
    ambient_pressure : float
        [Pa]

    Returns
    -------
    FrozenNozzle

    Examples
    --------
    Closed form for a calorically perfect gas: p*/pc = (2/(g+1))^(g/(g-1)), 0.53 for
    g = 1.4 (NACA Report 1135); these products (g about 1.38) give close to that:

    >>> n = frozen_nozzle(hydrazine_decomposition(0.5), 1e6, area_ratio=50)
    >>> 0.53 < n.throat_pressure / 1e6 < 0.56
    True
    """
    if (area_ratio is None) == (exit_pressure is None):
        raise InputError("exit", "both" if area_ratio is not None else "neither",
                         "exactly one of area_ratio or exit_pressure")
    pc = float(chamber_pressure)
    line = FrozenExpansion(chamber, pc)

    def sonic(lnp):
        st = line.at(math.exp(lnp))
        return st.velocity - st.sound_speed

    pt = math.exp(brentq(sonic, math.log(pc * 0.2), math.log(pc * (1 - 1e-6)), xtol=1e-13))
    throat = line.at(pt)
    mass_flux = throat.density * throat.sound_speed
    if exit_pressure is not None:
        pe = float(exit_pressure)
        if not 0 < pe < pc:
            raise InputError("exit_pressure", exit_pressure, f"a pressure between 0 and {pc:.6g} Pa")
    else:
        eps = float(area_ratio)
        if not eps > 1:
            raise InputError("area_ratio", area_ratio, "an exit/throat area ratio above 1")

        def area(lnp):
            return line.at(math.exp(lnp), mass_flux).area_ratio - eps

        lo = math.log(pt)
        while area(lo) < 0 and lo > math.log(pc) - 40:
            lo -= 1.0
        pe = math.exp(brentq(area, lo, math.log(pt), xtol=1e-13))
    out = line.at(pe, mass_flux)
    low = max(gas_species(k).thermo.min_temp for k in _SPECIES)
    if out.temperature < low:   # say how far the data reach: the area ratio where T falls to their limit
        p_low = math.exp(brentq(lambda lnp: line.at(math.exp(lnp), mass_flux).temperature - low,
                                math.log(pe), math.log(pt), xtol=1e-12))
        reach = line.at(p_low, mass_flux)
        raise SolverError(f"exit temperature {out.temperature:.4g} K is below the species data ({low:g} K); "
                          f"this frozen expansion stays inside them up to area ratio {reach.area_ratio:.4g} "
                          f"(exit pressure {p_low:.4g} Pa)",
                          f"hydrazine decomposition products, chamber pressure {pc:.6g} Pa")
    eps = out.area_ratio
    c_vac = out.velocity + pe * eps / mass_flux
    c_amb = c_vac - ambient_pressure * eps / mass_flux
    throat = replace(throat, area_ratio=1.0)
    return FrozenNozzle(pc, pt, throat.temperature, pe, out.temperature, eps, pc / mass_flux, out.velocity,
                        c_vac / G0, c_amb / G0, mass_flux, (line.at(pc), throat, out))
