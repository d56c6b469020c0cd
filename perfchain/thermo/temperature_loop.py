"""HP and SP equilibria with condensed products: an outer loop on temperature over TP states.

Used by :class:`~perfchain.thermo.equilibrium.EquilibriumSystem` where Cantera's gas-only
HP/SP solver does not apply (a condensed product forms). Newton steps on T with the analytic
equilibrium cp, kept in a bracket; on a melting plateau (h(T) or s(T) jumps at a phase
change) the lever rule blends the two sides at the transition temperature.
"""

from __future__ import annotations

import math
from dataclasses import replace

from perfchain.errors import SolverError
from perfchain.thermo.state import MixState, residual_ok

__all__ = ["temperature_loop", "lever_rule", "least_value"]


def temperature_loop(system, kind: str, target: float, p: float, T0: float, guess=None) -> MixState:
    """HP (``kind="h"``) or SP (``"s"``) equilibrium of a system by an outer loop on T.

    Newton steps with the analytic equilibrium cp ((dh/dT)p = cp, (ds/dT)p = cp/T), kept
    inside a bracket; where h(T) or s(T) jumps (a condensed phase change) the bracket
    collapses onto the transition and :func:`lever_rule` blends the two sides.

    Parameters
    ----------
    system : EquilibriumSystem
    kind : str
        ``"h"`` or ``"s"``.
    target : float
        Enthalpy [J/kg] or entropy [J/(kg K)].
    p : float
        Pressure [Pa].
    T0 : float
        Starting temperature [K].
    guess : MixState, optional
        A nearby state (seeds the condensed amounts).

    Returns
    -------
    MixState

    Examples
    --------
    Argon (cp = 5/2 R/M) with h = 5/2 R/M (2500 K - 298.15 K) is at 2500 K (closed form;
    M the data's molar mass):

    >>> from perfchain.thermo.equilibrium import EquilibriumSystem, R_UNIVERSAL
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> s = EquilibriumSystem(get_ingredient("Ar").elements)
    >>> round(temperature_loop(s, "h", 2.5 * R_UNIVERSAL / s.mw[0] * (2500.0 - 298.15), 1e5, 1000.0).T, 4)
    2500.0
    """
    tmin, tmax = max(system.gas.min_temp, 200.0), min(system.gas.max_temp, 6000.0)
    lo, hi = tmin, tmax          # f(lo) <= 0 <= f(hi) once known
    lo_known = hi_known = False
    T = min(max(T0, tmin), tmax)
    prev = guess
    tried = False
    bound = None                 # least_value at tmin, computed only if the loop heads down there
    for _ in range(80):
        try:
            st = system.tp(T, p, prev)
        except SolverError:
            # on the way down with no lower bracket: if even the least h (or s) any products can
            # have at tmin is above the target, that is the reason, not this state's failure
            if lo_known or (bound := least_value(system, kind, tmin, p)) <= target:
                raise
            break
        prev = st
        f = (st.h if kind == "h" else st.s) - target
        if residual_ok(kind, st, target):
            return st
        if f < 0:
            lo, lo_known = T, True
        else:
            hi, hi_known = T, True
        if lo_known and hi_known and hi - lo < 1e-9 * hi:
            break
        if lo_known and hi_known and not tried:
            # a phase change inside the bracket: try its plateau at once (no bisection onto it)
            tried = True
            hit = _plateau_in(system, kind, target, p, lo, hi, st)
            if isinstance(hit, MixState):
                return hit
            if hit is not None:
                (lo, hi), T = hit, 0.5 * (hit[0] + hit[1])
                continue
        d = system.equilibrium_derivatives(st)
        slope = d["cp"] if kind == "h" else d["cp"] / T
        T_new = T - f / slope if slope > 0 else math.nan
        if not (lo < T_new < hi) or not math.isfinite(T_new):
            if lo_known and hi_known:
                T_new = 0.5 * (lo + hi)
            elif lo_known:
                if T >= tmax:
                    break
                T_new = min(tmax, T * 1.3)
            else:
                if T <= tmin or (bound is None and (bound := least_value(system, kind, tmin, p)) > target):
                    break    # even the least h (or s) any products can have at tmin is above the target
                T_new = max(tmin, T * 0.7)
        # seed the next state's condensed amounts by the analytic dn/dlnT (fewer inner steps)
        dln = math.log(T_new / T)
        prev = replace(st, condensed=tuple(
            (i, n + d["dn_dlnT"].get(i, 0.0) * dln if n + d["dn_dlnT"].get(i, 0.0) * dln > 0 else 0.5 * n)
            for i, n in st.condensed))
        T = T_new
    if not (lo_known and hi_known):
        raise SolverError(f"no temperature in the data range {tmin:g}-{tmax:g} K meets the "
                          f"{'enthalpy' if kind == 'h' else 'entropy'} target at {p:.6g} Pa", system.point)
    return _plateau(system, kind, target, p, lo, hi, prev)


def _plateau_in(system, kind, target, p, lo, hi, prev):
    """The plateau state if a transition temperature inside (lo, hi) [K] carries the target,
    else the narrowed bracket on the side that does (None without a transition inside)."""
    limits = sorted({t for sp_ in system.cond_species for t in (sp_.thermo.min_temp, sp_.thermo.max_temp)
                     if lo + 1e-6 < t < hi - 1e-6})
    for t_b in limits:
        a, b = system.tp(t_b - 1e-7, p, prev), system.tp(t_b + 1e-7, p, prev)
        va, vb = (a.h, b.h) if kind == "h" else (a.s, b.s)
        if va <= target <= vb and {i for i, _ in a.condensed} != {i for i, _ in b.condensed}:
            return lever_rule(system, a, b, (vb - target) / (vb - va))
        if target < va:
            return lo, t_b - 1e-7
        lo = t_b + 1e-7
    return (lo, hi) if limits else None


