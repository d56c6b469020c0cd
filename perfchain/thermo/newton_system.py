"""The linear system of one Newton step of the batch solver (see :mod:`.newton`).

Rows: the element balances, the gas-amount condition sum n_j = N, one condition per
condensed candidate (mu0_c/RT = a_c . pi when present, d n_c = -n_c when absent) and the
enthalpy (HP) or entropy (SP) target. Columns: the element potentials pi (over RT),
d ln N, the condensed amounts and d ln T. Compiled (see :mod:`.jit`); one row at a time.

On a melting plateau (two phases ``pa`` below and ``pb`` above the transition temperature of
one substance both present) temperature is fixed at the transition: the row of ``pb`` becomes
d ln T = 0, the row of ``pa`` asks a_c . pi for the mean mu0/RT of the two phases (in the data
they differ there by ~6e-6 for alumina), and the split between the phases is what the
enthalpy or entropy row now fixes (the condensed-phase treatment of Gordon & McBride, NASA
RP-1311, 1994, ch. 3 and 5; from memory; our own code).
"""

from __future__ import annotations

import math

from perfchain.constants import R_UNIVERSAL
from perfchain.thermo.jit import exp, jit
from perfchain.thermo.kernel import LN_DEEP, add_pairs

__all__ = ["gas_terms", "newton_system"]


@jit
def gas_terms(kind, i, A, lnn, lnN, lnP, uses, n_use, cp, H, S, nj, r, live, J, x):
    """The gas species' part of row i's Newton system (J and x zeroed before, updated in place).

    Only the species ``uses[:n_use]`` take part (the row's pruned set, see
    :mod:`perfchain.thermo.pruning`, in increasing order). For them ``nj`` gets the species
    amounts [kmol/kg] (0 below a mole fraction of e^-80) and ``r`` the residuals mu_j/RT of the
    gas conditions [-]; ``live`` (int array) the species of non-zero amount, in order. J gets
    the element-pair sums (columns 0..E-1), sum n a_e (column E) and sum n a_e h/RT (last
    column); x[e] gets sum n r a_e.

    Returns
    -------
    tuple of float
        sum n, sum n h/RT, sum n r [kmol/kg], and the sums s3..s7 the target row needs
        (HP: n h^2, n (cp - h), n h r; SP: n (sigma - 1), n (sigma - 1) h, n cp, n sigma,
        n (sigma - 1) r, with sigma = s_j/R of the species in the mixture).

    Examples
    --------
    One species (Ar, one element) at its equilibrium amount 0.025 kmol/kg, mole fraction 1,
    with mu0/RT = 0 and p = p_ref: r = 0 and sum n = 0.025 (closed form):

    >>> import numpy as np
    >>> J, x, nj, r = np.zeros((3, 3)), np.zeros(3), np.empty(1), np.empty(1)
    >>> ln, one = np.log(np.array([[0.025]])), np.array([2.5])
    >>> out = gas_terms(0, 0, np.ones((1, 1)), ln, ln[:, 0], 0.0, np.zeros(1, np.int64), 1, one, one, one,
    ...                 nj, r, np.empty(1, np.int64), J, x)
    >>> [round(float(v), 15) for v in out[:3]], float(r[0]), round(float(J[0, 0]), 15)
    ([0.025, 0.0625, 0.0], 0.0, 0.025)
    """
    E = A.shape[1]
    m = J.shape[0]
    n = 0
    for q in range(n_use):
        k = uses[q]
        lx = lnn[i, k] - lnN[i]
        # below 1e-35 of the gas a species adds nothing a double can hold to any sum here
        nj[k] = exp(lnn[i, k]) if lx > LN_DEEP else 0.0
        r[k] = H[k] - S[k] + lx + lnP
        if nj[k] != 0.0:
            live[n] = k
            n += 1
    sum_n = 0.0
    sum_nH = 0.0
    sum_nr = 0.0
    s3 = 0.0
    s4 = 0.0
    s5 = 0.0
    s6 = 0.0
    s7 = 0.0
    for q in range(n):
        k = live[q]
        w0 = nj[k]
        wH = w0 * H[k]
        wr = w0 * r[k]
        sum_n += w0
        sum_nH += wH
        sum_nr += wr
        if kind == 0:
            e3 = wH * H[k]
            s3 += e3
            s4 += w0 * (cp[k] - H[k])
            s5 += wH * r[k]
            ew = 0.0
        else:
            sig = S[k] - (lnn[i, k] - lnN[i]) - lnP
            ew = w0 * (sig - 1.0)
            s3 += ew
            s4 += ew * H[k]
            s5 += w0 * cp[k]
            s6 += w0 * sig
            s7 += ew * r[k]
        add_pairs(J, w0, A, k, E)       # sum n a_e a_f, and An in column E
        for e in range(E):              # zeros where a_e = 0, as in add_pairs
            ae = A[k, e]
            there = ae != 0.0
            J[e, m - 1] += wH * ae if there else 0.0      # AnH
            x[e] += wr * ae if there else 0.0             # Anr (rhs part)
            if kind == 1:
                J[m - 1, e] += ew * ae if there else 0.0  # sum w a_e
    return sum_n, sum_nH, sum_nr, s3, s4, s5, s6, s7


