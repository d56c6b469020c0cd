"""Compiled inner loop of :mod:`perfchain.thermo.batch` (numba): the Newton method, one point at a time.

The same equations, damping and convergence test as the numpy version in
:func:`perfchain.thermo.batch._solve_numpy`; each point is solved by its own scalar
loop, so a point's result cannot depend on the other points of a batch. Set
``PERFCHAIN_NO_JIT=1`` to use the numpy version instead (no compiler needed).
"""

from __future__ import annotations

import math
import os

import numpy as np

from perfchain.constants import R_UNIVERSAL

AVAILABLE = False
if os.environ.get("PERFCHAIN_NO_JIT", "") not in ("1", "true", "yes"):
    try:
        from numba import njit
        AVAILABLE = True
    except ImportError:  # pragma: no cover - numba is a dependency; this keeps a bare install working
        AVAILABLE = False

# status codes of a row after a solve
OK, NOT_CONVERGED, NON_FINITE, OUT_OF_DATA, PHASE_OUT_OF_RANGE = 0, 1, 2, 3, 4

LN_TRACE = math.log(1e-8)
LN_1E4 = math.log(1e-4)
LN_FLOOR = -690.0
LN_DEEP = -80.0          # ln mole fraction below which a species is left out of the sums
STEP_TOL = 1e-9                   # converged: largest major-species d ln n below this (the step after is ~1e-18)
T_TOL = 1e-10                     # ... and |d ln T| below this
COND_TOL = 1e-10
MAX_ITER = 80


def _python(f):
    return f


jit = njit(cache=True, nogil=True) if AVAILABLE else _python


@jit
def _poly_one(T, coef, mid, cp, H, S):
    """cp/R, h/RT, s0/R of every fit at one temperature (written into cp, H, S)."""
    lnT = math.log(T)
    for k in range(mid.shape[0]):
        r = 0 if T <= mid[k] else 1
        a1, a2, a3, a4, a5 = coef[r, 0, k], coef[r, 1, k], coef[r, 2, k], coef[r, 3, k], coef[r, 4, k]
        a6, a7 = coef[r, 5, k], coef[r, 6, k]
        cp[k] = a1 + T * (a2 + T * (a3 + T * (a4 + T * a5)))
        H[k] = a1 + T * (a2 * 0.5 + T * (a3 * (1 / 3) + T * (a4 * 0.25 + T * a5 * 0.2))) + a6 / T
        S[k] = a1 * lnT + T * (a2 + T * (a3 * 0.5 + T * (a4 * (1 / 3) + T * a5 * 0.25))) + a7


@jit
def _buffers(K, C):
    """Work arrays for the thermo of K gas species and C condensed candidates."""
    return np.empty(K), np.empty(K), np.empty(K), np.empty(C), np.empty(C), np.empty(C)


@jit
def _add_pairs(M, w, A, k, col):
    """M[e, f] += w a_ke a_kf for the elements of species k, and M[e, col] += w a_ke."""
    E = A.shape[1]
    for e in range(E):
        ae = A[k, e]
        if ae == 0.0:
            continue
        for f in range(E):
            M[e, f] += w * ae * A[k, f]
        M[e, col] += w * ae


@jit
def _gauss(J, x):
    """Solve J y = x in place (x becomes y); Gaussian elimination with partial pivoting.

    Returns False when a pivot vanishes (singular system).
    """
    m = x.shape[0]
    for c in range(m):
        piv = c
        best = abs(J[c, c])
        for r in range(c + 1, m):
            if abs(J[r, c]) > best:
                best = abs(J[r, c])
                piv = r
        if not best > 0.0 or not math.isfinite(best):
            return False
        if piv != c:
            for q in range(m):
                t = J[c, q]
                J[c, q] = J[piv, q]
                J[piv, q] = t
            t = x[c]
            x[c] = x[piv]
            x[piv] = t
        for r in range(c + 1, m):
            f = J[r, c] / J[c, c]
            if f != 0.0:
                for q in range(c, m):
                    J[r, q] -= f * J[c, q]
                x[r] -= f * x[c]
    for c in range(m - 1, -1, -1):
        s = x[c]
        for q in range(c + 1, m):
            s -= J[c, q] * x[q]
        x[c] = s / J[c, c]
    return True


