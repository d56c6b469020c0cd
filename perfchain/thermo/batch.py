"""Shifting-equilibrium chamber and nozzle for many operating points at once.

One vectorised Newton method solves the chemical equilibrium of a whole batch
of points together (numpy arrays of shape points x species), over every NASA
gas species of the propellant's elements and its condensed candidates, with no
pruning. It evaluates the same NASA 7-coefficient polynomials Cantera loads
from ``nasa_gas.yaml`` and ``nasa_condensed.yaml``.

The equations are the equilibrium conditions of an ideal-gas mixture with pure
condensed phases (the Lagrange conditions of minimum Gibbs energy): for each
gas species ``ln n_j - ln N + mu0_j/RT + ln(p/p_ref) = a_j . pi``, for each
present condensed phase ``mu0_c/RT = a_c . pi``, the element balances,
``sum n_j = N``, and the enthalpy (HP) or entropy (SP) target. Each Newton
step solves one small linear system per point for the element potentials
``pi``, ``d ln N``, the condensed amounts and ``d ln T``; the step is damped
so no major species changes by more than a factor e^2 (the control of Gordon &
McBride, NASA RP-1311, 1994, ch. 3; from memory; our own code).

Every row is computed as if it were alone: rows never mix (no sums across
points, no BLAS calls whose rounding could depend on the batch shape) and each
row stops iterating when it has converged, so a point's result is the same
floating-point number in a batch of one and in a sweep of thousands. Rows the
method cannot settle cleanly (no convergence, a phase change on a melting
plateau, a state outside the data) are handed back with ``ok = False``; the
caller solves them on the general path in :mod:`perfchain.thermo.equilibrium`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from perfchain.thermo.derivatives import R_UNIVERSAL
from perfchain.thermo import kernel as _kernel
from perfchain.thermo.equilibrium import EquilibriumSystem

__all__ = ["Tables", "tables_for", "Batch", "hp", "sp", "derivatives", "nozzle", "restate_exits"]

_MAX_ITER = 80
_LN_TRACE = math.log(1e-8)       # species below this mole fraction do not limit the step
_LN_FLOOR = -690.0               # ln mole fraction floor (exp underflows below ~-745)
_STEP_TOL = _kernel.STEP_TOL       # converged: largest major-species d ln n below this
_T_TOL = _kernel.T_TOL             # ... and |d ln T| below this
_COND_TOL = 1e-10                # a condensed phase forms when mu0/RT - a.pi < -this


@dataclass(frozen=True)
class Tables:
    """Arrays of one product set (gas species, condensed candidates, elements)."""

    element_names: tuple
    species_names: tuple
    cond_names: tuple
    A: np.ndarray          # (K, E) atoms of each element in each gas species
    AT: np.ndarray         # (E, K)
    AA: np.ndarray         # (E, E, K) a_je a_jf
    gas_coef: np.ndarray   # (2, 7, K) NASA-7 coefficients, [0] low range, [1] high
    gas_mid: np.ndarray    # (K,) range boundary [K]
    cA: np.ndarray         # (C, E)
    cAT: np.ndarray        # (E, C)
    cond_coef: np.ndarray  # (2, 7, C)
    cond_mid: np.ndarray   # (C,)
    cond_tmin: np.ndarray  # (C,)
    cond_tmax: np.ndarray  # (C,)
    cond_formula: tuple    # formula key per candidate (phases of one substance share it)
    formula_id: np.ndarray  # (C,) one integer per formula key
    t_min: float           # gas data range [K]
    t_max: float
    p_ref: float           # reference pressure of the data [Pa]
    supported: bool        # False: some species is not a 2-range NASA-7 fit


def tables_for(system: EquilibriumSystem) -> Tables:
    """The :class:`Tables` of an :class:`~perfchain.thermo.equilibrium.EquilibriumSystem`'s species."""
    key = (tuple(system.species_names), tuple(system.cond_names), tuple(system.element_names))
    return _tables(key, system)


