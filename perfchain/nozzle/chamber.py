"""Chamber equilibrium at fixed enthalpy and pressure (infinite-area chamber).

The reactants enter at their storage enthalpy; the products reach chemical
equilibrium at the chamber pressure with the same total enthalpy (adiabatic,
HP equilibrium). In an infinite-area chamber the gas is at rest, so the
chamber state is also the nozzle's stagnation state.
"""

from __future__ import annotations

from perfchain.thermo.equilibrium import EquilibriumSystem, MixState
from perfchain.errors import SolverError

__all__ = ["chamber_state"]


def chamber_state(system: EquilibriumSystem, enthalpy: float, pressure: float,
                  guess: MixState | None = None) -> MixState:
    """Adiabatic equilibrium of the products at the reactants' enthalpy.

    Parameters
    ----------
    system : EquilibriumSystem
        Products of the propellant (its element totals).
    enthalpy : float
        Reactant enthalpy [J/kg].
    pressure : float
        Chamber pressure [Pa].
    guess : MixState, optional
        A nearby solved state (warm start).

    Returns
    -------
    MixState

    Examples
    --------
    Stoichiometric hydrogen-air at 1 atm from 298.15 K burns at 2383 K with
    dissociation (Turns, An Introduction to Combustion, Appendix B; from
    memory, +/- 25 K):

    >>> from perfchain.propellants.mixture import make_propellant
    >>> p = make_propellant("air", "GH2", equivalence_ratio=1.0)
    >>> st = chamber_state(EquilibriumSystem(p.elements), p.enthalpy, 101325.0)
    >>> abs(st.T - 2383) < 25
    True
    """
    try:
        st = system.hp(enthalpy, pressure, guess)
    except SolverError:
        raise
    except Exception as exc:  # any Cantera failure carries the operating point
        raise SolverError(f"chamber equilibrium failed at {pressure:.6g} Pa: {type(exc).__name__}",
                          system.point) from None
    system.check(st)
    return st