@jit
def solve_rows(rows, kind, target, A, gas_coef, gas_mid, cA, cond_coef, cond_mid, cond_tmin, cond_tmax,
               formula, p_ref, t_min, t_max, b, T, p, lnn, lnN, nc, act, pi, status, iters):
    """Newton iterations for each listed row at fixed p: HP (kind 0, target h [J/kg]) or
    SP (kind 1, target s [J/(kg K)]). Arrays are updated in place; ``status`` per row,
    ``iters`` counts the steps taken (added to, per row)."""
    R = R_UNIVERSAL
    K, E = A.shape
    C = cA.shape[0]
    m = E + 2 + C
    cp, H, S, ccp, cH, cS = _buffers(K, C)
    nj = np.empty(K)
    r = np.empty(K)
    dlnn = np.empty(K)
    J = np.empty((m, m))
    x = np.empty(m)
    for q in range(rows.shape[0]):
        i = rows[q]
        tgt = target[q]
        st = NOT_CONVERGED
        for it in range(MAX_ITER):
            iters[i] += 1
            Ti = T[i]
            lnP = math.log(p[i] / p_ref)
            _poly_one(Ti, gas_coef, gas_mid, cp, H, S)
            if C:
                _poly_one(Ti, cond_coef, cond_mid, ccp, cH, cS)
            N = math.exp(lnN[i])
            for k in range(K):
                lx = lnn[i, k] - lnN[i]
                # below 1e-35 of the gas a species adds nothing a double can hold to any sum here
                nj[k] = math.exp(lnn[i, k]) if lx > LN_DEEP else 0.0
                r[k] = H[k] - S[k] + lx + lnP
            for a in range(m):
                x[a] = 0.0
                for c in range(m):
                    J[a, c] = 0.0
            sum_n = 0.0
            sum_nH = 0.0
            sum_nr = 0.0
            s3 = 0.0
            s4 = 0.0
            s5 = 0.0
            s6 = 0.0
            s7 = 0.0
            for k in range(K):
                w0 = nj[k]
                if w0 == 0.0:
                    continue
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
                _add_pairs(J, w0, A, k, E)                  # sum n a_e a_f, and An in column E
                for e in range(E):
                    ae = A[k, e]
                    if ae == 0.0:
                        continue
                    J[e, m - 1] += wH * ae      # AnH
                    x[e] += wr * ae             # Anr (rhs part)
                    if kind == 1:
                        J[m - 1, e] += ew * ae  # sum w a_e
            for e in range(E):
                cond_e = 0.0
                for c in range(C):
                    cond_e += nc[i, c] * cA[c, e]
                x[e] = b[i, e] - J[e, E] - cond_e + x[e]
                J[E, e] = J[e, E]
                for c in range(C):
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
                    for e in range(E):
                        J[row, e] = cA[c, e]
                    J[row, m - 1] = cH[c]
                    x[row] = cH[c] - cS[c]
                    ncH += nc[i, c] * cH[c]
                    ncS += nc[i, c] * cS[c]
                    nccp += nc[i, c] * ccp[c]
                    nccpH += nc[i, c] * (ccp[c] - cH[c])
                else:
                    J[row, row] = 1.0
                    x[row] = -nc[i, c]
            if kind == 0:
                t = tgt / (R * Ti)
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
                x[m - 1] = tgt / R - s6 - ncS + s7
            if not _gauss(J, x):
                st = NON_FINITE
                break
            dlnN = x[E]
            dlnT = x[m - 1]
            big = max(5.0 * abs(dlnT), 5.0 * abs(dlnN))
            trace_lim = math.inf
            step = abs(dlnN)
            for k in range(K):
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
            new_lnN = lnN[i] + lam * dlnN
            new_T = min(max(Ti * math.exp(lam * dlnT), 100.0), 2.0e4)
            finite = math.isfinite(new_lnN) and math.isfinite(new_T)
            dnc_max = 0.0
            for c in range(C):
                if act[i, c]:
                    dn = x[E + 1 + c]
                    finite = finite and math.isfinite(dn)
                    if abs(dn) > dnc_max:
                        dnc_max = abs(dn)
            for k in range(K):
                if not math.isfinite(dlnn[k]):
                    finite = False
            for e in range(E):
                if not math.isfinite(x[e]):
                    finite = False
            if not finite:
                st = NON_FINITE
                break
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
                    if nc[i, c] <= 0.0:       # the phase ran out: drop it
                        nc[i, c] = 0.0
                        act[i, c] = False
                        conv = False
                else:
                    nc[i, c] = 0.0
            if not conv:
                continue
            # converged on this phase set: does another phase want to form?
            if C and _add_phase(i, Ti, cA, cH, cS, cond_tmin, cond_tmax, formula, pi, act, nc, lnN):
                continue
            st = OK
            Tn = T[i]
            if not (t_min <= Tn <= t_max):
                st = OUT_OF_DATA
            for c in range(C):
                if act[i, c] and not (cond_tmin[c] <= Tn <= cond_tmax[c]):
                    st = PHASE_OUT_OF_RANGE
            break
        status[i] = st


