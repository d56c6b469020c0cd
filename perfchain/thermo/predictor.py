"""Second-order starts of the batch isentropic steps: a row's state at a new pressure from two of its solved states.

A batch row moved along its isentrope (:func:`perfchain.thermo.isentrope.isentropic_step`)
starts its Newton from a predicted state. With one solved state the prediction is first
order (its isentropic derivatives). Where the row has a second solved state on the same
isentrope (its throat, or the state before the last step of a search), ln T, ln N, each
ln n_j and the condensed amounts follow the cubic through both values and both slopes in
x = ln p (Hermite interpolation; Burden & Faires, Numerical Analysis, sec. 3.4; from memory),
which starts the Newton much nearer its solution. Which gas species the Newton starts
with (those above :data:`perfchain.thermo.pruning.ROW_KEEP`) stays what the first-order
prediction would give, so the solved state is the same to the last digits or so.

Compiled by numba (or plain Python under ``PERFCHAIN_NO_JIT=1``, see :mod:`.jit`); each row
is predicted from its own states only.
"""

from __future__ import annotations

import math

import numpy as np

from perfchain.thermo.jit import exp, jit, log

__all__ = ["cubic", "move_rows", "hermite_rows"]


@jit
def cubic(ya, ma, yb, mb, ih, dx):
    """The cubic with value ya and slope ma at 0 and value yb and slope mb at h = 1 / ih, at dx.

    Examples
    --------
    y = x^2 (value 0, slope 0 at 0; value 1, slope 2 at 1) is its own cubic (closed form):

    >>> cubic(0.0, 0.0, 1.0, 2.0, 1.0, 0.5), cubic(0.0, 0.0, 1.0, 2.0, 1.0, -1.0)
    (0.25, 1.0)
    """
    s = (yb - ya) * ih
    c2 = (3.0 * s - 2.0 * ma - mb) * ih
    c3 = (ma + mb - 2.0 * s) * (ih * ih)
    return ya + dx * (ma + dx * (c2 + dx * c3))


@jit
def hermite_rows(rows, p_new, ln_keep, formula, T, p, lnN, lnn, nc, act, k, dN, dn, dnc,
                 fT, fp, flnN, flnn, fnc, fact, fk, fdN, fdn, fdnc, done):
    """Predict the listed rows at ``p_new`` from their state and a second one (``f...``), in place.

    A row is predicted (``done[q]`` True; T, ln N, ln n and nc written, p left to the caller)
    where the second state lies at another pressure, the target no further beyond the row's
    own state than the two are apart, the same condensed phases are present in both and none
    on a melting plateau, and the prediction is finite with ln T at most 0.5 outside the two
    states' values. A gas species in the Newton's starting set of the first-order prediction
    (above ``ln_keep``, a ln mole fraction) follows the cubic where it is above ``ln_keep`` in
    both states; every other one keeps the first-order mole fraction.

    Parameters
    ----------
    rows : (m,) int;  p_new : (m,) new pressures [Pa];  ln_keep : float [-]
    formula : (C,) int, an id per condensed substance
    T, p, lnN, lnn, nc, act : the batch's arrays (its rows' present states)
    k, dN, dn, dnc : d ln T, d ln N, d ln n_j (n, K) and d nc (n, C) per d ln p along the isentrope
    fT, fp, flnN, flnn, fnc, fact, fk, fdN, fdn, fdnc : the same of the second states
    done : (m,) bool, written

    Examples
    --------
    Argon from 3000 K and 10 bar, a second state at 1 bar (T = 3000 x 0.1^0.4 K, same slope
    0.4): every curve is a straight line, and 3 bar gives T = 3000 x 0.3^0.4 K (closed form):

    >>> one = lambda v: np.array([v])
    >>> T, p, lnN, lnn = one(3000.0), one(1e6), one(-3.0), np.full((1, 1), -3.0)
    >>> nc, act, dnc = np.zeros((1, 0)), np.zeros((1, 0), bool), np.zeros((1, 0))
    >>> done = np.zeros(1, bool)
    >>> hermite_rows(np.array([0]), one(3e5), math.log(1e-14), np.zeros(0, np.int64), T, p, lnN, lnn,
    ...              nc, act, one(0.4), one(0.0), np.zeros((1, 1)), dnc, one(3000.0 * 0.1 ** 0.4), one(1e5),
    ...              one(-3.0), np.full((1, 1), -3.0), nc, act, one(0.4), one(0.0), np.zeros((1, 1)), dnc, done)
    >>> bool(done[0]), round(float(T[0] / (3000.0 * 0.3 ** 0.4)), 12)
    (True, 1.0)
    """
    K = lnn.shape[1]
    C = nc.shape[1]
    new_lnn = np.empty(K)
    new_nc = np.empty(C)
    for q in range(rows.shape[0]):
        i = rows[q]
        done[q] = False
        xa = log(p[i])
        h = log(fp[i]) - xa
        dx = log(p_new[q]) - xa
        if not (math.isfinite(h) and math.isfinite(dx) and h != 0.0):
            continue
        if not (-1.0 <= dx / h <= 1.0):
            continue
        same = True
        for c in range(C):
            if act[i, c] != fact[i, c]:
                same = False
            elif act[i, c]:
                for c2 in range(c + 1, C):
                    if act[i, c2] and formula[c2] == formula[c]:
                        same = False
        if not same:
            continue
        # the first-order prediction's gas amount and step (as perfchain.thermo.isentrope._move)
        kd = abs(k[i] * dx)
        dxl = dx * min(1.0, 1.0 / max(kd, 1e-300))
        lnN_lin = lnN[i] + dN[i] * dxl
        ih = 1.0 / h
        ta, tb = log(T[i]), log(fT[i])
        lnT = cubic(ta, k[i], tb, fk[i], ih, dx)
        new_lnN = cubic(lnN[i], dN[i], flnN[i], fdN[i], ih, dx)
        good = math.isfinite(lnT) and math.isfinite(new_lnN) and min(ta, tb) - 0.5 <= lnT <= max(ta, tb) + 0.5
        a_keep, b_keep = lnN[i] + ln_keep, flnN[i] + ln_keep
        total = 0.0
        for j in range(K):
            lin = min(lnn[i, j] + dn[i, j] * dxl, lnN_lin) - lnN_lin      # ln mole fraction, first order
            v = new_lnN + lin
            if lin > ln_keep and lnn[i, j] > a_keep and flnn[i, j] > b_keep:
                v = min(cubic(lnn[i, j], dn[i, j], flnn[i, j], fdn[i, j], ih, dx), new_lnN)
                if not v - new_lnN > ln_keep:       # stays in the starting set
                    v = new_lnN + ln_keep + 1e-6
            total += v
            new_lnn[j] = v
        for c in range(C):
            new_nc[c] = max(cubic(nc[i, c], dnc[i, c], fnc[i, c], fdnc[i, c], ih, dx), 0.0) if act[i, c] else 0.0
            total += new_nc[c]
        if good and math.isfinite(total):
            _put(i, exp(lnT), new_lnN, new_lnn, new_nc, T, lnN, lnn, nc)
            done[q] = True


