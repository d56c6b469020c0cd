"""Batch throats near a melting plateau: the sonic point of highest rho u, row by row.

Near a condensed product's phase change (:func:`.flow_models.near_transition`) rho u along the
isentrope can have two humps, one on the melting plateau (T held, the sound speed lower) and
one off it, each with a sonic point; the throat is the higher hump. The general path
(:mod:`perfchain.nozzle.expansion`) scans p/p0 = 0.95 ... 0.2 in 40 steps of ln p, solves each
bracket where the flow turns from subsonic to supersonic and keeps the sonic point of highest
rho u. This module does the same on batch rows: the scan is one continuation along each row's
isentrope, every bracket is refined on its own row (rows never mix), and where rho u peaks at
the plateau's edge (a kink: u^2 - a^2 jumps through zero) the refinement closes on the edge, as
Brent's method does on the general path.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from perfchain.thermo.batch_state import Batch, derivatives
from perfchain.thermo.isentrope import frozen_derivatives, frozen_step, isentropic_step

__all__ = ["highest_sonic_points"]

_FIELDS = ("b", "T", "p", "lnN", "lnn", "nc", "act", "pi", "ok")
#: the general path's scan: p/p0 = 0.95 ... 0.2 in 40 steps of ln p
GRID = np.linspace(np.log(0.95), np.log(0.2), 41)
#: how far below its transition the liquid branch may be followed while its edge is sought [K]
EDGE_REACH = 20.0
#: the derivatives that go with each isentropic step
_DERIVATIVES = {isentropic_step: derivatives, frozen_step: frozen_derivatives}


def _stack(parts):
    """One batch of the rows of several (batch, rows) pairs, in order (copies)."""
    new = Batch.__new__(Batch)
    new.tab = parts[0][0].tab
    for k in _FIELDS:
        setattr(new, k, np.concatenate([getattr(bt, k)[r] for bt, r in parts]))
    new.iters = np.zeros(len(new.T), np.int64)
    new.why = {}
    return new


def _mach_gap(bt, props, d, h0):
    """(u^2 - a^2) / a^2 [-] and rho u [kg/(m^2 s)] of every row."""
    with np.errstate(all="ignore"):
        u2 = 2.0 * (h0 - props["h"])
        a2 = d["sound_speed"] ** 2
        return (u2 - a2) / a2, props["density"] * np.sqrt(np.maximum(u2, 0.0))


def highest_sonic_points(ch: Batch, ch_d, th: Batch, props, d, rows, p0, s0, h0, step):
    """Move throat rows to their sonic point of highest rho u (in place).

    ``ch``, ``ch_d``: the chamber batch and its derivatives (where each scan starts); ``th``,
    ``props``, ``d``: the throat batch with the first sonic point it found, its properties and
    derivatives (updated in place on ``rows``; a row handed back for want of a sonic point
    takes the scan's, if that lies near a transition too); ``p0``, ``s0``, ``h0``: chamber pressure [Pa],
    entropy [J/(kg K)] and enthalpy [J/kg] of every row; ``step``: the isentropic step of the
    flow model before the throat. A row whose scan leaves the data is handed back.

    Examples
    --------
    Argon has no phase change: its one sonic point, p*/p0 = (3/4)^(5/2) = 0.4871 (gamma = 5/3,
    closed form), is kept:

    >>> from perfchain.constants import R_UNIVERSAL
    >>> from perfchain.thermo.batch import nozzle, tables_for
    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.thermo.isentrope import isentropic_step
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> ar = get_ingredient("Ar")
    >>> tab = tables_for(EquilibriumSystem(ar.elements))
    >>> nz = nozzle(tab, [[ar.elements["Ar"]]], np.array([2.5 * R_UNIVERSAL / 39.948 * 2701.85]),
    ...             np.array([1e6]), np.array([0]), area_ratio=np.array([4.0]))
    >>> th = nz.throat
    >>> highest_sonic_points(nz.chamber, nz.chamber_deriv, th, nz.throat_props, nz.throat_deriv,
    ...                      np.array([0]), np.array([1e6]), nz.chamber_props["s"],
    ...                      nz.chamber_props["h"], isentropic_step)
    >>> bool(th.ok[0]), round(float(th.p[0] / 1e6), 4)
    (True, 0.4871)
    """
    rows = np.asarray(rows, np.int64)
    if not len(rows):
        return
    m = len(rows)
    sc = _stack([(ch, rows)])
    sp_ = sc.props()
    sd = {k: v[rows].copy() for k, v in ch_d.items()}
    s0r, h0r, p0r = s0[rows], h0[rows], p0[rows]
    snaps, gaps = [], []
    for x in GRID:                       # one continuation down each row's isentrope
        live = np.nonzero(sc.ok)[0]
        sp_, sd = step(sc, live, p0r[live] * np.exp(x), sd, s0r[live], sp_)
        gaps.append(np.where(sc.ok, _mach_gap(sc, sp_, sd, h0r)[0], np.nan))
        snaps.append((_stack([(sc, np.arange(m))]), {k: v.copy() for k, v in sd.items()}))
    for j in np.nonzero(~sc.ok & th.ok[rows])[0]:
        th.fail(rows[j], "sonic throat near a melting plateau: " + sc.why.get(int(j), "scan failed"))
    f = np.array(gaps)                   # (41, m)
    ka, ja = np.nonzero((f[:-1] < 0) & (f[1:] > 0))   # subsonic above, supersonic below
    keep = sc.ok[ja]
    ka, ja = ka[keep], ja[keep]
    if len(ja):
        _refine_and_pick(th, props, d, rows, ja, ka, snaps, f, p0r, s0r, h0r, step)


def _refine_and_pick(th, props, d, rows, ja, ka, snaps, f, p0r, s0r, h0r, step):
    """Refine every bracket (grid k, k + 1) of scan row j to its sonic point and move each
    throat row there where rho u beats the sonic point it has."""
    groups = [np.nonzero(ka == k)[0] for k in range(len(GRID))]
    sel = np.concatenate(groups)
    rb = _stack([(snaps[k][0], ja[g]) for k, g in enumerate(groups)])
    rd = {key: np.concatenate([snaps[k][1][key][ja[g]] for k, g in enumerate(groups)]) for key in snaps[0][1]}
    ja, ka = ja[sel], ka[sel]
    rp = rb.props()
    xa, xb = GRID[ka].copy(), GRID[ka + 1].copy()           # f(xa) < 0 < f(xb)
    fa, fb = f[ka, ja], f[ka + 1, ja]
    s, h, p0 = s0r[ja], h0r[ja], p0r[ja]
    live = np.ones(len(ja), bool)
    for it in range(200):
        act = np.nonzero(live & rb.ok)[0]
        if not len(act):
            break
        with np.errstate(all="ignore"):
            sec = xa - fa * (xb - xa) / (fb - fa)
        # regula falsi inside the bracket, bisection every third step (a kink stalls the secant)
        xn = np.where((it % 3 == 2) | ~np.isfinite(sec) | (sec <= np.minimum(xa, xb))
                      | (sec >= np.maximum(xa, xb)), 0.5 * (xa + xb), sec)
        rp, rd = step(rb, act, p0[act] * np.exp(xn[act]), rd, s[act], rp)
        g = _mach_gap(rb, rp, rd, h)[0]
        lower, upper = act[g[act] < 0], act[g[act] >= 0]
        xa[lower], fa[lower] = xn[lower], g[lower]
        xb[upper], fb[upper] = xn[upper], g[upper]
        live[act[(np.abs(g[act]) < 1e-12) | (np.abs(xa - xb)[act] < 1e-12)]] = False
    live &= rb.ok
    good = ~live & rb.ok
    if step in _DERIVATIVES and not good.all():
        good |= _plateau_edges(rb, rp, rd, ~good, ja, ka, snaps, p0r, s0r, h0r, step)
    flux = _mach_gap(rb, rp, rd, h)[1]
    _pick(th, props, d, rows, ja, rb, rp, rd, flux, good, h0r)


def _edge_of(tab, T_up, act_up, act_down):
    """(upper phase, lower phase, transition [K]) of a substance whose upper phase alone is
    present above its transition at the bracket's subsonic end and whose lower phase is present
    at its supersonic end; None if there is none."""
    for c in np.nonzero(act_up)[0]:
        tb = tab.cond_tmin[c]
        if not T_up > tb:
            continue
        for c2 in np.nonzero((tab.formula_id == tab.formula_id[c]) & act_down & ~act_up)[0]:
            if tab.cond_tmax[c2] == tb and tab.cond_tmin[c2] < tb - EDGE_REACH:
                return int(c), int(c2), float(tb)
    return None


def _plateau_edges(rb, rp, rd, bad, ja, ka, snaps, p0r, s0r, h0r, step):
    """Settle the brackets (rows of ``rb``, ``rp``, ``rd``) the refinement could not, where the
    isentrope enters a melting plateau inside them: each is moved to the state where the upper
    phase alone reaches its transition temperature (s = s0), if that state is a kink of rho u
    (the plateau's sound speed below u, the upper phase's above) inside the bracket. Returns
    the brackets settled."""
    tab = rb.tab
    groups = {}
    for q in np.nonzero(bad)[0]:
        up, down = snaps[ka[q]][0], snaps[ka[q] + 1][0]
        if up.ok[ja[q]] and down.ok[ja[q]]:
            e = _edge_of(tab, up.T[ja[q]], up.act[ja[q]], down.act[ja[q]])
            if e is not None:
                groups.setdefault(e, []).append(q)
    settled = np.zeros(len(bad), bool)
    for (c, c2, tb), qs in groups.items():
        qs = np.array(qs, np.int64)
        eb = _stack([(snaps[ka[q]][0], [ja[q]]) for q in qs])
        ed = {key: np.concatenate([snaps[ka[q]][1][key][[ja[q]]] for q in qs]) for key in rd}
        done, ed = _edge_states(eb, ed, c, c2, tb, p0r[ja[qs]], s0r[ja[qs]], h0r[ja[qs]], step)
        with np.errstate(all="ignore"):
            x = np.log(eb.p / p0r[ja[qs]])
        done &= (GRID[ka[qs] + 1] <= x) & (x <= GRID[ka[qs]])        # inside its own bracket
        ep = eb.props()
        for e, q in zip(np.nonzero(done)[0], qs[done]):
            for k in _FIELDS:
                getattr(rb, k)[q] = getattr(eb, k)[e]
            rp["_out"][q], rp["nj"][q] = ep["_out"][e], ep["nj"][e]
            for key in rd:
                rd[key][q] = ed[key][e]
            rb.why.pop(int(q), None)
            settled[q] = True
    return settled


def _edge_states(eb: Batch, ed, c, c2, tb, p0, s, h0, step):
    """Solve the rows of ``eb`` (states on the branch of upper phase ``c``, ``ed`` their
    derivatives, ``step`` the isentropic step: shifting or frozen) for the pressure where that
    branch reaches the transition ``tb`` [K] at entropy ``s``: Newton in ln p on
    ln T(ln p) = ln tb with slope (dlnT/dlnp)_s, the data of ``c`` taken EDGE_REACH below tb
    meanwhile and those of the lower phase ``c2`` ended there (no phase change on the way).

    The state kept is the upper phase alone at tb exactly, with the derivatives of the plateau
    it enters (the side the flow goes on to; ``c2`` counted present with no amount): its sound
    speed is the plateau's, as the general path's throat station reports. A row whose edge is
    no kink (u^2 not between the plateau's a^2 and the upper phase's) is not done. Returns the
    rows done and the derivatives of every row."""
    tab = eb.tab
    tmin, tmax = tab.cond_tmin.copy(), tab.cond_tmax.copy()
    tmin[c], tmax[c2] = tb - EDGE_REACH, tb - EDGE_REACH
    eb.tab = replace(tab, cond_tmin=tmin, cond_tmax=tmax)
    ep = eb.props()
    x = np.log(eb.p / p0)
    live = eb.ok.copy()
    for _ in range(30):
        with np.errstate(all="ignore"):
            g = np.log(tb) - np.log(eb.T)
            dx = np.clip(g / ed["dlnT_dlnp_s"], -0.05, 0.05)
        live &= eb.ok & ~(np.abs(g) < 1e-13)
        act = np.nonzero(live & np.isfinite(dx))[0]
        if not len(act):
            break
        x[act] += dx[act]
        ep, ed = step(eb, act, p0[act] * np.exp(x[act]), ed, s[act], ep)
    eb.tab = tab
    rows = np.nonzero(~live & eb.ok & eb.act[:, c])[0]
    eb.T[rows] = tb
    ep = eb.props(rows, ep)
    deriv = _DERIVATIVES[step]
    a_up = deriv(eb, ep)["sound_speed"].copy()
    eb.act[rows, c2], eb.nc[rows, c2] = True, 0.0
    ed = deriv(eb, ep)
    with np.errstate(all="ignore"):
        u = np.sqrt(np.maximum(2.0 * (h0 - ep["h"]), 0.0))
        kink = (ed["sound_speed"] < u) & (u < a_up)
    eb.act[rows, c2] = False
    done = np.zeros(len(eb.T), bool)
    done[rows] = kink[rows] & eb.ok[rows]
    return done, ed


def _pick(th, props, d, rows, ja, rb, rp, rd, flux, good, h0r):
    """Each throat row takes its refined sonic point of highest rho u if it beats its own; a row
    with a bracket neither the refinement nor the edge solve could settle is handed back (its
    sonic point might be the higher one)."""
    for j in np.unique(ja):
        i = rows[j]
        with np.errstate(all="ignore"):
            own = props["density"][i] * np.sqrt(max(2.0 * (h0r[j] - props["h"][i]), 0.0))
        own = own if th.ok[i] else -1.0
        mine = ja == j
        if not good[mine].all():     # a sonic point it could not settle might be the higher one
            th.fail(i, "sonic throat near a melting plateau: a sonic point the batch solver could not settle")
            continue
        cand = np.nonzero(mine)[0]
        c = cand[np.argmax(flux[cand])]
        if not flux[c] > own:
            continue
        for k in _FIELDS:
            getattr(th, k)[i] = getattr(rb, k)[c]
        props["_out"][i] = rp["_out"][c]
        props["nj"][i] = rp["nj"][c]
        for k in d:
            d[k][i] = rd[k][c]
        th.why.pop(int(i), None)