@jit
def _add_phase(i, T, cA, cH, cS, cond_tmin, cond_tmax, formula, pi, act, nc, lnN):
    """Activate the most undersaturated condensed candidate valid at T (one phase per
    substance: the most stable valid one). Returns True if a phase was added."""
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
    nc[i, which] = 1e-3 * math.exp(lnN[i])
    return True


@jit
def props_rows(rows, A, gas_coef, gas_mid, cond_coef, cond_mid, p_ref, T, p, lnn, nc, act, out, nj):
    """Mixture properties of the listed rows (SI, per kg): out[:, 0..5] = n_gas, h, s,
    cp_frozen, cv_frozen, density; nj = gas species amounts [kmol/kg]."""
    R = R_UNIVERSAL
    K = lnn.shape[1]
    C = nc.shape[1]
    cp, H, S, ccp, cH, cS = _buffers(K, C)
    for i in rows:
        Ti = T[i]
        _poly_one(Ti, gas_coef, gas_mid, cp, H, S)
        if C:
            _poly_one(Ti, cond_coef, cond_mid, ccp, cH, cS)
        ng = 0.0
        for k in range(K):
            nj[i, k] = math.exp(lnn[i, k])
            ng += nj[i, k]
        lng = math.log(ng)
        lnP = math.log(p[i] / p_ref)
        h = 0.0
        s = 0.0
        c = 0.0
        for k in range(K):
            if nj[i, k] == 0.0:
                continue
            h += nj[i, k] * H[k]
            s += nj[i, k] * (S[k] - (lnn[i, k] - lng) - lnP)
            c += nj[i, k] * cp[k]
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


