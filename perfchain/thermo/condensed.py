"""The amount of one condensed phase in equilibrium with the gas: a safeguarded root in ln(n_max - n).

Used by :class:`~perfchain.thermo.equilibrium.EquilibriumSystem` when exactly one condensed
phase is present: the residual is the phase's equilibrium condition mu0_c/RT - a_c . pi, a
function of its amount through the gas left behind.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import least_squares

from perfchain.errors import SolverError

__all__ = ["condensed_amount", "solve_condensed"]


def solve_condensed(system, T: float, p: float, active: list, guess):
    """Amounts of the active condensed phases of a system in equilibrium with the gas at T, p.

    Each phase's condition mu0_c/RT = a_c . pi is solved for its amount: by
    :func:`condensed_amount` for one phase, by bounded least squares for several. The gas
    is equilibrated by Cantera for the element totals left over.

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

    Returns
    -------
    tuple
        Gas mole fractions X, gas amount [kmol/kg], element potentials over RT [-], and the
        condensed amounts [kmol/kg].

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
    Ac = system.cond_A[active]
    g = np.array([system.cond_g_rt(i, T) for i in active])
    with np.errstate(divide="ignore", invalid="ignore"):
        nmax = np.array([np.min(np.where(a > 0, system.b / a, np.inf)) for a in Ac])
    cache = {}

    def solve(n):
        key = tuple(np.round(n, 300))
        if key not in cache:
            cache[key] = system.gas_tp(T, p, system.b - Ac.T @ n)
        return cache[key]

    def resid(n):
        _, _, lam = solve(np.asarray(n, float))
        return g - Ac @ lam

    if len(active) == 1:
        n = np.array([condensed_amount(lambda x: resid([x])[0], nmax[0], float(guess[0]),
                                       system.cond_names[active[0]], system.point)])
    else:
        x0 = np.clip(guess, 0.0, nmax * 0.999)
        sol = least_squares(resid, x0, bounds=(np.zeros(len(active)), nmax * (1 - 1e-9)),
                            xtol=1e-15, ftol=1e-15, gtol=1e-15, max_nfev=200)
        n = sol.x
        if np.abs(resid(n)).max() > 1e-7 and not (np.abs(resid(n))[n > 1e-14] < 1e-7).all():
            raise SolverError("condensed-phase equilibrium did not converge", system.point)
    X, n_gas, lam = solve(n)
    return X, n_gas, lam, n


def condensed_amount(r, nmax: float, guess: float, name: str, point: str = "") -> float:
    """Root of r(n) on [0, nmax): a secant in y = ln(nmax - n), where r is nearly linear.

    r rises without bound as the gas is stripped of the limiting element; a root below
    n = 0 means the phase is absent (returns 0). Bisection on the bracket safeguards the
    secant.

    Parameters
    ----------
    r : callable
        Residual r(n) [-] of the phase's equilibrium condition at amount n [kmol/kg].
    nmax : float
        Amount that would take up all of the limiting element [kmol/kg].
    guess : float
        Starting amount [kmol/kg] (used when inside (0, nmax)).
    name : str
        Phase name, for errors.
    point : str
        Operating point, for errors.

    Returns
    -------
    float
        The amount [kmol/kg].

    Raises
    ------
    SolverError
        When the root would take up all of an element or the secant does not converge.

    Examples
    --------
    r(n) = -ln(1 - n/nmax) - 1 is linear in y and vanishes at n = nmax (1 - 1/e) = 1.2642411
    for nmax = 2 (closed form); with +1 instead of -1 it is positive at n = 0: absent.

    >>> import math
    >>> round(condensed_amount(lambda n: -math.log(1 - n / 2) - 1, 2.0, 0.0, "C(gr)"), 7)
    1.2642411
    >>> condensed_amount(lambda n: -math.log(1 - n / 2) + 1, 2.0, 0.0, "C(gr)")
    0.0
    """
    def ry(y):
        return r(nmax - math.exp(y))

    y_max = math.log(nmax)
    y_min = math.log(nmax * 1e-10)     # beyond this the gas has lost an element
    y0 = math.log(nmax - guess) if 0.0 < guess < nmax else math.log(0.5 * nmax)
    lo, hi = -math.inf, math.inf       # r(lo) > 0 > r(hi): r decreases with y
    zero_checked = False
    y1 = y0 - 1e-3
    f0 = ry(y0)
    for _ in range(60):
        for y, f in ((y0, f0),):
            if f > 0:
                lo = max(lo, y)
            else:
                hi = min(hi, y)
        if abs(f0) < 1e-12:
            return nmax - math.exp(y0)
        f1 = ry(y1)
        if f1 > 0:
            lo = max(lo, y1)
        else:
            hi = min(hi, y1)
        if abs(f1) < 1e-12 or abs(y1 - y0) < 1e-13:
            return nmax - math.exp(y1)
        y2 = y1 - f1 * (y1 - y0) / (f1 - f0) if f1 != f0 else math.nan
        if y2 >= y_max or (math.isfinite(lo) and lo >= y_max):
            if not zero_checked:
                zero_checked = True
                if r(0.0) >= 0.0:
                    return 0.0             # the species does not form here
                hi = min(hi, y_max)
            y2 = math.nan
        if not (lo < y2 < hi) or not math.isfinite(y2):
            if math.isfinite(lo) and math.isfinite(hi):
                y2 = 0.5 * (lo + hi)
            elif math.isfinite(lo):
                y2 = min(lo + 1.0, y_max)
            else:
                y2 = max(hi - 2.0, y_min)
        y0, f0, y1 = y1, f1, y2
        if y1 <= y_min and hi <= y_min + 1e-12:
            raise SolverError(f"{name} would take up all of an element", point)
    raise SolverError(f"{name} amount did not converge", point)