@jit
def move_rows(rows, p_new, T, p, lnN, lnn, nc, act, k, dN, dn, dnc):
    """The first-order start: the listed rows moved to ``p_new`` along their slopes, in place.

    T, ln N, ln n_j and the condensed amounts move along their isentropic derivatives (as
    :func:`hermite_rows`) over x = ln(p_new / p), the step cut so abs(d ln T) <= 1; ln n_j is
    kept at most ln N and the amounts at least 0. A row whose prediction is not finite keeps
    its state. The pressures are left to the caller.

    Examples
    --------
    Argon from 3000 K and 10 bar to 1 bar along d ln T / d ln p = 0.4: T = 3000 x 0.1^0.4 K
    (closed form):

    >>> one = lambda v: np.array([v])
    >>> T, lnN, lnn = one(3000.0), one(-3.0), np.full((1, 1), -3.0)
    >>> nc, act = np.zeros((1, 0)), np.zeros((1, 0), bool)
    >>> move_rows(np.array([0]), one(1e5), T, one(1e6), lnN, lnn, nc, act, one(0.4), one(0.0),
    ...           np.zeros((1, 1)), np.zeros((1, 0)))
    >>> round(float(T[0] / (3000.0 * 0.1 ** 0.4)), 12)
    1.0
    """
    new_lnn, new_nc = np.empty(lnn.shape[1]), np.empty(nc.shape[1])     # a row's prediction
    for q in range(rows.shape[0]):
        i = rows[q]
        dx = log(p_new[q] / p[i])
        dx = dx * min(1.0, 1.0 / max(abs(k[i] * dx), 1e-300))
        new_T = T[i] * exp(k[i] * dx)
        new_lnN = lnN[i] + dN[i] * dx
        total = new_T + new_lnN
        for j in range(new_lnn.shape[0]):
            v = lnn[i, j] + dn[i, j] * dx
            total += v
            new_lnn[j] = min(v, new_lnN)
        for c in range(new_nc.shape[0]):
            v = nc[i, c] + dnc[i, c] * dx
            if act[i, c]:
                total += v
            new_nc[c] = max(v, 0.0) if act[i, c] else 0.0
        if math.isfinite(total):
            _put(i, new_T, new_lnN, new_lnn, new_nc, T, lnN, lnn, nc)


@jit
def _put(i, new_T, new_lnN, new_lnn, new_nc, T, lnN, lnn, nc):
    """Write a row's prediction into the batch arrays (row i)."""
    T[i] = new_T
    lnN[i] = new_lnN
    for j in range(new_lnn.shape[0]):
        lnn[i, j] = new_lnn[j]
    for c in range(new_nc.shape[0]):
        nc[i, c] = new_nc[c]
