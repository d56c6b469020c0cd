"""A batch of equilibrium states (one row per point) and its solves: HP, SP, properties, derivatives.

The arrays of a :class:`Batch` are handed to the compiled kernels (:mod:`.newton`,
:mod:`.kernel`, :mod:`.derivatives`), which work row by row: a row's numbers never depend on
the other rows. A row the method cannot settle cleanly gets ``ok = False`` and a reason
(:meth:`Batch.fail`); the caller solves it on the general path.
"""

from __future__ import annotations

import math

import numpy as np

from perfchain.thermo import kernel
from perfchain.thermo.derivatives import deriv_rows
from perfchain.thermo.newton import solve_rows
from perfchain.thermo.tables import Tables

__all__ = ["Batch", "hp", "sp", "derivatives"]

_START = 0.15      # the cold start's gas amount per atom of the row [kmol/kmol]


class Batch:
    """Equilibrium states of n points (arrays; row i is point i).

    Parameters
    ----------
    tab : Tables
        The product set (see :func:`perfchain.thermo.tables.tables_for`).
    b : array_like (n, E)
        Element totals [kmol/kg].
    T, p : array_like (n,)
        Starting temperature [K] and pressure [Pa].

    Attributes
    ----------
    b : (n, E) element totals [kmol/kg]
    T : (n,) [K];  p : (n,) [Pa]
    lnn : (n, K) ln gas species amounts [ln kmol/kg];  lnN : (n,) ln gas amount
    nc : (n, C) condensed amounts [kmol/kg];  act : (n, C) present phases
    pi : (n, E) element potentials / RT [-]
    ok : (n,) rows still solved cleanly;  why : row -> reason handed back
    iters : (n,) Newton steps taken on this batch, per row

    Examples
    --------
    A cold start shares 0.15 kmol per kmol of atoms among the species of at most three atoms:

    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.thermo.tables import tables_for
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> bt = Batch(tables_for(EquilibriumSystem(get_ingredient("Ar").elements)), [[0.025]], [3800.0], [1e5])
    >>> round(float(np.exp(bt.lnN[0])), 12), bool(bt.ok[0])
    (0.00375, True)
    """

    def __init__(self, tab: Tables, b, T, p):
        n = len(T)
        K, C = len(tab.species_names), len(tab.cond_names)
        self.tab = tab
        self.b = np.array(b, float).reshape(n, len(tab.element_names))
        self.T = np.array(T, float)
        self.p = np.array(p, float)
        # cold start: 0.15 of the row's atoms per kg (fewer moles than the products have,
        # ~0.4: a start below takes fewer Newton steps) shared by the species of at most three
        # atoms, the rest at a trace level (they would otherwise have to fall by ~30 e-folds,
        # in damped steps)
        small = tab.A.sum(1) <= 3 + 1e-9
        x0 = np.where(small, 1.0 / max(small.sum(), 1), 1e-20)
        with np.errstate(divide="ignore"):
            self.lnN = np.log(_START * self.b.sum(1))
        self.lnN[~np.isfinite(self.lnN)] = math.log(0.1)
        self.lnn = self.lnN[:, None] + np.log(x0)
        self.nc = np.zeros((n, C))
        self.act = np.zeros((n, C), bool)
        self.pi = np.zeros((n, len(tab.element_names)))
        self.ok = np.ones(n, bool)
        self.why: dict = {}
        self.iters = np.zeros(n, np.int64)

    def take(self, rows) -> "Batch":
        """A new batch of copies of the given rows (with their reasons, if handed back)."""
        rows = np.asarray(rows, int)
        new = Batch.__new__(Batch)
        new.tab = self.tab
        for k in ("b", "T", "p", "lnN", "lnn", "nc", "act", "pi", "ok"):
            setattr(new, k, getattr(self, k)[rows].copy())
        new.iters = np.zeros(len(rows), np.int64)
        new.why = {}
        for j, r in enumerate(rows):
            if int(r) in self.why:
                new.why[j] = self.why[int(r)]
        return new

    def fail(self, rows, reason):
        """Hand rows back with a reason (the first reason of a row is kept)."""
        for r in np.atleast_1d(rows):
            if self.ok[r]:
                self.ok[r] = False
                self.why[int(r)] = reason

    def props(self, rows=None, into=None):
        """Per-row mixture properties (SI, per kg): dict of arrays.

        ``n_gas`` [kmol/kg], ``h`` [J/kg], ``s``, ``cp_frozen``, ``cv_frozen`` [J/(kg K)],
        ``density`` [kg/m^3], ``nj`` (n, K) [kmol/kg]. With ``rows`` and ``into`` (an
        earlier result), only those rows are recomputed, in place.
        """
        tab = self.tab
        n, K = self.lnn.shape
        if into is None or rows is None:
            rows = np.arange(n)
            into = {"_out": np.empty((n, 6)), "nj": np.empty((n, K))}
        out = into["_out"]
        kernel.props_rows(np.asarray(rows, np.int64), tab.gas_coef, tab.gas_mid, tab.cond_coef, tab.cond_mid,
                          tab.p_ref, self.T, self.p, self.lnn, self.nc, self.act, out, into["nj"])
        into.update(n_gas=out[:, 0], h=out[:, 1], s=out[:, 2], cp_frozen=out[:, 3],
                    cv_frozen=out[:, 4], density=out[:, 5])
        return into