@jit
def deriv_rows(rows, A, gas_coef, gas_mid, cA, cond_coef, cond_mid, T, nj, ng, nc, act, out, dlnn_s, dnc_s):
    """Equilibrium derivatives per row (the systems of :func:`perfchain.thermo.derivatives.derivatives`).

    out[:, 0..7] = cp, cv [J/(kg K)], dlnV/dlnT, dlnV/dlnp, gamma_s, sound speed [m/s],
    dlnT/dlnp along the isentrope, dlnN/dlnp along it; dlnn_s, dnc_s: species and
    condensed amounts along it. A singular row gets NaN.
    """
    R = R_UNIVERSAL
    K = nj.shape[1]
    E = A.shape[1]
    C = nc.shape[1]
    m = E + C + 1
    cp, H, S, ccp, cH, cS = _buffers(K, C)
    M = np.empty((m, m))
    M2 = np.empty((m, m))
    xT = np.empty(m)
    xp = np.empty(m)
    for i in rows:
        Ti = T[i]
        _poly_one(Ti, gas_coef, gas_mid, cp, H, S)
        if C:
            _poly_one(Ti, cond_coef, cond_mid, ccp, cH, cS)
        for a in range(m):
            xT[a] = 0.0
            xp[a] = 0.0
            for c in range(m):
                M[a, c] = 0.0
        sum_nH = 0.0
        for k in range(K):
            w = nj[i, k]
            if w == 0.0:
                continue
            sum_nH += w * H[k]
            _add_pairs(M, w, A, k, m - 1)
            for e in range(E):
                xT[e] -= w * H[k] * A[k, e]
        for e in range(E):
            M[m - 1, e] = M[e, m - 1]
            xp[e] = M[e, m - 1]
            for q in range(C):
                if act[i, q]:
                    M[e, E + q] = cA[q, e]
        for q in range(C):
            if act[i, q]:
                for e in range(E):
                    M[E + q, e] = cA[q, e]
                xT[E + q] = -cH[q]
            else:
                M[E + q, E + q] = 1.0
        xT[m - 1] = -sum_nH
        xp[m - 1] = ng[i]
        for a in range(m):
            for c in range(m):
                M2[a, c] = M[a, c]
        if not (_gauss(M, xT) and _gauss(M2, xp)):
            for j in range(out.shape[1]):
                out[i, j] = math.nan
            continue
        zT = xT[m - 1]
        zp = xp[m - 1]
        dVT = 1.0 + zT
        dVp = -1.0 + zp
        cpR = 0.0
        for k in range(K):
            w = nj[i, k]
            if w == 0.0:
                continue
            d = zT + H[k]
            for e in range(E):
                d += A[k, e] * xT[e]
            cpR += w * cp[k] + w * H[k] * d
        for q in range(C):
            if act[i, q]:
                cpR += nc[i, q] * ccp[q] + cH[q] * xT[E + q]
        cpe = cpR * R
        cve = cpe + ng[i] * R * dVT * dVT / dVp
        gs = -(cpe / cve) / dVp
        kk = ng[i] * R * dVT / cpe
        out[i, 0] = cpe
        out[i, 1] = cve
        out[i, 2] = dVT
        out[i, 3] = dVp
        out[i, 4] = gs
        out[i, 5] = math.sqrt(gs * ng[i] * R * Ti) if gs > 0 else math.nan
        out[i, 6] = kk
        out[i, 7] = zp + zT * kk
        for k in range(K):
            dT = zT + H[k]
            dp = zp - 1.0
            for e in range(E):
                dT += A[k, e] * xT[e]
                dp += A[k, e] * xp[e]
            dlnn_s[i, k] = dp + dT * kk
        for q in range(C):
            dnc_s[i, q] = xp[E + q] + xT[E + q] * kk


@jit
def perfect_gas_guess(eps, g, out):
    """ln(p/p*) of a calorically perfect gas (exponent g) at supersonic area ratio eps, per row:
    bisection on the closed form A/A*(p) of NACA Report 1135 (p* the sonic pressure)."""
    for i in range(eps.shape[0]):
        gi = g[i]
        crit = (2.0 / (gi + 1.0)) ** (gi / (gi - 1.0))
        lo, hi = -80.0, 0.0
        for _ in range(60):
            x = 0.5 * (lo + hi)
            r = crit * math.exp(x)
            m2 = 2.0 / (gi - 1.0) * (r ** (-(gi - 1.0) / gi) - 1.0)
            a = math.sqrt(((2.0 / (gi + 1.0)) * (1.0 + 0.5 * (gi - 1.0) * m2)) ** ((gi + 1.0) / (gi - 1.0)) / m2) \
                if m2 > 0 else math.inf
            if not a < eps[i]:
                lo = x      # area ratio too large here: the exit pressure is higher
            else:
                hi = x
        out[i] = 0.5 * (lo + hi)
