"""Finite contraction-ratio chamber: stagnation-pressure loss from heat addition.

In a constant-area chamber the propellants enter at the injector face at
negligible speed and leave the combustion zone at the nozzle inlet with speed
``u``. Conservation between the two planes (one-dimensional, adiabatic,
frictionless; the Rayleigh-line model of any gas-dynamics text, e.g. Anderson,
Modern Compressible Flow, ch. 3; Sutton & Biblarz ch. 5):

* mass: ``rho u = mdot / A_c = (rho u)* / CR``, CR = A_c / A_t;
* momentum: ``p_inj = p + rho u^2``;
* energy: ``h + u^2/2 = h_reactants``.

The nozzle-inlet state is on the isentrope of its own stagnation state
(h_reactants, s_inlet); the stagnation pressure ``p0`` of the nozzle is iterated
until the momentum balance returns the given injector-face pressure. The
combustion zone is in equilibrium (shifting) whatever the nozzle's flow model.
"""

from __future__ import annotations

from dataclasses import dataclass

from perfchain.nozzle.chamber import chamber_state
from perfchain.thermo.equilibrium import EquilibriumSystem, MixState
from perfchain.errors import InputError, SolverError
from perfchain.nozzle.expansion import subsonic_state, throat_of

__all__ = ["FiniteChamber", "finite_area_chamber", "check_contraction_ratio", "MAX_CONTRACTION"]

#: largest contraction ratio accepted [-]; at 1e4 the inlet Mach is ~6e-5 and p0 differs from
#: the injector pressure by ~1e-9 (Rayleigh closed form), i.e. an infinite-area chamber
MAX_CONTRACTION = 1e4


def check_contraction_ratio(value) -> float:
    """Validate a contraction ratio A_c/A_t (> 1) [-].

    >>> check_contraction_ratio(3)
    3.0
    """
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not 1.0 < value <= MAX_CONTRACTION:
        raise InputError("contraction_ratio", value,
                         f"a chamber/throat area ratio above 1 and at most {MAX_CONTRACTION:g} "
                         "(beyond that the chamber is infinite for all practical purposes)")
    return float(value)


@dataclass(frozen=True)
class FiniteChamber:
    """Solved finite-area chamber (SI).

    Attributes
    ----------
    contraction_ratio : float [-]
    injector_pressure : float [Pa]
    stagnation : MixState
        Nozzle stagnation state (h_reactants, s_inlet, p0).
    inlet : MixState
        Static state at the nozzle inlet (end of combustion).
    inlet_velocity : float [m/s]
    """

    contraction_ratio: float
    injector_pressure: float
    stagnation: MixState
    inlet: MixState
    inlet_velocity: float

    @property
    def stagnation_pressure(self) -> float:
        """Nozzle-inlet stagnation pressure [Pa]."""
        return self.stagnation.p


def finite_area_chamber(system: EquilibriumSystem, enthalpy: float, injector_pressure: float,
                        contraction_ratio: float, tol: float = 1e-10) -> FiniteChamber:
    """Solve the finite-area chamber for a given injector-face pressure.

    Parameters
    ----------
    system : EquilibriumSystem
    enthalpy : float
        Reactant enthalpy [J/kg].
    injector_pressure : float
        Injector-face pressure [Pa] (the user's "chamber pressure").
    contraction_ratio : float
        Chamber area / throat area [-], > 1.

    Returns
    -------
    FiniteChamber

    Examples
    --------
    For a calorically perfect gas p_inj / p0 = (1 + g M^2) / (1 + (g-1)/2 M^2)^(g/(g-1))
    at the inlet Mach of A/A* = CR (momentum balance and the isentropic
    relation). Argon (g = 5/3) at CR = 2: M = 0.2982, p0/p_inj = 0.9369:

    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> s = EquilibriumSystem(get_ingredient("Ar").elements)
    >>> h = s.tp(4000.0, 1e6).h
    >>> fc = finite_area_chamber(s, h, 1e6, 2.0)
    >>> round(fc.stagnation_pressure / 1e6, 4)
    0.9369
    """
    cr = check_contraction_ratio(contraction_ratio)
    p0 = injector_pressure
    guess = None
    for _ in range(50):
        stag = chamber_state(system, enthalpy, p0, guess)
        guess = stag
        throat, u_t, _ = throat_of(system, stag, "shifting")
        g_c = throat.density * u_t / cr
        inlet, u = subsonic_state(system, stag, g_c, throat.p, "shifting")
        p_inj = inlet.p + inlet.density * u * u
        if abs(p_inj / injector_pressure - 1.0) < tol:
            return FiniteChamber(cr, injector_pressure, stag, inlet, u)
        p0 *= injector_pressure / p_inj
    raise SolverError("finite-area chamber iteration did not converge", system.point)
