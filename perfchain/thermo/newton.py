"""The batch solver's Newton method for chemical equilibrium, one point (row) at a time.

Unknowns per point: the element potentials pi (over RT), d ln N (gas amount), the
condensed amounts and d ln T. Each step linearises the gas conditions
``ln n_j - ln N + mu0_j/RT + ln(p/p0) = a_j . pi``, the element balances, ``sum n_j = N``,
the condensed conditions ``mu0_c/RT = a_c . pi`` and the enthalpy (HP) or entropy (SP)
target, solves one (E + 2 + C)-square system (assembled in :mod:`.newton_system`) and updates every ln n_j from pi; the step is
damped so no rising major species grows by more than e^2 and no trace species overshoots
1e-4 (the control of Gordon & McBride, NASA RP-1311, 1994, ch. 3; from memory; our own code).

A condensed phase that ends outside its data range is swapped for the other phase of its
substance (liquid alumina below 2327 K becomes solid); when the row then ends on the far side
of the same transition it sits on the melting plateau: T is held at the transition, both
phases are present and the enthalpy or entropy target fixes their split (see
:mod:`.newton_system`). A plateau whose split leaves one phase negative gives that phase's
amount to the other and lets T go again.

Compiled by numba (or plain Python under ``PERFCHAIN_NO_JIT=1``, see :mod:`.jit`); each
point is solved by its own scalar loop, so its result cannot depend on the other points.
"""

from __future__ import annotations

import math

import numpy as np

from perfchain.thermo.jit import exp, jit, log
from perfchain.thermo.kernel import (LN_1E4, LN_FLOOR, LN_TRACE, MAX_ITER, NON_FINITE, NOT_CONVERGED, OK,
                                     OUT_OF_DATA, PHASE_OUT_OF_RANGE, STEP_TOL, T_TOL, gauss_solve, poly_list, poly_one,
                                     poly_some)
from perfchain.thermo.newton_system import newton_system
from perfchain.thermo.phases import add_phase, crossing, plateau_of, swap_phase
from perfchain.thermo.pruning import listed, prove_left_out, row_in_use

__all__ = ["solve_rows", "damped_step", "take_step"]


@jit
def damped_step(i, A, lnn, lnN, r, H, uses, n_use, x, dlnn):
    """Species steps of row i from the solved system x, and the damping factor.

    ``dlnn`` gets d ln n_j = a_j . pi - r_j + d ln N + h_j/RT d ln T for the species
    ``uses[:n_use]`` (the others, left out, see :mod:`perfchain.thermo.pruning`, keep the 0 they
    must hold). The step is cut so no
    major species (mole fraction above 1e-8) grows by more than e^2, abs(d ln T) and abs(d ln N)
    stay below 0.4, and no trace species rises past a mole fraction of 1e-4.

    Returns
    -------
    tuple of float
        (damping factor in (0, 1], largest abs(d ln n) of the major species and abs(d ln N)).

    Examples
    --------
    A step of d ln T = 1 is damped to 2/5 (closed form: lambda = 2 / (5 abs(d ln T))):

    >>> import numpy as np
    >>> lam, step = damped_step(0, np.ones((1, 1)), np.zeros((1, 1)), np.zeros(1), np.zeros(1),
    ...                         np.zeros(1), np.zeros(1, np.int64), 1, np.array([0.0, 0.0, 1.0]), np.empty(1))
    >>> float(lam), float(step)
    (0.4, 0.0)
    """
    E = A.shape[1]
    m = x.shape[0]
    dlnN = x[E]
    dlnT = x[m - 1]
    big = max(5.0 * abs(dlnT), 5.0 * abs(dlnN))
    trace_lim = math.inf
    step = abs(dlnN)
    for q in range(n_use):
        k = uses[q]
        d = -r[k] + dlnN + H[k] * dlnT
        for e in range(E):
            d += x[e] * A[k, e]
        dlnn[k] = d
        lnx = lnn[i, k] - lnN[i]
        if lnx > LN_TRACE:
            if d > big:
                big = d
            if abs(d) > step:
                step = abs(d)
        else:
            grow = d - dlnN
            if grow > 0.0:
                lim = (LN_1E4 - lnx) / grow
                if lim < trace_lim:
                    trace_lim = lim
    lam = 2.0 / big if big > 2.0 else 1.0
    lam = min(lam, max(trace_lim, 1e-3))
    lam = min(lam, 1.0)
    return lam, step


