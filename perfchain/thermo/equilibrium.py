"""Gas + condensed chemical equilibrium for fixed element totals, on Cantera.

Cantera is the state engine: an ideal-gas phase built from the NASA Glenn data
holds the gas, and each condensed candidate is a pure substance whose standard
Gibbs energy comes from the same data. Everything is per kilogram of
propellant: element totals ``b`` [kmol/kg], enthalpy ``h`` [J/kg], entropy
``s`` [J/(kg K)].

How a state is found:

* TP: the gas is equilibrated by Cantera for the element totals left after the
  condensed amounts. A condensed species is present when its standard Gibbs
  energy lies below the sum of the gas's element potentials (the equilibrium
  condition for a pure condensed phase); its amount is then solved so that the
  condition holds with equality. Only condensed species whose data cover the
  temperature are candidates, so none is ever reported outside its range.
* HP and SP: Cantera's own gas HP/SP solver where no condensed product forms;
  otherwise an outer loop on temperature over TP states (Brent's method), with
  the lever rule on a melting plateau.

Every result is checked (element balance, target residual, data range) before
it is returned; a failed check raises :class:`~perfchain.errors.SolverError`.
Condensed volume is neglected in the mixture density (a common assumption of
theoretical rocket performance; condensed volume fractions are ~1e-3).
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, replace
from functools import lru_cache
from typing import Mapping

import numpy as np
from scipy.optimize import brentq, least_squares, nnls

from perfchain.errors import SolverError
from perfchain.thermo.derivatives import R_UNIVERSAL, derivatives
from perfchain.thermo.products import ProductSpecies, gas_species, product_species

__all__ = ["EquilibriumSystem", "MixState", "R_UNIVERSAL"]



def _equilibrate(gas, mode, **kw):
    """Cantera's gas equilibrium, without its out-of-range warning: our checks reject such states."""
    with warnings.catch_warnings():
        warnings.filterwarnings("ignore", message=r"ChemEquil::equilibrate", category=UserWarning)
        gas.equilibrate(mode, **kw)


_ELEMENT_TOL = 1e-9   # relative element-balance residual allowed
_TARGET_TOL = 1e-9    # relative h or s residual allowed (scaled by cp*T)


@dataclass(frozen=True)
class MixState:
    """One thermodynamic state of the products, per kg of propellant.

    Attributes
    ----------
    T : float
        Temperature [K].
    p : float
        Pressure [Pa].
    n_gas : float
        Gas amount [kmol/kg].
    X : numpy.ndarray
        Gas mole fractions, in the system's species order.
    condensed : tuple of (int, float)
        (condensed candidate index, amount [kmol/kg]) of each present phase.
    h, s : float
        Enthalpy [J/kg] and entropy [J/(kg K)] of the whole mixture.
    cp_frozen, cv_frozen : float
        Frozen heat capacities of the mixture [J/(kg K)].
    density : float
        Mixture density, condensed volume neglected [kg/m^3].
    """

    T: float
    p: float
    n_gas: float
    X: np.ndarray
    condensed: tuple
    h: float
    s: float
    cp_frozen: float
    cv_frozen: float
    density: float

    @property
    def molar_mass(self) -> float:
        """Mixture mass per kmol of gas [kg/kmol] (= gas molar mass without condensed)."""
        return 1.0 / self.n_gas

    @property
    def gamma_frozen(self) -> float:
        """Frozen cp/cv of the mixture [-]."""
        return self.cp_frozen / self.cv_frozen


@lru_cache(maxsize=32)
def _gas_phase(names: tuple):
    """One Cantera ideal-gas phase per species set, shared within a process."""
    import cantera as ct

    return ct.Solution(thermo="ideal-gas", species=[gas_species(n) for n in names])


