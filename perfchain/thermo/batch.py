"""Shifting-equilibrium chamber and nozzle for many operating points at once.

The batch solver: the chamber (HP), the sonic throat and the exits (SP) of many points,
each solved on its own row by the compiled Newton method of :mod:`.newton` over every
NASA gas species of the propellant's elements and its condensed candidates (each row's
solve pruned to the species that matter, with a proof, see :mod:`.pruning`), on the same
NASA 7-coefficient fits Cantera loads (``nasa_gas.yaml``, ``nasa_condensed.yaml``; arrays in
:mod:`.tables`). The equations are the equilibrium
conditions of an ideal-gas mixture with pure condensed phases (the Lagrange conditions of
minimum Gibbs energy); see :mod:`.newton`.

Every row is computed as if it were alone: rows never mix (no sums across points, no
BLAS calls whose rounding could depend on the batch shape) and each row stops iterating
when it has converged, so a point's result is the same floating-point number in a batch
of one and in a sweep of thousands. Rows the method cannot settle cleanly (no
convergence, a state outside the data) are handed
back with ``ok = False``; the caller solves them on the general path in
:mod:`perfchain.thermo.equilibrium`.

This module is the entry point: :func:`nozzle`, :func:`restate_exits`, and (re-exported) :class:`Tables`,
:func:`tables_for`, :class:`Batch`, :func:`hp`, :func:`sp`, :func:`derivatives`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from perfchain.thermo.batch_state import Batch, derivatives, hp, sp
from perfchain.thermo.flow_models import FLOW_MODELS, near_transition
from perfchain.thermo.isentrope import check_elements, frozen_derivatives, frozen_step, isentropic_step, snapshot
from perfchain.thermo.perfect_gas import perfect_gas_guess
from perfchain.thermo.tables import Tables, tables_for
from perfchain.thermo.throat_scan import highest_sonic_points

__all__ = ["Tables", "tables_for", "Batch", "hp", "sp", "derivatives", "Nozzle", "nozzle", "restate_exits"]


@dataclass
class Nozzle:
    """Solved shifting expansions of a batch (arrays over the exit rows, SI)."""

    chamber: Batch
    chamber_props: dict
    chamber_deriv: dict
    throat: Batch
    throat_props: dict
    throat_deriv: dict
    exit: Batch
    exit_props: dict
    exit_deriv: dict
    source: np.ndarray          # exit row -> chamber row
    throat_velocity: np.ndarray
    exit_velocity: np.ndarray
    throat_mass_flux: np.ndarray
    area_ratio: np.ndarray
    ok: np.ndarray              # exit rows solved cleanly
    why: dict                   # exit row -> reason


def nozzle(tab: Tables, b, h0, pc, source, area_ratio=None, exit_pressure=None,
           flow: str = "shifting") -> Nozzle:
    """Chamber (HP), sonic throat and supersonic exit for many points.

    ``flow`` is a model of :data:`perfchain.thermo.flow_models.FLOW_MODELS`: shifting
    equilibrium, frozen at the chamber, or frozen from the throat on. Condensed
    phases ride along (no-slip frozen sound speed); a state on a melting plateau holds T
    at the transition (shifting: :mod:`.newton`; frozen: :func:`.isentrope.frozen_step`).

    Parameters
    ----------
    tab : Tables
    b : (n_ch, E) element totals [kmol/kg];  h0 : (n_ch,) reactant enthalpy [J/kg]
    pc : (n_ch,) chamber pressure [Pa]
    source : (n_ex,) chamber row of each exit row
    area_ratio, exit_pressure : (n_ex,) exit area / throat area [-] or exit pressure [Pa]
        (one of them; NaN where the other is used is not supported).

    Examples
    --------
    Argon is a monatomic ideal gas (gamma = 5/3 exactly, no reactions). Heated
    to 3000 K (h = 5/2 R/M (T - 298.15 K)) and expanded to area ratio 4, the
    closed form A/A*(M) of NACA Report 1135 gives Mach 3.441 and p/p0 = 0.01838,
    with the throat at p*/p0 = (3/4)^(5/2) = 0.4871:

    >>> from perfchain.constants import R_UNIVERSAL
    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> ar = get_ingredient("Ar")
    >>> tab = tables_for(EquilibriumSystem(ar.elements))
    >>> h0 = 2.5 * R_UNIVERSAL / 39.948 * (3000.0 - 298.15)
    >>> nz = nozzle(tab, [[ar.elements["Ar"]]], np.array([h0]), np.array([1e6]),
    ...             np.array([0]), area_ratio=np.array([4.0]))
    >>> bool(nz.ok[0]), round(float(nz.chamber.T[0]))
    (True, 3000)
    >>> round(float(nz.throat.p[0] / 1e6), 4), round(float(nz.exit.p[0] / 1e6), 5)
    (0.4871, 0.01838)
    >>> round(float(nz.exit_velocity[0] / nz.exit_deriv["sound_speed"][0]), 3)
    3.441
    """
    before, after = FLOW_MODELS[flow]
    n_ch = len(pc)
    ch = Batch(tab, b, np.full(n_ch, 3800.0), pc)
    hp(ch, np.arange(n_ch), h0)
    ch_props = ch.props()
    ch_d = derivatives(ch, ch_props) if before else frozen_derivatives(ch, ch_props)
    s0, h_0 = ch_props["s"], ch_props["h"]
    th, th_props, th_d = _throat(ch, ch_d, ch_props, pc, isentropic_step if before else frozen_step)
    u_t = np.sqrt(np.maximum(2.0 * (h_0 - th_props["h"]), 0.0))
    G_t = th_props["density"] * u_t
    source = np.asarray(source, int)
    ex = th.take(source)
    if not after:   # frozen from here on, at the throat's composition
        d_ex = frozen_derivatives(ex, {k: v[source] for k, v in th_props.items()})
    else:
        d_ex = {k: v[source] for k, v in th_d.items()}
    step_a = isentropic_step if after else frozen_step
    s0e, h0e, Gte, pte = s0[source], h_0[source], G_t[source], th.p[source]
    if exit_pressure is not None:
        ex_props, ex_d, u_e, eps = _exit_by_pressure(ex, d_ex, np.asarray(exit_pressure, float), s0e, h0e, Gte,
                                                     pte, step_a)
    else:
        eps = np.asarray(area_ratio, float)
        ex_props, ex_d, u_e = _exit_by_area_ratio(ex, d_ex, eps, s0e, h0e, Gte, pte, step_a)
    for bt_, pr_ in ((ch, ch_props), (th, th_props), (ex, ex_props)):
        check_elements(bt_, pr_)
    ok, why = _verdict(ch, th, ex, source, th_props["s"][source], ex_props, s0e, Gte, u_e, eps)
    return Nozzle(ch, ch_props, ch_d, th, th_props, th_d, ex, ex_props, ex_d, source,
                  u_t, u_e, G_t, eps, ok, why)


def _throat(ch: Batch, ch_d, ch_props, pc, step):
    """Sonic throats of the chamber rows: u^2 = a^2 by a safeguarded secant in x = ln(p / p0).

    Near a melting plateau the sonic point of highest rho u (:mod:`.throat_scan`). Returns the
    throat batch, its properties and derivatives (rows without a throat handed back).
    """
    n_ch = len(pc)
    s0, h_0 = ch_props["s"], ch_props["h"]
    th = ch.take(np.arange(n_ch))
    g = np.clip(ch_d["gamma_s"], 1.05, 1.7)
    with np.errstate(all="ignore"):
        x = np.log((2.0 / (g + 1.0)) ** (g / (g - 1.0)))
    x_prev = f_prev = None
    live = ch.ok.copy()
    d = {k: v.copy() for k, v in ch_d.items()}          # updated in place row by row
    props = {k: v.copy() for k, v in ch_props.items()}
    u2 = np.full(n_ch, np.nan)
    a2 = np.full(n_ch, np.nan)
    for it in range(40):
        rows = np.nonzero(live & th.ok)[0]
        if not len(rows):
            break
        # (no second-order start here: its copies cost about what the ~40 Newton steps it
        # saves per 84 throats do)
        props, d = step(th, rows, pc[rows] * np.exp(x[rows]), d, s0[rows], props)
        with np.errstate(all="ignore"):
            u2 = 2.0 * (h_0 - props["h"])
            a2 = d["sound_speed"] ** 2
            f = (u2 - a2) / a2
            # slope: du^2/dx = -2 p/rho; d ln a^2/dx ~ dlnT/dlnp along the isentrope
            approx = (-2.0 * th.p / props["density"] - u2 * d["dlnT_dlnp_s"]) / a2
            if f_prev is None:
                slope = approx
            else:
                sec = (f - f_prev) / (x - x_prev)
                slope = np.where(np.isfinite(sec) & (sec < 0) & (x != x_prev), sec, approx)
            dx = np.clip(-f / slope, -0.3, 0.3)
        done = np.abs(f) < 1e-12
        live[rows[done[rows] | ~np.isfinite(dx[rows])]] = False
        x_prev, f_prev = x.copy(), f.copy()
        x = np.where(live, x + dx, x)
    for i in np.nonzero(live & th.ok)[0]:
        th.fail(i, "no sonic throat found by the batch solver")
    with np.errstate(all="ignore"):
        sonic = (u2 > 0) & (np.abs((u2 - a2) / a2) < 1e-10)
    for i in np.nonzero(th.ok & ~sonic)[0]:
        th.fail(i, "no sonic throat found by the batch solver")
    if len(ch.tab.cond_names):
        lims = ch.tab.cond_tmin, ch.tab.cond_tmax
        lost = ~th.ok & ch.ok & near_transition(*lims, ch.T, ch.T)   # no sonic point met on the way
        near = np.nonzero(th.ok & near_transition(*lims, th.T, ch.T) | lost)[0]
        highest_sonic_points(ch, ch_d, th, props, d, near, pc, s0, h_0, step)
        for i in np.nonzero(lost & th.ok & ~near_transition(*lims, th.T, ch.T))[0]:
            th.fail(i, "no sonic throat found by the batch solver")
    return th, props, d


def _exit_by_pressure(ex: Batch, d, pe, s0, h0, G_t, p_t, step):
    """Exits at given pressures pe [Pa] below the throat's: (props, derivatives, velocity, area ratio)."""
    rows = np.nonzero(ex.ok)[0]
    for i in rows:
        if not pe[i] < p_t[i]:
            ex.fail(i, "exit pressure not below the throat pressure")
    rows = np.nonzero(ex.ok)[0]
    props, dd = step(ex, rows, pe[rows], d, s0[rows], ex.props())
    u = np.sqrt(np.maximum(2.0 * (h0 - props["h"]), 0.0))
    with np.errstate(all="ignore"):
        eps = G_t / (props["density"] * u)
    return props, dd, u, eps