@jit
def take_step(i, lam, step, sum_n, x, dlnn, uses, n_use, T, lnn, lnN, nc, act, pa, pb, pi):
    """Move row i by ``lam`` times the Newton step (in place); drop condensed phases that ran out.

    The two phases ``pa``, ``pb`` of a melting plateau (-1: none) keep their place, even with a
    negative amount, until the plateau has converged (:func:`solve_rows` settles them), and T
    stays where it is. ``dlnn`` must be 0 for the species not in ``uses[:n_use]``.

    Returns
    -------
    tuple of bool
        (finite: the step was finite and was taken; converged on this phase set: undamped,
        major species and condensed amounts moved less than 1e-9, ln T less than 1e-10).

    Examples
    --------
    An undamped zero step converges and leaves the row as it was:

    >>> import numpy as np
    >>> T, lnn, lnN = np.array([1000.0]), np.zeros((1, 1)), np.zeros(1)
    >>> take_step(0, 1.0, 0.0, 1.0, np.zeros(3), np.zeros(1), np.zeros(1, np.int64), 1, T, lnn, lnN,
    ...           np.zeros((1, 0)), np.zeros((1, 0), bool), -1, -1, np.zeros((1, 1)))
    (True, True)
    >>> float(T[0])
    1000.0
    """
    K = lnn.shape[1]
    C = nc.shape[1]
    E = pi.shape[1]
    m = x.shape[0]
    dlnN = x[E]
    dlnT = x[m - 1]
    new_lnN = lnN[i] + lam * dlnN
    new_T = min(max(T[i] * exp(lam * dlnT), 100.0), 2.0e4) if pa < 0 else T[i]
    finite = math.isfinite(new_lnN) and math.isfinite(new_T)
    dnc_max = 0.0
    for c in range(C):
        if act[i, c]:
            dn = x[E + 1 + c]
            finite = finite and math.isfinite(dn)
            if abs(dn) > dnc_max:
                dnc_max = abs(dn)
    for q in range(n_use):            # dlnn is 0 for the species left out
        if not math.isfinite(dlnn[uses[q]]):
            finite = False
    for e in range(E):
        if not math.isfinite(x[e]):
            finite = False
    if not finite:
        return False, False
    for k in range(K):
        v = lnn[i, k] + lam * dlnn[k]
        lnn[i, k] = max(v, new_lnN + LN_FLOOR)
    lnN[i] = new_lnN
    T[i] = new_T
    for e in range(E):
        pi[i, e] = x[e]
    conv = lam == 1.0 and step < STEP_TOL and abs(dlnT) < T_TOL and dnc_max < STEP_TOL * sum_n
    for c in range(C):
        if act[i, c]:
            nc[i, c] = nc[i, c] + lam * x[E + 1 + c]
            if nc[i, c] <= 0.0 and c != pa and c != pb:       # the phase ran out: drop it
                nc[i, c] = 0.0
                act[i, c] = False
                conv = False
        else:
            nc[i, c] = 0.0
    return True, conv


