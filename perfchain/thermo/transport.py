"""Transport properties of the gas products: viscosity, conductivity (frozen and reacting), cp, Prandtl.

For a gas composition at (T, p), per species the Lennard-Jones data of
:mod:`.transport_data` and the kinetic theory of :mod:`.transport_kinetic`; then

* viscosity by Wilke's mixture rule (Wilke, J. Chem. Phys. 18 (1950) 517);
* frozen thermal conductivity by the Mason-Saxena rule (Mason & Saxena, Phys. Fluids 1 (1958)
  361): lambda = sum x_i lambda_i / sum x_j A_ij with A_ij = 1.065 phi_ij (Wilke's phi) for
  i != j, A_ii = 1 (Poling, Prausnitz & O'Connell 2001, eq. 10-6.1);
* the chemical-reaction contribution to conductivity of a gas in local chemical equilibrium
  (Butler & Brokaw, J. Chem. Phys. 26 (1957) 1636; the form of Gordon & McBride, NASA RP-1311
  part I, 1994, section 5): lambda_r = dh^T A^-1 dh / (R T^2), with one row per independent
  reaction i, dh_i its heat of reaction and A_ij = sum_{k<l} (R T / (p D_kl)) x_k x_l
  (nu_ik/x_k - nu_il/x_l)(nu_jk/x_k - nu_jl/x_l). The result does not depend on which set of
  independent reactions is used; here the formation reactions of every species from the most
  abundant ones (the components);
* frozen cp of the gas, and the equilibrium cp of the reacting gas (the same reactions:
  cp_r = dh^T G^-1 dh / (R T^2) per mole, G_ij = sum_k nu_ik nu_jk / x_k - dnu_i dnu_j),
  unless the caller gives its own equilibrium cp (for example the chain's, which also counts
  condensed products);
* Prandtl numbers mu cp / lambda, frozen and equilibrium.

Condensed species are not part of the gas: they are left out (``excluded``) and the gas mole
fractions renormalised. A gas species with no transport data is left out too (``uncovered``) and
its mole fraction reported; above :data:`UNCOVERED_LIMIT` the values are not to be used
(:attr:`GasTransport.ok` is False).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Sequence

import numpy as np

from perfchain.constants import R_UNIVERSAL
from perfchain.errors import InputError
from perfchain.thermo import transport_kinetic as kin
from perfchain.thermo.transport_data import SpeciesTransport, species_transport

__all__ = ["GasTransport", "gas_transport", "UNCOVERED_LIMIT", "MIXTURE_RULES"]

#: largest gas mole fraction without transport data for which the result is usable [-]: leaving
#: out a fraction f changes a mixture value by about f at most, within the mixture rules' own
#: few per cent
UNCOVERED_LIMIT = 0.05
#: Mason-Saxena's constant in A_ij = 1.065 phi_ij (Mason & Saxena 1958)
_MASON_SAXENA = 1.065
#: species below this gas mole fraction take no part [-] (their share is far below the rules' accuracy)
_TRACE = 1e-12
MIXTURE_RULES = (
    "viscosity: Chapman-Enskog with Lennard-Jones collision integrals (Neufeld et al. 1972, "
    "Brokaw 1969 polar correction), Wilke (1950) mixture rule",
    "thermal conductivity: Warnatz (1982) pure-species form (Kee, Coltrin & Glarborg 2003), "
    "Mason-Saxena (1958) mixture rule",
    "reaction contribution for shifting flow: Butler & Brokaw (1957) as in Gordon & McBride, "
    "NASA RP-1311 (1994), with Chapman-Enskog binary diffusion coefficients",
)


@dataclass(frozen=True)
class GasTransport:
    """Transport properties of a gas mixture at one (T, p).

    Fields: viscosity [Pa s], thermal_conductivity [W/(m K)] (frozen),
    thermal_conductivity_equilibrium [W/(m K)] (frozen + reaction contribution),
    cp_frozen [J/(kg K)] (of the gas), cp_equilibrium [J/(kg K)] (the caller's, or of the
    reacting gas), prandtl [-] (frozen: mu cp_frozen / lambda), prandtl_equilibrium [-]
    (mu cp_equilibrium / lambda_equilibrium), excluded (condensed species left out),
    uncovered (gas species without transport data, left out), uncovered_fraction [-] (their
    gas mole fraction), species_sources (pairs of species name and data source), notes.
    """

    viscosity: float
    thermal_conductivity: float
    thermal_conductivity_equilibrium: float
    cp_frozen: float
    cp_equilibrium: float
    prandtl: float
    prandtl_equilibrium: float
    excluded: tuple = ()
    uncovered: tuple = ()
    uncovered_fraction: float = 0.0
    species_sources: tuple = ()
    notes: tuple = MIXTURE_RULES

    @property
    def ok(self) -> bool:
        """True when the gas species without data stay below :data:`UNCOVERED_LIMIT`."""
        return self.uncovered_fraction <= UNCOVERED_LIMIT


def _split(species, fractions):
    """(gas records with their x, condensed names, uncovered names, uncovered x) of a composition."""
    gas, excluded, uncovered, lost = [], [], [], 0.0
    for name, x in zip(species, fractions):
        kind = _kind(name)
        if isinstance(kind, SpeciesTransport):
            gas.append((kind, x))
        elif kind == "condensed":
            excluded.append(name)
        else:
            uncovered.append(name)
            lost += x
    return gas, tuple(excluded), tuple(uncovered), lost


@lru_cache(maxsize=1024)
def _kind(name):
    """A gas species' transport record, ``"condensed"``, or ``"uncovered"`` (a gas without data)."""
    from perfchain.thermo.products import condensed_molar_masses, gas_species

    rec = species_transport(name)
    if rec is not None:
        return rec
    if condensed_molar_masses((name,)):
        return "condensed"
    try:
        gas_species(name)
    except KeyError:
        raise InputError("species", name, "a NASA gas or condensed product name "
                         "(perfchain.thermo.products)") from None
    return "uncovered"