def _nasa7(thermo):
    """(low, high, T_mid) coefficients of a 2-range NASA-7 fit, or None."""
    if type(thermo).__name__ != "NasaPoly2":
        return None
    c = np.asarray(thermo.coeffs, float)
    return c[8:15], c[1:8], c[0]


def _tables(key, system):
    cache = _TABLES
    if key in cache:
        return cache[key]
    gas = system.gas
    fits = [_nasa7(gas.species(k).thermo) for k in range(gas.n_species)]
    cfits = [_nasa7(s.thermo) for s in system.cond_species]
    supported = all(f is not None for f in fits + cfits)
    zero = (np.zeros(7), np.zeros(7), 1000.0)
    fits = [f or zero for f in fits]
    cfits = [f or zero for f in cfits]
    A = np.ascontiguousarray(system.A, float)
    C = len(system.cond_species)
    E = A.shape[1]
    cA = np.ascontiguousarray(system.cond_A, float).reshape(C, E)
    tab = Tables(
        element_names=tuple(system.element_names), species_names=tuple(system.species_names),
        cond_names=tuple(system.cond_names), A=A, AT=np.ascontiguousarray(A.T),
        AA=np.ascontiguousarray((A[:, :, None] * A[:, None, :]).transpose(1, 2, 0)),
        gas_coef=np.ascontiguousarray(np.array([[f[0] for f in fits], [f[1] for f in fits]]).reshape(2, len(fits), 7).transpose(0, 2, 1)),
        gas_mid=np.array([f[2] for f in fits], float),
        cA=cA, cAT=np.ascontiguousarray(cA.T),
        cond_coef=np.ascontiguousarray(np.array([[f[0] for f in cfits], [f[1] for f in cfits]]).reshape(2, C, 7).transpose(0, 2, 1)),
        cond_mid=np.array([f[2] for f in cfits], float).reshape(C),
        cond_tmin=np.array([s.thermo.min_temp for s in system.cond_species], float).reshape(C),
        cond_tmax=np.array([s.thermo.max_temp for s in system.cond_species], float).reshape(C),
        cond_formula=tuple(system._cond_formula),
        formula_id=np.array([sorted(set(system._cond_formula)).index(f) for f in system._cond_formula],
                            np.int64).reshape(C),
        t_min=float(gas.min_temp),
        t_max=float(gas.max_temp), p_ref=float(gas.reference_pressure), supported=supported)
    cache[key] = tab
    if len(cache) > 16:
        cache.pop(next(iter(cache)))
    return tab


_TABLES: dict = {}


def _poly(coef, mid, T):
    """cp/R, h/RT, s0/R of NASA-7 fits at temperatures T: arrays (n, K).

    ``coef`` is (2, 7, K): low and high range, coefficient-major, so every
    selected coefficient is a contiguous (n, K) array.
    """
    Tc = T[:, None]
    c = np.where((Tc <= mid[None, :])[None], coef[0][:, None, :], coef[1][:, None, :])
    a1, a2, a3, a4, a5, a6, a7 = c
    cp = a1 + Tc * (a2 + Tc * (a3 + Tc * (a4 + Tc * a5)))
    h = a1 + Tc * (a2 * 0.5 + Tc * (a3 * (1 / 3) + Tc * (a4 * 0.25 + Tc * a5 * 0.2))) + a6 / Tc
    s = a1 * np.log(Tc) + Tc * (a2 + Tc * (a3 * 0.5 + Tc * (a4 * (1 / 3) + Tc * a5 * 0.25))) + a7
    return cp, h, s


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


