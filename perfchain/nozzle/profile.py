"""Gas states along a wall contour: the isentrope at each station's area ratio.

Each station of a contour (:mod:`perfchain.nozzle.contour`) has an area ratio A/A_t and a
side of the throat. Upstream of the throat the state is the subsonic one whose mass flux is
(rho u)* / (A/A_t) (:func:`perfchain.nozzle.expansion.subsonic_state`), downstream the
supersonic one (:func:`perfchain.nozzle.expansion.expand` with the throat already solved), the
throat itself the sonic state; the chamber's cylinder is the finite chamber's nozzle inlet (its
area ratio is the contraction ratio). The composition follows the flow model (shifting,
frozen, frozen-throat) exactly as in the one-point chain.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from perfchain.nozzle.expansion import expand, subsonic_state
from perfchain.thermo.equilibrium import EquilibriumSystem, MixState
from perfchain.thermo.flow_models import FLOW_MODELS, check_flow

__all__ = ["ProfileState", "contour_states"]


@dataclass(frozen=True)
class ProfileState:
    """One station's gas: state (MixState, SI), velocity and sound speed [m/s], area ratio [-],
    cp [J/(kg K)] and isentropic exponent gamma = rho a^2 / p [-] of the flow model."""

    state: MixState
    velocity: float
    sound_speed: float
    area_ratio: float
    cp: float
    gamma: float

    @property
    def mach(self) -> float:
        """Mach number [-] (of the flow model's sound speed)."""
        return self.velocity / self.sound_speed


def contour_states(system: EquilibriumSystem, stagnation: MixState, throat: tuple, area_ratios, subsonic,
                   flow: str = "shifting") -> list[ProfileState]:
    """The gas state at every station of a contour.

    Parameters
    ----------
    system : EquilibriumSystem
    stagnation : MixState
        Nozzle stagnation state [SI].
    throat : tuple
        (throat state, velocity [m/s], sound speed [m/s]) of ``stagnation``
        (:func:`perfchain.nozzle.expansion.throat_of`).
    area_ratios : array_like
        A/A_t at each station [-], at least 1.
    subsonic : array_like of bool
        True upstream of the throat.
    flow : str
        ``"shifting"``, ``"frozen"`` or ``"frozen-throat"``.

    Returns
    -------
    list of ProfileState

    Examples
    --------
    Argon (gamma = 5/3): at A/A_t = 2 the subsonic and supersonic roots of the closed form
    A/A*(M) of NACA Report 1135 are M = 0.29817 and 2.40120:

    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> from perfchain.nozzle.expansion import throat_of
    >>> sys_ar = EquilibriumSystem(get_ingredient("Ar").elements)
    >>> c = sys_ar.tp(3000.0, 1e6)
    >>> t = throat_of(sys_ar, c, "frozen")
    >>> s = contour_states(sys_ar, c, t, [2.0, 1.0, 2.0], [True, False, False], "frozen")
    >>> [round(x.mach, 4) for x in s]
    [0.2982, 1.0, 2.4012]
    """
    flow = check_flow(flow)
    before, after = FLOW_MODELS[flow]
    th_state, u_t, a_t = throat
    g_t = th_state.density * u_t
    out = []
    for eps, sub in zip(np.asarray(area_ratios, float), np.asarray(subsonic, bool)):
        eps = float(eps)
        if abs(eps - 1.0) < 1e-12:
            st, u, a, shifting = th_state, u_t, a_t, before
        elif sub:
            st, u = subsonic_state(system, stagnation, g_t / eps, th_state.p, flow)
            a, shifting = system.sound_speed(st, before), before
        else:
            e = expand(system, stagnation, flow, area_ratio=eps, throat=throat)
            st, u, a, shifting = e.exit, e.exit_velocity, e.exit_sound_speed, after
        cp = system.cp_equilibrium(st) if shifting else st.cp_frozen
        out.append(ProfileState(st, u, a, eps, cp, st.density * a * a / st.p))
    return out