def _verdict(ch: Batch, th: Batch, ex: Batch, source, s_t, ex_props, s0, G_t, u_e, eps):
    """Exit rows solved cleanly, and why the others were handed back (conservation checks
    as on the general path: the throat and exit keep the chamber entropy, the exit meets its
    area ratio)."""
    ok = ex.ok & th.ok[source] & ch.ok[source]
    why = {}
    for i in np.nonzero(~ok)[0]:
        c = int(source[i])
        why[i] = ch.why.get(c) or th.why.get(c) or ex.why.get(i, "")
    with np.errstate(all="ignore"):
        for st_s, name in ((s_t, "throat"), (ex_props["s"], "exit")):
            miss = np.abs(st_s - s0) > 1e-7 * np.abs(s0)
            for i in np.nonzero(miss & ok)[0]:
                ok[i] = False
                why[i] = f"{name} state misses the chamber entropy"
        reach = np.abs(G_t / (ex_props["density"] * u_e) / eps - 1.0) < 1e-7
        for i in np.nonzero(~(reach & (u_e > 0)) & ok)[0]:
            ok[i] = False
            why[i] = "exit does not reach its area ratio"
    return ok, why


def restate_exits(nz: Nozzle, rows, pressure, flow: str = "shifting") -> dict:
    """Exit rows of a solved :class:`Nozzle` moved along their isentrope to other pressures.

    The same step as an exit given by pressure (:func:`nozzle` with ``exit_pressure``), started
    from the row's exit state instead of its throat: the supersonic segment's flow model, the
    chamber's entropy and enthalpy, the same checks. Rows never mix.

    Parameters
    ----------
    nz : Nozzle
    rows : (m,) exit rows of ``nz``
    pressure : (m,) new static pressures [Pa], below each row's throat pressure
    flow : str
        The flow model ``nz`` was solved with.

    Returns
    -------
    dict
        ``pressure`` [Pa], ``velocity`` [m/s], ``area_ratio`` [-], ``mach`` [-], ``ok``
        (bool array) and ``why`` (row -> reason), arrays over ``rows``.

    Examples
    --------
    Argon (gamma = 5/3, no reactions) from 3000 K and 1 MPa, exit solved at area ratio 4 and
    moved to p/p0 = 0.05: the closed form of NACA Report 1135 gives
    M^2 = 3 ((1/0.05)^(2/5) - 1) and A/A* = 2.345 there:

    >>> import math
    >>> from perfchain.constants import R_UNIVERSAL
    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> ar = get_ingredient("Ar")
    >>> tab = tables_for(EquilibriumSystem(ar.elements))
    >>> h0 = 2.5 * R_UNIVERSAL / 39.948 * (3000.0 - 298.15)
    >>> nz = nozzle(tab, [[ar.elements["Ar"]]], np.array([h0]), np.array([1e6]),
    ...             np.array([0]), area_ratio=np.array([4.0]))
    >>> st = restate_exits(nz, [0], [5e4])
    >>> m = math.sqrt(3.0 * (20.0 ** 0.4 - 1.0))
    >>> bool(st["ok"][0]), round(float(st["mach"][0]) / m, 6)
    (True, 1.0)
    >>> round(float(st["area_ratio"][0]), 3), round((0.75 * (1 + m * m / 3)) ** 2 / m, 3)
    (2.345, 2.345)
    """
    rows = np.asarray(rows, int)
    p_new = np.asarray(pressure, float)
    src = nz.source[rows]
    bt = nz.exit.take(rows)
    bt.ok &= nz.ok[rows]
    props = {k: v[rows].copy() for k, v in nz.exit_props.items()}
    d = {k: v[rows].copy() for k, v in nz.exit_deriv.items()}
    s0, h0 = nz.chamber_props["s"][src], nz.chamber_props["h"][src]
    for i in np.nonzero(bt.ok & ~((p_new > 0) & (p_new < nz.throat.p[src])))[0]:
        bt.fail(i, "separation station not between the throat and the exit")
    live = np.nonzero(bt.ok)[0]
    far = None
    if FLOW_MODELS[flow][1]:    # the row's throat, the other end of the segment its new state lies on
        th = nz.throat.take(src)
        far = snapshot(th, {k: v[src] for k, v in nz.throat_deriv.items()})
    step = isentropic_step if FLOW_MODELS[flow][1] else frozen_step
    props, d = step(bt, live, p_new[live], d, s0[live], props, far)
    check_elements(bt, props)
    with np.errstate(all="ignore"):
        u = np.sqrt(np.maximum(2.0 * (h0 - props["h"]), 0.0))
        eps = nz.throat_mass_flux[src] / (props["density"] * u)
        mach = u / d["sound_speed"]
        good = (np.abs(props["s"] - s0) <= 1e-7 * np.abs(s0)) & (u > 0) & np.isfinite(eps)
    for i in np.nonzero(bt.ok & ~good)[0]:
        bt.fail(i, "separation station misses the chamber entropy")
    return {"pressure": p_new, "velocity": u, "area_ratio": eps, "mach": mach, "ok": bt.ok.copy(),
            "why": dict(bt.why)}


