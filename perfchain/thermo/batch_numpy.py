"""The numpy version of the batch solver's inner loops (:mod:`perfchain.thermo.batch`).

Used when numba is missing or ``PERFCHAIN_NO_JIT=1``: the same method as
:mod:`perfchain.thermo.kernel`, all rows of a batch advancing together array by array.
Rows never mix: only element-wise operations and reductions along a row.
"""

from __future__ import annotations

import math

import numpy as np

from perfchain.thermo.batch import (_COND_TOL, _LN_FLOOR, _LN_TRACE, _MAX_ITER, _STEP_TOL, _T_TOL, Batch, _apply, _cond,
                    _poly, _rowdot)
from perfchain.thermo.derivatives import R_UNIVERSAL

__all__ = ["solve", "props", "derivatives"]


def props(bt: Batch) -> dict:
    """Per-row mixture properties (SI, per kg), as :meth:`perfchain.thermo.batch.Batch.props`."""
    tab = bt.tab
    T, p = bt.T, bt.p
    cp, H, S = _poly(tab.gas_coef, tab.gas_mid, T)
    nj = np.exp(bt.lnn)
    ng = nj.sum(-1)
    lnx = bt.lnn - np.log(ng)[:, None]
    lnP = np.log(p / tab.p_ref)
    ccp, cH, cS = _cond(tab, T)
    nc = np.where(bt.act, bt.nc, 0.0)
    h = R_UNIVERSAL * T * ((nj * H).sum(-1) + (nc * cH).sum(-1))
    s = R_UNIVERSAL * ((nj * (S - lnx - lnP[:, None])).sum(-1) + (nc * cS).sum(-1))
    cpf = R_UNIVERSAL * ((nj * cp).sum(-1) + (nc * ccp).sum(-1))
    return {"n_gas": ng, "h": h, "s": s, "cp_frozen": cpf, "cv_frozen": cpf - ng * R_UNIVERSAL,
            "density": p / (ng * R_UNIVERSAL * T), "nj": nj}