@jit
def solve_rows(rows, kind, target, A, gas_coef, gas_mid, cA, cond_coef, cond_mid, cond_tmin, cond_tmax,
               formula, p_ref, t_min, t_max, b, T, p, lnn, lnN, nc, act, pi, status, iters):
    """Newton iterations for each listed row at fixed pressure, arrays updated in place.

    Parameters
    ----------
    rows : ndarray of int
        Rows to solve; ``target[q]`` belongs to ``rows[q]``.
    kind : int
        0: HP (target enthalpy [J/kg]); 1: SP (target entropy [J/(kg K)]).
    A, cA : ndarray
        Atoms per element of the gas species (K, E) and condensed candidates (C, E).
    gas_coef, gas_mid, cond_coef, cond_mid : ndarray
        NASA-7 fits (see :func:`perfchain.thermo.kernel.poly_one`).
    cond_tmin, cond_tmax : ndarray (C,)
        Data range of each condensed candidate [K]; ``formula`` (C,) an id per substance.
    p_ref, t_min, t_max : float
        Reference pressure of the data [Pa] and the gas data range [K].
    b, T, p, lnn, lnN, nc, act, pi : ndarray
        The batch: element totals [kmol/kg], T [K], p [Pa], ln species and gas amounts,
        condensed amounts [kmol/kg] and presence, element potentials over RT [-].
    status, iters : ndarray of int
        Written per row: a status code of :mod:`perfchain.thermo.kernel` (``OK`` ...);
        Newton steps taken (added to).

    Examples
    --------
    See :func:`perfchain.thermo.batch.hp` (methane-air flame temperature).
    """
    K, E = A.shape
    C = cA.shape[0]
    m = E + 2 + C
    cp, H, S = np.empty(K), np.empty(K), np.empty(K)
    ccp, cH, cS = np.empty(C), np.empty(C), np.empty(C)
    nj = np.empty(K)
    r = np.empty(K)
    dlnn = np.empty(K)
    J = np.empty((m, m))
    x = np.empty(m)
    use = np.empty(K, np.bool_)
    uses = np.empty(K, np.int64)      # the species in use, listed (the loops of a step run over these)
    live = np.empty(K, np.int64)
    idx = np.empty(m, np.int64)       # the unknowns of the system (absent condensed phases left out)
    for q in range(rows.shape[0]):
        i = rows[q]
        row_in_use(i, lnn, lnN, use)      # the row's pruned gas set (see perfchain.thermo.pruning)
        n_use = listed(use, uses)
        for k in range(K):
            dlnn[k] = 0.0                 # the species left out do not move
        lnP = log(p[i] / p_ref)
        st = NOT_CONVERGED
        swaps = 0
        last = -1                     # substance of the last phase swap
        pa, pb = plateau_of(i, cond_tmin, cond_tmax, formula, act) if C else (-1, -1)
        if pa >= 0:                   # warm start on a plateau: back to its temperature
            T[i] = cond_tmax[pa]
        for it in range(MAX_ITER):
            iters[i] += 1
            Ti = T[i]
            poly_list(Ti, gas_coef, gas_mid, uses, n_use, cp, H, S)
            if C:                         # the present phases (all of them before the formation test)
                poly_some(Ti, cond_coef, cond_mid, act[i], ccp, cH, cS)
            sum_n, n_on = newton_system(kind, target[q], i, A, cA, b, T, lnn, lnN, nc, act, pa, pb, lnP, uses, n_use,
                                        cp, H, S, ccp, cH, cS, nj, r, live, J, x, idx)
            if not gauss_solve(J, x, idx, n_on):
                st = NON_FINITE
                break
            lam, step = damped_step(i, A, lnn, lnN, r, H, uses, n_use, x, dlnn)
            finite, conv = take_step(i, lam, step, sum_n, x, dlnn, uses, n_use, T, lnn, lnN, nc, act, pa, pb, pi)
            if not finite:
                st = NON_FINITE
                break
            if not conv:
                continue
            # converged on this species set: would a left-out species be above the alarm?
            if prove_left_out(i, A, gas_coef, gas_mid, T, lnP, pi, lnn, lnN, use):
                n_use = listed(use, uses)
                continue
            if pa >= 0 and (nc[i, pa] <= 0.0 or nc[i, pb] <= 0.0):
                # the split says one phase only: it takes the whole amount and T is free again
                keep, gone = (pb, pa) if nc[i, pa] <= nc[i, pb] else (pa, pb)
                nc[i, keep] += nc[i, gone]
                nc[i, gone] = 0.0
                act[i, gone] = False
                if nc[i, keep] <= 0.0:
                    nc[i, keep] = 0.0
                    act[i, keep] = False
                last = formula[keep]
                swaps += 1
                pa, pb = -1, -1
                continue
            # converged on this phase set: does another phase want to form?
            if C:
                poly_one(Ti, cond_coef, cond_mid, ccp, cH, cS)
            if C and add_phase(i, Ti, cA, cH, cS, cond_tmin, cond_tmax, formula, pi, act, nc, lnN):
                continue
            Tn = T[i]
            if C and swaps < 4:
                c, c2, tb = crossing(i, Tn, cond_tmin, cond_tmax, formula, act)
                if c >= 0:
                    act[i, c2] = True
                    if formula[c] == last:    # back across the transition just crossed: the plateau
                        nc[i, c2] = 0.5 * nc[i, c]
                        nc[i, c] *= 0.5
                        pa, pb = (c, c2) if cond_tmax[c] == tb else (c2, c)
                        T[i] = tb
                    else:                     # crossed a phase change: go on with the other phase
                        nc[i, c2] = nc[i, c]
                        nc[i, c] = 0.0
                        act[i, c] = False
                    last = formula[c]
                    swaps += 1
                    continue
                if swap_phase(i, Tn, cond_tmin, cond_tmax, formula, act, nc):
                    swaps += 1
                    continue
            st = OK
            if not (t_min <= Tn <= t_max):
                st = OUT_OF_DATA
            for c in range(C):
                if act[i, c] and not (cond_tmin[c] <= Tn <= cond_tmax[c]):
                    st = PHASE_OUT_OF_RANGE
            break
        status[i] = st
