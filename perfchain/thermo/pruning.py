"""Species pruning: solve with the species that matter, prove the rest stay negligible.

A propellant of C, H, O and N has about a hundred product species in the NASA
data, but at rocket conditions only a dozen or two exceed a mole fraction of
1e-10 anywhere between chamber and exit. Solving with that subset is 10-30x
faster. It is safe because the element potentials of the pruned solution
predict the mole fraction every left-out species would have at equilibrium
(ideal gas: ln x_k = a_k . pi - mu0_k/RT - ln(p/p_ref)); if any prediction
exceeds the threshold the species is added back and the point solved again.

Two places prune. The general path (:mod:`perfchain.performance.general`) solves Cantera states
on a named subset (:func:`subset_system`, :func:`left_out_violations`). The batch solver's
Newton (:mod:`.newton`) prunes each row on its own, compiled: a solve starts with the gas
species above :data:`ROW_KEEP` in its starting state (:func:`row_in_use`), and when it has
converged :func:`prove_left_out` predicts every left-out species from the element potentials;
one predicted above :data:`ROW_ALARM` joins and the Newton goes on, the others get their
predicted (equilibrium) amounts. Condensed candidates are never left out of the test: an absent
one must not lower the Gibbs energy (``mu0_c/RT >= a_c . pi``, :func:`perfchain.thermo.phases.add_phase`),
and it costs the linear system nothing (its row and column are an identity). A row's set is a
function of its own starting state only, so rows still never mix.
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import TYPE_CHECKING

import numpy as np

from perfchain.thermo.jit import jit
from perfchain.thermo.kernel import LN_1E4, LN_FLOOR, fit_k

if TYPE_CHECKING:
    from perfchain.thermo.equilibrium import EquilibriumSystem, MixState

__all__ = ["KEEP_THRESHOLD", "ALARM_THRESHOLD", "ROW_KEEP", "ROW_ALARM", "subset_system", "initial_subset",
           "left_out_violations", "lift", "row_in_use", "listed", "prove_left_out"]

KEEP_THRESHOLD = 1e-12   #: species above this mole fraction in a solved state are kept [-]
ALARM_THRESHOLD = 1e-10  #: a left-out species predicted above this forces a re-solve [-]
ROW_KEEP = 1e-14         #: batch rows: gas species above this mole fraction at a solve's start take part [-]
ROW_ALARM = 1e-12        #: batch rows: a left-out species predicted above this joins the solve [-]
_LN_ROW_KEEP = math.log(ROW_KEEP)
_LN_ROW_ALARM = math.log(ROW_ALARM)


def subset_system(full: EquilibriumSystem, names) -> EquilibriumSystem:
    """An :class:`EquilibriumSystem` over the named gas species (cached on ``full``)."""
    from perfchain.thermo.equilibrium import EquilibriumSystem
    from perfchain.thermo.products import ProductSpecies

    key = tuple(sorted(set(names), key=full.species_names.index))
    cache = full.__dict__.setdefault("_subsets", {})
    if key not in cache:
        gas = tuple(full.gas.species(n) for n in key)
        ps = ProductSpecies(tuple(full.element_names), gas, tuple(full.cond_species))
        elements = dict(zip(full.element_names, full.b))
        cache[key] = EquilibriumSystem(elements, products=ps, point=full.point)
        if len(cache) > 64:
            cache.pop(next(iter(cache)))
    sub = cache[key]
    sub.point = full.point
    return sub


def initial_subset(full: EquilibriumSystem, states) -> list[str]:
    """Names of the species above :data:`KEEP_THRESHOLD` in any of ``states`` (of ``full``)."""
    keep = set()
    for st in states:
        keep.update(n for n, x in zip(full.species_names, st.X) if x > KEEP_THRESHOLD)
    return sorted(keep, key=full.species_names.index)


def left_out_violations(full: EquilibriumSystem, work: EquilibriumSystem, states) -> list[str]:
    """Left-out species whose predicted mole fraction exceeds :data:`ALARM_THRESHOLD`.

    ``states`` are solved states of ``work`` (a subset of ``full``).
    """
    if work is full:
        return []
    inside = set(work.species_names)
    idx = [k for k, n in enumerate(full.species_names) if n not in inside]
    if not idx:
        return []
    order = [work.element_names.index(e) for e in full.element_names]
    A_out = full.A[idx]
    bad = set()
    for st in states:
        work.gas.TPX = st.T, st.p, st.X
        lam = work.element_potentials()[order]
        full.gas.TP = st.T, st.p
        g = full.gas.standard_gibbs_RT[idx]      # Cantera's ideal-gas standard state is at p: ln(p/p0) is in it
        lnx = A_out @ lam - g
        for k, v in zip(idx, lnx):
            if v > math.log(ALARM_THRESHOLD):
                bad.add(full.species_names[k])
    return sorted(bad)


def lift(st: MixState, src: EquilibriumSystem, dst: EquilibriumSystem) -> MixState:
    """A state of ``src`` re-expressed over ``dst``'s species (a superset): same T, p, h, s.

    Species ``src`` left out get mole fraction 0; condensed candidates are shared.
    """
    if src is dst:
        return st
    X = np.zeros(dst.gas.n_species)
    index = {n: k for k, n in enumerate(dst.species_names)}
    for n, x in zip(src.species_names, st.X):
        X[index[n]] = x
    return replace(st, X=X)


@jit
def row_in_use(i, lnn, lnN, use):
    """Mark in ``use`` (bool, (K,)) the gas species of row i above :data:`ROW_KEEP` of the gas.

    Examples
    --------
    Mole fractions 0.9, 1e-13 and 1e-20: the first two take part:

    >>> import numpy as np
    >>> use = np.empty(3, bool)
    >>> row_in_use(0, np.log([[0.9, 1e-13, 1e-20]]), np.zeros(1), use)
    >>> use.tolist()
    [True, True, False]
    """
    for k in range(use.shape[0]):
        use[k] = lnn[i, k] - lnN[i] > _LN_ROW_KEEP


@jit
def listed(use, idx):
    """The species marked in ``use`` (bool, (K,)) written to ``idx`` (int, (K,)) in increasing order.

    Returns
    -------
    int
        How many there are (``idx[:n]``).

    Examples
    --------
    >>> import numpy as np
    >>> idx = np.empty(3, np.int64)
    >>> n = listed(np.array([True, False, True]), idx)
    >>> n, idx[:n].tolist()
    (2, [0, 2])
    """
    n = 0
    for k in range(use.shape[0]):
        if use[k]:
            idx[n] = k
            n += 1
    return n


@jit
def prove_left_out(i, A, gas_coef, gas_mid, T, lnP, pi, lnn, lnN, use):
    """The proof for row i's left-out gas species at a converged state, and their amounts.

    Each species k not in ``use`` has at equilibrium ln x_k = a_k . pi - mu0_k/RT - ln(p/p_ref)
    (ideal gas; pi the row's element potentials over RT, mu0_k/RT from the NASA-7 fit at
    T[i]). One predicted above :data:`ROW_ALARM` joins ``use`` (its amount set to the
    prediction, at most a mole fraction of 1e-4, so the Newton can take it from there); the
    others get the predicted amount, or none (the floor e^-690) below :data:`ROW_KEEP`.

    Returns
    -------
    bool
        True if a species joined (the row is not solved yet).

    Examples
    --------
    One element, three species with mu0/RT = 0, 5 and 40 at p = p_ref and pi = 0 (closed form:
    ln x = -mu0/RT). The second, left out, has ln x = -5, far above the alarm: it joins, at a
    mole fraction of 1e-4 to start with. The third, ln x = -40 (4e-18), stays out, at no amount:

    >>> import numpy as np
    >>> coef = np.zeros((2, 7, 3))
    >>> coef[:, 5, 1], coef[:, 5, 2] = 5.0 * 1000.0, 40.0 * 1000.0    # h/RT = a6/T at 1000 K
    >>> use, lnn = np.array([True, False, False]), np.array([[0.0, -700.0, -700.0]])
    >>> prove_left_out(0, np.ones((3, 1)), coef, np.full(3, 6000.0), np.array([1000.0]), 0.0,
    ...                np.zeros((1, 1)), lnn, np.zeros(1), use)
    True
    >>> use.tolist(), [round(float(v), 4) for v in lnn[0]]
    ([True, True, False], [0.0, -9.2103, -690.0])
    """
    Ti = T[i]
    lnT = math.log(Ti)
    E = A.shape[1]
    added = False
    for k in range(use.shape[0]):
        if use[k]:
            continue
        _, Hk, Sk = fit_k(Ti, lnT, gas_coef, gas_mid, k)
        pred = Sk - Hk - lnP
        for e in range(E):
            pred += A[k, e] * pi[i, e]
        if pred > _LN_ROW_ALARM:
            use[k] = True
            lnn[i, k] = lnN[i] + min(pred, LN_1E4)
            added = True
        else:       # below ROW_KEEP: out of the sums downstream too (props, derivatives)
            lnn[i, k] = lnN[i] + (pred if pred > _LN_ROW_KEEP else LN_FLOOR)
    return added
