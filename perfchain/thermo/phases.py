"""Condensed phases of a batch row: which one forms, which replaces one out of its data range,
and when a row sits on a melting plateau.

Compiled kernels (see :mod:`.jit`) that :mod:`.newton` calls between Newton solves, one row at a
time; the frozen isentrope (:mod:`.isentrope`) uses :func:`swap_phase` too. Phases of one
substance (AL2O3(a) and AL2O3(L)) share a formula id (:class:`~perfchain.thermo.tables.Tables`).
"""

from __future__ import annotations

import math

import numpy as np

from perfchain.thermo.jit import exp, jit
from perfchain.thermo.kernel import COND_TOL

__all__ = ["add_phase", "swap_phase", "plateau_of", "crossing"]


@jit
def add_phase(i, T, cA, cH, cS, cond_tmin, cond_tmax, formula, pi, act, nc, lnN):
    """Activate on row i the most supersaturated condensed candidate valid at T [K].

    A candidate is supersaturated when mu0_c/RT - a_c . pi < -1e-10; of the phases of one
    substance (same ``formula`` id) only the most stable one valid at T counts, and none if
    a phase of that substance is present already. The new phase starts at 1e-3 N [kmol/kg].

    Returns
    -------
    bool
        True if a phase was added.

    Examples
    --------
    One carbon candidate with mu0/RT = -1 below a gas with pi_C = 0: supersaturated, added:

    >>> import numpy as np
    >>> act, nc = np.zeros((1, 1), bool), np.zeros((1, 1))
    >>> add_phase(0, 1000.0, np.ones((1, 1)), np.array([0.0]), np.array([1.0]), np.array([200.0]),
    ...           np.array([5000.0]), np.array([0]), np.zeros((1, 1)), act, nc, np.zeros(1))
    True
    >>> bool(act[0, 0]), float(nc[0, 0])
    (True, 0.001)
    """
    C, E = cA.shape
    drive = np.empty(C)
    for c in range(C):
        d = cH[c] - cS[c]
        for e in range(E):
            d -= cA[c, e] * pi[i, e]
        drive[c] = d if cond_tmin[c] <= T <= cond_tmax[c] else math.inf
    best = -COND_TOL
    which = -1
    for c in range(C):
        if not math.isfinite(drive[c]) or act[i, c]:
            continue
        ok = True
        for c2 in range(C):
            if c2 != c and formula[c2] == formula[c]:
                if act[i, c2] or drive[c2] < drive[c] or (drive[c2] == drive[c] and c2 < c):
                    ok = False
        if ok and drive[c] < best:
            best = drive[c]
            which = c
    if which < 0:
        return False
    act[i, which] = True
    nc[i, which] = 1e-3 * exp(lnN[i])
    return True


@jit
def swap_phase(i, T, cond_tmin, cond_tmax, formula, act, nc):
    """Replace on row i each active condensed phase whose data do not hold T [K] by the phase
    of the same substance that does (liquid alumina below 2327 K becomes solid alumina), moving
    its amount over. A row that swaps back and forth sits on a melting plateau (:mod:`.newton`, and
    :func:`~perfchain.thermo.isentrope.frozen_step` for frozen rows).

    Returns
    -------
    bool
        True if a phase was swapped.

    Examples
    --------
    A liquid (valid 2327-6000 K) at 2000 K becomes the solid of the same substance (300-2327 K):

    >>> import numpy as np
    >>> act, nc = np.array([[False, True]]), np.array([[0.0, 0.5]])
    >>> swap_phase(0, 2000.0, np.array([300.0, 2327.0]), np.array([2327.0, 6000.0]),
    ...            np.array([7, 7]), act, nc)
    True
    >>> act.tolist(), nc.tolist()
    ([[True, False]], [[0.5, 0.0]])
    """
    C = act.shape[1]
    swapped = False
    for c in range(C):
        if not act[i, c] or (cond_tmin[c] <= T <= cond_tmax[c]):
            continue
        for c2 in range(C):
            if c2 != c and formula[c2] == formula[c] and not act[i, c2] \
                    and cond_tmin[c2] <= T <= cond_tmax[c2]:
                act[i, c2] = True
                nc[i, c2] = nc[i, c]
                act[i, c] = False
                nc[i, c] = 0.0
                swapped = True
                break
    return swapped


@jit
def plateau_of(i, cond_tmin, cond_tmax, formula, act):
    """The two present phases of one substance on row i that meet at a transition temperature.

    Returns
    -------
    tuple of int
        (lower phase, upper phase): the lower one's data end where the upper one's begin
        (AL2O3(a) up to 2327 K, AL2O3(L) from 2327 K); (-1, -1) if no substance has two.

    Examples
    --------
    >>> import numpy as np
    >>> plateau_of(0, np.array([300.0, 2327.0]), np.array([2327.0, 6000.0]), np.array([3, 3]),
    ...            np.array([[True, True]]))
    (0, 1)
    """
    C = act.shape[1]
    for c in range(C):
        if not act[i, c]:
            continue
        for c2 in range(C):
            if c2 != c and act[i, c2] and formula[c2] == formula[c] and cond_tmax[c] == cond_tmin[c2]:
                return c, c2
    return -1, -1


@jit
def crossing(i, T, cond_tmin, cond_tmax, formula, act):
    """A present phase on row i whose data do not hold T [K], and its neighbour across the limit.

    Returns
    -------
    tuple
        (phase, the absent phase of the same substance whose data begin (or end) at the limit
        crossed and hold T, that limit [K]); (-1, -1, nan) if there is none.

    Examples
    --------
    Liquid alumina (data from 2327 K) at 2300 K: the solid (data up to 2327 K) across 2327 K:

    >>> import numpy as np
    >>> new, old, t_cross = crossing(0, 2300.0, np.array([300.0, 2327.0]), np.array([2327.0, 6000.0]),
    ...                              np.array([3, 3]), np.array([[False, True]]))
    >>> new, old, float(t_cross)
    (1, 0, 2327.0)
    """
    C = act.shape[1]
    for c in range(C):
        if not act[i, c] or (cond_tmin[c] <= T <= cond_tmax[c]):
            continue
        tb = cond_tmax[c] if T > cond_tmax[c] else cond_tmin[c]
        for c2 in range(C):
            if c2 != c and formula[c2] == formula[c] and not act[i, c2] \
                    and cond_tmin[c2] <= T <= cond_tmax[c2] and (cond_tmin[c2] == tb or cond_tmax[c2] == tb):
                return c, c2, tb
    return -1, -1, math.nan