class Batch:
    """Equilibrium states of n points (arrays; row i is point i).

    Attributes
    ----------
    b : (n, E) element totals [kmol/kg]
    T : (n,) [K];  p : (n,) [Pa]
    lnn : (n, K) ln gas species amounts [ln kmol/kg];  lnN : (n,) ln gas amount
    nc : (n, C) condensed amounts [kmol/kg];  act : (n, C) present phases
    pi : (n, E) element potentials / RT [-]
    ok : (n,) rows still solved cleanly;  why : row -> reason handed back
    """

    def __init__(self, tab: Tables, b, T, p):
        n = len(T)
        K, C = len(tab.species_names), len(tab.cond_names)
        self.tab = tab
        self.b = np.array(b, float).reshape(n, len(tab.element_names))
        self.T = np.array(T, float)
        self.p = np.array(p, float)
        # cold start: 0.1 kmol/kg shared by the species of at most three atoms, the rest at a
        # trace level (they would otherwise have to fall by ~30 e-folds, in damped steps)
        small = tab.A.sum(1) <= 3 + 1e-9
        x0 = np.where(small, 1.0 / max(small.sum(), 1), 1e-20)
        self.lnN = np.full(n, math.log(0.1))
        self.lnn = np.tile(np.log(0.1 * x0), (n, 1))
        self.nc = np.zeros((n, C))
        self.act = np.zeros((n, C), bool)
        self.pi = np.zeros((n, len(tab.element_names)))
        self.ok = np.ones(n, bool)
        self.why: dict = {}

    def take(self, rows) -> "Batch":
        """A new batch of copies of the given rows."""
        rows = np.asarray(rows, int)
        new = Batch.__new__(Batch)
        new.tab = self.tab
        for k in ("b", "T", "p", "lnN", "lnn", "nc", "act", "pi", "ok"):
            setattr(new, k, getattr(self, k)[rows].copy())
        new.why = {}
        for j, r in enumerate(rows):
            if int(r) in self.why:
                new.why[j] = self.why[int(r)]
        return new

    def fail(self, rows, reason):
        for r in np.atleast_1d(rows):
            if self.ok[r]:
                self.ok[r] = False
                self.why[int(r)] = reason

    # ------------------------------------------------------------ properties
    def props(self, rows=None, into=None):
        """Per-row mixture properties (SI, per kg): dict of arrays.

        With ``rows`` and ``into`` (an earlier result), only those rows are
        recomputed, in place.
        """
        tab = self.tab
        if _kernel.AVAILABLE:
            n, K = self.lnn.shape
            if into is None or rows is None:
                rows = np.arange(n)
                into = {"_out": np.empty((n, 6)), "nj": np.empty((n, K))}
            out = into["_out"]
            _kernel.props_rows(np.asarray(rows, np.int64), tab.A, tab.gas_coef, tab.gas_mid, tab.cond_coef,
                               tab.cond_mid, tab.p_ref, self.T, self.p, self.lnn, self.nc, self.act, out,
                               into["nj"])
            into.update(n_gas=out[:, 0], h=out[:, 1], s=out[:, 2], cp_frozen=out[:, 3],
                        cv_frozen=out[:, 4], density=out[:, 5])
            return into
        from perfchain.thermo import batch_numpy as _batch_numpy

        return _batch_numpy.props(self)


def _cond(tab, T):
    if not len(tab.cond_names):
        z = np.zeros((len(T), 0))
        return z, z, z
    return _poly(tab.cond_coef, tab.cond_mid, T)


# ---------------------------------------------------------------- Newton method
_REASONS = {
    _kernel.NOT_CONVERGED: f"the batch equilibrium solver did not converge in {_MAX_ITER} steps",
    _kernel.NON_FINITE: "the batch equilibrium solver met a singular or non-finite step",
    _kernel.OUT_OF_DATA: "temperature outside the gas data range",
    _kernel.PHASE_OUT_OF_RANGE: "a condensed phase outside its data range (a phase change)",
}


def _solve(bt: Batch, rows, kind: str, target):
    """Newton iterations on ``rows`` of ``bt`` at fixed p: HP (``kind="h"``, target h [J/kg])
    or SP (``"s"``, target s [J/(kg K)]). Rows that do not settle get ``ok = False``.

    The compiled loop of :mod:`perfchain.thermo.kernel` when numba is there, else the
    numpy version (same method, results equal to ~1e-13).
    """
    if not _kernel.AVAILABLE:
        from perfchain.thermo import batch_numpy as _batch_numpy

        return _batch_numpy.solve(bt, rows, kind, target)
    tab = bt.tab
    rows = np.ascontiguousarray(rows, dtype=np.int64)
    if not len(rows):
        return
    status = np.zeros(len(bt.T), np.int64)
    if not hasattr(bt, "iters"):
        bt.iters = np.zeros(len(bt.T), np.int64)
    _kernel.solve_rows(rows, 0 if kind == "h" else 1, np.ascontiguousarray(target, float), tab.A,
                       tab.gas_coef, tab.gas_mid, tab.cA, tab.cond_coef, tab.cond_mid, tab.cond_tmin,
                       tab.cond_tmax, tab.formula_id, tab.p_ref, tab.t_min, tab.t_max, bt.b, bt.T, bt.p,
                       bt.lnn, bt.lnN, bt.nc, bt.act, bt.pi, status, bt.iters)
    for i in rows[status[rows] != _kernel.OK]:
        bt.fail(int(i), _REASONS[int(status[i])])


