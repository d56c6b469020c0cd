"""Moving batch rows along their isentrope: equilibrium (shifting) or frozen composition.

The steps the batch nozzle (:mod:`.batch`) takes from the chamber to the throat and on to
each exit, row by row (rows never mix), and the element-balance check of a solved batch.
"""

from __future__ import annotations

import math

import numpy as np

from perfchain.constants import R_UNIVERSAL
from perfchain.thermo.batch_state import Batch, derivatives, sp
from perfchain.thermo.phases import crossing, swap_phase
from perfchain.thermo.predictor import hermite_rows, move_rows
from perfchain.thermo.pruning import ROW_KEEP

_LN_KEEP = math.log(ROW_KEEP)

__all__ = ["snapshot", "isentropic_step", "on_plateau", "frozen_derivatives", "frozen_step", "check_elements"]


def on_plateau(tab, act) -> np.ndarray:
    """Rows holding two phases of one condensed substance (a melting plateau): (n,) bool.

    Examples
    --------
    Two phases of substance 3 present on row 0, one on row 1:

    >>> from types import SimpleNamespace
    >>> tab = SimpleNamespace(formula_id=np.array([3, 3]))
    >>> on_plateau(tab, np.array([[True, True], [False, True]])).tolist()
    [True, False]
    """
    ids = np.asarray(tab.formula_id)
    out = np.zeros(len(act), bool)
    for f in np.unique(ids):
        if (ids == f).sum() > 1:
            out |= act[:, ids == f].sum(1) > 1
    return out


def _apply(pi, A):
    """sum_e pi[n, e] A[k, e] -> (n, K), in a fixed order of elements."""
    if A.shape[1] == 0:
        return np.zeros((len(pi), A.shape[0]))
    out = pi[:, 0:1] * A[:, 0]
    for e in range(1, A.shape[1]):
        out = out + pi[:, e:e + 1] * A[:, e]
    return out


def _rowdot(x, MT):
    """sum_k x[n, k] MT[e, k] -> (n, E), reduced along the contiguous last axis, row by row."""
    return (x[:, None, :] * MT[None, :, :]).sum(-1)


def _move(bt: Batch, rows, p_new, d):
    """Set new pressures on rows with a first-order isentropic predictor (warm start; see
    :func:`perfchain.thermo.predictor.move_rows`)."""
    if not len(rows):
        return
    move_rows(rows, p_new, bt.T, bt.p, bt.lnN, bt.lnn, bt.nc, bt.act, d["dlnT_dlnp_s"], d["dlnN_s"], d["dlnn_s"],
              d["dnc_s"])
    bt.p[rows] = p_new


def snapshot(bt: Batch, d) -> dict:
    """A copy of every row's state and isentropic derivatives, for :func:`isentropic_step`'s ``far``."""
    out = {k: getattr(bt, k).copy() for k in ("T", "p", "lnN", "lnn", "nc", "act")}
    out.update({k: d[k].copy() for k in ("dlnT_dlnp_s", "dlnN_s", "dlnn_s", "dnc_s") if k in d})
    return out


def _hermite(bt: Batch, rows, p_new, d, far):
    """Rows predicted to second order from their state and the one in ``far`` (see
    :func:`perfchain.thermo.predictor.hermite_rows`): (len(rows),) bool."""
    done = np.zeros(len(rows), bool)
    if far is None or "dlnn_s" not in far or not len(rows):
        return done
    hermite_rows(rows, p_new, _LN_KEEP, bt.tab.formula_id, bt.T, bt.p, bt.lnN, bt.lnn, bt.nc, bt.act,
                 d["dlnT_dlnp_s"], d["dlnN_s"], d["dlnn_s"], d["dnc_s"], far["T"], far["p"], far["lnN"],
                 far["lnn"], far["nc"], far["act"], far["dlnT_dlnp_s"], far["dlnN_s"], far["dlnn_s"], far["dnc_s"],
                 done)
    return done