def derivatives(bt: Batch, props) -> dict:
    """Equilibrium derivatives of every row, as :func:`perfchain.thermo.batch.derivatives`."""
    tab = bt.tab
    T = bt.T
    E, C = len(tab.element_names), len(tab.cond_names)
    m = E + C + 1
    n = len(T)
    with np.errstate(all="ignore"):
        cp, H, _ = _poly(tab.gas_coef, tab.gas_mid, T)
        ccp, cH, _ = _cond(tab, T)
        nj = props["nj"]
        ng = props["n_gas"]
        act = bt.act
        nc = np.where(act, bt.nc, 0.0)
        An = _rowdot(nj, tab.AT)
        M = np.zeros((n, m, m))
        M[:, :E, :E] = (nj[:, None, None, :] * tab.AA[None]).sum(-1)
        M[:, :E, -1] = An
        M[:, -1, :E] = An
        if C:
            M[:, :E, E:E + C] = np.where(act[:, None, :], tab.cAT[None], 0.0)
            M[:, E:E + C, :E] = np.where(act[:, :, None], tab.cA[None], 0.0)
            M[:, E:E + C, E:E + C] = np.where(act, 0.0, 1.0)[:, :, None] * np.eye(C)[None]
        rhs = np.zeros((n, m, 2))
        rhs[:, :E, 0] = -_rowdot(nj * H, tab.AT)
        rhs[:, E:E + C, 0] = np.where(act, -cH, 0.0)
        rhs[:, -1, 0] = -(nj * H).sum(-1)
        rhs[:, :E, 1] = An
        rhs[:, -1, 1] = ng
        try:
            sol = np.linalg.solve(M, rhs)
        except np.linalg.LinAlgError:
            sol = np.full((n, m, 2), np.nan)
            for i in range(n):
                try:
                    sol[i] = np.linalg.solve(M[i:i + 1], rhs[i:i + 1])[0]
                except np.linalg.LinAlgError:
                    pass
        x_T, y_T, z_T, z_p = sol[:, :E, 0], sol[:, E:E + C, 0], sol[:, -1, 0], sol[:, -1, 1]
        dlnV_dlnT = 1.0 + z_T
        dlnV_dlnp = -1.0 + z_p
        dlnnj_T = z_T[:, None] + _apply(x_T, tab.A) + H
        cp_R = (nj * cp).sum(-1) + (nc * ccp).sum(-1) + (nj * H * dlnnj_T).sum(-1) \
            + (np.where(act, cH, 0.0) * y_T).sum(-1)
        cpe = cp_R * R_UNIVERSAL
        cve = cpe + ng * R_UNIVERSAL * dlnV_dlnT ** 2 / dlnV_dlnp
        gamma_s = -(cpe / cve) / dlnV_dlnp
        a = np.sqrt(gamma_s * ng * R_UNIVERSAL * T)
        # along the isentrope: ds = cp dlnT - n R dlnV/dlnT dlnp = 0
        dlnT_dlnp_s = ng * R_UNIVERSAL * dlnV_dlnT / cpe
        # composition along the isentrope (first-order predictor for the next nozzle state)
        x_p, y_p = sol[:, :E, 1], sol[:, E:E + C, 1]
        k = dlnT_dlnp_s[:, None]
        dlnn_s = (z_p[:, None] + _apply(x_p, tab.A) - 1.0) + dlnnj_T * k
        dlnN_s = z_p + z_T * dlnT_dlnp_s
        dnc_s = y_p + y_T * k
    bad = ~(np.isfinite(a) & (gamma_s > 0))
    for i in np.nonzero(bad & bt.ok)[0]:
        bt.fail(i, "equilibrium derivatives are singular")
    return {"cp": cpe, "cv": cve, "dlnV_dlnT": dlnV_dlnT, "dlnV_dlnp": dlnV_dlnp,
            "gamma_s": gamma_s, "sound_speed": a, "dlnT_dlnp_s": dlnT_dlnp_s,
            "dlnn_s": dlnn_s, "dlnN_s": dlnN_s, "dnc_s": dnc_s}