def hp(bt: Batch, rows, h):
    """Chamber equilibrium of ``rows`` at their pressure and enthalpy ``h`` [J/kg] (in place).

    Examples
    --------
    Stoichiometric methane-air at 1 atm from 298.15 K burns at 2226 K with
    dissociation (Turns, An Introduction to Combustion, Table 2.2 / Appendix B;
    from memory, +/- 25 K):

    >>> from perfchain.propellants.mixture import make_propellant
    >>> mix = make_propellant("air", "GCH4", equivalence_ratio=1.0)
    >>> tab = tables_for(EquilibriumSystem(mix.elements))
    >>> rows = Batch(tab, [[mix.elements.get(e, 0.0) for e in tab.element_names]], [3800.0], [101325.0])
    >>> hp(rows, [0], [mix.enthalpy])
    >>> bool(rows.ok[0]), abs(float(rows.T[0]) - 2226) < 25
    (True, True)
    """
    _solve(bt, rows, "h", h)


def sp(bt: Batch, rows, s):
    """Equilibrium of ``rows`` at their pressure and entropy ``s`` [J/(kg K)] (in place)."""
    _solve(bt, rows, "s", s)


# ---------------------------------------------------------------- derivatives
def derivatives(bt: Batch, props=None, rows=None, into=None) -> dict:
    """Equilibrium cp, volume derivatives and sound speed of every row (arrays, SI).

    The same linear systems as :func:`perfchain.thermo.derivatives.derivatives`, one per row.

    Returns
    -------
    dict
        ``cp``, ``cv`` [J/(kg K)], ``dlnV_dlnT``, ``dlnV_dlnp``, ``gamma_s`` [-],
        ``sound_speed`` [m/s], ``dlnT_dlnp_s`` [-] (along the isentrope).
    """
    tab = bt.tab
    props = props or bt.props()
    if _kernel.AVAILABLE:
        n, K = bt.lnn.shape
        if into is None or rows is None or "_out" not in into:
            rows = np.arange(n)
            into = {"_out": np.empty((n, 8)), "dlnn_s": np.empty((n, K)),
                    "dnc_s": np.zeros((n, len(tab.cond_names)))}
        out = into["_out"]
        rows = np.asarray(rows, np.int64)
        _kernel.deriv_rows(rows, tab.A, tab.gas_coef, tab.gas_mid, tab.cA, tab.cond_coef, tab.cond_mid,
                           bt.T, props["nj"], props["n_gas"], bt.nc, bt.act, out, into["dlnn_s"],
                           into["dnc_s"])
        bad = ~(np.isfinite(out[rows, 5]) & (out[rows, 4] > 0))
        for i in rows[bad & bt.ok[rows]]:
            bt.fail(i, "equilibrium derivatives are singular")
        into.update(cp=out[:, 0], cv=out[:, 1], dlnV_dlnT=out[:, 2], dlnV_dlnp=out[:, 3],
                    gamma_s=out[:, 4], sound_speed=out[:, 5], dlnT_dlnp_s=out[:, 6], dlnN_s=out[:, 7])
        return into
    from perfchain.thermo import batch_numpy as _batch_numpy

    return _batch_numpy.derivatives(bt, props)