def isentropic_step(bt: Batch, rows, p_new, d, s, props, far=None):
    """Move rows to new pressures p_new [Pa] along their equilibrium isentrope s [J/(kg K)].

    Each row starts from its state moved along its analytic isentropic derivatives ``d``
    (a first-order predictor), or, where ``far`` (a :func:`snapshot`) holds another solved
    state of the row on the same isentrope, along the cubic through both states (see
    :mod:`.predictor`); then the SP equilibrium is solved. ``props`` and ``d`` hold every row;
    only ``rows`` are recomputed (in place).

    Returns
    -------
    tuple of dict
        (properties, derivatives) as :meth:`Batch.props` and :func:`derivatives`.

    Examples
    --------
    Argon (cp = 5/2 R) from 3000 K and 10 bar to 1 bar: T = 3000 K x 0.1^(2/5) = 1194.3 K
    (ideal-gas isentrope, closed form):

    >>> from perfchain.thermo.batch_state import Batch, derivatives
    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.thermo.tables import tables_for
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> ar = get_ingredient("Ar")
    >>> bt = Batch(tables_for(EquilibriumSystem(ar.elements)), [[ar.elements["Ar"]]], [3000.0], [1e6])
    >>> bt.lnn[:], bt.lnN[:] = np.log(ar.elements["Ar"]), np.log(ar.elements["Ar"])
    >>> props = bt.props()
    >>> props, d = isentropic_step(bt, np.array([0]), np.array([1e5]), derivatives(bt, props),
    ...                            props["s"].copy(), props)
    >>> bool(bt.ok[0]), round(float(bt.T[0]), 1)
    (True, 1194.3)
    """
    rows = np.asarray(rows, np.int64)
    p_new = np.asarray(p_new, float)
    done = _hermite(bt, rows, p_new, d, far)
    _move(bt, rows[~done], p_new[~done], d)
    bt.p[rows] = p_new
    sp(bt, rows, s)
    props = bt.props(rows, props)
    return props, derivatives(bt, props, rows, d)


def frozen_derivatives(bt: Batch, props) -> dict:
    """The frozen-flow counterpart of :func:`derivatives` (gas composition fixed).

    Condensed phases count as inert particles in velocity and thermal equilibrium (no slip):
    their cp is in cp_f, and n is the gas amount per kilogram of mixture, so the sound speed is
    sqrt(gamma_f p / rho) of the two-phase mixture (Sutton & Biblarz ch. 3; from memory).
    On a melting plateau (:func:`frozen_step`) T is held at the transition while the melt
    fraction takes up the entropy, so p / rho = n R T does not change along the isentrope:
    there the isentropic exponent is 1, the sound speed sqrt(n R T) and dlnT/dlnp = 0 (the
    general path's central difference of p(rho) along the frozen isentrope gives the same).

    Returns
    -------
    dict
        ``cp`` (frozen) [J/(kg K)], ``sound_speed`` sqrt(gamma_f n R T) [m/s], ``gamma_s``
        (gamma_f) [-] and ``dlnT_dlnp_s`` = n R / cp_f along the frozen isentrope [-].

    Examples
    --------
    Argon: gamma_f = 5/3 and dlnT/dlnp = 2/5 along the isentrope (closed forms):

    >>> from perfchain.thermo.batch_state import Batch, derivatives
    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.thermo.tables import tables_for
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> ar = get_ingredient("Ar")
    >>> bt = Batch(tables_for(EquilibriumSystem(ar.elements)), [[ar.elements["Ar"]]], [3000.0], [1e6])
    >>> bt.lnn[:], bt.lnN[:] = np.log(ar.elements["Ar"]), np.log(ar.elements["Ar"])
    >>> d = frozen_derivatives(bt, bt.props())
    >>> round(float(d["gamma_s"][0]), 9), round(float(d["dlnT_dlnp_s"][0]), 9)
    (1.666666667, 0.4)
    """
    with np.errstate(all="ignore"):
        cpf, cvf, ng = props["cp_frozen"], props["cv_frozen"], props["n_gas"]
        gam = cpf / cvf
        k = ng * R_UNIVERSAL / cpf
        flat = on_plateau(bt.tab, bt.act) if bt.act.shape[1] else None
        if flat is not None and flat.any():
            gam, k = np.where(flat, 1.0, gam), np.where(flat, 0.0, k)
        return {"cp": cpf, "sound_speed": np.sqrt(gam * ng * R_UNIVERSAL * bt.T), "gamma_s": gam,
                "dlnT_dlnp_s": k}


