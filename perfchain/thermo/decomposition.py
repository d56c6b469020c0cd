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
from dataclasses import dataclass
from types import MappingProxyType
from typing import Mapping

from scipy.optimize import brentq

from perfchain.constants import G0, ONE_ATM
from perfchain.errors import InputError, SolverError
from perfchain.propellants.decomposition import check_ammonia_dissociation, decomposition_moles
from perfchain.thermo.gas import per_thread_cache
from perfchain.thermo.products import gas_species

__all__ = ["DecompositionChamber", "FrozenNozzle", "hydrazine_decomposition", "frozen_nozzle"]

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
class FrozenNozzle:
    """Ideal frozen expansion of a fixed composition (SI).

    Attributes
    ----------
    chamber_pressure, throat_pressure, exit_pressure [Pa]; throat_temperature,
    exit_temperature [K]; area_ratio [-]; cstar, exit_velocity [m/s];
    isp_vacuum, isp_ambient [s].
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
    gas = _gas()
    pc = float(chamber_pressure)
    x = [chamber.mole_fractions.get(k, 0.0) for k in _SPECIES]
    gas.TPX = chamber.temperature, pc, x
    h0, s0 = gas.h, gas.s

    def state(p):
        gas.SP = s0, p           # composition held: frozen
        return gas.h, gas.density, gas.sound_speed, gas.T

    def speed(p):
        return math.sqrt(max(2.0 * (h0 - state(p)[0]), 0.0))

    def sonic(lnp):
        return speed(math.exp(lnp)) - state(math.exp(lnp))[2]

    lnpt = brentq(sonic, math.log(pc * 0.2), math.log(pc * (1 - 1e-6)), xtol=1e-13)
    pt = math.exp(lnpt)
    _, rho_t, a_t, t_t = state(pt)
    mass_flux = rho_t * a_t
    if exit_pressure is not None:
        pe = float(exit_pressure)
        if not 0 < pe < pc:
            raise InputError("exit_pressure", exit_pressure, f"a pressure between 0 and {pc:.6g} Pa")
    else:
        eps = float(area_ratio)
        if not eps > 1:
            raise InputError("area_ratio", area_ratio, "an exit/throat area ratio above 1")

        def area(lnp):
            p = math.exp(lnp)
            return mass_flux / (state(p)[1] * speed(p)) - eps

        lo = math.log(pt)
        while area(lo) < 0 and lo > math.log(pc) - 40:
            lo -= 1.0
        pe = math.exp(brentq(area, lo, math.log(pt), xtol=1e-13))
    _, rho_e, _, t_e = state(pe)
    low = max(gas_species(k).thermo.min_temp for k in _SPECIES)
    if t_e < low:
        raise SolverError(f"exit temperature {t_e:.4g} K is below the species data ({low:g} K)",
                          f"hydrazine decomposition products, chamber pressure {pc:.6g} Pa")
    u_e = speed(pe)
    eps = mass_flux / (rho_e * u_e)
    c_vac = u_e + pe * eps / mass_flux
    c_amb = c_vac - ambient_pressure * eps / mass_flux
    return FrozenNozzle(pc, pt, t_t, pe, t_e, eps, pc / mass_flux, u_e, c_vac / G0, c_amb / G0)
