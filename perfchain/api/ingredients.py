"""Ingredients: look up the bundled ones, list them, define your own, blend them.

Thin, documented wrappers of :mod:`perfchain.propellants.ingredients` that also take pint
Quantities and numpy scalars.
"""

from __future__ import annotations

__all__ = ["ingredient", "ingredients", "ingredient_rows", "blend", "custom_ingredient"]


def ingredient(name):
    """A bundled ingredient or blend by name or alias (case-insensitive).

    Parameters
    ----------
    name : str or Ingredient

    Returns
    -------
    perfchain.propellants.ingredients.Ingredient
        Element totals [kmol/kg], enthalpy at the storage state [J/kg],
        temperature [K], density [kg/m^3], sources.

    Examples
    --------
    Liquid oxygen is stored at its normal boiling point, 90.17 K (NASA TP-2002-211556;
    from memory):

    >>> import perfchain as pc
    >>> pc.ingredient("lox").temperature
    90.17
    """
    from perfchain.inputs import ingredient as check_ingredient

    return check_ingredient(name, "ingredient")


def ingredients():
    """The bundled ingredients and blends as a table (what ``perfchain ingredients --json`` lists).

    Returns
    -------
    pandas.DataFrame
        Columns ``name``, ``aliases``, ``role``, ``formula``, ``enthalpy`` [J/kg],
        ``temperature`` [K], ``phase``, ``density`` [kg/m^3], ``sources``, ``parts``;
        units in ``attrs["units"]``.

    Examples
    --------
    Liquid hydrogen boils at 20.27 K at one atmosphere (NIST Chemistry WebBook; from memory):

    >>> import perfchain as pc
    >>> table = pc.ingredients()
    >>> float(table.set_index("name").loc["LH2", "temperature"]), table.attrs["units"]["density"]
    (20.27, 'kg/m^3')
    """
    import pandas as pd

    df = pd.DataFrame(ingredient_rows())
    df.attrs["units"] = {c: {"enthalpy": "J/kg", "temperature": "K", "density": "kg/m^3"}.get(c, "")
                         for c in df.columns}
    return df


def ingredient_rows() -> list[dict]:
    """One plain dict per bundled ingredient (SI), as ``perfchain ingredients --json`` prints them."""
    from perfchain.propellants.ingredients import list_ingredients

    return [{"name": i.name, "aliases": list(i.aliases), "role": i.role, "formula": i.formula_text,
             "enthalpy": i.enthalpy, "temperature": i.temperature, "phase": i.phase,
             "density": i.density, "sources": dict(i.sources), "parts": [list(p) for p in i.parts]}
            for i in list_ingredients()]


def _plain(x):
    """A numpy scalar as a Python float (so the record builders take it); anything else unchanged."""
    from perfchain.units import plain_number

    n = plain_number(x)
    return x if n is None or isinstance(x, (int, float)) else n


def blend(name, parts, density=None):
    """An ingredient mixed from others by mass fraction (ideal mixing, no heat of mixing).

    Parameters
    ----------
    name : str
    parts : Mapping[str or Ingredient, float]
        Mass fractions [-] that sum to 1.
    density : str, Quantity or float, optional
        Measured blend density [kg/m^3]; otherwise the volumes add.

    Returns
    -------
    perfchain.propellants.ingredients.Ingredient

    Examples
    --------
    90 % hydrogen peroxide: 0.9 kg H2O2(l) (-187.8 kJ/mol, NIST) + 0.1 kg water
    (-285.83 kJ/mol, CODATA) gives -0.9*5521 - 0.1*15866 = -6556 kJ/kg:

    >>> import perfchain as pc
    >>> round(pc.blend("htp-90", {"H2O2": 0.9, "water": 0.1}).enthalpy / 1e3)
    -6556
    """
    from perfchain.propellants.ingredients import blend as make_blend

    return make_blend(name, {k: _plain(v) for k, v in dict(parts).items()}, density)


def custom_ingredient(name, formula, enthalpy, temperature="298.15 K", density=None, phase="liquid",
                      monopropellant=False):
    """An ingredient of your own from its formula and enthalpy at the storage state.

    Parameters
    ----------
    name : str
    formula : Mapping[str, float]
        Atoms per formula unit, e.g. ``{"C": 1, "H": 4}``.
    enthalpy : str, Quantity or float
        Molar enthalpy at the storage state relative to the elements at 298.15 K
        [J/mol] (``"-74.87 kJ/mol"``).
    temperature : str, Quantity or float
        Storage temperature [K].
    density : str, Quantity or float, optional
        Density at the storage state [kg/m^3].
    phase : str
        ``"liquid"``, ``"gas"`` or ``"solid"``.
    monopropellant : bool
        True if it releases energy on its own, so that a propellant of it alone is accepted
        (``pc.point(propellant=...)``).

    Returns
    -------
    perfchain.propellants.ingredients.Ingredient

    Examples
    --------
    Methane gas, enthalpy of formation -74.87 kJ/mol (NIST-JANAF tables); a pint Quantity
    works as well as text:

    >>> import perfchain as pc
    >>> ch4 = pc.custom_ingredient("my-methane", {"C": 1, "H": 4}, pc.Q_(-74.87, "kJ/mol"), phase="gas")
    >>> round(ch4.molar_mass, 3), round(ch4.enthalpy / 1e6, 4)   # kg/kmol, MJ/kg
    (16.043, -4.6668)
    """
    from perfchain.propellants.ingredients import custom_ingredient as make

    return make(name, {k: _plain(v) for k, v in dict(formula).items()}, enthalpy, temperature, density, phase,
                bool(monopropellant))