def _exit_by_area_ratio(ex: Batch, d, eps, s0, h0, G_t, p_t, step):
    """Supersonic exits with A/A* = eps: Newton in x = ln(p/p_t) with the exact slope
    df/dx = -(p/rho)(1/a^2 - 1/u^2) of f = ln((rho u)*/(rho u)) - ln eps, kept in a bracket."""
    n = len(eps)
    target = np.log(eps)
    x = np.empty(n)
    perfect_gas_guess(np.ascontiguousarray(eps, float), np.ascontiguousarray(np.clip(d["gamma_s"], 1.05, 1.7)), x)
    lo = np.full(n, -np.inf)
    hi = np.zeros(n)
    live = ex.ok.copy()
    props = ex.props()
    dd = d
    far = None
    for it in range(40):
        rows = np.nonzero(live & ex.ok)[0]
        if not len(rows):
            break
        here = snapshot(ex, dd) if step is isentropic_step else None
        props, dd = step(ex, rows, p_t[rows] * np.exp(x[rows]), dd, s0[rows], props, far)
        far = here
        with np.errstate(all="ignore"):
            u = np.sqrt(np.maximum(2.0 * (h0 - props["h"]), 0.0))
            f = np.log(G_t / (props["density"] * u)) - target
            a = dd["sound_speed"]
            slope = -(ex.p / props["density"]) * (1.0 / (a * a) - 1.0 / (u * u))
        r = rows[ex.ok[rows]]
        fr, ur, xr = f[r], u[r], x[r]
        novel = ~((ur > 0) & np.isfinite(fr))
        for i in r[novel]:
            ex.fail(i, "exit state has no velocity")
        met = ~novel & (np.abs(fr) < 1e-11)
        live[r[met]] = False
        go = ~novel & ~met
        r, fr, xr, sl = r[go], fr[go], xr[go], slope[r[go]]
        lo[r] = np.where(fr > 0, xr, lo[r])
        hi[r] = np.where(fr > 0, hi[r], xr)
        with np.errstate(all="ignore"):
            xn = xr + np.where(sl < 0, -fr / sl, np.nan)
            inside = (lo[r] < xn) & (xn < hi[r]) & np.isfinite(xn)
            xn = np.where(inside, xn, np.where(np.isfinite(lo[r]), 0.5 * (lo[r] + hi[r]), xr - 1.0))
        stuck = np.abs(xn - xr) < 1e-12
        live[r[stuck]] = False
        for i in r[stuck & (np.abs(fr) > 1e-8)]:
            ex.fail(i, "area ratio not met by the batch solver")
        x[r[~stuck]] = xn[~stuck]
    for i in np.nonzero(live & ex.ok)[0]:
        ex.fail(i, "area ratio not met by the batch solver")
    u = np.sqrt(np.maximum(2.0 * (h0 - props["h"]), 0.0))
    return props, dd, u