def solve(bt: Batch, rows, kind: str, target):
    """Newton iterations on ``rows`` (see :func:`perfchain.thermo.batch._solve`), all rows advancing together."""
    tab = bt.tab
    E, C = len(tab.element_names), len(tab.cond_names)
    m = E + 2 + C
    ic = slice(E + 1, E + 1 + C)
    rows = np.asarray(rows, int)
    target = np.asarray(target, float)
    live = np.ones(len(rows), bool)
    for it in range(_MAX_ITER):
        idx = np.nonzero(live)[0]
        if not len(idx):
            return
        r_ = rows[idx]
        T, p, lnn, lnN = bt.T[r_], bt.p[r_], bt.lnn[r_], bt.lnN[r_]
        nc, act, b, tgt = bt.nc[r_], bt.act[r_], bt.b[r_], target[idx]
        n = len(r_)
        with np.errstate(all="ignore"):
            cp, H, S = _poly(tab.gas_coef, tab.gas_mid, T)
            ccp, cH, cS = _cond(tab, T)
            g = H - S
            cg = cH - cS
            lnP = np.log(p / tab.p_ref)
            N = np.exp(lnN)
            nj = np.exp(lnn)
            r = g + lnn - lnN[:, None] + lnP[:, None]
            nH = nj * H
            nr = nj * r
            if kind == "h":
                W = np.stack([nj, nH, nr, nH * H, nj * (cp - H), nH * r], axis=1)
            else:
                sig = S - (lnn - lnN[:, None]) - lnP[:, None]
                w = nj * (sig - 1.0)
                W = np.stack([nj, nH, nr, w, w * H, nj * cp, nj * sig, w * r], axis=1)
            sums = W.sum(-1)                                               # (n, P)
            el = (W[:, :4, None, :] * tab.AT[None, None]).sum(-1)          # (n, 4, E)
            An, AnH, Anr = el[:, 0], el[:, 1], el[:, 2]
            sum_n, sum_nH, sum_nr = sums[:, 0], sums[:, 1], sums[:, 2]
            J = np.zeros((n, m, m))
            rhs = np.zeros((n, m))
            J[:, :E, :E] = (nj[:, None, None, :] * tab.AA[None]).sum(-1)
            J[:, :E, E] = An
            J[:, :E, ic] = tab.cAT[None]
            J[:, :E, -1] = AnH
            rhs[:, :E] = b - An - _apply(nc, tab.cAT) + Anr
            J[:, E, :E] = An
            J[:, E, E] = sum_n - N
            J[:, E, -1] = sum_nH
            rhs[:, E] = N - sum_n + sum_nr
            if C:
                J[:, ic, :E] = np.where(act[:, :, None], tab.cA[None], 0.0)
                J[:, ic, -1] = np.where(act, cH, 0.0)
                eye = np.where(act, 0.0, 1.0)
                J[:, ic, ic] = eye[:, :, None] * np.eye(C)[None]
                rhs[:, ic] = np.where(act, cg, -nc)
            ncm = np.where(act, nc, 0.0)
            if kind == "h":
                t = tgt / (R_UNIVERSAL * T)
                J[:, -1, :E] = AnH
                J[:, -1, E] = sum_nH
                J[:, -1, ic] = np.where(act, cH, 0.0)
                J[:, -1, -1] = sums[:, 3] + sums[:, 4] + (ncm * (ccp - cH)).sum(-1) + t
                rhs[:, -1] = t - sum_nH - (ncm * cH).sum(-1) + sums[:, 5]
            else:
                J[:, -1, :E] = el[:, 3]
                J[:, -1, E] = sums[:, 3] + sum_n
                J[:, -1, ic] = np.where(act, cS, 0.0)
                J[:, -1, -1] = sums[:, 4] + sums[:, 5] + (ncm * ccp).sum(-1)
                rhs[:, -1] = tgt / R_UNIVERSAL - sums[:, 6] - (ncm * cS).sum(-1) + sums[:, 7]
            sol, singular = _linsolve(J, rhs)
            pi, dlnN, dnc, dlnT = sol[:, :E], sol[:, E], sol[:, ic], sol[:, -1]
            dlnn = _apply(pi, tab.A) - r + dlnN[:, None] + H * dlnT[:, None]
            lnx = lnn - lnN[:, None]
            major = lnx > _LN_TRACE
            big = np.maximum(5 * np.abs(dlnT), 5 * np.abs(dlnN))
            big = np.maximum(big, np.where(major & (dlnn > 0), dlnn, 0.0).max(-1))   # falling species fall freely
            lam = np.where(big > 2.0, 2.0 / big, 1.0)
            grow = dlnn - dlnN[:, None]
            trace_lim = np.where(~major & (grow > 0), (math.log(1e-4) - lnx) / grow, np.inf).min(-1)
            lam = np.minimum(lam, np.maximum(trace_lim, 1e-3))
            lam = np.minimum(lam, 1.0)
            new_lnN = lnN + lam * dlnN
            new_lnn = np.maximum(lnn + lam[:, None] * dlnn, new_lnN[:, None] + _LN_FLOOR)
            new_T = np.clip(T * np.exp(lam * dlnT), 100.0, 2.0e4)
            new_nc = np.where(act, nc + lam[:, None] * dnc, 0.0)
            finite = np.isfinite(new_lnn).all(-1) & np.isfinite(new_T) & np.isfinite(new_lnN) \
                & np.isfinite(new_nc).all(-1) & np.isfinite(pi).all(-1) & ~singular
            step = np.maximum(np.where(major, np.abs(dlnn), 0.0).max(-1), np.abs(dlnN))
            conv = finite & (lam == 1.0) & (step < _STEP_TOL) & (np.abs(dlnT) < _T_TOL) \
                & (np.abs(np.where(act, dnc, 0.0)).max(-1, initial=0.0) < _STEP_TOL * sum_n)
        bt.T[r_] = np.where(finite, new_T, T)
        bt.lnN[r_] = np.where(finite, new_lnN, lnN)
        bt.lnn[r_] = np.where(finite[:, None], new_lnn, lnn)
        bt.nc[r_] = np.where(finite[:, None], new_nc, nc)
        bt.pi[r_] = np.where(finite[:, None], pi, bt.pi[r_])
        for j in np.nonzero(~finite)[0]:
            bt.fail(r_[j], "the batch equilibrium solver met a singular or non-finite step")
            live[idx[j]] = False
        # condensed phases: drop a phase that ran out; add the most undersaturated one on convergence
        if C:
            gone = act & (bt.nc[r_] <= 0.0)
            for j, c in zip(*np.nonzero(gone)):
                bt.act[r_[j], c] = False
                bt.nc[r_[j], c] = 0.0
                conv[j] = False
            ready = np.nonzero(conv & finite)[0]
            if len(ready):
                added = _add_phases(bt, r_[ready], cg[ready] - _apply(pi[ready], tab.cA))
                conv[ready[added]] = False
        for j in np.nonzero(conv & finite)[0]:
            live[idx[j]] = False
            _final_checks(bt, r_[j])
    for j in np.nonzero(live)[0]:
        bt.fail(rows[j], f"the batch equilibrium solver did not converge in {_MAX_ITER} steps")