@jit
def newton_system(kind, tgt, i, A, cA, b, T, lnn, lnN, nc, act, pa, pb, lnP, uses, n_use, cp, H, S, ccp, cH, cS,
                  nj, r, live, J, x, idx):
    """Assemble row i's Newton system J [d pi, d ln N, d n_c, d ln T] = x (in place).

    ``kind`` 0: HP, ``tgt`` the enthalpy [J/kg]; 1: SP, ``tgt`` the entropy [J/(kg K)].
    Species properties (cp, H, S of the gas; ccp, cH, cS of the condensed candidates) must be
    evaluated at T[i] before (the gas species ``uses[:n_use]`` and the present condensed
    phases only). Absent condensed phases get an identity row and column that zero them, and
    ``idx`` (int array) lists the other unknowns, for :func:`~perfchain.thermo.kernel.gauss_solve`.
    ``pa``, ``pb``: the two present phases of a substance on its melting plateau (lower and
    upper; -1 for none): T is held and their split is solved for.

    Returns
    -------
    tuple
        (sum n over the gas species [kmol/kg], the scale of the condensed-amount test; the
        number of unknowns listed in ``idx``).

    Examples
    --------
    Argon at 0.025 kmol/kg at equilibrium, HP at its own enthalpy: the system asks for no
    change (closed form: every residual is zero, so the right-hand side is zero):

    >>> import numpy as np
    >>> J, x = np.empty((3, 3)), np.empty(3)
    >>> ln = np.log(np.array([[0.025]]))
    >>> one = np.array([2.5])
    >>> from perfchain.constants import R_UNIVERSAL
    >>> h = 0.025 * 2.5 * R_UNIVERSAL * 1000.0
    >>> n, n_on = newton_system(0, h, 0, np.ones((1, 1)), np.zeros((0, 1)), np.array([[0.025]]),
    ...                         np.array([1000.0]), ln, ln[:, 0], np.zeros((1, 0)), np.zeros((1, 0), bool),
    ...                         -1, -1, 0.0, np.zeros(1, np.int64), 1, one, one, one, np.empty(0), np.empty(0),
    ...                         np.empty(0), np.empty(1), np.empty(1), np.empty(1, np.int64), J, x, np.empty(3, np.int64))
    >>> round(float(n), 15), n_on, [abs(round(float(v), 12)) for v in x]
    (0.025, 3, [0.0, 0.0, 0.0])
    """
    K, E = A.shape
    C = cA.shape[0]
    m = J.shape[0]
    Ti = T[i]
    N = exp(lnN[i])
    for a in range(m):
        x[a] = 0.0
        for c in range(m):
            J[a, c] = 0.0
    sum_n, sum_nH, sum_nr, s3, s4, s5, s6, s7 = gas_terms(kind, i, A, lnn, lnN, lnP, uses, n_use, cp, H, S, nj, r,
                                                          live, J, x)
    for e in range(E):
        cond_e = 0.0
        for c in range(C):
            cond_e += nc[i, c] * cA[c, e]
        x[e] = b[i, e] - J[e, E] - cond_e + x[e]
        J[E, e] = J[e, E]
        for c in range(C):
            if act[i, c]:
                J[e, E + 1 + c] = cA[c, e]
    J[E, E] = sum_n - N
    J[E, m - 1] = sum_nH
    x[E] = N - sum_n + sum_nr
    ncH = 0.0
    ncS = 0.0
    nccp = 0.0
    nccpH = 0.0
    for c in range(C):
        row = E + 1 + c
        if act[i, c]:
            if c == pb:             # the plateau: T is fixed at the transition
                J[row, m - 1] = 1.0
                x[row] = 0.0
            else:
                for e in range(E):
                    J[row, e] = cA[c, e]
                J[row, m - 1] = cH[c]
                x[row] = cH[c] - cS[c]
                if c == pa:
                    x[row] = 0.5 * (x[row] + cH[pb] - cS[pb])
            ncH += nc[i, c] * cH[c]
            ncS += nc[i, c] * cS[c]
            nccp += nc[i, c] * ccp[c]
            nccpH += nc[i, c] * (ccp[c] - cH[c])
        else:
            J[row, row] = 1.0
            x[row] = -nc[i, c]
    if kind == 0:
        t = tgt / (R_UNIVERSAL * Ti)
        for e in range(E):
            J[m - 1, e] = J[e, m - 1]
        J[m - 1, E] = sum_nH
        for c in range(C):
            if act[i, c]:
                J[m - 1, E + 1 + c] = cH[c]
        J[m - 1, m - 1] = s3 + s4 + nccpH + t
        x[m - 1] = t - sum_nH - ncH + s5
    else:
        J[m - 1, E] = s3 + sum_n
        for c in range(C):
            if act[i, c]:
                J[m - 1, E + 1 + c] = cS[c]
        J[m - 1, m - 1] = s4 + s5 + nccp
        x[m - 1] = tgt / R_UNIVERSAL - s6 - ncS + s7
    n_on = 0
    for a in range(m):
        if a <= E or a == m - 1 or act[i, a - E - 1]:
            idx[n_on] = a
            n_on += 1
    return sum_n, n_on
