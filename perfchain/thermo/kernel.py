"""Shared pieces of the compiled kernels: solver constants, NASA-7 fits, a small linear solver.

Everything here is decorated with :data:`perfchain.thermo.jit.jit` (numba, or plain
Python under ``PERFCHAIN_NO_JIT=1``) and works on one point (one row) at a time, so a
point's numbers never depend on the other points of a batch. The Newton method is in
:mod:`.newton`, the equilibrium-derivative system in :mod:`.derivatives`, the perfect-gas
area-ratio inversion in :mod:`.perfect_gas`.
"""

from __future__ import annotations

import math

import numpy as np

from perfchain.constants import R_UNIVERSAL
from perfchain.thermo.jit import COMPILED, exp, jit, jit_inline, log

__all__ = ["COMPILED", "OK", "NOT_CONVERGED", "NON_FINITE", "OUT_OF_DATA", "PHASE_OUT_OF_RANGE",
           "MAX_ITER", "STEP_TOL", "T_TOL", "COND_TOL", "LN_TRACE", "LN_1E4", "LN_FLOOR", "LN_DEEP",
           "LN_FLOOR_ABS", "fit_k", "poly_list",
           "poly_k", "poly_one", "poly_some", "add_pairs", "gauss_solve", "props_rows"]

# status codes of a row after a solve
OK, NOT_CONVERGED, NON_FINITE, OUT_OF_DATA, PHASE_OUT_OF_RANGE = 0, 1, 2, 3, 4

# the solver constants (one place: the Newton method and its callers read them here)
MAX_ITER = 80                     # Newton steps per solve
STEP_TOL = 1e-9                   # converged: largest major-species d ln n below this (the step after is ~1e-18)
T_TOL = 1e-10                     # ... and |d ln T| below this
COND_TOL = 1e-10                  # a condensed phase forms when mu0/RT - a.pi < -this
LN_TRACE = math.log(1e-8)         # species below this mole fraction do not limit the step
LN_1E4 = math.log(1e-4)           # ... and may rise at most to this one in a step
LN_FLOOR = -690.0                 # ln mole fraction floor (exp underflows below ~-745)
LN_DEEP = -80.0                   # ln mole fraction below which a species is left out of the sums
LN_FLOOR_ABS = -300.0             # ln amount [ln(kmol/kg)] below which props_rows reuses one exp (the floor)


@jit
def poly_one(T, coef, mid, cp, H, S):
    """cp/R, h/RT and s0/R of every NASA 7-coefficient fit at one temperature.

    Parameters
    ----------
    T : float
        Temperature [K].
    coef : ndarray (2, 7, K)
        Coefficients a1..a7 of each fit, ``coef[0]`` for T <= ``mid``, ``coef[1]`` above.
    mid : ndarray (K,)
        Temperature where each fit switches range [K].
    cp, H, S : ndarray (K,)
        Outputs, written in place: cp/R, h/RT, s0/R [-] (s0 at the reference pressure).

    Examples
    --------
    Argon in the NASA Glenn data (McBride, Zehe & Gordon, NASA TP-2002-211556): a1 = 5/2,
    the cp/R of a monatomic ideal gas (closed form); h = 0 at 298.15 K (an element in its
    reference state); s0 = 154.85 J/(mol K) at 298.15 K (CODATA key value 154.846; from memory):

    >>> import numpy as np
    >>> a = [2.5, 0.0, 0.0, 0.0, 0.0, -745.375, 4.37967491]
    >>> coef = np.array([a, a], float).reshape(2, 7, 1)
    >>> cp, H, S = np.empty(1), np.empty(1), np.empty(1)
    >>> poly_one(298.15, coef, np.array([1000.0]), cp, H, S)
    >>> float(cp[0]), round(float(H[0]), 12), round(float(S[0]) * 8.314462618, 2)
    (2.5, 0.0, 154.85)
    """
    lnT = math.log(T)
    for k in range(mid.shape[0]):
        poly_k(T, lnT, coef, mid, k, cp, H, S)