def _linsolve(J, rhs):
    """Solve each row's system (LAPACK per matrix); singular rows come back flagged."""
    n = len(J)
    singular = np.zeros(n, bool)
    try:
        return np.linalg.solve(J, rhs[:, :, None])[:, :, 0], singular
    except np.linalg.LinAlgError:
        out = np.zeros_like(rhs)
        for i in range(n):
            try:
                out[i] = np.linalg.solve(J[i:i + 1], rhs[i:i + 1, :, None])[0, :, 0]
            except np.linalg.LinAlgError:
                singular[i] = True
        return out, singular


def _add_phases(bt: Batch, rows, drive):
    """Activate on each row the most undersaturated condensed candidate valid at its T.

    ``drive`` (len(rows), C) is mu0_c/RT - a_c . pi; negative means the gas is
    supersaturated in that phase. Of the phases of one substance only the
    most stable one valid at T counts. Returns a boolean array: row got a phase.
    """
    tab = bt.tab
    T = bt.T[rows][:, None]
    valid = (tab.cond_tmin[None] <= T) & (T <= tab.cond_tmax[None])
    drive = np.where(valid, drive, np.inf)
    taken = np.zeros_like(valid)
    for f in set(tab.cond_formula):
        same = np.array([cf == f for cf in tab.cond_formula])
        if same.sum() > 1:
            # only the most stable valid phase of this substance is a candidate
            d_same = np.where(same[None], drive, np.inf)
            best = d_same.argmin(-1)
            mask = same[None] & (np.arange(len(same))[None] != best[:, None])
            drive = np.where(mask, np.inf, drive)
        taken |= same[None] & bt.act[rows].any(-1, keepdims=True) & (bt.act[rows] & same[None]).any(-1, keepdims=True)
    drive = np.where(taken | bt.act[rows], np.inf, drive)
    which = drive.argmin(-1)
    add = drive[np.arange(len(rows)), which] < -_COND_TOL
    for j in np.nonzero(add)[0]:
        r = rows[j]
        bt.act[r, which[j]] = True
        bt.nc[r, which[j]] = 1e-3 * math.exp(bt.lnN[r])
    return add


def _final_checks(bt: Batch, i):
    """A converged row must lie inside the data and keep its phases inside their ranges."""
    tab = bt.tab
    T = bt.T[i]
    if not (tab.t_min <= T <= tab.t_max):
        bt.fail(i, f"temperature {T:.1f} K outside the gas data range")
        return
    for c in np.nonzero(bt.act[i])[0]:
        if not (tab.cond_tmin[c] <= T <= tab.cond_tmax[c]):
            bt.fail(i, f"{tab.cond_names[c]} outside its data range (a phase change)")
            return
