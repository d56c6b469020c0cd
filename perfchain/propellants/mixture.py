"""Propellant mixtures: O/F <-> equivalence ratio <-> % fuel, element totals, enthalpy.

Definitions (mass basis, the usual propellant-chemistry convention):

* mixture ratio O/F = oxidizer mass / fuel mass;
* stoichiometric O/F makes the oxidizing valence of the mix zero, i.e. exactly
  enough oxidizer to turn C into CO2, H into H2O, Al into Al2O3, ... ;
* equivalence ratio phi = (O/F)_stoich / (O/F) (phi > 1 is fuel-rich);
* % fuel = 100 / (1 + O/F).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Mapping

from perfchain.errors import InputError
from perfchain.propellants.ingredients import Ingredient, get_ingredient

__all__ = ["Propellant", "make_propellant", "stoichiometric_mixture_ratio"]


def stoichiometric_mixture_ratio(oxidizer: Ingredient, fuel: Ingredient) -> float:
    """Stoichiometric O/F by mass from the oxidizing valences [-].

    Examples
    --------
    H2 + 1/2 O2 -> H2O: O/F = 15.999 / 2.016 = 7.936 (IUPAC atomic weights):

    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> round(stoichiometric_mixture_ratio(get_ingredient("LOX"), get_ingredient("LH2")), 3)
    7.936

    CH4 + 2 O2 -> CO2 + 2 H2O: O/F = 2 * 31.998 / 16.043 = 3.989:

    >>> round(stoichiometric_mixture_ratio(get_ingredient("GOX"), get_ingredient("GCH4")), 3)
    3.989
    """
    vo, vf = oxidizer.valence, fuel.valence
    if not vo < 0:
        raise InputError("oxidizer", oxidizer.name, f"an ingredient with oxidizing power (this one is {oxidizer.role})")
    if not vf > 0:
        raise InputError("fuel", fuel.name, f"an ingredient with reducing power (this one is {fuel.role})")
    return -vf / vo


@dataclass(frozen=True)
class Propellant:
    """An oxidizer and a fuel at a mixture ratio: what the chamber burns.

    Attributes
    ----------
    oxidizer, fuel : Ingredient
    mixture_ratio : float
        O/F by mass [-].
    """

    oxidizer: Ingredient
    fuel: Ingredient
    mixture_ratio: float

    @property
    def stoichiometric_mixture_ratio(self) -> float:
        """Stoichiometric O/F [-]."""
        return stoichiometric_mixture_ratio(self.oxidizer, self.fuel)

    @property
    def equivalence_ratio(self) -> float:
        """phi = (O/F)_st / (O/F) [-]; > 1 fuel-rich."""
        return self.stoichiometric_mixture_ratio / self.mixture_ratio

    @property
    def fuel_percent(self) -> float:
        """Fuel mass per cent of the propellant [%]."""
        return 100.0 / (1.0 + self.mixture_ratio)

    @property
    def oxidizer_fraction(self) -> float:
        """Oxidizer mass fraction [-]."""
        return self.mixture_ratio / (1.0 + self.mixture_ratio)

    @property
    def elements(self) -> Mapping[str, float]:
        """Element totals [kmol of atoms per kg of propellant]."""
        wo = self.oxidizer_fraction
        out: dict[str, float] = {}
        for ing, w in ((self.oxidizer, wo), (self.fuel, 1.0 - wo)):
            for e, n in ing.elements.items():
                out[e] = out.get(e, 0.0) + w * n
        return out

    @property
    def enthalpy(self) -> float:
        """Enthalpy of the reactants at their storage states [J/kg]."""
        wo = self.oxidizer_fraction
        return wo * self.oxidizer.enthalpy + (1.0 - wo) * self.fuel.enthalpy

    @property
    def bulk_density(self) -> float | None:
        """Bulk propellant density, volumes of the two tanks added [kg/m^3].

        rho_bulk = (1 + O/F) / (O/F / rho_o + 1 / rho_f)
        (Sutton & Biblarz, Rocket Propulsion Elements, ch. 7; from memory).
        """
        ro, rf = self.oxidizer.density, self.fuel.density
        if ro is None or rf is None:
            return None
        r = self.mixture_ratio
        return (1.0 + r) / (r / ro + 1.0 / rf)

    def describe(self) -> str:
        """Short text for messages: ``"LOX/RP-1 at O/F 2.56"``."""
        return f"{self.oxidizer.name}/{self.fuel.name} at O/F {self.mixture_ratio:.6g}"


def make_propellant(oxidizer, fuel, mixture_ratio=None, equivalence_ratio=None,
                    fuel_percent=None) -> Propellant:
    """Build a :class:`Propellant` from exactly one way of stating the mixture.

    Parameters
    ----------
    oxidizer, fuel : str or Ingredient
    mixture_ratio : float, optional
        O/F by mass [-], > 0.
    equivalence_ratio : float, optional
        phi [-], > 0.
    fuel_percent : float, optional
        Fuel mass per cent [%], in (0, 100).

    Examples
    --------
    Stoichiometric hydrogen-oxygen is 11.19 % fuel by mass (2.016/18.015):

    >>> p = make_propellant("LOX", "LH2", equivalence_ratio=1.0)
    >>> round(p.mixture_ratio, 3), round(p.fuel_percent, 2)
    (7.936, 11.19)
    """
    ox = get_ingredient(oxidizer, field="oxidizer")
    fu = get_ingredient(fuel, field="fuel")
    given = [n for n, v in (("mixture_ratio", mixture_ratio), ("equivalence_ratio", equivalence_ratio),
                            ("fuel_percent", fuel_percent)) if v is not None]
    if len(given) != 1:
        raise InputError("mixture", ", ".join(given) or "none",
                         "exactly one of mixture_ratio, equivalence_ratio, fuel_percent")
    st = stoichiometric_mixture_ratio(ox, fu)
    if mixture_ratio is not None:
        r = _positive(mixture_ratio, "mixture_ratio", "an O/F by mass above 0")
    elif equivalence_ratio is not None:
        r = st / _positive(equivalence_ratio, "equivalence_ratio", "an equivalence ratio above 0")
    else:
        f = _positive(fuel_percent, "fuel_percent", "a fuel mass per cent in (0, 100)")
        if not f < 100:
            raise InputError("fuel_percent", fuel_percent, "a fuel mass per cent in (0, 100)")
        r = (100.0 - f) / f
    return Propellant(ox, fu, r)


def _positive(value, field, allowed) -> float:
    if isinstance(value, bool):
        raise InputError(field, value, allowed)
    try:
        x = float(value)
    except (TypeError, ValueError):
        raise InputError(field, value, allowed) from None
    if not (math.isfinite(x) and x > 0):
        raise InputError(field, value, allowed)
    return x