# ---------------------------------------------------------------- nozzle
def _move(bt: Batch, rows, p_new, d):
    """Set new pressures on rows with a first-order isentropic predictor (warm start).

    T, ln N, ln n_j and the condensed amounts move along their analytic
    derivatives at constant entropy; the step is cut to |d ln T| <= 1 and
    predicted mole fractions are kept below 1.
    """
    if not len(rows):
        return
    with np.errstate(all="ignore"):
        dx = np.log(p_new / bt.p[rows])
        k = d["dlnT_dlnp_s"][rows]
        scale = np.minimum(1.0, 1.0 / np.maximum(np.abs(k * dx), 1e-300))
        dx = dx * scale
        T = bt.T[rows] * np.exp(k * dx)
        lnN = bt.lnN[rows] + d["dlnN_s"][rows] * dx
        lnn = np.minimum(bt.lnn[rows] + d["dlnn_s"][rows] * dx[:, None], lnN[:, None])
        nc = np.where(bt.act[rows], np.maximum(bt.nc[rows] + d["dnc_s"][rows] * dx[:, None], 0.0), 0.0)
        good = np.isfinite(T) & np.isfinite(lnN) & np.isfinite(lnn).all(-1) & np.isfinite(nc).all(-1)
    g = rows[good]
    bt.T[g], bt.lnN[g], bt.lnn[g], bt.nc[g] = T[good], lnN[good], lnn[good], nc[good]
    bt.p[rows] = p_new


def _step(bt: Batch, rows, p_new, d, s, props):
    """Move rows to new pressures along their isentrope s [J/(kg K)]: (props, derivatives).

    ``props`` and ``d`` hold every row; only ``rows`` are recomputed (in place).
    """
    _move(bt, rows, p_new, d)
    sp(bt, rows, s)
    props = bt.props(rows, props)
    return props, derivatives(bt, props, rows, d)


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


def _frozen_d(bt: Batch, props) -> dict:
    """The frozen-flow counterpart of :func:`derivatives` (gas composition fixed): cp_frozen,
    sqrt(gamma_f n R T), gamma_f and dlnT/dlnp = n R / cp_f along the frozen isentrope.
    Valid for gas-only rows (rows with a condensed phase are handed back before use)."""
    with np.errstate(all="ignore"):
        cpf, cvf, ng = props["cp_frozen"], props["cv_frozen"], props["n_gas"]
        gam = cpf / cvf
        return {"cp": cpf, "sound_speed": np.sqrt(gam * ng * R_UNIVERSAL * bt.T), "gamma_s": gam,
                "dlnT_dlnp_s": ng * R_UNIVERSAL / cpf}


def _frozen_step(bt: Batch, rows, p_new, d, s, props):
    """Move rows to new pressures at their entropy s [J/(kg K)] with the composition fixed:
    Newton on ln T with (ds/dlnT)_p = cp_frozen. Returns (props, frozen derivatives)."""
    if len(rows):
        with np.errstate(all="ignore"):
            guess = bt.T[rows] * np.exp(np.clip(d["dlnT_dlnp_s"][rows] * np.log(p_new / bt.p[rows]), -1.5, 1.5))
        bt.T[rows] = np.where(np.isfinite(guess), guess, bt.T[rows])
        bt.p[rows] = p_new
    live = np.asarray(rows, np.int64)
    target = dict(zip(live.tolist(), np.asarray(s, float).tolist()))
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
    for i in np.asarray(rows, np.int64):
        if bt.ok[i] and not (bt.tab.t_min <= bt.T[i] <= bt.tab.t_max):
            bt.fail(i, "frozen state outside the gas data range")
    return props, _frozen_d(bt, props)