def _check(species, mole_fractions, temperature, pressure):
    if len(species) != len(mole_fractions) or not species:
        raise InputError("mole_fractions", len(mole_fractions),
                         f"one per species ({len(species)}), at least one")
    for field, v in (("temperature", temperature), ("pressure", pressure)):
        if not (math.isfinite(v) and v > 0):
            raise InputError(field, v, "a finite value above 0 (SI units)")
    if any(not (math.isfinite(x) and x >= 0) for x in mole_fractions):
        raise InputError("mole_fractions", list(mole_fractions), "finite values >= 0")


def _reactions(recs, x):
    """Independent formation reactions (rows, per species) from the most abundant components.

    Row reduction of the element matrix with its columns in order of falling mole fraction:
    the pivot columns are the components, and the reduced column of every other species holds
    the amounts of the components that form it.
    """
    e_mat = _element_matrix(tuple(r.name for r in recs))
    order = np.argsort(-x, kind="stable")
    red = e_mat[:, order].copy()
    pivots, row = [], 0
    for col in range(red.shape[1]):
        if row == red.shape[0]:
            break
        k = row + int(np.argmax(np.abs(red[row:, col])))
        if abs(red[k, col]) < 1e-9:
            continue
        red[[row, k]] = red[[k, row]]
        red[row] /= red[row, col]
        others = np.arange(red.shape[0]) != row
        red[others] -= np.outer(red[others, col], red[row])
        pivots.append(col)
        row += 1
    free = [c for c in range(red.shape[1]) if c not in pivots]
    nu = np.zeros((len(free), len(recs)))
    for i, c in enumerate(free):
        nu[i, order[c]] = 1.0
        nu[i, order[pivots]] = -red[:len(pivots), c]
    return nu


@lru_cache(maxsize=256)
def _element_matrix(names):
    comps = [_composition(n) for n in names]
    elements = sorted({e for c in comps for e in c})
    return np.array([[c.get(e, 0.0) for c in comps] for e in elements])


def _composition(name):
    from perfchain.thermo.products import gas_species

    return gas_species(name).composition


def _quadratic(mat, vec):
    """vec^T mat^-1 vec for a symmetric positive-definite mat, scaled by its diagonal."""
    if vec.size == 0:
        return 0.0
    s = 1.0 / np.sqrt(np.diag(mat))
    y = np.linalg.solve(mat * np.outer(s, s), vec * s)
    return float((vec * s) @ y)


