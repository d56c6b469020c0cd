"""Properties of solved states, the methods :class:`~perfchain.thermo.equilibrium.EquilibriumSystem`
inherits from :class:`StateProperties`: analytic derivatives (memoised), sound speeds,
heat capacities, composition tables and the final checks of a state.

The central-difference versions (``sound_speed_fd``, ``cp_equilibrium_fd``) are what the
tests compare the analytic ones against.
"""

from __future__ import annotations

import math

import numpy as np

from perfchain.errors import SolverError
from perfchain.thermo.derivatives import derivatives
from perfchain.thermo.state import MixState

__all__ = ["StateProperties"]


class StateProperties:
    """Mixin of :class:`~perfchain.thermo.equilibrium.EquilibriumSystem`: properties of its states.

    Uses the system's ``gas``, ``tp``, ``sp``, ``frozen_sp``, ``cond_valid``, species and
    element tables; every method takes a solved :class:`~perfchain.thermo.state.MixState`.

    Examples
    --------
    Argon at 1000 K: a monatomic ideal gas, cp = 5/2 R/M = 520.3 J/(kg K) (closed form):

    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> s = EquilibriumSystem(get_ingredient("Ar").elements)
    >>> isinstance(s, StateProperties), round(s.cp_equilibrium(s.tp(1000.0, 1e5)), 1)
    (True, 520.3)
    """

    def equilibrium_derivatives(self, st: MixState) -> dict:
        """Derivatives of an equilibrium state, solved analytically (memoised per state).

        See :func:`perfchain.thermo.derivatives.derivatives`.

        Differentiating the equilibrium conditions (gas: ln n_j = ln n + a_j.pi
        - mu0_j/RT - ln p/p0; condensed: mu0_c/RT = a_c.pi; element balances)
        gives one small linear system each for d/dlnT at constant p and d/dlnp
        at constant T (Gordon & McBride, NASA RP-1311, 1994, ch. 2; from
        memory; derived afresh here). Condensed volume is neglected.

        Returns
        -------
        dict
            ``cp`` [J/(kg K)], ``cv`` [J/(kg K)], ``dlnV_dlnT``, ``dlnV_dlnp``,
            ``gamma_s`` [-] (isentropic exponent), ``sound_speed`` [m/s].
        """
        cache = self.__dict__.setdefault("_derivative_cache", {})
        key = (st.T, st.p, st.h, st.s)
        if key in cache:
            return cache[key]
        out = derivatives(self, st)
        if len(cache) > 256:
            cache.clear()
        cache[key] = out
        return out

    def sound_speed(self, st: MixState, shifting: bool) -> float:
        """Sound speed [m/s]: equilibrium (``shifting``) or frozen composition.

        The equilibrium value comes from :meth:`equilibrium_derivatives`; the
        frozen one of a pure gas is Cantera's analytic sqrt(gamma R T / M). With
        condensed products carried as inert particles in velocity and thermal
        equilibrium (no slip, condensed volume neglected): a^2 = gamma_f p / rho with
        gamma_f = cp_f / (cp_f - n_gas R), cp_f the frozen cp per kilogram of mixture,
        condensed included, and p / rho = n_gas R T (the two-phase equilibrium-flow
        relations, Sutton & Biblarz, Rocket Propulsion Elements, ch. 3; from memory). On a
        melting plateau (two phases of one substance at the transition temperature) T no
        longer follows p; a central difference along the frozen isentrope then.
        """
        if shifting:
            return self.equilibrium_derivatives(st)["sound_speed"]
        if not st.condensed:
            self.gas.TPX = st.T, st.p, st.X
            return float(self.gas.sound_speed)
        formulas = [self.cond_formula[i] for i, _ in st.condensed]
        if len(set(formulas)) < len(formulas):
            return self.sound_speed_fd(st, shifting=False)
        return float(math.sqrt(st.cp_frozen / st.cv_frozen * st.p / st.density))

    def sound_speed_fd(self, st: MixState, shifting: bool, rel_step: float = 1e-4) -> float:
        """Sound speed [m/s] by a central difference of p(rho) along the isentrope."""
        pp, pm = st.p * (1 + rel_step), st.p * (1 - rel_step)
        if shifting:
            a, b = self.sp(st.s, pp, st), self.sp(st.s, pm, st)
        else:
            a, b = self.frozen_sp(st, st.s, pp), self.frozen_sp(st, st.s, pm)
        return float(np.sqrt((pp - pm) / (a.density - b.density)))

    def cp_equilibrium(self, st: MixState) -> float:
        """Equilibrium heat capacity at constant pressure [J/(kg K)]."""
        return self.equilibrium_derivatives(st)["cp"]

    def cp_equilibrium_fd(self, st: MixState, rel_step: float = 1e-4) -> float:
        """Equilibrium cp [J/(kg K)] by a central difference of h(T) at constant p."""
        dT = st.T * rel_step
        return (self.tp(st.T + dT, st.p).h - self.tp(st.T - dT, st.p).h) / (2 * dT)

    def mole_fractions(self, st: MixState, threshold: float = 0.0) -> dict:
        """Mole fractions of all products, condensed included (per total moles) [-]."""
        total = st.n_gas + sum(n for _, n in st.condensed)
        out = {}
        v = st.X * st.n_gas / total
        for k in np.nonzero(v > threshold)[0]:
            out[self.species_names[k]] = float(v[k])
        for i, n in st.condensed:
            v = n / total
            if v > threshold:
                out[self.cond_names[i]] = out.get(self.cond_names[i], 0.0) + float(v)
        return dict(sorted(out.items(), key=lambda kv: -kv[1]))

    def condensed_mass_fraction(self, st: MixState) -> float:
        """Mass fraction of condensed products [-]."""
        return float(sum(n * self.cond_mw[i] for i, n in st.condensed))

    def check(self, st: MixState):
        """Raise SolverError when a state breaks element balance or the data range."""
        b = st.n_gas * (self.A.T @ st.X)
        for i, n in st.condensed:
            b = b + n * self.cond_A[i]
        err = np.abs(b - self.b).max() / max(np.abs(self.b).max(), 1e-300)
        if err > 1e-7:
            raise SolverError(f"element balance violated by {err:.1e}", self.point)
        if not (self.gas.min_temp - 1e-6 <= st.T <= self.gas.max_temp + 1e-6):
            raise SolverError(f"temperature {st.T:.1f} K outside the gas data range "
                              f"{self.gas.min_temp:g}-{self.gas.max_temp:g} K", self.point)
        for i, _ in st.condensed:
            if not self.cond_valid(i, st.T):
                raise SolverError(f"{self.cond_names[i]} at {st.T:.1f} K is outside its data range",
                                  self.point)
