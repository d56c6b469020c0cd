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
from functools import cached_property
from typing import Mapping

from perfchain.errors import InputError
from perfchain.units import as_float
from perfchain.propellants.ingredients import OXIDIZING_VALENCE, Ingredient, get_ingredient

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
    """What the chamber burns: an oxidizer and a fuel at a mixture ratio, or a formulation.

    A bipropellant (:func:`make_propellant`) has ``oxidizer``, ``fuel`` and
    ``mixture_ratio``; a formulation
    (:func:`~perfchain.propellants.formulation.make_formulation`: a solid grain, a
    monopropellant) has ``parts`` instead, and its O/F quantities are None. Both give
    the chain the same things: element totals and enthalpy per kilogram.

    Attributes
    ----------
    oxidizer, fuel : Ingredient or None
    mixture_ratio : float or None
        O/F by mass [-]; None for a formulation.
    parts : tuple of (Ingredient, float)
        Ingredients and mass fractions of a formulation (empty for a bipropellant).
    """

    oxidizer: Ingredient | None
    fuel: Ingredient | None
    mixture_ratio: float | None
    parts: tuple = ()

    @property
    def is_formulation(self) -> bool:
        """True for a formulation (no oxidizer/fuel split)."""
        return bool(self.parts)

    @property
    def ingredients(self) -> tuple:
        """Every ingredient with its mass fraction [-], ``((Ingredient, w), ...)``."""
        if self.parts:
            return self.parts
        wo = self.oxidizer_fraction
        return ((self.oxidizer, wo), (self.fuel, 1.0 - wo))

    @property
    def name(self) -> str:
        """``"LOX/RP-1"``, ``"H2O2-98"`` or ``"AP=0.68, Al=0.18, HTPB=0.14"``."""
        if not self.parts:
            return f"{self.oxidizer.name}/{self.fuel.name}"
        if len(self.parts) == 1:
            return self.parts[0][0].name
        return ", ".join(f"{i.name}={w:.6g}" for i, w in self.parts)

    @cached_property
    def stoichiometric_mixture_ratio(self) -> float | None:
        """Stoichiometric O/F [-] (None for a formulation; the record is frozen: computed once)."""
        if self.parts:
            return None
        return stoichiometric_mixture_ratio(self.oxidizer, self.fuel)

    @property
    def equivalence_ratio(self) -> float | None:
        """phi = (O/F)_st / (O/F) [-]; > 1 fuel-rich (None for a formulation)."""
        if self.parts:
            return None
        return self.stoichiometric_mixture_ratio / self.mixture_ratio

    @property
    def fuel_percent(self) -> float | None:
        """Fuel mass per cent of the propellant [%] (None for a formulation)."""
        if self.parts:
            return None
        return 100.0 / (1.0 + self.mixture_ratio)

    @property
    def oxidizer_fraction(self) -> float | None:
        """Oxidizer mass fraction [-] (None for a formulation)."""
        if self.parts:
            return None
        return self.mixture_ratio / (1.0 + self.mixture_ratio)

    @property
    def elements(self) -> Mapping[str, float]:
        """Element totals [kmol of atoms per kg of propellant]."""
        out: dict[str, float] = {}
        for ing, w in self.ingredients:
            for e, n in ing.elements.items():
                out[e] = out.get(e, 0.0) + w * n
        return out

    @property
    def enthalpy(self) -> float:
        """Enthalpy of the reactants at their storage states [J/kg]."""
        if self.parts:
            return sum(w * i.enthalpy for i, w in self.parts)
        wo = self.oxidizer_fraction
        return wo * self.oxidizer.enthalpy + (1.0 - wo) * self.fuel.enthalpy

    @property
    def valence(self) -> float:
        """Oxidizing valence of the mix [kmol electrons per kg]: 0 stoichiometric,
        > 0 fuel-rich, < 0 oxidizer-rich (see ``OXIDIZING_VALENCE``)."""
        return sum(OXIDIZING_VALENCE.get(e, 0.0) * n for e, n in self.elements.items())

    @property
    def bulk_density(self) -> float | None:
        """Bulk propellant density, volumes of the ingredients added [kg/m^3].

        rho_bulk = (1 + O/F) / (O/F / rho_o + 1 / rho_f) for a bipropellant
        (Sutton & Biblarz, Rocket Propulsion Elements, ch. 7; from memory), and
        1 / sum(w_i / rho_i) for a formulation (the theoretical maximum density of
        a grain: no voids).
        """
        if self.parts:
            if any(i.density is None for i, _ in self.parts):
                return None
            return 1.0 / sum(w / i.density for i, w in self.parts)
        ro, rf = self.oxidizer.density, self.fuel.density
        if ro is None or rf is None:
            return None
        r = self.mixture_ratio
        return (1.0 + r) / (r / ro + 1.0 / rf)

    def describe(self) -> str:
        """Short text for messages: ``"LOX/RP-1 at O/F 2.56"``, ``"propellant AP=0.68, ..."``."""
        if self.parts:
            return f"propellant {self.name}"
        return f"{self.oxidizer.name}/{self.fuel.name} at O/F {self.mixture_ratio:.6g}"

    def reactants_dict(self) -> dict:
        """What the chamber was given, so anyone can recompute the equilibrium.

        Returns
        -------
        dict
            ``enthalpy`` [J/kg], ``elements`` {symbol: mol/kg}, and ``ingredients``:
            a list of {``name``, ``mass_fraction`` [-], ``enthalpy`` [J/kg],
            ``temperature`` [K], ``density`` [kg/m^3] or None, ``phase``}.

        Examples
        --------
        Hydrogen peroxide H2O2 (34.015 kg/kmol) is 58.80 mol H and 58.80 mol O per kg;
        its enthalpy of formation, -187.8 kJ/mol (NIST Chemistry WebBook), is
        -5.521 MJ/kg:

        >>> from perfchain.propellants.formulation import make_formulation
        >>> r = make_formulation("H2O2").reactants_dict()
        >>> {e: round(n, 2) for e, n in r["elements"].items()}, round(r["enthalpy"] / 1e6, 3)
        ({'H': 58.8, 'O': 58.8}, -5.521)
        """
        return {
            "enthalpy": self.enthalpy,
            "elements": {e: 1e3 * n for e, n in self.elements.items()},
            "ingredients": [{"name": i.name, "mass_fraction": w, "enthalpy": i.enthalpy,
                             "temperature": i.temperature, "density": i.density, "phase": i.phase}
                            for i, w in self.ingredients],
        }


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
    if not math.isfinite(r):   # e.g. phi = 1e-310: O/F overflows (a mixture of oxidizer alone)
        field, value = given[0], equivalence_ratio if equivalence_ratio is not None else fuel_percent
        raise InputError(field, value, f"a value whose O/F is a finite number (O/F = {r})")
    return Propellant(ox, fu, r)


def _positive(value, field, allowed) -> float:
    if isinstance(value, bool):
        raise InputError(field, value, allowed)
    try:
        x = as_float(value)
    except (TypeError, ValueError):
        raise InputError(field, value, allowed) from None
    if not (math.isfinite(x) and x > 0):
        raise InputError(field, value, allowed)
    return x
