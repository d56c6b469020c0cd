"""Species pruning: solve with the species that matter, prove the rest stay negligible.

A propellant of C, H, O and N has about a hundred product species in the NASA
data, but at rocket conditions only a dozen or two exceed a mole fraction of
1e-10 anywhere between chamber and exit. Solving with that subset is 10-30x
faster. It is safe because the element potentials of the pruned solution
predict the mole fraction every left-out species would have at equilibrium
(ideal gas: ln x_k = a_k . pi - mu0_k/RT - ln(p/p_ref)); if any prediction
exceeds the threshold the species is added back and the point solved again.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from perfchain.thermo.equilibrium import EquilibriumSystem, MixState
from perfchain.thermo.products import ProductSpecies

__all__ = ["KEEP_THRESHOLD", "ALARM_THRESHOLD", "subset_system", "initial_subset",
           "left_out_violations", "lift"]

KEEP_THRESHOLD = 1e-12   #: species above this mole fraction in a solved state are kept [-]
ALARM_THRESHOLD = 1e-10  #: a left-out species predicted above this forces a re-solve [-]


def subset_system(full: EquilibriumSystem, names) -> EquilibriumSystem:
    """An :class:`EquilibriumSystem` over the named gas species (cached on ``full``)."""
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
        g = full.gas.standard_gibbs_RT[idx]
        lnx = A_out @ lam - g - math.log(st.p / full.gas.reference_pressure)
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
