"""Which product species come from the NASA data that Cantera ships.

Gas products come from ``nasa_gas.yaml`` (748 species), condensed products from
``nasa_condensed.yaml`` (382), both NASA Glenn polynomial fits (McBride, Zehe &
Gordon, NASA TP-2002-211556). Only species made of the propellant's elements
are kept: species of absent elements cost time for nothing. By default:

* ions are left out (their mole fractions in chemical rockets stay below
  ~1e-6; ionization is not modelled);
* gas species of C, H, O, N and the noble gases whose data start above 200 K are
  left out, because they raise the phase's minimum temperature and make the
  equilibrium solver fail in cold nozzle exits (heavy hydrocarbons such as
  n-pentane and Jet-A vapour, none of them a combustion product at rocket
  conditions). Species of any other element (metals, halogens, S...) are all
  kept: most of their records start at 298.15 or 300 K, and they include the
  main carriers of those elements (HCl, AlCl, AlOH, KOH, KCl, MgCl2); such a
  system's gas data then start at 300 K, and a colder state is reported
  as outside the data, never extrapolated;
* condensed species that are really liquid *reactants* (benzene, toluene,
  n-octane, Jet-A) are left out of the products.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

__all__ = ["ProductSpecies", "product_species", "gas_species", "GAS_DATA", "CONDENSED_DATA"]

GAS_DATA = "nasa_gas.yaml"
CONDENSED_DATA = "nasa_condensed.yaml"
_LIGHT = {"C", "H", "O", "N", "Ar", "He"}
_REACTANT_LIQUIDS = {"C6H6(L)", "C7H8(L)", "C8H18(L),n-octa", "Jet-A(L)"}
#: density given to condensed products [kg/m^3]; the gas-dynamic calculation
#: neglects condensed volume, this only keeps Cantera's phase objects sane.
CONDENSED_DENSITY = 2000.0


@dataclass(frozen=True)
class ProductSpecies:
    """The candidate products for one set of elements.

    Attributes
    ----------
    elements : tuple of str
    gas : tuple of cantera.Species
    condensed : tuple of cantera.Species
    """

    elements: tuple
    gas: tuple
    condensed: tuple


@lru_cache(maxsize=1)
def _all_species():
    import cantera as ct

    return (tuple(ct.Species.list_from_file(GAS_DATA)),
            tuple(ct.Species.list_from_file(CONDENSED_DATA)))


@lru_cache(maxsize=1)
def _gas_by_name():
    return {s.name: s for s in _all_species()[0]}


def gas_species(name: str):
    """The NASA gas species record called ``name`` (a cantera.Species).

    >>> gas_species("H2O").composition == {"H": 2.0, "O": 1.0}
    True
    """
    return _gas_by_name()[name]


@lru_cache(maxsize=64)
def product_species(elements: frozenset, condensed: bool = True,
                    exclude: frozenset = frozenset()) -> ProductSpecies:
    """Candidate product species for a propellant made of ``elements``.

    Parameters
    ----------
    elements : frozenset of str
        Element symbols as Cantera writes them (``"H"``, ``"O"``, ``"Al"``...).
    condensed : bool
        Keep condensed candidates (graphite, liquid and solid water, alumina...).
    exclude : frozenset of str
        Species names to leave out.

    Examples
    --------
    The hydrogen-oxygen system in the NASA data has nine gas species
    (H, HO2, H2, H2O, H2O2, O, OH, O2, O3) and liquid and solid water:

    >>> p = product_species(frozenset({"H", "O"}))
    >>> len(p.gas), sorted(s.name for s in p.condensed)
    (9, ['H2O(L)', 'H2O(s)'])
    """
    gas_all, cond_all = _all_species()
    elements = frozenset(elements)

    def keep(s):
        comp = set(s.composition)
        return comp <= elements and "E" not in comp and s.name not in exclude

    gas = tuple(s for s in gas_all if keep(s) and (s.thermo.min_temp <= 200.0 + 1e-9
                                                   or not set(s.composition) <= _LIGHT))
    cond = ()
    if condensed:
        cond = tuple(s for s in cond_all if keep(s) and s.name not in _REACTANT_LIQUIDS)
    return ProductSpecies(tuple(sorted(elements)), gas, cond)


def condensed_molar_masses(names: tuple) -> dict:
    """Molar masses [kg/kmol] of condensed species of the NASA data, by name (unknown names left out).

    Examples
    --------
    Alumina, Al2O3: 2 x 26.982 + 3 x 15.999 = 101.96 (IUPAC standard atomic weights):

    >>> round(condensed_molar_masses(("AL2O3(a)",))["AL2O3(a)"], 2)
    101.96
    """
    from perfchain.propellants.ingredients import atomic_weight

    by_name = {s.name: s for s in _all_species()[1]}
    return {n: sum(atomic_weight(e) * k for e, k in by_name[n].composition.items())
            for n in names if n in by_name}