_REASONS = {
    kernel.NOT_CONVERGED: f"the batch equilibrium solver did not converge in {kernel.MAX_ITER} steps",
    kernel.NON_FINITE: "the batch equilibrium solver met a singular or non-finite step",
    kernel.OUT_OF_DATA: "temperature outside the gas data range",
    kernel.PHASE_OUT_OF_RANGE: "a condensed phase outside its data range (a phase change)",
}


def _solve(bt: Batch, rows, kind: int, target):
    """Newton iterations (:func:`perfchain.thermo.newton.solve_rows`) on ``rows`` of ``bt``."""
    tab = bt.tab
    rows = np.ascontiguousarray(rows, dtype=np.int64)
    if not len(rows):
        return
    status = np.zeros(len(bt.T), np.int64)
    solve_rows(rows, kind, np.ascontiguousarray(target, float), tab.A, tab.gas_coef, tab.gas_mid, tab.cA,
               tab.cond_coef, tab.cond_mid, tab.cond_tmin, tab.cond_tmax, tab.formula_id, tab.p_ref, tab.t_min,
               tab.t_max, bt.b, bt.T, bt.p, bt.lnn, bt.lnN, bt.nc, bt.act, bt.pi, status, bt.iters)
    for i in rows[status[rows] != kernel.OK]:
        bt.fail(int(i), _REASONS[int(status[i])])


def hp(bt: Batch, rows, h):
    """Chamber equilibrium of ``rows`` at their pressure and enthalpy ``h`` [J/kg] (in place).

    Examples
    --------
    Stoichiometric methane-air at 1 atm from 298.15 K burns at 2226 K with
    dissociation (Turns, An Introduction to Combustion, Table 2.2 / Appendix B;
    from memory, +/- 25 K):

    >>> from perfchain.propellants.mixture import make_propellant
    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.thermo.tables import tables_for
    >>> mix = make_propellant("air", "GCH4", equivalence_ratio=1.0)
    >>> tab = tables_for(EquilibriumSystem(mix.elements))
    >>> rows = Batch(tab, [[mix.elements.get(e, 0.0) for e in tab.element_names]], [3800.0], [101325.0])
    >>> hp(rows, [0], [mix.enthalpy])
    >>> bool(rows.ok[0]), abs(float(rows.T[0]) - 2226) < 25
    (True, True)
    """
    _solve(bt, rows, 0, h)