@jit
def poly_some(T, coef, mid, use, cp, H, S):
    """:func:`poly_one` for the fits marked in ``use`` (bool, (K,)) only; the others are left as they were.

    Examples
    --------
    Argon's fit (see :func:`poly_one`) twice, the second one not in use:

    >>> import numpy as np
    >>> a = [2.5, 0.0, 0.0, 0.0, 0.0, -745.375, 4.37967491]
    >>> coef = np.array([a + a, a + a], float).reshape(2, 2, 7).transpose(0, 2, 1).copy()
    >>> cp, H, S = np.zeros(2), np.zeros(2), np.zeros(2)
    >>> poly_some(1000.0, coef, np.array([1000.0, 1000.0]), np.array([True, False]), cp, H, S)
    >>> cp.tolist()
    [2.5, 0.0]
    """
    lnT = math.log(T)
    for k in range(mid.shape[0]):
        if use[k]:
            poly_k(T, lnT, coef, mid, k, cp, H, S)


@jit
def poly_list(T, coef, mid, idx, n, cp, H, S):
    """:func:`poly_one` for the fits ``idx[:n]`` (int array) only; the others are left as they were.

    Examples
    --------
    Argon's fit (see :func:`poly_one`) twice, only the second one listed:

    >>> import numpy as np
    >>> a = [2.5, 0.0, 0.0, 0.0, 0.0, -745.375, 4.37967491]
    >>> coef = np.array([a + a, a + a], float).reshape(2, 2, 7).transpose(0, 2, 1).copy()
    >>> cp, H, S = np.zeros(2), np.zeros(2), np.zeros(2)
    >>> poly_list(1000.0, coef, np.array([1000.0, 1000.0]), np.array([1, 0]), 1, cp, H, S)
    >>> cp.tolist()
    [0.0, 2.5]
    """
    lnT = math.log(T)
    for q in range(n):
        poly_k(T, lnT, coef, mid, idx[q], cp, H, S)


@jit_inline
def poly_k(T, lnT, coef, mid, k, cp, H, S):
    """cp/R, h/RT and s0/R of fit k at T [K] (``lnT`` = ln T) into cp[k], H[k], S[k]; see :func:`poly_one`.

    Examples
    --------
    A constant cp/R = 2.5 (a monatomic ideal gas; closed form h/RT = 2.5 + a6/T):

    >>> import numpy as np
    >>> coef = np.zeros((2, 7, 1))
    >>> coef[:, 0, 0] = 2.5
    >>> cp, H, S = np.empty(1), np.empty(1), np.empty(1)
    >>> poly_k(500.0, np.log(500.0), coef, np.array([1000.0]), 0, cp, H, S)
    >>> float(cp[0]), float(H[0])
    (2.5, 2.5)
    """
    cp[k], H[k], S[k] = fit_k(T, lnT, coef, mid, k)


@jit_inline
def fit_k(T, lnT, coef, mid, k):
    """(cp/R, h/RT, s0/R) of fit k at T [K] (``lnT`` = ln T), the arithmetic of every kernel.

    The one place the NASA-7 polynomials are evaluated: :func:`poly_k` writes these into
    arrays, the kernels that need one species' values call this directly.

    Examples
    --------
    A constant cp/R = 2.5 (a monatomic ideal gas; closed forms h/RT = 2.5 + a6/T and
    s0/R = 2.5 ln T + a7):

    >>> import numpy as np
    >>> coef = np.zeros((2, 7, 1))
    >>> coef[:, 0, 0], coef[:, 5, 0], coef[:, 6, 0] = 2.5, 1000.0, 1.0
    >>> [round(float(v), 12) for v in fit_k(500.0, np.log(500.0), coef, np.array([1000.0]), 0)]
    [2.5, 4.5, 16.536520246055]
    """
    r = 0 if T <= mid[k] else 1
    a1, a2, a3, a4, a5 = coef[r, 0, k], coef[r, 1, k], coef[r, 2, k], coef[r, 3, k], coef[r, 4, k]
    a6, a7 = coef[r, 5, k], coef[r, 6, k]
    cp = a1 + T * (a2 + T * (a3 + T * (a4 + T * a5)))
    h = a1 + T * (a2 * 0.5 + T * (a3 * (1 / 3) + T * (a4 * 0.25 + T * a5 * 0.2))) + a6 / T
    s = a1 * lnT + T * (a2 + T * (a3 * 0.5 + T * (a4 * (1 / 3) + T * a5 * 0.25))) + a7
    return cp, h, s


