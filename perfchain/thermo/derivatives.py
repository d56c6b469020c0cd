"""Analytic derivatives of an equilibrium state: cp, volume derivatives, sound speed.

Differentiating the equilibrium conditions of the gas (ln n_j = ln n + a_j . pi -
mu0_j/RT - ln p/p0), of each pure condensed phase (mu0_c/RT = a_c . pi) and the
element balances gives one small linear system for d/dlnT at constant p and one
for d/dlnp at constant T (the formulation of Gordon & McBride, NASA RP-1311, 1994,
ch. 2; from memory; derived afresh here). Condensed volume is neglected. On a melting
plateau (two phases of one substance at their transition temperature) the phases count once
in the system and the split is an unknown of its own: T stays put along the isentrope, the
isentropic exponent is -1 / (dlnV/dlnp)_T and cp is infinite (see
:func:`derivative_system`, Notes).

The system is written once, in :func:`derivative_system` (compiled, see :mod:`.jit`):
:func:`deriv_rows` applies it to the rows of the batch solver, :func:`derivatives` to a
state of the general path (:class:`~perfchain.thermo.equilibrium.EquilibriumSystem`).
"""

from __future__ import annotations

import math

import numpy as np

from perfchain.constants import R_UNIVERSAL
from perfchain.errors import SolverError
from perfchain.thermo.jit import exp, jit
from perfchain.thermo.kernel import LN_DEEP, add_pairs, fit_k, gauss_solve, poly_one

__all__ = ["merge_phases", "derivative_system", "deriv_rows", "derivatives"]


@jit
def _assemble(nj, ng, H, A, cA, cH, act, live, n_live, M, xT, xp, idx):
    """The matrix M and the two right-hand sides of :func:`derivative_system`.

    Returns the number of unknowns listed in ``idx`` (the absent condensed phases, identity rows
    and columns, left out).
    """
    E = A.shape[1]
    C = cA.shape[0]
    m = E + C + 1
    for a in range(m):
        xT[a] = 0.0
        xp[a] = 0.0
        for c in range(m):
            M[a, c] = 0.0
    sum_nH = 0.0
    for j in range(n_live):
        k = live[j]
        w = nj[k]
        sum_nH += w * H[k]
        add_pairs(M, w, A, k, m - 1)
        for e in range(E):
            xT[e] -= w * H[k] * A[k, e]
    for e in range(E):
        M[m - 1, e] = M[e, m - 1]
        xp[e] = M[e, m - 1]
        for q in range(C):
            if act[q]:
                M[e, E + q] = cA[q, e]
    for q in range(C):
        if act[q]:
            for e in range(E):
                M[E + q, e] = cA[q, e]
            xT[E + q] = -cH[q]
        else:
            M[E + q, E + q] = 1.0
    xT[m - 1] = -sum_nH
    xp[m - 1] = ng
    n_on = 0
    for a in range(m):
        if a < E or a == m - 1 or act[a - E]:
            idx[n_on] = a
            n_on += 1
    return n_on


@jit
def merge_phases(formula, act, nc, act1, nc1):
    """Condensed phases with the two phases of a substance on its melting plateau counted as one.

    ``act1``, ``nc1`` (C,) get ``act``, ``nc`` with each pair of present phases of one
    substance (same ``formula`` id) merged into the larger (the amounts added).

    Returns
    -------
    tuple of int
        (kept phase, merged-away phase) of the first such pair; (-1, -1) if there is none.

    Examples
    --------
    Solid 0.1 and liquid 0.3 kmol/kg of one substance: the liquid keeps 0.4:

    >>> import numpy as np
    >>> act1, nc1 = np.empty(2, bool), np.empty(2)
    >>> merge_phases(np.array([3, 3]), np.array([True, True]), np.array([0.1, 0.3]), act1, nc1)
    (1, 0)
    >>> act1.tolist(), [round(float(v), 12) for v in nc1]
    ([False, True], [0.0, 0.4])
    """
    C = act.shape[0]
    keep, gone = -1, -1
    for q in range(C):
        act1[q] = act[q]
        nc1[q] = nc[q] if act[q] else 0.0
    for q in range(C):
        for q2 in range(C):
            if q2 != q and act1[q] and act1[q2] and formula[q2] == formula[q] \
                    and (nc1[q2] > nc1[q] or (nc1[q2] == nc1[q] and q2 > q)):
                nc1[q2] += nc1[q]
                nc1[q] = 0.0
                act1[q] = False
                if keep < 0:
                    keep, gone = q2, q
    return keep, gone