def sp(bt: Batch, rows, s):
    """Equilibrium of ``rows`` at their pressure and entropy ``s`` [J/(kg K)] (in place).

    Examples
    --------
    Argon (cp = 5/2 R) from 3000 K and 10 bar to 1 bar at constant entropy: T = 3000 K x
    0.1^(2/5) = 1194.3 K (ideal-gas isentrope, closed form):

    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.thermo.tables import tables_for
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> ar = get_ingredient("Ar")
    >>> bt = Batch(tables_for(EquilibriumSystem(ar.elements)), [[ar.elements["Ar"]]], [3000.0], [1e6])
    >>> bt.lnn[:], bt.lnN[:] = np.log(ar.elements["Ar"]), np.log(ar.elements["Ar"])
    >>> s0 = float(bt.props()["s"][0])
    >>> bt.p[0] = 1e5
    >>> sp(bt, [0], [s0])
    >>> bool(bt.ok[0]), round(float(bt.T[0]), 1)
    (True, 1194.3)
    """
    _solve(bt, rows, 1, s)


def derivatives(bt: Batch, props=None, rows=None, into=None) -> dict:
    """Equilibrium cp, volume derivatives and sound speed of every row (arrays, SI).

    The system of :func:`perfchain.thermo.derivatives.derivative_system`, one per row. With
    ``rows`` and ``into`` (an earlier result), only those rows are recomputed, in place.

    Returns
    -------
    dict
        ``cp``, ``cv`` [J/(kg K)], ``dlnV_dlnT``, ``dlnV_dlnp``, ``gamma_s`` [-],
        ``sound_speed`` [m/s], ``dlnT_dlnp_s``, ``dlnN_s`` [-] (along the isentrope),
        ``dlnn_s`` (n, K) [-] and ``dnc_s`` (n, C) [kmol/kg] (along the isentrope).

    Examples
    --------
    Argon (cp = 5/2 R): isentropic exponent 5/3 and sound speed sqrt(5/3 R T / M) = 1020.1 m/s
    at 3000 K (closed forms; M = 39.948 kg/kmol):

    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.thermo.tables import tables_for
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> ar = get_ingredient("Ar")
    >>> bt = Batch(tables_for(EquilibriumSystem(ar.elements)), [[ar.elements["Ar"]]], [3000.0], [1e6])
    >>> bt.lnn[:], bt.lnN[:] = np.log(ar.elements["Ar"]), np.log(ar.elements["Ar"])
    >>> d = derivatives(bt)
    >>> round(float(d["gamma_s"][0]), 9), round(float(d["sound_speed"][0]), 1)
    (1.666666667, 1020.1)
    """
    tab = bt.tab
    props = props or bt.props()
    n, K = bt.lnn.shape
    if into is None or rows is None or "_out" not in into:
        rows = np.arange(n)
        into = {"_out": np.empty((n, 8)), "dlnn_s": np.empty((n, K)), "dnc_s": np.zeros((n, len(tab.cond_names)))}
    out = into["_out"]
    rows = np.asarray(rows, np.int64)
    deriv_rows(rows, tab.A, tab.gas_coef, tab.gas_mid, tab.cA, tab.cond_coef, tab.cond_mid, tab.formula_id, bt.T,
               props["nj"], props["n_gas"], bt.nc, bt.act, out, into["dlnn_s"], into["dnc_s"])
    bad = ~(np.isfinite(out[rows, 5]) & (out[rows, 4] > 0))
    for i in rows[bad & bt.ok[rows]]:
        bt.fail(i, "equilibrium derivatives are singular")
    into.update(cp=out[:, 0], cv=out[:, 1], dlnV_dlnT=out[:, 2], dlnV_dlnp=out[:, 3],
                gamma_s=out[:, 4], sound_speed=out[:, 5], dlnT_dlnp_s=out[:, 6], dlnN_s=out[:, 7])
    return into
