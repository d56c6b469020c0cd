"""Ingredient records at their storage state: the bundled data, blends and your own.

An :class:`Ingredient` is plain data: element totals per kilogram, enthalpy per
kilogram at the storage state (relative to the elements in their reference
states at 298.15 K, the convention of the NASA Glenn data that Cantera ships),
storage temperature, phase, density and the source of each number. The bundled
records live in ``mechanisms/ingredients.toml``; blends and user-defined
ingredients are built with :func:`blend` and :func:`custom_ingredient`.
:func:`bundled_ingredient` looks a record up by its name or alias only; names as a user
types them (conditioned ``"LOX @ 80 K"``, mixtures ``"RP-1=0.9, Al=0.1"``) are resolved
one floor up, by :func:`perfchain.propellants.ingredients.get_ingredient`.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass, field
from functools import cached_property, lru_cache
from pathlib import Path
from types import MappingProxyType
from typing import Mapping

from perfchain.errors import DataError, InputError, suggest
from perfchain.units import to_si

__all__ = [
    "Ingredient", "bundled_ingredient", "list_ingredients", "blend", "custom_ingredient",
    "atomic_weight", "OXIDIZING_VALENCE", "DATA_FILE",
]


def _data_file() -> Path:
    """Path of the bundled ingredient records, wherever perfchain is installed.

    A wheel or a regular install carries ``mechanisms/`` as the data package
    ``perfchain.mechanisms``; a source checkout (editable install, or the tree on
    ``sys.path``) has it at the top of the repository.
    """
    from importlib import resources

    try:
        candidate = Path(str(resources.files("perfchain.mechanisms") / "ingredients.toml"))
        if candidate.is_file():
            return candidate
    except (ModuleNotFoundError, TypeError):
        pass
    return Path(__file__).resolve().parents[2] / "mechanisms" / "ingredients.toml"


DATA_FILE = _data_file()

#: Oxidizing (propellant) valence of each element: positive for reducing
#: elements, negative for oxidizing ones, zero for inert ones. The usual
#: propellant-chemistry convention (products CO2, H2O, N2, HCl, HF, Al2O3, ...;
#: e.g. Sutton & Biblarz, Rocket Propulsion Elements, chapter on solid
#: propellants; from memory).
OXIDIZING_VALENCE = MappingProxyType({
    "H": 1.0, "C": 4.0, "O": -2.0, "N": 0.0, "F": -1.0, "Cl": -1.0, "Br": -1.0, "I": -1.0,
    "Al": 3.0, "B": 3.0, "Be": 2.0, "Li": 1.0, "Mg": 2.0, "Na": 1.0, "K": 1.0, "Si": 4.0,
    "Ti": 4.0, "Zr": 4.0, "Fe": 3.0, "S": 4.0, "P": 5.0,
    "Ar": 0.0, "He": 0.0, "Ne": 0.0, "Kr": 0.0, "Xe": 0.0,
})


@lru_cache(maxsize=None)
def atomic_weight(symbol: str) -> float:
    """Atomic weight of an element [kg/kmol], as Cantera holds it (IUPAC values).

    >>> atomic_weight("O")  # IUPAC 2013 conventional value (from memory)
    15.999
    """
    import cantera as ct

    try:
        return float(ct.Element(symbol).weight)
    except Exception:  # Cantera raises CanteraError for unknown symbols
        raise InputError("formula", symbol, "a chemical element symbol such as H, C, O, N, Al, Cl") from None


@dataclass(frozen=True)
class Ingredient:
    """One propellant ingredient (or blend) at its storage state.

    Attributes
    ----------
    name : str
        Name a practitioner types, e.g. ``"LOX"``.
    elements : Mapping[str, float]
        Element totals [kmol of atoms per kg of ingredient].
    enthalpy : float
        Specific enthalpy at the storage state [J/kg], elements at 298.15 K = 0.
    temperature : float
        Storage temperature [K].
    phase : str
        ``"liquid"``, ``"gas"``, ``"solid"``, ...
    density : float or None
        Density at the storage state [kg/m^3].
    formula : Mapping[str, float]
        Atoms per formula unit (per kg basis is in ``elements``).
    molar_mass : float
        Mass of one formula unit [kg/kmol].
    aliases : tuple of str
    sources : Mapping[str, str]
        Where each number comes from.
    parts : tuple of (str, float)
        Constituents and mass fractions, for a blend.
    monopropellant : bool
        Releases energy on its own (decomposes or self-deflagrates), so a
        propellant of it alone makes sense.
    fluid : str or None
        CoolProp name of its real-fluid equation of state, for a record that
        can be conditioned to another storage temperature.
    """

    name: str
    elements: Mapping[str, float]
    enthalpy: float
    temperature: float
    phase: str
    density: float | None
    formula: Mapping[str, float]
    molar_mass: float
    aliases: tuple = ()
    sources: Mapping[str, str] = field(default_factory=dict)
    parts: tuple = ()
    monopropellant: bool = False
    fluid: str | None = None

    def __hash__(self):
        return hash((self.name, self.enthalpy, tuple(self.elements.items())))

    @cached_property
    def valence(self) -> float:
        """Oxidizing valence [kmol electrons per kg]: > 0 fuel, < 0 oxidizer (the record is frozen:
        computed once)."""
        return sum(OXIDIZING_VALENCE.get(e, 0.0) * n for e, n in self.elements.items())

    @property
    def role(self) -> str:
        """``"fuel"``, ``"oxidizer"`` or ``"inert"`` from the sign of the valence."""
        v = self.valence
        scale = sum(abs(n) for n in self.elements.values()) or 1.0
        if abs(v) < 1e-9 * scale:
            return "inert"
        return "fuel" if v > 0 else "oxidizer"

    @property
    def formula_text(self) -> str:
        """Formula as text, e.g. ``"C1H1.9423"``."""
        return "".join(f"{e}{n:g}" for e, n in self.formula.items())


def _from_formula(name, formula, molar_enthalpy, temperature, phase, density,
                  aliases=(), sources=None, monopropellant=False, fluid=None) -> Ingredient:
    """Build an ingredient from atoms per formula unit and J/kmol."""
    if not formula:
        raise InputError(f"{name}.formula", formula, "at least one element with a positive count")
    clean = {}
    for sym, count in formula.items():
        atomic_weight(sym)
        if not isinstance(count, (int, float)) or isinstance(count, bool) or not count > 0 \
                or not math.isfinite(count):
            raise InputError(f"{name}.formula.{sym}", count, "a positive atom count")
        clean[sym] = float(count)
    molar_mass = sum(atomic_weight(e) * n for e, n in clean.items())
    elements = {e: n / molar_mass for e, n in clean.items()}
    return Ingredient(
        name=name, elements=MappingProxyType(elements), enthalpy=molar_enthalpy / molar_mass,
        temperature=temperature, phase=phase, density=density,
        formula=MappingProxyType(clean), molar_mass=molar_mass, aliases=tuple(aliases),
        sources=MappingProxyType(dict(sources or {})), monopropellant=bool(monopropellant), fluid=fluid,
    )


def custom_ingredient(name: str, formula: Mapping[str, float], enthalpy, temperature="298.15 K",
                      density=None, phase: str = "liquid", monopropellant: bool = False) -> Ingredient:
    """Define an ingredient of your own.

    Parameters
    ----------
    name : str
    formula : Mapping[str, float]
        Atoms per formula unit, e.g. ``{"C": 1, "H": 4}``.
    enthalpy : str or float
        Molar enthalpy at the storage state relative to the elements at
        298.15 K, as text with a unit (``"-74.87 kJ/mol"``) or a float [J/mol].
    temperature : str or float
        Storage temperature (``"298.15 K"``) [K].
    density : str or float, optional
        Density at the storage state [kg/m^3].
    phase : str
    monopropellant : bool
        True if it releases energy on its own (a propellant of it alone is accepted).

    Returns
    -------
    Ingredient

    Examples
    --------
    Methane gas, enthalpy of formation -74.87 kJ/mol (NIST-JANAF tables):

    >>> ch4 = custom_ingredient("my-methane", {"C": 1, "H": 4}, "-74.87 kJ/mol", phase="gas")
    >>> round(ch4.molar_mass, 3), round(ch4.enthalpy / 1e6, 4)   # kg/kmol, MJ/kg
    (16.043, -4.6668)
    """
    h = to_si(enthalpy, "molar_enthalpy", f"{name}.enthalpy") * 1e3  # J/mol -> J/kmol
    t = to_si(temperature, "temperature", f"{name}.temperature", minimum=0.0)
    rho = None if density is None else to_si(density, "density", f"{name}.density", minimum=0.0)
    return _from_formula(name, dict(formula), h, t, phase, rho, sources={"all": "user-defined"},
                         monopropellant=monopropellant)


def blend(name: str, parts: Mapping, density=None, aliases=(), sources=None,
          monopropellant: bool | None = None) -> Ingredient:
    """Mix ingredients by mass fraction (ideal mixing: no heat of mixing).

    Parameters
    ----------
    name : str
    parts : Mapping[str or Ingredient, float] or sequence of (key, fraction)
        Mass fractions; they must sum to 1 (within 1e-6).
    density : str or float, optional
        Measured blend density [kg/m^3]; otherwise the volumes add.
    monopropellant : bool, optional
        Default: True if any part is a monopropellant.

    Returns
    -------
    Ingredient

    Examples
    --------
    90 % hydrogen peroxide: 0.9 kg H2O2(l) (-187.8 kJ/mol, NIST) + 0.1 kg water
    (-285.83 kJ/mol, CODATA) gives -0.9*5521 - 0.1*15866 = -6556 kJ/kg:

    >>> round(blend("htp", {"H2O2": 0.9, "water": 0.1}).enthalpy / 1e3)
    -6556
    """
    items = []
    for key, frac in (parts.items() if isinstance(parts, Mapping) else parts):
        ing = key if isinstance(key, Ingredient) else bundled_ingredient(key, field=f"{name}.parts")
        if isinstance(frac, bool) or not isinstance(frac, (int, float)) or not 0 < frac <= 1:
            raise InputError(f"{name}.parts.{ing.name}", frac, "a mass fraction in (0, 1]")
        items.append((ing, float(frac)))
    total = sum(f for _, f in items)
    if not items or abs(total - 1.0) > 1e-6:
        raise InputError(f"{name}.parts", dict((i.name, f) for i, f in items),
                         f"mass fractions that sum to 1 within 1e-6 (these sum to {total:.9g})")
    elements: dict[str, float] = {}
    for ing, frac in items:
        for e, n in ing.elements.items():
            elements[e] = elements.get(e, 0.0) + frac * n
    if density is None:
        if any(i.density is None for i, _ in items):
            rho = None
        else:
            rho = 1.0 / sum(f / i.density for i, f in items)
    else:
        rho = to_si(density, "density", f"{name}.density", minimum=0.0)
    # one formula unit = 1 kmol of "blend" defined as 1 kg / (sum of moles of parts)
    moles = sum(f / i.molar_mass for i, f in items)
    molar_mass = 1.0 / moles
    formula = {e: n * molar_mass for e, n in elements.items()}
    temperature = sum(f * i.temperature for i, f in items)
    phases = {i.phase for i, _ in items}
    return Ingredient(
        name=name, elements=MappingProxyType(elements),
        enthalpy=sum(f * i.enthalpy for i, f in items), temperature=temperature,
        phase=phases.pop() if len(phases) == 1 else "mixed", density=rho,
        formula=MappingProxyType(formula), molar_mass=molar_mass, aliases=tuple(aliases),
        sources=MappingProxyType(dict(sources or {})),
        parts=tuple((i.name, f) for i, f in items),
        monopropellant=any(i.monopropellant for i, _ in items) if monopropellant is None else bool(monopropellant),
    )


@lru_cache(maxsize=4)
def _database(path: str) -> Mapping[str, Ingredient]:
    try:
        with open(path, "rb") as fh:
            data = tomllib.load(fh)
    except OSError as exc:
        raise DataError("ingredient data", path, f"a readable ingredient file ({exc.strerror}); "
                        "reinstall perfchain or run from a full checkout") from None
    db: dict[str, Ingredient] = {}
    for rec in data.get("ingredient", []):
        name = rec["name"]
        h = to_si(rec["enthalpy"], "molar_enthalpy", f"{name}.enthalpy") * 1e3
        ing = _from_formula(
            name, rec["formula"], h,
            to_si(rec["temperature"], "temperature", f"{name}.temperature", minimum=0.0),
            rec["phase"], to_si(rec["density"], "density", f"{name}.density", minimum=0.0),
            rec.get("aliases", ()), rec.get("source", {}), rec.get("monopropellant", False),
            rec.get("fluid"))
        db[name] = ing
    for rec in data.get("blend", []):
        def lookup(n, _db=db):
            return _db[n]
        parts = {lookup(k): v for k, v in rec["parts"].items()}
        db[rec["name"]] = blend(rec["name"], parts, rec.get("density"), rec.get("aliases", ()),
                                rec.get("source", {}), rec.get("monopropellant"))
    return MappingProxyType(db)


@lru_cache(maxsize=4)
def _index(path: str) -> Mapping[str, Ingredient]:
    """Lower-case name or alias -> record, built once per data file (as :func:`_database`):
    every look-up of a sweep's propellants reads it."""
    index = {}
    for ing in _database(path).values():
        for key in (ing.name, *ing.aliases):
            index[key.lower()] = ing
    return MappingProxyType(index)


