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
from dataclasses import replace
from functools import lru_cache
from typing import Mapping

import numpy as np
from scipy.optimize import brentq, nnls

from perfchain.constants import R_UNIVERSAL
from perfchain.errors import SolverError
from perfchain.thermo.condensed import solve_condensed
from perfchain.thermo.gas import equilibrate_quietly, gas_only_state, gas_phase
from perfchain.thermo.products import ProductSpecies, product_species
from perfchain.thermo.state import MixState
from perfchain.thermo.state_properties import StateProperties
from perfchain.thermo.temperature_loop import temperature_loop

__all__ = ["EquilibriumSystem", "MixState", "R_UNIVERSAL"]

_ELEMENT_TOL = 1e-9   # relative element-balance residual allowed


class EquilibriumSystem(StateProperties):
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
        self.gas = gas_phase(tuple(s.name for s in ps.gas))
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
        self.cond_formula = [tuple(sorted(s.composition.items())) for s in self.cond_species]
        self.n0 = self._initial_moles(self.b)

    # ---------------------------------------------------------------- helpers
    def _initial_moles(self, b):
        """Non-negative species amounts with exactly the element totals ``b``."""
        n, res = nnls(self.A.T, b)
        if res > 1e-10 * max(np.abs(b).max(), 1e-30):
            raise SolverError("element totals cannot be matched by the gas species", self.point)
        return np.maximum(n, 0.0) + 1e-30

    def cond_g_rt(self, i: int, T: float) -> float:
        """Standard Gibbs energy over RT of condensed candidate i at T [K] [-].

        Examples
        --------
        Graphite at 298.15 K: h = 0 (the element's reference state) and s = 5.74 J/(mol K)
        (CODATA key value; from memory), so g/RT = -s/R = -0.690:

        >>> from perfchain.propellants.mixture import make_propellant
        >>> s = EquilibriumSystem(make_propellant("LOX", "RP-1", 1.5).elements)
        >>> round(s.cond_g_rt(s.cond_names.index("C(gr)"), 298.15), 3)
        -0.69
        """
        th = self.cond_species[i].thermo
        return (th.h(T) - T * th.s(T)) / (R_UNIVERSAL * T)

    def cond_valid(self, i: int, T: float, tol: float = 1e-6) -> bool:
        """Is T [K] inside the data range of condensed candidate i (widened by ``tol`` [K])?

        Examples
        --------
        Liquid water's data begin at its melting point, 273.15 K (NASA Glenn data, which
        give ice below it):

        >>> from perfchain.propellants.mixture import make_propellant
        >>> s = EquilibriumSystem(make_propellant("GOX", "GH2", equivalence_ratio=2.0).elements)
        >>> i = s.cond_names.index("H2O(L)")
        >>> s.cond_valid(i, 300.0), s.cond_valid(i, 270.0), s.cond_valid(i, 273.15 - 1e-7)
        (True, False, True)
        """
        th = self.cond_species[i].thermo
        return th.min_temp - tol <= T <= th.max_temp + tol

    def element_potentials(self) -> np.ndarray:
        """Element potentials over RT of the (equilibrated) gas phase held in ``self.gas`` [-].

        The least-squares solution of mu_j/RT = a_j . pi over the species above a mole
        fraction of 1e-10 (exact at equilibrium).

        Examples
        --------
        Pure argon: pi_Ar is the chemical potential of argon over RT (the definition):

        >>> from perfchain.propellants.ingredients import get_ingredient
        >>> s = EquilibriumSystem(get_ingredient("Ar").elements)
        >>> s.gas.TPX = 1000.0, 1e5, "Ar:1"
        >>> mu = float(s.gas.chemical_potentials[0]) / (R_UNIVERSAL * 1000.0)
        >>> round(float(s.element_potentials()[0]) / mu, 12)
        1.0
        """
        gas = self.gas
        X = gas.X
        mask = X > 1e-10
        mu = gas.chemical_potentials[mask] / (R_UNIVERSAL * gas.T)
        lam, *_ = np.linalg.lstsq(self.A[mask], mu, rcond=None)
        return lam

    def gas_tp(self, T: float, p: float, b) -> tuple:
        """Equilibrate the gas alone at T [K], p [Pa] for element totals b [kmol/kg].

        Returns
        -------
        tuple
            Mole fractions X [-], gas amount n_gas [kmol/kg], element potentials over RT [-].

        Examples
        --------
        Argon: all of it is gas (closed form):

        >>> from perfchain.propellants.ingredients import get_ingredient
        >>> s = EquilibriumSystem(get_ingredient("Ar").elements)
        >>> X, n, pi = s.gas_tp(1000.0, 1e5, s.b)
        >>> float(X[0]), round(n / float(s.b[0]), 12)
        (1.0, 1.0)
        """
        gas = self.gas
        n0 = self._initial_moles(b)
        try:
            gas.TPX = T, p, n0
            equilibrate_quietly(gas, "TP", rtol=1e-12)
        except Exception:  # CanteraError: retry with the slower, sturdier solver
            try:
                gas.TPX = T, p, n0
                equilibrate_quietly(gas, "TP", solver="vcs", rtol=1e-12)
            except Exception:
                raise SolverError(f"gas equilibrium failed at {T:.1f} K, {p:.6g} Pa",
                                  self.point) from None
        X = gas.X.copy()
        n_gas = self.gas_amount(X, b)
        return X, n_gas, self.element_potentials()

    def gas_amount(self, X, b) -> float:
        """Gas amount [kmol/kg] whose mole fractions X hold the element totals b [kmol/kg].

        Raises :class:`~perfchain.errors.SolverError` when no amount matches b to 1e-8.

        Examples
        --------
        Water vapour (H2O, X = 1) holding 2 kmol/kg of H and 1 of O: 1 kmol/kg (closed form):

        >>> import numpy as np
        >>> from perfchain.propellants.mixture import make_propellant
        >>> s = EquilibriumSystem(make_propellant("GOX", "GH2", equivalence_ratio=1.0).elements)
        >>> X = np.zeros(len(s.species_names)); X[s.species_names.index("H2O")] = 1.0
        >>> b = np.array([{"H": 2.0, "O": 1.0}[e] for e in s.element_names])
        >>> round(s.gas_amount(X, b), 12)
        1.0
        """
        c = self.A.T @ X
        n = float(c @ b / (c @ c))
        err = np.abs(n * c - b).max() / max(np.abs(b).max(), 1e-300)
        if err > _ELEMENT_TOL * 10:
            raise SolverError(f"element balance violated by {err:.1e} after the gas solve", self.point)
        return n

    def make_state(self, T: float, p: float, X, n_gas: float, condensed) -> MixState:
        """The :class:`MixState` of a given composition at T [K] and p [Pa] (no equilibrium solved).

        Parameters
        ----------
        T, p : float
            [K], [Pa].
        X : ndarray
            Gas mole fractions [-].
        n_gas : float
            Gas amount [kmol/kg].
        condensed : sequence of (int, float)
            (candidate index, amount [kmol/kg]) of each present phase.

        Examples
        --------
        Argon at 1000 K and 1 bar: density p M / (R T) = 0.48046 kg/m^3 (ideal gas, closed form):

        >>> import numpy as np
        >>> from perfchain.propellants.ingredients import get_ingredient
        >>> s = EquilibriumSystem(get_ingredient("Ar").elements)
        >>> round(s.make_state(1000.0, 1e5, np.array([1.0]), 1 / 39.948, []).density, 5)
        0.48046
        """
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
            if not self.cond_valid(i, T, tol=0.0):   # phases switch exactly at the range limits
                continue
            g = self.cond_g_rt(i, T)
            f = self.cond_formula[i]
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
        start = (guess.X, guess.n_gas) if guess is not None and seed else None
        X, n_gas, lam, amounts = self._settle(T, p, active, np.array([n for _, n in seed]), start)
        for _ in range(8):
            drive = {i: self.cond_g_rt(i, T) - self.cond_A[i] @ lam for i in cands if i not in active}
            new = [i for i, d in drive.items() if d < -1e-10]
            if not new:
                break
            # one at a time, most negative first, keeps the active set small and consistent
            active.append(min(new, key=drive.get))
            X, n_gas, lam, amounts = self._settle(T, p, active, np.append(amounts, 0.0))
        else:
            raise SolverError("condensed-phase selection did not settle", self.point)
        return self.make_state(T, p, X, n_gas, list(zip(active, amounts)))

    def _settle(self, T, p, active, amounts, start=None):
        """Solve the active condensed set (edited in place), dropping phases that come out absent.
        ``start`` (gas mole fractions, gas amount of a nearby state) warm-starts the Newton."""
        if not active:
            return (*self.gas_tp(T, p, self.b), np.zeros(0))
        try:
            X, n_gas, lam, amounts = solve_condensed(self, T, p, active, amounts, start)
        except SolverError:
            if start is None:
                raise
            X, n_gas, lam, amounts = solve_condensed(self, T, p, active, amounts)
        keep = amounts > 1e-14
        if keep.all():
            return X, n_gas, lam, amounts
        active[:] = [i for i, k in zip(active, keep) if k]
        return self._settle(T, p, active, amounts[keep])

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
            return temperature_loop(self, kind, target, p, guess.T * math.exp(dlnT * r), seeded)
        state = gas_only_state(self, kind, target, p, guess)
        if state is not None and not self._forms_condensed(state):
            return state
        T0 = state.T if state is not None else (guess.T if guess else 2500.0)
        return temperature_loop(self, kind, target, p, T0, guess)

    def _forms_condensed(self, st: MixState) -> bool:
        if not self.cond_species:
            return False
        self.gas.TPX = st.T, st.p, st.X
        lam = self.element_potentials()
        return any(self.cond_g_rt(i, st.T) - self.cond_A[i] @ lam < -1e-10
                   for i in self._candidates(st.T))

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
            st = self.make_state(gas.T, p, ref.X, ref.n_gas, [])
        else:
            st = self._frozen_condensed(ref, s, p)
        for i, _ in st.condensed:
            if not self.cond_valid(i, st.T):
                th = self.cond_species[i].thermo
                raise SolverError(
                    f"frozen flow carries {self.cond_names[i]} to {st.T:.1f} K, outside its data "
                    f"range {th.min_temp:g}-{th.max_temp:g} K", self.point)
        return st

    def _frozen_phases(self, condensed, T: float, above: bool = False) -> list:
        """Frozen condensed amounts moved to the phase of each substance whose data hold T [K]
        (the composition is frozen, not the phase: liquid alumina freezes at 2327 K).
        At a range limit, ``above`` picks the phase above it."""
        out = []
        for i, n in condensed:
            f = self.cond_formula[i]
            same = [j for j in range(len(self.cond_species)) if self.cond_formula[j] == f
                    and self.cond_valid(j, T, tol=0.0)]
            if same:
                th = [self.cond_species[j].thermo for j in same]
                k = max(range(len(same)), key=lambda q: th[q].max_temp if above else -th[q].min_temp)
                i = same[k] if len(same) > 1 else same[0]
            out.append((i, n))
        return out

    def _frozen_condensed(self, ref: MixState, s: float, p: float) -> MixState:
        """Frozen state with condensed phases: a root on T; on a phase change (a jump of s(T) at
        a transition temperature) the lever rule splits each substance between its two phases."""
        def state(T, above=False):
            return self.make_state(T, p, ref.X, ref.n_gas, self._frozen_phases(ref.condensed, T, above))

        lo, hi = max(self.gas.min_temp, 100.0), min(self.gas.max_temp, 6000.0)
        if state(lo).s > s or state(hi).s < s:
            raise SolverError(f"frozen state at {p:.6g} Pa lies outside {lo:g}-{hi:g} K", self.point)
        T = brentq(lambda t: state(t).s - s, lo, hi, xtol=1e-10, rtol=1e-14)
        st = state(T)
        if abs(st.s - s) <= 1e-9 * abs(s):
            return st
        limits = [t for sp_ in self.cond_species for t in (sp_.thermo.min_temp, sp_.thermo.max_temp)
                  if abs(t - T) < 1e-6 * T]
        if not limits:
            raise SolverError(f"frozen state at {p:.6g} Pa not found", self.point)
        t_b = limits[0]
        a, b = state(t_b, above=False), state(t_b, above=True)
        if not a.s <= s <= b.s:
            raise SolverError(f"frozen state at {p:.6g} Pa not found on the phase change at {t_b:g} K",
                              self.point)
        w = (b.s - s) / (b.s - a.s)
        cond: dict = {}
        for (i, x), (j, y) in zip(a.condensed, b.condensed):
            cond[i] = cond.get(i, 0.0) + w * x
            cond[j] = cond.get(j, 0.0) + (1 - w) * y
        return self.make_state(t_b, p, ref.X, ref.n_gas, sorted(cond.items()))


@lru_cache(maxsize=None)
def _weight(symbol):
    from perfchain.propellants.ingredients import atomic_weight

    return atomic_weight(symbol)