@jit_inline
def add_pairs(M, w, A, k, col):
    """Add species k's share of an element-pair sum: M[e, f] += w a_ke a_kf, M[e, col] += w a_ke.

    Parameters
    ----------
    M : ndarray (m, m)
        Matrix updated in place.
    w : float
        Weight (the species amount [kmol/kg]).
    A : ndarray (K, E)
        Atoms of each element in each species [-].
    k, col : int
        Species row of ``A``; column of ``M`` that collects sum w a_ke.

    Examples
    --------
    Water (H2O: a_H = 2, a_O = 1) with weight 0.5 (closed form: 0.5 * [[4, 2], [2, 1]], and 0.5 * [2, 1]):

    >>> import numpy as np
    >>> M = np.zeros((3, 3))
    >>> add_pairs(M, 0.5, np.array([[2.0, 1.0]]), 0, 2)
    >>> M.tolist()
    [[2.0, 1.0, 1.0], [1.0, 0.5, 0.5], [0.0, 0.0, 0.0]]
    """
    E = A.shape[1]
    for e in range(E):
        # an element not in species k adds nothing, even when w is not finite (a select, not a
        # branch: no mispredictions; its zeros leave the sums' bits as they are)
        ae = A[k, e]
        we = w * ae if ae != 0.0 else 0.0
        for f in range(E):
            M[e, f] += we * A[k, f]
        M[e, col] += we


@jit
def gauss_solve(J, x, idx, n, y=None):
    """Solve J y = x in place (x becomes y) by Gaussian elimination with partial pivoting.

    Only the unknowns ``idx[:n]`` (increasing) are solved for: every other row and column of J
    must be an identity row and column (1 on the diagonal, 0 elsewhere), and their x stays as
    it is (the solution of such a row). Eliminating the full system would do the same
    arithmetic on the listed rows (the identity rows never give a pivot or a non-zero
    multiplier, and they add only zero terms), so skipping them changes no bit. The same
    operations for every point, whatever else is being solved: no BLAS call whose rounding
    could depend on a batch's shape. ``J`` is overwritten.

    Parameters
    ----------
    J : ndarray (m, m)
        Matrix [any unit].
    x : ndarray (m,)
        Right-hand side; the solution on return.
    idx : ndarray of int (m,)
        The unknowns solved for, in increasing order, in ``idx[:n]``.
    n : int
    y : ndarray (m,), optional
        A second right-hand side, solved with the same elimination (the solution on return):
        the same bits as a second solve on a copy of J, for half the work.

    Returns
    -------
    bool
        False when a pivot vanishes or is not finite (singular system; x is then garbage).

    Examples
    --------
    2 y0 + y1 = 3, y0 + 3 y1 = 5 has the solution y = (0.8, 1.4) (closed form); an identity
    row and column left out keep their value:

    >>> import numpy as np
    >>> x = np.array([3.0, 7.0, 5.0])
    >>> J = np.array([[2.0, 0.0, 1.0], [0.0, 1.0, 0.0], [1.0, 0.0, 3.0]])
    >>> gauss_solve(J, x, np.array([0, 2, 1]), 2), [round(float(v), 12) for v in x]
    (True, [0.8, 7.0, 1.4])
    >>> gauss_solve(np.array([[1.0, 2.0], [2.0, 4.0]]), np.array([1.0, 2.0]), np.array([0, 1]), 2)
    False

    Two right-hand sides at once (the second: y = (0.2, 0.4), closed form):

    >>> x, y = np.array([3.0, 5.0]), np.array([0.8, 1.4])
    >>> gauss_solve(np.array([[2.0, 1.0], [1.0, 3.0]]), x, np.array([0, 1]), 2, y)
    True
    >>> [round(float(v), 12) for v in y]
    [0.2, 0.4]
    """
    for a in range(n):
        c = idx[a]
        piv = c
        best = abs(J[c, c])
        for b in range(a + 1, n):
            r = idx[b]
            if abs(J[r, c]) > best:
                best = abs(J[r, c])
                piv = r
        if not best > 0.0 or not math.isfinite(best):
            return False
        if piv != c:
            for b in range(n):
                q = idx[b]
                t = J[c, q]
                J[c, q] = J[piv, q]
                J[piv, q] = t
            t = x[c]
            x[c] = x[piv]
            x[piv] = t
            if y is not None:
                t = y[c]
                y[c] = y[piv]
                y[piv] = t
        for b in range(a + 1, n):
            r = idx[b]
            f = J[r, c] / J[c, c]
            if f != 0.0:
                for d in range(a, n):
                    q = idx[d]
                    J[r, q] -= f * J[c, q]
                x[r] -= f * x[c]
                if y is not None:
                    y[r] -= f * y[c]
    _back_substitute(J, x, idx, n)
    if y is not None:
        _back_substitute(J, y, idx, n)
    return True