def list_ingredients(path: str | Path | None = None) -> list[Ingredient]:
    """All bundled ingredients and blends, in file order.

    >>> "LOX" in [i.name for i in list_ingredients()]
    True
    """
    return list(_database(str(path or DATA_FILE)).values())


def bundled_ingredient(name, field: str = "ingredient", path: str | Path | None = None) -> Ingredient:
    """A bundled ingredient by name or alias, case-insensitively (an Ingredient is returned as is).

    Parameters
    ----------
    name : str or Ingredient
        A name or alias of the data file, e.g. ``"ch4(l)"``.
    field : str
        The input's name in the error message.
    path : str or Path, optional
        Another ingredient file (default: the bundled data).

    Returns
    -------
    Ingredient
        The record as read from the file.

    Examples
    --------
    Liquid methane at its normal boiling point, 111.66 K (NIST Chemistry WebBook; from memory),
    and a conditioned name, which this plain look-up does not resolve:

    >>> lch4 = bundled_ingredient("ch4(l)")
    >>> lch4.name, abs(lch4.temperature - 111.66) < 0.05
    ('LCH4', True)
    >>> bundled_ingredient("LCH4 @ 100 K", field="fuel")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: fuel: got 'LCH4 @ 100 K'; allowed: a known ingredient (did you mean 'LCH4'?)
    """
    if isinstance(name, Ingredient):
        return name
    index = _index(str(path or DATA_FILE))
    if isinstance(name, str) and name.strip().lower() in index:
        return index[name.strip().lower()]
    names = [i.name for i in list_ingredients(path)] + [a for i in list_ingredients(path) for a in i.aliases]
    hint = suggest(str(name), names) or "see `perfchain ingredients` for the list"
    raise InputError(field, name, f"a known ingredient ({hint})")