def frozen_step(bt: Batch, rows, p_new, d, s, props, far=None):
    """Move rows to new pressures p_new [Pa] at their entropy s [J/(kg K)], composition fixed.

    Newton on ln T with (ds/dlnT)_p = cp_frozen, from the guess along ``d``. A condensed
    substance that crosses its transition temperature changes phase, not amount; if the target
    entropy lies in the jump of s(T) there, the row sits on the melting plateau: T is the
    transition temperature and the lever rule on s splits the substance between its two
    phases (as the general path does, :meth:`~perfchain.thermo.equilibrium.EquilibriumSystem.frozen_sp`).
    ``props`` holds every row; only ``rows`` are recomputed (in place). ``far`` is not used
    (the signature of :func:`isentropic_step`).

    Returns
    -------
    tuple of dict
        (properties, :func:`frozen_derivatives`).

    Examples
    --------
    Argon from 3000 K and 10 bar to 1 bar: T = 3000 K x 0.1^(2/5) = 1194.3 K (closed form):

    >>> from perfchain.thermo.batch_state import Batch, derivatives
    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.thermo.tables import tables_for
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> ar = get_ingredient("Ar")
    >>> bt = Batch(tables_for(EquilibriumSystem(ar.elements)), [[ar.elements["Ar"]]], [3000.0], [1e6])
    >>> bt.lnn[:], bt.lnN[:] = np.log(ar.elements["Ar"]), np.log(ar.elements["Ar"])
    >>> props = bt.props()
    >>> props, d = frozen_step(bt, np.array([0]), np.array([1e5]), frozen_derivatives(bt, props),
    ...                        props["s"].copy(), props)
    >>> bool(bt.ok[0]), round(float(bt.T[0]), 1)
    (True, 1194.3)
    """
    rows = np.asarray(rows, np.int64)
    if len(rows):
        with np.errstate(all="ignore"):
            guess = bt.T[rows] * np.exp(np.clip(d["dlnT_dlnp_s"][rows] * np.log(p_new / bt.p[rows]), -1.5, 1.5))
        bt.T[rows] = np.where(np.isfinite(guess), guess, bt.T[rows])
        bt.p[rows] = p_new
        if bt.act.shape[1]:
            _merge_plateau(bt, rows[on_plateau(bt.tab, bt.act[rows])])
    target = dict(zip(rows.tolist(), np.asarray(s, float).tolist()))
    props = _frozen_newton(bt, rows, target, props)
    # a frozen condensed substance crossing its melting point changes phase, not composition
    tab = bt.tab
    swap = [i for i in rows if bt.ok[i] and bt.act[i].any()
            and swap_phase(i, bt.T[i], tab.cond_tmin, tab.cond_tmax, tab.formula_id, bt.act, bt.nc)]
    if swap:
        props = _frozen_newton(bt, np.array(swap, np.int64), target, props)
        flat = [i for i in swap if bt.ok[i] and swap_phase(i, bt.T[i], tab.cond_tmin, tab.cond_tmax,
                                                             tab.formula_id, bt.act.copy(), bt.nc.copy())]
        if flat:     # back across the transition just crossed: the plateau
            props = _frozen_plateau(bt, np.array(flat, np.int64), target, props)
    for i in np.asarray(rows, np.int64):
        if bt.ok[i] and not (bt.tab.t_min <= bt.T[i] <= bt.tab.t_max):
            bt.fail(i, "frozen state outside the gas data range")
    return props, frozen_derivatives(bt, props)


def _merge_plateau(bt: Batch, rows):
    """Rows on a plateau start the frozen Newton with each substance in one phase (the larger)."""
    ids = bt.tab.formula_id
    for i in rows:
        for c in np.nonzero(bt.act[i])[0]:
            for c2 in np.nonzero(bt.act[i] & (ids == ids[c]))[0]:
                if c2 != c and bt.act[i, c] and (bt.nc[i, c2], c2) < (bt.nc[i, c], c):
                    bt.nc[i, c] += bt.nc[i, c2]
                    bt.nc[i, c2] = 0.0
                    bt.act[i, c2] = False


