"""The arrays the compiled kernels work on: atoms and NASA-7 fits of one product set.

Built once per set of gas species, condensed candidates and elements from the same NASA
Glenn data Cantera loads (``nasa_gas.yaml``, ``nasa_condensed.yaml``), and cached.
"""

from __future__ import annotations

import threading
from dataclasses import dataclass

import numpy as np

__all__ = ["Tables", "tables_for"]


@dataclass(frozen=True)
class Tables:
    """Arrays of one product set (gas species, condensed candidates, elements)."""

    element_names: tuple
    species_names: tuple
    cond_names: tuple
    A: np.ndarray          # (K, E) atoms of each element in each gas species
    AT: np.ndarray         # (E, K)
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


def tables_for(system) -> Tables:
    """The :class:`Tables` of an :class:`~perfchain.thermo.equilibrium.EquilibriumSystem`'s species.

    Parameters
    ----------
    system : EquilibriumSystem

    Returns
    -------
    Tables
        Cached per (gas species, condensed candidates, elements); temperatures in [K],
        the data's reference pressure in [Pa].

    Examples
    --------
    Argon has one product species, no condensed phase, and NASA Glenn data from 200 to
    6000 K (McBride, Zehe & Gordon, NASA TP-2002-211556); Cantera holds the fits at a
    reference pressure of one standard atmosphere:

    >>> from perfchain.thermo.equilibrium import EquilibriumSystem
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> tab = tables_for(EquilibriumSystem(get_ingredient("Ar").elements))
    >>> tab.species_names, tab.cond_names, tab.t_min, tab.t_max, tab.p_ref, tab.supported
    (('Ar',), (), 200.0, 6000.0, 101325.0, True)
    """
    key = (tuple(system.species_names), tuple(system.cond_names), tuple(system.element_names))
    with _TABLES_LOCK:   # read-only tables, shared by every thread; the dict itself is guarded
        tab = _TABLES.get(key)
        if tab is None:
            tab = _TABLES[key] = _build(system)
            if len(_TABLES) > 16:
                _TABLES.pop(next(iter(_TABLES)))
    return tab


_TABLES: dict = {}
_TABLES_LOCK = threading.Lock()


def _nasa7(thermo):
    """(low, high, T_mid) coefficients of a 2-range NASA-7 fit, or None."""
    if type(thermo).__name__ != "NasaPoly2":
        return None
    c = np.asarray(thermo.coeffs, float)
    return c[8:15], c[1:8], c[0]


def _coef(fits, n):
    """(2, 7, n) contiguous coefficient array of n fits (low, high)."""
    return np.ascontiguousarray(np.array([[f[0] for f in fits], [f[1] for f in fits]]).reshape(2, n, 7)
                                .transpose(0, 2, 1))


def _build(system) -> Tables:
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
    formulas = sorted(set(system.cond_formula))
    return Tables(
        element_names=tuple(system.element_names), species_names=tuple(system.species_names),
        cond_names=tuple(system.cond_names), A=A, AT=np.ascontiguousarray(A.T),
        gas_coef=_coef(fits, len(fits)), gas_mid=np.array([f[2] for f in fits], float),
        cA=cA, cAT=np.ascontiguousarray(cA.T),
        cond_coef=_coef(cfits, C), cond_mid=np.array([f[2] for f in cfits], float).reshape(C),
        cond_tmin=np.array([s.thermo.min_temp for s in system.cond_species], float).reshape(C),
        cond_tmax=np.array([s.thermo.max_temp for s in system.cond_species], float).reshape(C),
        cond_formula=tuple(system.cond_formula),
        formula_id=np.array([formulas.index(f) for f in system.cond_formula], np.int64).reshape(C),
        t_min=float(gas.min_temp), t_max=float(gas.max_temp), p_ref=float(gas.reference_pressure),
        supported=supported)