class EquilibriumSystem:
    """Equilibrium states of the products of one propellant composition.

    Parameters
    ----------
    elements : Mapping[str, float]
        Element totals [kmol/kg].
    products : ProductSpecies, optional
        Candidate species; by default all NASA species of these elements.
    condensed : bool
        Allow condensed products.
    point : str
        Text naming the operating point, carried into solver errors.
    """

    def __init__(self, elements: Mapping[str, float], products: ProductSpecies | None = None,
                 condensed: bool = True, point: str = ""):
        present = frozenset(e for e, n in elements.items() if n > 0)
        ps = products or product_species(present, condensed)
        self.gas = _gas_phase(tuple(s.name for s in ps.gas))
        self.point = point
        gas = self.gas
        self.element_names = list(gas.element_names)
        self.b = np.array([float(elements.get(e, 0.0)) for e in self.element_names])
        missing = present - set(self.element_names)
        if missing:
            raise SolverError(f"no gas species in the NASA data for element(s) {sorted(missing)}", point)
        self.A = np.array([[gas.n_atoms(k, e) for e in self.element_names]
                           for k in range(gas.n_species)])
        self.mw = gas.molecular_weights
        self.species_names = list(gas.species_names)
        self.cond_species = list(ps.condensed if condensed else ())
        self.cond_A = np.array([[s.composition.get(e, 0.0) for e in self.element_names]
                                for s in self.cond_species]).reshape(len(self.cond_species),
                                                                     len(self.element_names))
        self.cond_mw = np.array([sum(_weight(e) * n for e, n in s.composition.items())
                                 for s in self.cond_species])
        self.cond_names = [s.name for s in self.cond_species]
        # formula key per candidate, to choose one phase of a substance
        self._cond_formula = [tuple(sorted(s.composition.items())) for s in self.cond_species]
        self.n0 = self._initial_moles(self.b)

    # ---------------------------------------------------------------- helpers
    def _initial_moles(self, b):
        """Non-negative species amounts with exactly the element totals ``b``."""
        n, res = nnls(self.A.T, b)
        if res > 1e-10 * max(np.abs(b).max(), 1e-30):
            raise SolverError("element totals cannot be matched by the gas species", self.point)
        return np.maximum(n, 0.0) + 1e-30

    def _cond_g_rt(self, i, T):
        th = self.cond_species[i].thermo
        return (th.h(T) - T * th.s(T)) / (R_UNIVERSAL * T)

    def _cond_valid(self, i, T, tol=1e-6):
        """Is T inside the data range of condensed candidate i? (``tol`` [K] for checks.)"""
        th = self.cond_species[i].thermo
        return th.min_temp - tol <= T <= th.max_temp + tol

    def _element_potentials(self):
        """Element potentials over RT from the equilibrated gas [-]."""
        gas = self.gas
        X = gas.X
        mask = X > 1e-10
        mu = gas.chemical_potentials[mask] / (R_UNIVERSAL * gas.T)
        lam, *_ = np.linalg.lstsq(self.A[mask], mu, rcond=None)
        return lam

    def _gas_tp(self, T, p, b):
        """Equilibrate the gas alone at T, p for element totals b; return (X, n_gas, lam)."""
        gas = self.gas
        n0 = self._initial_moles(b)
        try:
            gas.TPX = T, p, n0
            _equilibrate(gas, "TP", rtol=1e-12)
        except Exception:  # CanteraError: retry with the slower, sturdier solver
            try:
                gas.TPX = T, p, n0
                _equilibrate(gas, "TP", solver="vcs", rtol=1e-12)
            except Exception:
                raise SolverError(f"gas equilibrium failed at {T:.1f} K, {p:.6g} Pa",
                                  self.point) from None
        X = gas.X.copy()
        n_gas = self._gas_amount(X, b)
        return X, n_gas, self._element_potentials()

    def _gas_amount(self, X, b):
        c = self.A.T @ X
        n = float(c @ b / (c @ c))
        err = np.abs(n * c - b).max() / max(np.abs(b).max(), 1e-300)
        if err > _ELEMENT_TOL * 10:
            raise SolverError(f"element balance violated by {err:.1e} after the gas solve", self.point)
        return n

    def _make_state(self, T, p, X, n_gas, condensed):
        gas = self.gas
        gas.TPX = T, p, X
        m_gas = n_gas * gas.mean_molecular_weight
        h = gas.enthalpy_mass * m_gas
        s = gas.entropy_mass * m_gas
        cp = gas.cp_mass * m_gas
        cv = gas.cv_mass * m_gas
        for i, n in condensed:
            th = self.cond_species[i].thermo
            h += n * th.h(T)
            s += n * th.s(T)
            cp += n * th.cp(T)
            cv += n * th.cp(T)
        density = p / (n_gas * R_UNIVERSAL * T)
        return MixState(float(T), float(p), float(n_gas), X.copy(), tuple(condensed),
                        float(h), float(s), float(cp), float(cv), float(density))

    def _candidates(self, T):
        """Indices of condensed candidates valid at T, one (most stable) phase per substance."""
        best: dict = {}
        for i in range(len(self.cond_species)):
            if not self._cond_valid(i, T, tol=0.0):   # phases switch exactly at the range limits
                continue
            g = self._cond_g_rt(i, T)
            f = self._cond_formula[i]
            if f not in best or g < best[f][1]:
                best[f] = (i, g)
        return [i for i, _ in best.values()]

    # ---------------------------------------------------------------- TP
    def tp(self, T: float, p: float, guess: MixState | None = None) -> MixState:
        """Equilibrium state at temperature T [K] and pressure p [Pa].

        ``guess`` (a nearby solved state) seeds the condensed amounts.

        Examples
        --------
        Hydrogen-rich products (H2 + H2O) at 1 atm: at 300 K liquid water forms
        and the vapour left in the gas sits at the saturation pressure, 3.537
        kPa (IAPWS-95 / NIST steam tables), i.e. a mole fraction near 0.0349:

        >>> from perfchain.propellants.mixture import make_propellant
        >>> p = make_propellant("GOX", "GH2", equivalence_ratio=2.0)
        >>> sysw = EquilibriumSystem(p.elements)
        >>> st = sysw.tp(300.0, 101325.0)
        >>> [sysw.cond_names[i] for i, _ in st.condensed]
        ['H2O(L)']
        >>> x = st.X[sysw.species_names.index("H2O")]
        >>> bool(abs(x * 101325.0 - 3537.0) < 0.02 * 3537.0)
        True
        """
        cands = self._candidates(T)
        seed = [(i, n) for i, n in (guess.condensed if guess is not None else ()) if i in cands]
        active = [i for i, _ in seed]
        X, n_gas, lam, amounts = self._settle(T, p, active, np.array([n for _, n in seed]))
        for _ in range(8):
            drive = {i: self._cond_g_rt(i, T) - self.cond_A[i] @ lam for i in cands if i not in active}
            new = [i for i, d in drive.items() if d < -1e-10]
            if not new:
                break
            # one at a time, most negative first, keeps the active set small and consistent
            active.append(min(new, key=drive.get))
            X, n_gas, lam, amounts = self._settle(T, p, active, np.append(amounts, 0.0))
        else:
            raise SolverError("condensed-phase selection did not settle", self.point)
        return self._make_state(T, p, X, n_gas, list(zip(active, amounts)))

    def _settle(self, T, p, active, amounts):
        """Solve the active condensed set (edited in place), dropping phases that come out absent."""
        if not active:
            return (*self._gas_tp(T, p, self.b), np.zeros(0))
        X, n_gas, lam, amounts = self._solve_condensed(T, p, active, amounts)
        keep = amounts > 1e-14
        if keep.all():
            return X, n_gas, lam, amounts
        active[:] = [i for i, k in zip(active, keep) if k]
        return self._settle(T, p, active, amounts[keep])

    def _solve_condensed(self, T, p, active, guess):
        Ac = self.cond_A[active]
        g = np.array([self._cond_g_rt(i, T) for i in active])
        with np.errstate(divide="ignore", invalid="ignore"):
            nmax = np.array([np.min(np.where(a > 0, self.b / a, np.inf)) for a in Ac])
        cache = {}

        def solve(n):
            key = tuple(np.round(n, 300))
            if key not in cache:
                cache[key] = self._gas_tp(T, p, self.b - Ac.T @ n)
            return cache[key]

        def resid(n):
            _, _, lam = solve(np.asarray(n, float))
            return g - Ac @ lam

        if len(active) == 1:
            n = np.array([self._solve_one_condensed(lambda x: resid([x])[0], nmax[0], float(guess[0]),
                                                    self.cond_names[active[0]])])
        else:
            x0 = np.clip(guess, 0.0, nmax * 0.999)
            sol = least_squares(resid, x0, bounds=(np.zeros(len(active)), nmax * (1 - 1e-9)),
                                xtol=1e-15, ftol=1e-15, gtol=1e-15, max_nfev=200)
            n = sol.x
            if np.abs(resid(n)).max() > 1e-7 and not (np.abs(resid(n))[n > 1e-14] < 1e-7).all():
                raise SolverError("condensed-phase equilibrium did not converge", self.point)
        X, n_gas, lam = solve(n)
        return X, n_gas, lam, n

    def _solve_one_condensed(self, r, nmax, guess, name):
        """Root of r(n) on [0, nmax): secant in y = ln(nmax - n), where r is nearly linear.

        r rises without bound as the gas is stripped of the limiting element;
        a root below n = 0 means the species is absent (returns 0). Bisection
        on the bracket safeguards the secant.
        """
        def ry(y):
            return r(nmax - math.exp(y))

        y_max = math.log(nmax)
        y_min = math.log(nmax * 1e-10)     # beyond this the gas has lost an element
        y0 = math.log(nmax - guess) if 0.0 < guess < nmax else math.log(0.5 * nmax)
        lo, hi = -math.inf, math.inf       # r(lo) > 0 > r(hi): r decreases with y
        zero_checked = False
        y1 = y0 - 1e-3
        f0 = ry(y0)
        for _ in range(60):
            for y, f in ((y0, f0),):
                if f > 0:
                    lo = max(lo, y)
                else:
                    hi = min(hi, y)
            if abs(f0) < 1e-12:
                return nmax - math.exp(y0)
            f1 = ry(y1)
            if f1 > 0:
                lo = max(lo, y1)
            else:
                hi = min(hi, y1)
            if abs(f1) < 1e-12 or abs(y1 - y0) < 1e-13:
                return nmax - math.exp(y1)
            y2 = y1 - f1 * (y1 - y0) / (f1 - f0) if f1 != f0 else math.nan
            if y2 >= y_max or (math.isfinite(lo) and lo >= y_max):
                if not zero_checked:
                    zero_checked = True
                    if r(0.0) >= 0.0:
                        return 0.0             # the species does not form here
                    hi = min(hi, y_max)
                y2 = math.nan
            if not (lo < y2 < hi) or not math.isfinite(y2):
                if math.isfinite(lo) and math.isfinite(hi):
                    y2 = 0.5 * (lo + hi)
                elif math.isfinite(lo):
                    y2 = min(lo + 1.0, y_max)
                else:
                    y2 = max(hi - 2.0, y_min)
            y0, f0, y1 = y1, f1, y2
            if y1 <= y_min and hi <= y_min + 1e-12:
                raise SolverError(f"{name} would take up all of an element", self.point)
        raise SolverError(f"{name} amount did not converge", self.point)

    # ---------------------------------------------------------------- HP / SP
    def hp(self, h: float, p: float, guess: MixState | None = None) -> MixState:
        """Equilibrium state at enthalpy h [J/kg] and pressure p [Pa]."""
        return self._xp("h", h, p, guess)

    def sp(self, s: float, p: float, guess: MixState | None = None) -> MixState:
        """Equilibrium state at entropy s [J/(kg K)] and pressure p [Pa]."""
        return self._xp("s", s, p, guess)

    def _xp(self, kind, target, p, guess):
        if not (p > 0 and math.isfinite(p)):
            raise SolverError(f"pressure {p:.6g} Pa along the nozzle is not a positive number", self.point)
        if kind == "s" and guess is not None and guess.condensed and abs(guess.s - target) < 1e-6 * abs(target):
            # along an isentrope with condensed products: step T and the condensed amounts from
            # the previous state with the analytic derivatives, then the temperature loop
            d = self.equilibrium_derivatives(guess)
            r = math.log(p / guess.p)
            dlnT = guess.n_gas * R_UNIVERSAL * d["dlnV_dlnT"] / d["cp"]      # (dlnT/dlnp) at const s
            seeded = replace(guess, condensed=tuple(
                (i, max(n + (d["dn_dlnp"].get(i, 0.0) + d["dn_dlnT"].get(i, 0.0) * dlnT) * r, 0.5 * n))
                for i, n in guess.condensed))
            return self._t_loop(kind, target, p, guess.T * math.exp(dlnT * r), seeded)
        state = self._gas_xp(kind, target, p, guess)
        if state is not None and not self._forms_condensed(state):
            return state
        T0 = state.T if state is not None else (guess.T if guess else 2500.0)
        return self._t_loop(kind, target, p, T0, guess)

    def _gas_xp(self, kind, target, p, guess):
        """Cantera's gas-only HP/SP solve (no condensed); None when it fails."""
        gas = self.gas
        T0 = guess.T if guess is not None else 3000.0
        X0 = guess.X if (guess is not None and not guess.condensed) else None
        for attempt in range(3):
            try:
                if X0 is None or attempt:
                    gas.TPX = (T0 if attempt < 2 else 2000.0), p, self.n0
                    _equilibrate(gas, "TP")
                else:
                    gas.TPX = T0, p, X0
                if kind == "h":
                    gas.HP = target, p
                    _equilibrate(gas, "HP", rtol=1e-12)
                else:
                    gas.SP = target, p
                    _equilibrate(gas, "SP", rtol=1e-12)
            except Exception:
                continue
            X = gas.X.copy()
            T = gas.T
            try:
                n_gas = self._gas_amount(X, self.b)
            except SolverError:
                continue
            if not (gas.min_temp <= T <= gas.max_temp):
                return None  # outside the data: never accept an extrapolated state
            st = self._make_state(T, p, X, n_gas, [])
            if self._residual_ok(kind, st, target):
                return st
        return None

    def _residual_ok(self, kind, st, target):
        value = st.h if kind == "h" else st.s
        scale = st.cp_frozen * st.T if kind == "h" else st.cp_frozen
        return abs(value - target) <= _TARGET_TOL * scale

    def _forms_condensed(self, st: MixState) -> bool:
        if not self.cond_species:
            return False
        self.gas.TPX = st.T, st.p, st.X
        lam = self._element_potentials()
        return any(self._cond_g_rt(i, st.T) - self.cond_A[i] @ lam < -1e-10
                   for i in self._candidates(st.T))

    def _t_loop(self, kind, target, p, T0, guess=None):
        """Outer loop on T over TP equilibria (with condensed products).

        Newton steps with the analytic equilibrium cp ((dh/dT)p = cp,
        (ds/dT)p = cp/T), kept inside a bracket; where h(T) or s(T) jumps (a
        condensed phase change) the bracket collapses onto the transition and
        the lever rule blends the two sides.
        """
        tmin, tmax = max(self.gas.min_temp, 200.0), min(self.gas.max_temp, 6000.0)
        lo, hi = tmin, tmax          # f(lo) <= 0 <= f(hi) once known
        lo_known = hi_known = False
        T = min(max(T0, tmin), tmax)
        prev = guess
        for _ in range(80):
            st = self.tp(T, p, prev)
            prev = st
            f = (st.h if kind == "h" else st.s) - target
            if self._residual_ok(kind, st, target):
                return st
            if f < 0:
                lo, lo_known = T, True
            else:
                hi, hi_known = T, True
            if lo_known and hi_known and hi - lo < 1e-9 * hi:
                break
            d = self.equilibrium_derivatives(st)
            slope = d["cp"] if kind == "h" else d["cp"] / T
            T_new = T - f / slope if slope > 0 else math.nan
            if not (lo < T_new < hi) or not math.isfinite(T_new):
                if lo_known and hi_known:
                    T_new = 0.5 * (lo + hi)
                elif lo_known:
                    if T >= tmax:
                        break
                    T_new = min(tmax, T * 1.3)
                else:
                    if T <= tmin:
                        break
                    T_new = max(tmin, T * 0.7)
            # seed the next state's condensed amounts by the analytic dn/dlnT (fewer inner steps)
            dln = math.log(T_new / T)
            prev = replace(st, condensed=tuple(
                (i, n + d["dn_dlnT"].get(i, 0.0) * dln if n + d["dn_dlnT"].get(i, 0.0) * dln > 0 else 0.5 * n)
                for i, n in st.condensed))
            T = T_new
        if not (lo_known and hi_known):
            raise SolverError(f"no temperature in the data range {tmin:g}-{tmax:g} K meets the "
                              f"{'enthalpy' if kind == 'h' else 'entropy'} target at {p:.6g} Pa", self.point)
        # a jump in h(T) or s(T) at a condensed phase change (melting plateau): lever rule at
        # the transition temperature itself (a range limit of the data inside the bracket)
        limits = [t for sp_ in self.cond_species for t in (sp_.thermo.min_temp, sp_.thermo.max_temp)
                  if lo - 1e-6 <= t <= hi + 1e-6]
        if limits:
            t_b = min(limits, key=lambda t: abs(t - 0.5 * (lo + hi)))
            lo, hi = t_b - 1e-7, t_b + 1e-7
        a, b = self.tp(lo, p, prev), self.tp(hi, p, prev)
        va, vb = (a.h, b.h) if kind == "h" else (a.s, b.s)
        if not va <= target <= vb or hi - lo > 1e-6 * hi:
            raise SolverError("temperature loop did not meet its target", self.point)
        w = (vb - target) / (vb - va)
        return self._blend(a, b, w)

    def _blend(self, a: MixState, b: MixState, w: float) -> MixState:
        """Lever rule: w of state a and 1 - w of state b at (nearly) the same T, p."""
        n_a, n_b = a.n_gas * a.X, b.n_gas * b.X
        n = w * n_a + (1 - w) * n_b
        cond: dict = {}
        for i, x in a.condensed:
            cond[i] = cond.get(i, 0.0) + w * x
        for i, x in b.condensed:
            cond[i] = cond.get(i, 0.0) + (1 - w) * x
        T = 0.5 * (a.T + b.T)   # the transition temperature (a and b sit 0.1 uK either side)
        gas = self.gas
        gas.TPX = T, a.p, n
        st = self._make_state(T, a.p, gas.X.copy(), float(n.sum()), sorted(cond.items()))
        return st

    # ---------------------------------------------------------------- frozen
    def frozen_sp(self, ref: MixState, s: float, p: float) -> MixState:
        """State at entropy s [J/(kg K)] and pressure p [Pa] with ref's composition fixed."""
        gas = self.gas
        if not (p > 0 and math.isfinite(p)):
            raise SolverError(f"pressure {p:.6g} Pa along the nozzle is not a positive number", self.point)
        if not ref.condensed:
            try:
                gas.TPX = ref.T, p, ref.X
                gas.SP = s, p
            except Exception:  # CanteraError: no such state
                raise SolverError(f"frozen state at {p:.6g} Pa not found in the data range", self.point) from None
            st = self._make_state(gas.T, p, ref.X, ref.n_gas, [])
        else:
            def f(T):
                return self._make_state(T, p, ref.X, ref.n_gas, ref.condensed).s - s
            lo, hi = max(self.gas.min_temp, 100.0), min(self.gas.max_temp, 6000.0)
            if f(lo) > 0 or f(hi) < 0:
                raise SolverError(f"frozen state at {p:.6g} Pa lies outside {lo:g}-{hi:g} K", self.point)
            T = brentq(f, lo, hi, xtol=1e-10, rtol=1e-14)
            st = self._make_state(T, p, ref.X, ref.n_gas, ref.condensed)
        for i, _ in st.condensed:
            if not self._cond_valid(i, st.T):
                th = self.cond_species[i].thermo
                raise SolverError(
                    f"frozen flow carries {self.cond_names[i]} to {st.T:.1f} K, outside its data "
                    f"range {th.min_temp:g}-{th.max_temp:g} K", self.point)
        return st

    # ---------------------------------------------------------------- derived
    def equilibrium_derivatives(self, st: MixState) -> dict:
        """Derivatives of an equilibrium state, solved analytically (memoised per state).

        See :func:`perfchain.thermo.derivatives.derivatives`.

        Differentiating the equilibrium conditions (gas: ln n_j = ln n + a_j.pi
        - mu0_j/RT - ln p/p0; condensed: mu0_c/RT = a_c.pi; element balances)
        gives one small linear system each for d/dlnT at constant p and d/dlnp
        at constant T (Gordon & McBride, NASA RP-1311, 1994, ch. 2; from
        memory; derived afresh here). Condensed volume is neglected.

        Returns
        -------
        dict
            ``cp`` [J/(kg K)], ``cv`` [J/(kg K)], ``dlnV_dlnT``, ``dlnV_dlnp``,
            ``gamma_s`` [-] (isentropic exponent), ``sound_speed`` [m/s].
        """
        cache = self.__dict__.setdefault("_derivative_cache", {})
        key = (st.T, st.p, st.h, st.s)
        if key in cache:
            return cache[key]
        out = derivatives(self, st)
        if len(cache) > 256:
            cache.clear()
        cache[key] = out
        return out

    def sound_speed(self, st: MixState, shifting: bool) -> float:
        """Sound speed [m/s]: equilibrium (``shifting``) or frozen composition.

        The equilibrium value comes from :meth:`equilibrium_derivatives`; the
        frozen one of a pure gas is Cantera's analytic sqrt(gamma R T / M);
        with condensed products frozen, a central difference along the isentrope.
        """
        if shifting:
            return self.equilibrium_derivatives(st)["sound_speed"]
        if not st.condensed:
            self.gas.TPX = st.T, st.p, st.X
            return float(self.gas.sound_speed)
        return self.sound_speed_fd(st, shifting=False)

    def sound_speed_fd(self, st: MixState, shifting: bool, rel_step: float = 1e-4) -> float:
        """Sound speed [m/s] by a central difference of p(rho) along the isentrope."""
        pp, pm = st.p * (1 + rel_step), st.p * (1 - rel_step)
        if shifting:
            a, b = self.sp(st.s, pp, st), self.sp(st.s, pm, st)
        else:
            a, b = self.frozen_sp(st, st.s, pp), self.frozen_sp(st, st.s, pm)
        return float(np.sqrt((pp - pm) / (a.density - b.density)))

    def cp_equilibrium(self, st: MixState) -> float:
        """Equilibrium heat capacity at constant pressure [J/(kg K)]."""
        return self.equilibrium_derivatives(st)["cp"]

    def cp_equilibrium_fd(self, st: MixState, rel_step: float = 1e-4) -> float:
        """Equilibrium cp [J/(kg K)] by a central difference of h(T) at constant p."""
        dT = st.T * rel_step
        return (self.tp(st.T + dT, st.p).h - self.tp(st.T - dT, st.p).h) / (2 * dT)

    def mole_fractions(self, st: MixState, threshold: float = 0.0) -> dict:
        """Mole fractions of all products, condensed included (per total moles) [-]."""
        total = st.n_gas + sum(n for _, n in st.condensed)
        out = {}
        v = st.X * st.n_gas / total
        for k in np.nonzero(v > threshold)[0]:
            out[self.species_names[k]] = float(v[k])
        for i, n in st.condensed:
            v = n / total
            if v > threshold:
                out[self.cond_names[i]] = out.get(self.cond_names[i], 0.0) + float(v)
        return dict(sorted(out.items(), key=lambda kv: -kv[1]))

    def condensed_mass_fraction(self, st: MixState) -> float:
        """Mass fraction of condensed products [-]."""
        return float(sum(n * self.cond_mw[i] for i, n in st.condensed))

    def check(self, st: MixState):
        """Raise SolverError when a state breaks element balance or the data range."""
        b = st.n_gas * (self.A.T @ st.X)
        for i, n in st.condensed:
            b = b + n * self.cond_A[i]
        err = np.abs(b - self.b).max() / max(np.abs(self.b).max(), 1e-300)
        if err > 1e-7:
            raise SolverError(f"element balance violated by {err:.1e}", self.point)
        if not (self.gas.min_temp - 1e-6 <= st.T <= self.gas.max_temp + 1e-6):
            raise SolverError(f"temperature {st.T:.1f} K outside the gas data range "
                              f"{self.gas.min_temp:g}-{self.gas.max_temp:g} K", self.point)
        for i, _ in st.condensed:
            if not self._cond_valid(i, st.T):
                raise SolverError(f"{self.cond_names[i]} at {st.T:.1f} K is outside its data range",
                                  self.point)


@lru_cache(maxsize=None)
def _weight(symbol):
    from perfchain.propellants.ingredients import atomic_weight

    return atomic_weight(symbol)