@jit
def derivative_system(T, nj, ng, H, cp, A, cA, cH, ccp, nc, act, keep, gone, M, xT, xp, out, dlnn_s, dnc_s,
                      live, n_live, idx):
    """Solve the equilibrium-derivative system of one state; True unless it is singular.

    Parameters
    ----------
    T : float
        Temperature [K].
    nj : ndarray (K,)
        Gas species amounts [kmol/kg]; ``ng`` their sum [kmol/kg].
    H, cp : ndarray (K,)
        h/RT (every species) and cp/R (those in ``live``) of the gas species at T [-].
    A : ndarray (K, E)
        Atoms of each element in each gas species [-].
    cA : ndarray (C, E)
        Atoms of each element in each condensed candidate [-].
    cH, ccp, nc : ndarray (C,)
        h/RT, cp/R [-] and amount [kmol/kg] of each condensed candidate.
    act : ndarray of bool (C,)
        Present condensed phases (absent ones get d n = 0).
    keep, gone : int
        On a melting plateau (see :func:`merge_phases`): the phase that carries the substance's
        whole amount in ``nc`` and ``act``, and the other phase (absent there); -1 otherwise.
        ``cH`` must hold both.
    M : ndarray (E + C + 1, E + C + 1)
        Work array (overwritten).
    xT, xp : ndarray (E + C + 1,)
        Written: the solutions of the two systems, [d pi, d n_c, d ln N] per d ln T at
        constant p and per d ln p at constant T.
    out : ndarray (8,)
        Written: cp, cv [J/(kg K)], (dlnV/dlnT)_p, (dlnV/dlnp)_T, isentropic exponent [-],
        sound speed [m/s] (NaN unless the exponent is positive), dlnT/dlnp and dlnN/dlnp
        along the isentrope [-]. All NaN when singular. On a plateau cp, cv and (dlnV/dlnT)_p
        are the limits from the side of the kept phase, the rest is the plateau's own
        (see below).
    dlnn_s, dnc_s : ndarray (K,), (C,)
        Written: d ln n_j / d ln p [-] and d n_c / d ln p [kmol/kg] along the isentrope.
    live : ndarray of int (K,)
        ``live[:n_live]``, in increasing order: the species whose amounts enter the sums (every
        species of non-zero amount, or all but those a double cannot see beside the others).
    n_live : int
    idx : ndarray of int (E + C + 1,)
        Work array (the unknowns of the system).

    Returns
    -------
    bool

    Notes
    -----
    On a melting plateau two phases of one substance coexist at the transition temperature,
    whatever the pressure (condensed volume neglected), and any split between them is an
    equilibrium: with the split as an unknown (Gordon & McBride, NASA RP-1311, 1994, ch. 2;
    from memory) the derivatives at constant T are those of the substance counted once (both
    phases impose the same a_c . d pi = 0, the split does not enter the volume), while those at
    constant p do not exist: heat at constant p melts the substance at fixed T, so cp is
    infinite and (dlnV/dlnT)_p jumps between its two one-sided values. Along the isentrope T
    stays put and the entropy (dh = v dp at fixed T) fixes how the split moves, so
    dlnT/dlnp = 0, the isentropic exponent is -1 / (dlnV/dlnp)_T (the mixture expands at fixed
    T while the melt fraction takes up the entropy) and the sound speed sqrt(gamma_s n R T).
    Counting the two phases as one with T free (the one-sided exponent, cp/cv above 1) would
    overstate the isentropic exponent there.

    Examples
    --------
    A monatomic ideal gas (cp = 5/2 R): isentropic exponent 5/3 and dlnT/dlnp = 2/5 along
    the isentrope (closed forms):

    >>> import numpy as np
    >>> out, e = np.empty(8), np.empty(0)
    >>> ok = derivative_system(1000.0, np.array([0.025]), 0.025, np.array([2.5]), np.array([2.5]),
    ...                        np.ones((1, 1)), np.zeros((0, 1)), e, e, e, np.zeros(0, bool), -1, -1,
    ...                        np.empty((2, 2)), np.empty(2), np.empty(2), out,
    ...                        np.empty(1), e, np.zeros(1, np.int64), 1, np.empty(2, np.int64))
    >>> ok, round(float(out[4]), 12), round(float(out[6]), 12)
    (True, 1.666666666667, 0.4)
    """
    R = R_UNIVERSAL
    K, E = A.shape
    C = cA.shape[0]
    m = E + C + 1
    n_on = _assemble(nj, ng, H, A, cA, cH, act, live, n_live, M, xT, xp, idx)
    if not gauss_solve(M, xT, idx, n_on, xp):       # both right-hand sides, one elimination
        for j in range(out.shape[0]):
            out[j] = math.nan
        return False
    zT = xT[m - 1]
    zp = xp[m - 1]
    dVT = 1.0 + zT
    dVp = -1.0 + zp
    cpR = 0.0
    for j in range(n_live):
        k = live[j]
        w = nj[k]
        d = zT + H[k]
        for e in range(E):
            d += A[k, e] * xT[e]
        cpR += w * cp[k] + w * H[k] * d
    for q in range(C):
        if act[q]:
            cpR += nc[q] * ccp[q] + cH[q] * xT[E + q]
    cpe = cpR * R
    cve = cpe + ng * R * dVT * dVT / dVp
    gs = -(cpe / cve) / dVp
    kk = ng * R * dVT / cpe
    out[0] = cpe
    out[1] = cve
    out[2] = dVT
    out[3] = dVp
    out[4] = gs
    out[5] = math.sqrt(gs * ng * R * T) if gs > 0 else math.nan
    out[6] = kk
    out[7] = zp + zT * kk
    for k in range(K):
        dT = zT + H[k]
        dp = zp - 1.0
        for e in range(E):
            dT += A[k, e] * xT[e]
            dp += A[k, e] * xp[e]
        dlnn_s[k] = dp + dT * kk
    for q in range(C):
        dnc_s[q] = xp[E + q] + xT[E + q] * kk
    if keep >= 0:
        # the melting plateau: T held, the split moves with p so that dh = v dp (see Notes)
        out[4] = -1.0 / dVp
        out[5] = math.sqrt(out[4] * ng * R * T) if out[4] > 0 else math.nan
        out[6] = 0.0
        out[7] = zp
        dh = 0.0
        for k in range(K):
            dp = zp - 1.0
            for e in range(E):
                dp += A[k, e] * xp[e]
            dlnn_s[k] = dp
            dh += nj[k] * H[k] * dp
        whole = xp[E + keep]
        dnc_s[gone] = (ng - dh - cH[keep] * whole) / (cH[gone] - cH[keep])
        dnc_s[keep] = whole - dnc_s[gone]
    return True