def _frozen_plateau(bt: Batch, rows, target, props):
    """Frozen rows whose entropy target lies in the jump of s(T) at a transition temperature:
    T held there, the substance split between its two phases by the lever rule on s."""
    tab = bt.tab
    lower, upper, amount, flat = [], [], [], []
    for i in rows:
        c, c2, tb = crossing(i, bt.T[i], tab.cond_tmin, tab.cond_tmax, tab.formula_id, bt.act)
        if c < 0:
            bt.fail(i, "frozen state on a phase change not found by the batch solver")
            continue
        lo, hi = (c, c2) if tab.cond_tmax[c] == tb else (c2, c)
        flat.append(i)
        lower.append(lo)
        upper.append(hi)
        amount.append(bt.nc[i, c])
        bt.T[i] = tb
    if not flat:
        return props
    flat, lower, upper, n = (np.array(v) for v in (flat, lower, upper, amount))
    s = {}
    for side, (on, off) in (("lo", (lower, upper)), ("hi", (upper, lower))):
        bt.act[flat, on], bt.act[flat, off] = True, False
        bt.nc[flat, on], bt.nc[flat, off] = n, 0.0
        s[side] = bt.props(flat, props)["s"][flat].copy()
    with np.errstate(all="ignore"):
        w = (s["hi"] - np.array([target[i] for i in flat])) / (s["hi"] - s["lo"])   # fraction in the lower phase
    bt.act[flat, lower] = True
    bt.nc[flat, lower], bt.nc[flat, upper] = w * n, (1.0 - w) * n
    for i in flat[~((w >= 0.0) & (w <= 1.0))]:
        bt.fail(i, "frozen state on a phase change not found by the batch solver")
    return bt.props(flat, props)


def _frozen_newton(bt: Batch, live, target, props):
    """Newton on ln T with (ds/dlnT)_p = cp_frozen for the rows ``live`` to their ``target``
    entropies (row -> [J/(kg K)]); rows that do not settle are handed back."""
    for it in range(60):
        if not len(live):
            break
        props = bt.props(live, props)
        with np.errstate(all="ignore"):
            dlnT = (np.array([target[i] for i in live]) - props["s"][live]) / props["cp_frozen"][live]
        done = np.abs(dlnT) < 1e-13
        bad = ~np.isfinite(dlnT)
        for i in live[bad]:
            bt.fail(i, "frozen state not found by the batch solver")
        move = ~done & ~bad
        bt.T[live[move]] = bt.T[live[move]] * np.exp(np.clip(dlnT[move], -0.5, 0.5))
        live = live[move]
    for i in live:
        bt.fail(i, "frozen state not found by the batch solver")
    return props


def check_elements(bt: Batch, props, tol=1e-9):
    """Hand back the rows whose element totals are off by more than ``tol`` (relative) [-].

    Examples
    --------
    Argon at 0.025 kmol/kg checked against totals 1 % higher: handed back.

    >>> from perfchain.thermo.batch_state import Batch, derivatives
    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.thermo.tables import tables_for
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> ar = get_ingredient("Ar")
    >>> bt = Batch(tables_for(EquilibriumSystem(ar.elements)), [[ar.elements["Ar"]]], [3000.0], [1e6])
    >>> bt.lnn[:], bt.lnN[:] = np.log(ar.elements["Ar"]), np.log(ar.elements["Ar"])
    >>> check_elements(bt, bt.props())
    >>> bool(bt.ok[0])
    True
    >>> bt.b *= 1.01
    >>> check_elements(bt, bt.props())
    >>> bool(bt.ok[0]), bt.why[0]
    (False, 'element balance off by 9.9e-03 in the batch solver')
    """
    tab = bt.tab
    with np.errstate(all="ignore"):
        got = _rowdot(props["nj"], tab.AT) + _apply(np.where(bt.act, bt.nc, 0.0), tab.cAT)
        err = np.abs(got - bt.b).max(-1) / np.abs(bt.b).max(-1)
    for i in np.nonzero(~(err <= tol) & bt.ok)[0]:
        bt.fail(i, f"element balance off by {err[i]:.1e} in the batch solver")
