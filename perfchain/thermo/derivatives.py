"""Analytic derivatives of an equilibrium state: cp, volume derivatives, sound speed.

Differentiating the equilibrium conditions of the gas (ln n_j = ln n + a_j . pi -
mu0_j/RT - ln p/p0), of each pure condensed phase (mu0_c/RT = a_c . pi) and the
element balances gives one small linear system for d/dlnT at constant p and one
for d/dlnp at constant T (the formulation of Gordon & McBride, NASA RP-1311, 1994,
ch. 2; from memory; derived afresh here). Condensed volume is neglected.
"""

from __future__ import annotations

import numpy as np

from perfchain.constants import R_UNIVERSAL
from perfchain.errors import SolverError

__all__ = ["derivatives"]



def derivatives(system, st) -> dict:
    """Derivatives of one equilibrium state of an :class:`~perfchain.thermo.equilibrium.EquilibriumSystem`.

    Parameters
    ----------
    system : EquilibriumSystem
    st : MixState
        A solved equilibrium state of ``system``.

    Returns
    -------
    dict
        ``cp``, ``cv`` [J/(kg K)], ``dlnV_dlnT``, ``dlnV_dlnp`` [-], ``gamma_s`` [-]
        (isentropic exponent), ``sound_speed`` [m/s] (equilibrium), ``dn_dlnT``
        (condensed index -> (d n_c / d ln T)_p [kmol/kg]), ``dn_dlnp`` (the same at
        constant T).

    Examples
    --------
    A monatomic ideal gas (argon: cp = 5/2 R in the NASA data) has cp/cv = 5/3, so
    its sound speed is sqrt(5/3 R T / M) (closed form):

    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> s = EquilibriumSystem(get_ingredient("Ar").elements)
    >>> st = s.tp(1000.0, 1e5)
    >>> d = derivatives(s, st)
    >>> round(d["gamma_s"], 6), round(d["sound_speed"] / (5 / 3 * R_UNIVERSAL * 1000.0 / 39.95) ** 0.5, 6)
    (1.666667, 1.0)
    """
    gas = system.gas
    gas.TPX = st.T, st.p, st.X
    H = gas.standard_enthalpies_RT
    cp_j = gas.standard_cp_R
    n_j = st.n_gas * st.X
    rows = [k for k in range(len(system.element_names)) if system.b[k] > 0]
    A = system.A[:, rows]                       # species x elements
    # on a melting plateau two phases of one substance coexist; their rows would make the
    # system singular, so they count as one (the larger), an approximation at that point
    groups: dict = {}
    for i, n in st.condensed:
        groups.setdefault(system._cond_formula[i], []).append((n, i))
    condensed = [(max(g)[1], sum(n for n, _ in g)) for g in groups.values()]
    cond = [i for i, _ in condensed]
    Ac = system.cond_A[cond][:, rows] if cond else np.zeros((0, len(rows)))
    Hc = np.array([system.cond_species[i].thermo.h(st.T) / (R_UNIVERSAL * st.T) for i in cond])
    cpc = np.array([system.cond_species[i].thermo.cp(st.T) / R_UNIVERSAL for i in cond])
    nc = np.array([n for _, n in condensed])
    E, C = len(rows), len(cond)
    M = np.zeros((E + C + 1, E + C + 1))
    M[:E, :E] = (A * n_j[:, None]).T @ A
    M[:E, E:E + C] = Ac.T
    M[:E, -1] = A.T @ n_j
    M[E:E + C, :E] = Ac
    M[-1, :E] = A.T @ n_j
    rhs_T = np.concatenate([-(A.T @ (n_j * H)), -Hc, [-(n_j @ H)]])
    rhs_p = np.concatenate([A.T @ n_j, np.zeros(C), [st.n_gas]])
    try:
        sol = np.linalg.solve(M, np.column_stack([rhs_T, rhs_p]))
    except np.linalg.LinAlgError:
        raise SolverError("equilibrium derivatives are singular", system.point) from None
    x_T, y_T, z_T = sol[:E, 0], sol[E:E + C, 0], sol[-1, 0]
    y_p, z_p = sol[E:E + C, 1], sol[-1, 1]
    dlnV_dlnT = 1.0 + z_T
    dlnV_dlnp = -1.0 + z_p
    dlnnj_T = z_T + A @ x_T + H
    cp_R = n_j @ cp_j + nc @ cpc + n_j @ (H * dlnnj_T) + Hc @ y_T
    cp = cp_R * R_UNIVERSAL
    cv = cp + st.n_gas * R_UNIVERSAL * dlnV_dlnT ** 2 / dlnV_dlnp
    gamma_s = -(cp / cv) / dlnV_dlnp
    return {"dn_dlnT": dict(zip(cond, map(float, y_T))), "dn_dlnp": dict(zip(cond, map(float, y_p))),
            "cp": float(cp), "cv": float(cv), "dlnV_dlnT": float(dlnV_dlnT),
            "dlnV_dlnp": float(dlnV_dlnp), "gamma_s": float(gamma_s),
            "sound_speed": float(np.sqrt(gamma_s * st.n_gas * R_UNIVERSAL * st.T))}
