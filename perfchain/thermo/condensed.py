"""Gas + condensed equilibrium at fixed T and p: Newton on the element potentials and the amounts.

Used by :class:`~perfchain.thermo.equilibrium.EquilibriumSystem` when condensed phases are
present. Unknowns: the element potentials pi (over RT), d ln N (gas amount) and the amount of
each active condensed phase; each step linearises the gas conditions
``ln n_j - ln N + mu0_j/RT + ln(p/p0) = a_j . pi``, the element balances, ``sum n_j = N`` and
the condensed conditions ``mu0_c/RT = a_c . pi`` at fixed temperature (the Gibbs-minimisation
method of Gordon & McBride, NASA RP-1311, 1994, ch. 2-3; from memory; our own code). Species
amounts are carried as logarithms, so an element almost wholly condensed (alumina at the
nozzle exit leaves ~1e-20 of the aluminium in the gas) is resolved exactly, where
re-equilibrating the gas alone for such element totals is ill-conditioned.
"""

from __future__ import annotations

import math

import numpy as np

from perfchain.errors import SolverError

__all__ = ["solve_condensed"]

_MAX_ITER = 200
_TOL = 1e-12           # converged when every major d ln n and relative d n_c is below this
_LN_TRACE = math.log(1e-8)   # species below this mole fraction are trace (step control)


def solve_condensed(system, T: float, p: float, active: list, guess, start=None):
    """Amounts of the active condensed phases of a system in equilibrium with the gas at T, p.

    Parameters
    ----------
    system : EquilibriumSystem
    T : float
        Temperature [K].
    p : float
        Pressure [Pa].
    active : list of int
        Condensed candidates present.
    guess : array_like
        Starting amounts [kmol/kg].
    start : tuple, optional
        Gas mole fractions [-] and gas amount [kmol/kg] of a nearby state to start from;
        default the gas equilibrium of the element totals left by ``guess``.

    Returns
    -------
    tuple
        Gas mole fractions X, gas amount [kmol/kg], element potentials over RT [-], and the
        condensed amounts [kmol/kg] (a phase that comes out absent has amount 0).

    Examples
    --------
    Hydrogen-rich H2/O2 products at 300 K and 1 atm: liquid water forms until the vapour
    left sits at its saturation pressure, 3.537 kPa (IAPWS-95 / NIST steam tables):

    >>> from perfchain.propellants.mixture import make_propellant
    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> s = EquilibriumSystem(make_propellant("GOX", "GH2", equivalence_ratio=2.0).elements)
    >>> X, n_gas, pi, n = solve_condensed(s, 300.0, 101325.0, [s.cond_names.index("H2O(L)")], [0.0])
    >>> bool(abs(X[s.species_names.index("H2O")] * 101325.0 / 3537.0 - 1) < 0.02), bool(n[0] > 0)
    (True, True)
    """
    gas = system.gas
    A, b = system.A, system.b
    Ac = system.cond_A[active]
    gc = np.array([system.cond_g_rt(i, T) for i in active])
    nc = np.maximum(np.asarray(guess, float).reshape(len(active)), 0.0)
    # start: the gas equilibrium of the element totals left (all of them if that is infeasible)
    if start is not None:
        X0, n0 = start
    else:
        left = b - Ac.T @ nc
        X0, n0, _ = system.gas_tp(T, p, left if (left >= 0.02 * b).all() else b)
        if not (left >= 0.02 * b).all():
            nc = np.zeros(len(active))
    gas.TP = T, p
    mu0 = gas.standard_gibbs_RT          # Cantera's ideal-gas standard state includes ln(p/p0)
    lnn = np.log(np.maximum(X0 * n0, 1e-300))
    lnN = math.log(n0)
    E, C = A.shape[1], len(active)
    for _ in range(_MAX_ITER):
        n = np.exp(lnn)
        mu = mu0 + lnn - lnN
        x = np.linalg.solve(*_system(A, Ac, b, n, nc, mu, lnN, gc))
        pi, dlnN, dnc = x[:E], x[E], x[E + 1:]
        dlnn = A @ pi - mu + dlnN
        lam = _damping(lnn - lnN, dlnn, dlnN)
        lnn += lam * dlnn
        lnN += lam * dlnN
        nc = nc + lam * dnc
        if (nc < 0).any():           # a phase leaves: zero it, the caller drops it and re-solves
            nc = np.maximum(nc, 0.0)
            break
        major = lnn - lnN > _LN_TRACE
        done = max(np.abs(dlnn[major]).max(initial=0.0), abs(dlnN),
                   np.abs(dnc / np.maximum(nc, 1e-300)).max(initial=0.0)) < _TOL
        if done and lam == 1.0:
            break
    else:
        raise SolverError(f"condensed-phase equilibrium did not converge at {T:.1f} K, {p:.6g} Pa",
                          system.point)
    n = np.exp(lnn)
    err = np.abs(A.T @ n + Ac.T @ nc - b).max() / np.abs(b).max()
    if err > 1e-9 and (nc > 0).all():
        raise SolverError(f"element balance violated by {err:.1e} with condensed phases", system.point)
    return n / n.sum(), float(n.sum()), pi, nc


def _system(A, Ac, b, n, nc, mu, lnN, gc):
    """The (E + 1 + C)-square Newton system at fixed T (RP-1311 eqs. 2.24-2.26 with d ln T = 0)."""
    E, C = A.shape[1], Ac.shape[0]
    J = np.zeros((E + 1 + C, E + 1 + C))
    r = np.zeros(E + 1 + C)
    An = A * n[:, None]
    J[:E, :E] = A.T @ An
    J[:E, E] = An.sum(axis=0)
    J[:E, E + 1:] = Ac.T
    r[:E] = b - An.sum(axis=0) - Ac.T @ nc + An.T @ mu
    J[E, :E] = An.sum(axis=0)
    J[E, E] = n.sum() - math.exp(lnN)
    r[E] = math.exp(lnN) - n.sum() + n @ mu
    J[E + 1:, :E] = Ac
    r[E + 1:] = gc
    return J, r


def _damping(lnx, dlnn, dlnN) -> float:
    """Step factor in (0, 1]: no major species grows by more than e^2 and |d ln N| stays below 0.4,
    no trace species rises past a mole fraction of 1e-4 (RP-1311's control, from memory)."""
    major = lnx > _LN_TRACE
    big = max(5.0 * abs(dlnN), np.abs(dlnn[major]).max(initial=0.0))
    lam = 1.0 if big <= 2.0 else 2.0 / big
    rising = (~major) & (dlnn - dlnN > 0)
    if rising.any():
        lim = np.abs((-lnx[rising] - 9.2103404) / (dlnn[rising] - dlnN)).min()
        lam = min(lam, lim)
    return float(min(lam, 1.0))