@jit
def deriv_rows(rows, A, gas_coef, gas_mid, cA, cond_coef, cond_mid, formula, T, nj, ng, nc, act, out, dlnn_s,
               dnc_s):
    """:func:`derivative_system` for the listed rows of a batch (NASA-7 fits evaluated per row).

    Parameters
    ----------
    rows : ndarray of int
    A, cA : ndarray
        Atoms per element of the gas species (K, E) and condensed candidates (C, E).
    gas_coef, gas_mid, cond_coef, cond_mid : ndarray
        NASA-7 fits (see :func:`perfchain.thermo.kernel.poly_one`).
    T : ndarray (n,)
        [K]
    nj, ng, nc, act : ndarray
        Gas species amounts (n, K) and their sum (n,) [kmol/kg]; condensed amounts (n, C)
        [kmol/kg] and presence.
    out, dlnn_s, dnc_s : ndarray (n, 8), (n, K), (n, C)
        Written per row as in :func:`derivative_system`.

    Examples
    --------
    See :func:`perfchain.thermo.batch.nozzle` (argon: the sonic throat from these derivatives).
    """
    K, E = A.shape
    C = cA.shape[0]
    m = E + C + 1
    cp, H = np.empty(K), np.empty(K)
    ccp, cH, cS = np.empty(C), np.empty(C), np.empty(C)
    M = np.empty((m, m))
    xT = np.empty(m)
    xp = np.empty(m)
    act1 = np.empty(C, np.bool_)
    nc1 = np.empty(C)
    live = np.empty(K, np.int64)
    idx = np.empty(m, np.int64)
    deep = exp(LN_DEEP)
    for i in rows:
        Ti = T[i]
        lnT = math.log(Ti)
        # h/RT of every species (the isentrope moves them all), cp/R where the amount counts: below
        # e^-80 of the gas a species adds nothing a double can hold to the sums
        floor = ng[i] * deep
        n_live = 0
        for k in range(K):
            cpk, H[k], _ = fit_k(Ti, lnT, gas_coef, gas_mid, k)
            if not nj[i, k] <= floor:
                cp[k] = cpk
                live[n_live] = k
                n_live += 1
        if C:
            poly_one(Ti, cond_coef, cond_mid, ccp, cH, cS)
        # on a melting plateau the two phases of a substance count once, the split along the
        # isentrope solved apart (their two rows would make the system singular)
        keep, gone = merge_phases(formula, act[i], nc[i], act1, nc1)
        derivative_system(Ti, nj[i], ng[i], H, cp, A, cA, cH, ccp, nc1, act1, keep, gone, M, xT, xp, out[i],
                          dlnn_s[i], dnc_s[i], live, n_live, idx)


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
    A = np.ascontiguousarray(system.A[:, rows], float)   # species x elements
    # on a melting plateau two phases of one substance coexist; they count once in the system
    # and the split is solved apart (see derivative_system)
    cond = [i for i, _ in st.condensed]
    E, C = len(rows), len(cond)
    ids = {f: q for q, f in enumerate(dict.fromkeys(system.cond_formula[i] for i in cond))}
    formula = np.array([ids[system.cond_formula[i]] for i in cond], np.int64)
    act1, nc = np.empty(C, bool), np.empty(C)
    keep, gone = merge_phases(formula, np.ones(C, bool), np.array([n for _, n in st.condensed], float), act1, nc)
    Ac = np.ascontiguousarray(system.cond_A[cond][:, rows], float) if cond else np.zeros((0, E))
    Hc = np.array([system.cond_species[i].thermo.h(st.T) / (R_UNIVERSAL * st.T) for i in cond], float)
    cpc = np.array([system.cond_species[i].thermo.cp(st.T) / R_UNIVERSAL for i in cond], float)
    m = E + C + 1
    xT, xp, out = np.empty(m), np.empty(m), np.empty(8)
    live = np.flatnonzero(n_j != 0.0).astype(np.int64)
    if not derivative_system(float(st.T), n_j, float(st.n_gas), H, cp_j, A, Ac, Hc, cpc, nc, act1, keep, gone,
                             np.empty((m, m)), xT, xp, out, np.empty(len(n_j)), np.empty(C),
                             live, len(live), np.empty(m, np.int64)):
        raise SolverError("equilibrium derivatives are singular", system.point)
    cp, cv, dlnV_dlnT, dlnV_dlnp, gamma_s, a = (float(v) for v in out[:6])
    keep_only = [q for q in range(C) if act1[q]]
    return {"dn_dlnT": {cond[q]: float(xT[E + q]) for q in keep_only},
            "dn_dlnp": {cond[q]: float(xp[E + q]) for q in keep_only},
            "cp": cp, "cv": cv, "dlnV_dlnT": dlnV_dlnT, "dlnV_dlnp": dlnV_dlnp, "gamma_s": gamma_s,
            "sound_speed": a}
