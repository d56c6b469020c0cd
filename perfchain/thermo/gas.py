"""Cantera's gas-phase pieces of the general path: one ideal-gas phase per species set, quiet
equilibria, and the gas-only HP/SP state.

Used by :class:`~perfchain.thermo.equilibrium.EquilibriumSystem`; the functions that take a
``system`` read only its public attributes and methods.
"""

from __future__ import annotations

import functools
import threading
import warnings
from functools import lru_cache

from perfchain.errors import SolverError
from perfchain.thermo.products import gas_species
from perfchain.thermo.state import residual_ok
from perfchain.thermo.temperature_loop import least_value

__all__ = ["gas_phase", "equilibrate_quietly", "gas_only_state", "per_thread_cache"]


def per_thread_cache(maxsize: int):
    """``functools.lru_cache``, one per thread: for objects that hold a state and must not be shared.

    A Cantera phase keeps its temperature, pressure and composition between calls, so two
    threads equilibrating one phase at once get each other's states (rows failed with
    "element balance violated" on a Dask worker running several threads). Each thread
    therefore gets its own phases (and the systems built on them); a process with one thread
    behaves exactly as with a plain ``lru_cache``.

    Parameters
    ----------
    maxsize : int
        Entries kept per thread.

    Examples
    --------
    >>> import threading
    >>> @per_thread_cache(maxsize=4)
    ... def box(x):
    ...     return [x]
    >>> box(1) is box(1)
    True
    >>> seen = []
    >>> t = threading.Thread(target=lambda: seen.append(box(1)))
    >>> t.start(); t.join()
    >>> seen[0] is box(1), seen[0] == box(1)
    (False, True)
    """
    def wrap(make):
        local = threading.local()

        @functools.wraps(make)
        def cached(*args):
            made = getattr(local, "cached", None)
            if made is None:
                made = local.cached = lru_cache(maxsize=maxsize)(make)
            return made(*args)
        return cached
    return wrap


@per_thread_cache(maxsize=32)
def gas_phase(names: tuple):
    """One Cantera ideal-gas phase per tuple of NASA gas species names, shared within a thread
    (:func:`per_thread_cache`: a phase holds a state, so threads never share one).

    Parameters
    ----------
    names : tuple of str
        Species names of the NASA data (``nasa_gas.yaml``).

    Returns
    -------
    cantera.Solution

    Examples
    --------
    Nitrogen and its atoms: molar masses 28.014 and 14.007 kg/kmol (IUPAC standard atomic
    weight of N, 14.007):

    >>> g = gas_phase(("N2", "N"))
    >>> [round(float(m), 3) for m in g.molecular_weights]
    [28.014, 14.007]
    """
    import cantera as ct

    return ct.Solution(thermo="ideal-gas", species=[gas_species(n) for n in names])


def equilibrate_quietly(gas, mode: str, **kw):
    """Cantera's gas equilibrium without its out-of-range warning (our checks reject such states).

    Parameters
    ----------
    gas : cantera.Solution
    mode : str
        Cantera's property pair held fixed (``"TP"``, ``"HP"``, ``"SP"``); T in [K], p in [Pa].
    **kw
        Passed to ``gas.equilibrate``.

    Examples
    --------
    N2 at 300 K and 1 atm stays molecular: dissociation is negligible below ~3000 K
    (N2 bond energy 9.76 eV; from memory):

    >>> g = gas_phase(("N2", "N"))
    >>> g.TPX = 300.0, 101325.0, "N2:1"
    >>> equilibrate_quietly(g, "TP")
    >>> float(g.X[0]) > 0.999999
    True
    """
    with warnings.catch_warnings():
        warnings.filterwarnings("ignore", message=r"ChemEquil::equilibrate", category=UserWarning)
        gas.equilibrate(mode, **kw)


def _unreachable(system, kind: str, target: float, p: float) -> bool:
    """True when no equilibrium state in the data's temperature range meets the target: even the
    least enthalpy (or entropy) any products can have at its lowest temperature is above it
    (:func:`perfchain.thermo.temperature_loop.least_value`, a linear program of a few ms)."""
    return least_value(system, kind, max(system.gas.min_temp, 200.0), p) > target


def gas_only_state(system, kind: str, target: float, p: float, guess=None):
    """Cantera's gas-only HP (``kind="h"``) or SP (``"s"``) equilibrium of a system; None on failure.

    No condensed phase is considered. A state outside the gas data range, or one whose
    target residual or element balance is off, is never returned.

    Parameters
    ----------
    system : EquilibriumSystem
    kind : str
        ``"h"`` or ``"s"``.
    target : float
        Enthalpy [J/kg] or entropy [J/(kg K)].
    p : float
        Pressure [Pa].
    guess : MixState, optional
        A nearby solved state (its temperature and, if gas-only, composition start the solve).

    Returns
    -------
    MixState or None

    Examples
    --------
    Argon (cp = 5/2 R/M) with h = 5/2 R/M (3000 K - 298.15 K) is at 3000 K (closed form;
    M the data's molar mass):

    >>> from perfchain.thermo.equilibrium import EquilibriumSystem, R_UNIVERSAL
    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> s = EquilibriumSystem(get_ingredient("Ar").elements)
    >>> st = gas_only_state(s, "h", 2.5 * R_UNIVERSAL / s.mw[0] * (3000.0 - 298.15), 1e5)
    >>> round(st.T, 6)
    3000.0
    """
    gas = system.gas
    T0 = guess.T if guess is not None else 3000.0
    X0 = guess.X if (guess is not None and not guess.condensed) else None
    for attempt in range(3):
        try:
            if X0 is None or attempt:
                gas.TPX = (T0 if attempt < 2 else 2000.0), p, system.n0
                equilibrate_quietly(gas, "TP")
            else:
                gas.TPX = T0, p, X0
            if kind == "h":
                gas.HP = target, p
            else:
                gas.SP = target, p
            if not (gas.min_temp <= gas.T <= gas.max_temp) and _unreachable(system, kind, target, p):
                return None     # Cantera would crawl from there (N2O4/MMH at O/F 1e15: ~25 s) to fail
            equilibrate_quietly(gas, kind.upper() + "P", rtol=1e-12)
        except Exception:
            continue
        X = gas.X.copy()
        T = gas.T
        try:
            n_gas = system.gas_amount(X, system.b)
        except SolverError:
            continue
        if not (gas.min_temp <= T <= gas.max_temp):
            return None  # outside the data: never accept an extrapolated state
        st = system.make_state(T, p, X, n_gas, [])
        if residual_ok(kind, st, target):
            return st
    return None