@jit_inline
def _back_substitute(J, x, idx, n):
    """The back substitution of :func:`gauss_solve` (J upper triangular on ``idx[:n]``)."""
    for a in range(n - 1, -1, -1):
        c = idx[a]
        s = x[c]
        for b in range(a + 1, n):
            q = idx[b]
            s -= J[c, q] * x[q]
        x[c] = s / J[c, c]


@jit
def props_rows(rows, gas_coef, gas_mid, cond_coef, cond_mid, p_ref, T, p, lnn, nc, act, out, nj):
    """Mixture properties of the listed rows of a batch, per kg of propellant.

    Parameters
    ----------
    rows : ndarray of int
        Rows to compute.
    gas_coef, gas_mid, cond_coef, cond_mid : ndarray
        NASA-7 fits of the gas species and condensed candidates (see :func:`poly_one`).
    p_ref : float
        Reference pressure of the data [Pa].
    T, p : ndarray (n,)
        Temperature [K] and pressure [Pa] per row.
    lnn : ndarray (n, K)
        ln of the gas species amounts [ln(kmol/kg)].
    nc : ndarray (n, C)
        Condensed amounts [kmol/kg]; ``act`` (n, C) marks the present phases.
    out : ndarray (n, 6)
        Written: gas amount [kmol/kg], h [J/kg], s [J/(kg K)], frozen cp and cv
        [J/(kg K)], density [kg/m^3] (condensed volume neglected).
    nj : ndarray (n, K)
        Written: gas species amounts [kmol/kg].

    Examples
    --------
    Argon (NASA Glenn data: cp = 5/2 R) at 1000 K and 1 bar, 1/39.948 kmol/kg: density
    p M / (R T) = 0.48046 kg/m^3 and cp = 5/2 R / M = 520.33 J/(kg K) (ideal gas, closed form):

    >>> import numpy as np
    >>> a = [2.5, 0.0, 0.0, 0.0, 0.0, -745.375, 4.37967491]
    >>> coef = np.array([a, a], float).reshape(2, 7, 1)
    >>> out, nj = np.empty((1, 6)), np.empty((1, 1))
    >>> props_rows(np.array([0]), coef, np.array([6000.0]), np.zeros((2, 7, 0)),
    ...            np.zeros(0), 1e5, np.array([1000.0]), np.array([1e5]),
    ...            np.array([[np.log(1 / 39.948)]]), np.zeros((1, 0)), np.zeros((1, 0), bool), out, nj)
    >>> round(float(out[0, 5]), 5), round(float(out[0, 3]), 2)
    (0.48046, 520.33)
    """
    R = R_UNIVERSAL
    K = lnn.shape[1]
    C = nc.shape[1]
    ccp, cH, cS = np.empty(C), np.empty(C), np.empty(C)
    for i in rows:
        Ti = T[i]
        lnT = math.log(Ti)
        if C:
            poly_one(Ti, cond_coef, cond_mid, ccp, cH, cS)
        ng = 0.0
        deep_l = math.nan       # the species far below the gas share one ln n (the floor): one exp
        deep_n = 0.0
        for k in range(K):
            lk = lnn[i, k]
            if lk == deep_l:
                nk = deep_n
            else:
                nk = exp(lk)
                if lk < LN_FLOOR_ABS:
                    deep_l, deep_n = lk, nk
            nj[i, k] = nk
            ng += nk
        lng = log(ng)
        lnP = log(p[i] / p_ref)
        h = 0.0
        s = 0.0
        c = 0.0
        for k in range(K):
            # below e^-80 of the gas a species adds nothing a double can hold to these sums
            if lnn[i, k] - lng <= LN_DEEP:
                continue
            cpk, Hk, Sk = fit_k(Ti, lnT, gas_coef, gas_mid, k)
            h += nj[i, k] * Hk
            s += nj[i, k] * (Sk - (lnn[i, k] - lng) - lnP)
            c += nj[i, k] * cpk
        for q in range(C):
            if act[i, q]:
                h += nc[i, q] * cH[q]
                s += nc[i, q] * cS[q]
                c += nc[i, q] * ccp[q]
        out[i, 0] = ng
        out[i, 1] = R * Ti * h
        out[i, 2] = R * s
        out[i, 3] = R * c
        out[i, 4] = R * c - ng * R
        out[i, 5] = p[i] / (ng * R * Ti)