def nozzle(tab: Tables, b, h0, pc, source, area_ratio=None, exit_pressure=None,
           flow: str = "shifting") -> Nozzle:
    """Chamber (HP), sonic throat and supersonic exit for many points.

    ``flow`` is a model of :data:`perfchain.nozzle.expansion.FLOW_MODELS`: shifting
    equilibrium, frozen at the chamber, or frozen from the throat on. Frozen
    segments carrying a condensed phase are handed back (their sound speed needs
    the general path).

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

    >>> from perfchain.thermo.derivatives import R_UNIVERSAL
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
    from perfchain.thermo.flow_models import FLOW_MODELS

    before, after = FLOW_MODELS[flow]
    n_ch = len(pc)
    ch = Batch(tab, b, np.full(n_ch, 3800.0), pc)
    hp(ch, np.arange(n_ch), h0)
    ch_props = ch.props()
    ch_d = derivatives(ch, ch_props) if before else _frozen_d(ch, ch_props)
    if not before:
        for i in np.nonzero(ch.act.any(-1) & ch.ok)[0]:
            ch.fail(i, "frozen flow with condensed products: the general path")
    step_b = _step if before else _frozen_step
    s0, h_0 = ch_props["s"], ch_props["h"]
    # ---- throat: u^2 = a^2, safeguarded secant in x = ln(p / p0)
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
        props, d = step_b(th, rows, pc[rows] * np.exp(x[rows]), d, s0[rows], props)
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
            step = np.clip(-f / slope, -0.3, 0.3)
        done = np.abs(f) < 1e-12
        live[rows[done[rows] | ~np.isfinite(step[rows])]] = False
        x_prev, f_prev = x.copy(), f.copy()
        x = np.where(live, x + step, x)
    for i in np.nonzero(live & th.ok)[0]:
        th.fail(i, "no sonic throat found by the batch solver")
    th_props, th_d = props, d
    with np.errstate(all="ignore"):
        sonic = (u2 > 0) & (np.abs((u2 - a2) / a2) < 1e-10)
    for i in np.nonzero(th.ok & ~sonic)[0]:
        th.fail(i, "no sonic throat found by the batch solver")
    u_t = np.sqrt(np.maximum(2.0 * (h_0 - th_props["h"]), 0.0))
    G_t = th_props["density"] * u_t
    # ---- exits
    source = np.asarray(source, int)
    ex = th.take(source)
    if not after:   # frozen from here on, at the throat's composition
        for i in np.nonzero(ex.act.any(-1) & ex.ok)[0]:
            ex.fail(i, "frozen flow with condensed products: the general path")
        d_ex = _frozen_d(ex, {k: v[source] for k, v in th_props.items()})
    else:
        d_ex = {k: v[source] for k, v in th_d.items()}
    step_a = _step if after else _frozen_step
    s0e, h0e, Gte, pte = s0[source], h_0[source], G_t[source], th.p[source]
    if exit_pressure is not None:
        pe = np.asarray(exit_pressure, float)
        rows = np.nonzero(ex.ok)[0]
        for i in rows:
            if not pe[i] < pte[i]:
                ex.fail(i, "exit pressure not below the throat pressure")
        rows = np.nonzero(ex.ok)[0]
        ex_props, ex_d = step_a(ex, rows, pe[rows], d_ex, s0e[rows], ex.props())
        u_e = np.sqrt(np.maximum(2.0 * (h0e - ex_props["h"]), 0.0))
        with np.errstate(all="ignore"):
            eps = Gte / (ex_props["density"] * u_e)
    else:
        eps = np.asarray(area_ratio, float)
        ex_props, ex_d, u_e = _exit_by_area_ratio(ex, d_ex, eps, s0e, h0e, Gte, pte, step_a)
    for bt_, pr_ in ((ch, ch_props), (th, th_props), (ex, ex_props)):
        _check_elements(bt_, pr_)
    ok = ex.ok & th.ok[source] & ch.ok[source]
    why = {}
    for i in np.nonzero(~ok)[0]:
        c = int(source[i])
        why[i] = ch.why.get(c) or th.why.get(c) or ex.why.get(i, "")
    # conservation checks, as on the general path
    with np.errstate(all="ignore"):
        for st_s, name in ((th_props["s"][source], "throat"), (ex_props["s"], "exit")):
            miss = np.abs(st_s - s0e) > 1e-7 * np.abs(s0e)
            for i in np.nonzero(miss & ok)[0]:
                ok[i] = False
                why[i] = f"{name} state misses the chamber entropy"
        reach = np.abs(Gte / (ex_props["density"] * u_e) / eps - 1.0) < 1e-7
        for i in np.nonzero(~(reach & (u_e > 0)) & ok)[0]:
            ok[i] = False
            why[i] = "exit does not reach its area ratio"
    return Nozzle(ch, ch_props, ch_d, th, th_props, th_d, ex, ex_props, ex_d, source,
                  u_t, u_e, G_t, eps, ok, why)


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

    >>> from perfchain.thermo.derivatives import R_UNIVERSAL
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
    from perfchain.thermo.flow_models import FLOW_MODELS

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
    step = _step if FLOW_MODELS[flow][1] else _frozen_step
    props, d = step(bt, live, p_new[live], d, s0[live], props)
    _check_elements(bt, props)
    with np.errstate(all="ignore"):
        u = np.sqrt(np.maximum(2.0 * (h0 - props["h"]), 0.0))
        eps = nz.throat_mass_flux[src] / (props["density"] * u)
        mach = u / d["sound_speed"]
        good = (np.abs(props["s"] - s0) <= 1e-7 * np.abs(s0)) & (u > 0) & np.isfinite(eps)
    for i in np.nonzero(bt.ok & ~good)[0]:
        bt.fail(i, "separation station misses the chamber entropy")
    return {"pressure": p_new, "velocity": u, "area_ratio": eps, "mach": mach, "ok": bt.ok.copy(),
            "why": dict(bt.why)}


def _check_elements(bt: Batch, props, tol=1e-9):
    """Rows whose element totals are off by more than ``tol`` (relative) are handed back."""
    tab = bt.tab
    with np.errstate(all="ignore"):
        got = _rowdot(props["nj"], tab.AT) + _apply(np.where(bt.act, bt.nc, 0.0), tab.cAT)
        err = np.abs(got - bt.b).max(-1) / np.abs(bt.b).max(-1)
    for i in np.nonzero(~(err <= tol) & bt.ok)[0]:
        bt.fail(i, f"element balance off by {err[i]:.1e} in the batch solver")


def _exit_by_area_ratio(ex: Batch, d, eps, s0, h0, G_t, p_t, step=None):
    """Supersonic exits with A/A* = eps: Newton in x = ln(p/p_t) with the exact slope
    df/dx = -(p/rho)(1/a^2 - 1/u^2) of f = ln((rho u)*/(rho u)) - ln eps, kept in a bracket."""
    n = len(eps)
    target = np.log(eps)
    x = _perfect_gas_guess(eps, np.clip(d["gamma_s"], 1.05, 1.7))
    lo = np.full(n, -np.inf)
    hi = np.zeros(n)
    live = ex.ok.copy()
    props = ex.props()
    dd = d
    for it in range(40):
        rows = np.nonzero(live & ex.ok)[0]
        if not len(rows):
            break
        props, dd = (step or _step)(ex, rows, p_t[rows] * np.exp(x[rows]), dd, s0[rows], props)
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


def _perfect_gas_guess(eps, g):
    """ln(p/p*) of a calorically perfect gas (exponent g) at supersonic area ratio eps:
    bisection on the closed form A/A* of NACA Report 1135, vectorised."""
    if _kernel.AVAILABLE:
        out = np.empty(len(eps))
        _kernel.perfect_gas_guess(np.ascontiguousarray(eps, float), np.ascontiguousarray(g, float), out)
        return out
    lo = np.full(len(eps), -80.0)
    hi = np.zeros(len(eps))
    crit = (2.0 / (g + 1.0)) ** (g / (g - 1.0))          # p*/p0
    with np.errstate(all="ignore"):
        for _ in range(60):
            x = 0.5 * (lo + hi)
            r = crit * np.exp(x)                                # p/p0
            m2 = 2.0 / (g - 1.0) * (r ** (-(g - 1.0) / g) - 1.0)
            a = np.sqrt(((2.0 / (g + 1.0)) * (1.0 + 0.5 * (g - 1.0) * m2)) ** ((g + 1.0) / (g - 1.0)) / m2)
            big = ~(a < eps)                                    # area ratio too large: p higher
            lo = np.where(big, x, lo)
            hi = np.where(big, hi, x)
    return 0.5 * (lo + hi)