def least_value(system, kind: str, T: float, p: float) -> float:
    """A lower bound on the equilibrium enthalpy [J/kg] (or entropy [J/(kg K)]) at T [K], p [Pa].

    The least ``sum n_i h_i(T)`` over every amount vector that meets the element totals
    (a linear program, HiGHS): the equilibrium state is one such vector, so its enthalpy is
    no lower. For entropy, each gas species counts ``s_i(T) - R ln(p/p0)``, since the
    entropy of mixing ``-R sum n_i ln x_i`` is never negative. Both bounds rise with T
    (every h_i and s_i does), so a bound above the target at the lowest temperature of the
    data proves that no temperature in the data range meets it: the temperature loop then
    stops at once instead of solving near-frozen condensed states at the data's edge (LOX/LCH4
    at O/F 0.01 took 35 s to fail that way).

    Returns
    -------
    float
        The bound, less a small margin for the solver's tolerance; -inf if the program has no answer.

    Examples
    --------
    Argon alone: the bound is argon's own enthalpy, 5/2 R/M (T - 298.15 K) (closed form),
    less the margin:

    >>> from perfchain.thermo.equilibrium import EquilibriumSystem, R_UNIVERSAL
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> s = EquilibriumSystem(get_ingredient("Ar").elements)
    >>> exact = 2.5 * R_UNIVERSAL / s.mw[0] * (1000.0 - 298.15)
    >>> bound = least_value(s, "h", 1000.0, 1e5)
    >>> bool(exact - 1e-5 * exact < bound < exact)
    True
    """
    import numpy as np
    from scipy.optimize import linprog

    from perfchain.thermo.derivatives import R_UNIVERSAL

    gas = [system.gas.species(k).thermo for k in range(system.gas.n_species)]
    valid = [i for i in range(len(system.cond_species)) if system.cond_valid(i, T, tol=0.0)]
    if kind == "h":
        c = [th.h(T) for th in gas] + [system.cond_species[i].thermo.h(T) for i in valid]
    else:
        shift = R_UNIVERSAL * math.log(p / system.gas.reference_pressure)
        c = [th.s(T) - shift for th in gas] + [system.cond_species[i].thermo.s(T) for i in valid]
    A = np.vstack([system.A, system.cond_A[valid]]) if valid else system.A
    res = linprog(np.array(c, float), A_eq=A.T, b_eq=system.b, bounds=(0, None), method="highs")
    if res.status != 0:
        return -math.inf
    return float(res.fun) - 1e-6 * abs(float(res.fun)) - 1.0


def _plateau(system, kind, target, p, lo, hi, prev):
    """A jump in h(T) or s(T) at a condensed phase change (melting plateau) inside [lo, hi] [K]:
    lever rule at the transition temperature itself (a range limit of the data in the bracket)."""
    limits = [t for sp_ in system.cond_species for t in (sp_.thermo.min_temp, sp_.thermo.max_temp)
              if lo - 1e-6 <= t <= hi + 1e-6]
    if limits:
        t_b = min(limits, key=lambda t: abs(t - 0.5 * (lo + hi)))
        lo, hi = t_b - 1e-7, t_b + 1e-7
    a, b = system.tp(lo, p, prev), system.tp(hi, p, prev)
    va, vb = (a.h, b.h) if kind == "h" else (a.s, b.s)
    if not va <= target <= vb or hi - lo > 1e-6 * hi:
        raise SolverError("temperature loop did not meet its target", system.point)
    w = (vb - target) / (vb - va)
    return lever_rule(system, a, b, w)


def lever_rule(system, a: MixState, b: MixState, w: float) -> MixState:
    """The mixture of a fraction w of state a and 1 - w of state b at (nearly) the same T, p.

    Parameters
    ----------
    system : EquilibriumSystem
    a, b : MixState
        States 0.1 uK either side of a phase transition (same pressure).
    w : float
        Fraction of ``a`` [-], in [0, 1].

    Returns
    -------
    MixState
        At the mean temperature [K]; extensive properties are the w-weighted mean (lever rule).

    Examples
    --------
    Half of a state and half of the same state is that state (closed form):

    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> s = EquilibriumSystem(get_ingredient("Ar").elements)
    >>> st = s.tp(1000.0, 1e5)
    >>> mid = lever_rule(s, st, st, 0.5)
    >>> round(mid.h / st.h, 12), round(mid.T, 9)
    (1.0, 1000.0)
    """
    n_a, n_b = a.n_gas * a.X, b.n_gas * b.X
    n = w * n_a + (1 - w) * n_b
    cond: dict = {}
    for i, x in a.condensed:
        cond[i] = cond.get(i, 0.0) + w * x
    for i, x in b.condensed:
        cond[i] = cond.get(i, 0.0) + (1 - w) * x
    T = 0.5 * (a.T + b.T)   # the transition temperature (a and b sit 0.1 uK either side)
    gas = system.gas
    gas.TPX = T, a.p, n
    return system.make_state(T, a.p, gas.X.copy(), float(n.sum()), sorted(cond.items()))