def gas_transport(species: Sequence[str], mole_fractions: Sequence[float], temperature: float,
                  pressure: float, *, cp_equilibrium: float | None = None) -> GasTransport:
    """Viscosity, conductivity (frozen and reacting), cp and Prandtl numbers of a gas mixture.

    Parameters
    ----------
    species : sequence of str
        NASA product names (:mod:`perfchain.thermo.products`); condensed ones are allowed and
        left out (``excluded``).
    mole_fractions : sequence of float
        Mole fractions [-], one per species (renormalised over the gas species with data).
    temperature : float
        [K].
    pressure : float
        [Pa] (enters the binary diffusion coefficients of the reaction contribution only).
    cp_equilibrium : float, optional
        Equilibrium specific heat to use [J/(kg K)]; by default that of the reacting gas.

    Returns
    -------
    GasTransport

    Examples
    --------
    Air-like N2/O2 at 300 K (Incropera & DeWitt, *Fundamentals of Heat and Mass Transfer*,
    Table A.4, air at 300 K: 18.46 uPa s, 0.0263 W/(m K), Pr 0.707; from memory; here within
    1 %, 1 % and 3 %):

    >>> t = gas_transport(["N2", "O2"], [0.79, 0.21], 300.0, 101325.0)
    >>> round(t.viscosity * 1e6, 1), round(t.thermal_conductivity, 3), round(t.prandtl, 2)
    (18.6, 0.026, 0.73)

    Liquid water is not part of the gas:

    >>> gas_transport(["H2O", "H2O(L)"], [0.5, 0.5], 400.0, 1e5).excluded
    ('H2O(L)',)
    """
    _check(species, mole_fractions, temperature, pressure)
    gas, excluded, uncovered, lost = _split(species, mole_fractions)
    total = sum(x for _, x in gas) + lost
    gas = [(r, x) for r, x in gas if total > 0 and x / total >= _TRACE]
    if not gas:
        raise InputError("mole_fractions", list(mole_fractions),
                         "some gas species with transport data")
    recs = tuple(r for r, _ in gas)
    x = np.array([v for _, v in gas])
    x = x / x.sum()
    t = float(temperature)
    arr = _arrays(recs)
    cp_k = np.array([th.cp(t) for th in arr["thermo"]])     # [J/(kmol K)]
    h_k = np.array([th.h(t) for th in arr["thermo"]])       # [J/kmol]
    mu, lam = _frozen(t, x, cp_k, arr)
    m_mix = float(x @ arr["m"])
    cp_f = float(x @ cp_k) / m_mix
    lam_r, cp_r = _reacting(t, float(pressure), x, h_k, recs, arr)
    cp_e = float(cp_equilibrium) if cp_equilibrium is not None else cp_f + cp_r / m_mix
    lam_e = lam + lam_r
    notes = MIXTURE_RULES + (
        ("equilibrium cp: given by the caller" if cp_equilibrium is not None
         else "equilibrium cp: of the reacting gas (same reactions as the conductivity)"),)
    if excluded:
        notes += (f"condensed species left out of the gas transport: {', '.join(excluded)}",)
    if uncovered:
        notes += (f"gas species without transport data left out: {', '.join(uncovered)} "
                  f"(gas mole fraction {lost / total:.2g})",)
    return GasTransport(
        viscosity=mu, thermal_conductivity=lam, thermal_conductivity_equilibrium=lam_e,
        cp_frozen=cp_f, cp_equilibrium=cp_e, prandtl=mu * cp_f / lam,
        prandtl_equilibrium=mu * cp_e / lam_e, excluded=excluded, uncovered=uncovered,
        uncovered_fraction=lost / total if total > 0 else 0.0,
        species_sources=tuple((r.name, r.source) for r in recs), notes=notes)


@lru_cache(maxsize=256)
def _arrays(recs):
    """Per-species arrays of one species set (a tuple of SpeciesTransport), built once."""
    from perfchain.thermo.products import gas_species

    m = np.array([r.molar_mass for r in recs])
    sig = np.array([r.diameter for r in recs])
    eps = np.array([r.well_depth for r in recs])
    return {"m": m, "sig": sig, "eps": eps,
            "delta": kin.reduced_dipole([r.dipole for r in recs], eps, sig),
            "cv_rot": np.array([r.cv_rot for r in recs]),
            "z_rot": np.array([r.rotational_relaxation for r in recs]),
            "thermo": tuple(gas_species(r.name).thermo for r in recs)}


def _frozen(t, x, cp_k, arr):
    """Mixture viscosity (Wilke) and frozen conductivity (Mason-Saxena) [Pa s], [W/(m K)]."""
    mu_k = kin.viscosity_pure(t, arr["m"], arr["sig"], arr["eps"], arr["delta"])
    lam_k = kin.conductivity_pure(t, arr["m"], mu_k, cp_k - R_UNIVERSAL, arr["cv_rot"],
                                  arr["z_rot"], arr["eps"], arr["delta"])
    phi = kin.wilke_phi(mu_k, arr["m"])
    a_ms = _MASON_SAXENA * phi
    np.fill_diagonal(a_ms, 1.0)
    return float(np.sum(x * mu_k / (phi @ x))), float(np.sum(x * lam_k / (a_ms @ x)))


def _reacting(t, p, x, h_k, recs, arr):
    """Reaction conductivity [W/(m K)] and reaction cp per kmol [J/(kmol K)] (Butler & Brokaw)."""
    nu = _reactions(recs, x)
    if not nu.shape[0]:
        return 0.0, 0.0
    dh = nu @ h_k
    d = kin.binary_diffusion(t, p, arr["m"], arr["sig"], arr["eps"], arr["delta"])
    c = R_UNIVERSAL * t * np.outer(x, x) / (p * d)
    np.fill_diagonal(c, 0.0)
    w = nu / x
    a_mat = w @ (np.diag(c.sum(axis=1)) - c) @ w.T
    dn = nu.sum(axis=1)
    g_mat = w @ nu.T - np.outer(dn, dn)
    rt2 = R_UNIVERSAL * t * t
    return _quadratic(a_mat, dh) / rt2, _quadratic(g_mat, dh) / rt2
