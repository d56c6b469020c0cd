"""Sweep grids: the validated lists of a sweep and their product, in row order.

The grid is the product of mixture ratios x chamber pressures x (area ratios or exit
pressures) x (ambient pressures or altitudes) x flow models, in that order (the last one
varies fastest). Every list is checked by :func:`perfchain.inputs.grid` (text with units such
as ``"20 bar,50 bar"`` or ``"1.6:3.6:0.1"``, or from Python sequences, arrays, Quantities, SI
numbers). The ingredients may be the user's own records.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from perfchain.constants import ONE_ATM
from perfchain.errors import InputError

__all__ = ["SweepGrid", "make_grid", "MAX_POINTS", "ingredient_record", "from_record"]

MAX_POINTS = 20_000   #: grids above this many points need ``confirm=True`` (CLI ``--yes``)


def _flows(flow) -> tuple:
    from perfchain.thermo.flow_models import check_flow

    items = [p.strip() for p in flow.split(",")] if isinstance(flow, str) else list(flow)
    if not items or any(not p for p in items):
        raise InputError("flow", flow, "a flow model or a comma-separated list of them, none empty")
    flows = [check_flow(f) for f in items]
    if len(set(flows)) != len(flows):
        raise InputError("flow", flow, "distinct flow models")
    return tuple(flows)


def _stated(value, field: str):
    """An ingredient as the grid keeps it: a bundled one by the name given, one of the user's
    own as its plain record (a dict: picklable, JSON-ready, kept in the provenance)."""
    from perfchain.inputs import ingredient
    from perfchain.propellants.ingredients import get_ingredient

    ing = ingredient(value, field)
    try:
        bundled = get_ingredient(ing.name) is ing
    except InputError:
        bundled = False
    if bundled:
        return value if isinstance(value, str) else ing.name
    return ingredient_record(ing)


def _stated_formulation(value, checked):
    """A formulation as the grid keeps it: its text as given, or ``[[name or record, fraction], ...]``
    (the fractions as given, so the chunks rebuild the very same Propellant)."""
    from collections.abc import Mapping

    from perfchain.inputs import typed
    from perfchain.propellants.ingredients import Ingredient

    if isinstance(value, str):
        return value
    if isinstance(value, Mapping):
        items = [(k, typed(w)) for k, w in value.items()]
    elif isinstance(value, Ingredient):
        items = [(value, 1.0)]
    else:   # a Propellant
        items = list(checked.parts)
    return [[_stated(k, "propellant"), float(w)] for k, w in items]


def ingredient_record(ing) -> dict:
    """An :class:`~perfchain.propellants.ingredients.Ingredient` as plain data (its fields).

    >>> from perfchain.propellants.ingredients import custom_ingredient
    >>> r = ingredient_record(custom_ingredient("my-methane", {"C": 1, "H": 4}, "-74.87 kJ/mol"))
    >>> r["name"], r["formula"]
    ('my-methane', {'C': 1.0, 'H': 4.0})
    """
    from dataclasses import fields

    out = {}
    for f in fields(ing):
        v = getattr(ing, f.name)
        out[f.name] = dict(v) if f.name in ("elements", "formula", "sources") else \
            [list(p) for p in v] if f.name == "parts" else list(v) if f.name == "aliases" else v
    return out


def from_record(record: dict):
    """The :class:`~perfchain.propellants.ingredients.Ingredient` of :func:`ingredient_record` (equal to it)."""
    from types import MappingProxyType

    from perfchain.propellants.ingredients import Ingredient

    d = dict(record)
    for key in ("elements", "formula", "sources"):
        d[key] = MappingProxyType(dict(d[key]))
    d["aliases"] = tuple(d["aliases"])
    d["parts"] = tuple(tuple(p) for p in d["parts"])
    return Ingredient(**d)


@dataclass(frozen=True)
class SweepGrid:
    """A validated grid of operating points, SI values, in row order.

    Attributes
    ----------
    oxidizer, fuel : str or dict
        Bundled ingredient names, or the plain records of the user's own
        (:func:`ingredient_record`); :meth:`ingredients` gives the records.
    mixture_ratio : tuple of float
        O/F by mass [-].
    chamber_pressure : tuple of float
        [Pa]
    area_ratio, exit_pressure : tuple of float or None
        Exactly one is set: exit/throat areas [-] or exit pressures [Pa].
    ambient_pressure : tuple of float
        [Pa]
    altitude : tuple of float or None
        Geometric altitudes [m] the ambient pressures came from (US Standard
        Atmosphere 1976), if stated that way.
    flow : tuple of str
    separation : str
        Separation criterion (:func:`perfchain.performance.ambient.separation_rule`).
    propellant : str, list or None
        A formulation instead of oxidizer and fuel: its text as given, or its parts as
        ``[[name or record, mass fraction], ...]``; ``oxidizer`` and ``fuel`` are then None
        and ``mixture_ratio`` is ``(None,)`` (one point, no O/F axis).
    transport : bool
        Also compute the gas transport properties at chamber, throat and exit (columns
        ``<station>_viscosity`` ...; :mod:`perfchain.performance.transport`). Off by default:
        a few ms per station, more than the rest of a point.
    """

    oxidizer: str | dict | None
    fuel: str | dict | None
    mixture_ratio: tuple
    chamber_pressure: tuple
    area_ratio: tuple | None
    exit_pressure: tuple | None
    ambient_pressure: tuple
    altitude: tuple | None
    flow: tuple
    separation: str = "summerfield"
    propellant: str | list | None = None
    transport: bool = False

    def ingredients(self) -> tuple:
        """(oxidizer, fuel) as Ingredient records or bundled names (what make_propellant takes)."""
        return tuple(from_record(x) if isinstance(x, dict) else x for x in (self.oxidizer, self.fuel))

    def propellant_at(self, i: int):
        """The :class:`~perfchain.propellants.mixture.Propellant` of the ``i``-th mixture ratio
        (the formulation itself for a formulation grid), made once per grid (it is frozen)."""
        made = self.__dict__.get("_propellants")
        if made is None:       # not a field: no part of the grid's value, its equality or asdict()
            made = {}
            object.__setattr__(self, "_propellants", made)
        if i not in made:
            made[i] = self._make_propellant(i)
        return made[i]

    def __getstate__(self):
        """The grid's fields (pickled without the propellants made, as it was before any was)."""
        return {k: v for k, v in self.__dict__.items() if k != "_propellants"}

    def _make_propellant(self, i: int):
        from perfchain.propellants.formulation import make_formulation
        from perfchain.propellants.mixture import make_propellant

        if self.propellant is None:
            return make_propellant(*self.ingredients(), self.mixture_ratio[i])
        if isinstance(self.propellant, str):
            return make_formulation(self.propellant)
        return make_formulation([(from_record(k) if isinstance(k, dict) else k, w) for k, w in self.propellant])

    @property
    def exit_key(self) -> str:
        """``"area_ratio"`` or ``"exit_pressure"``: how the exit is stated."""
        return "area_ratio" if self.area_ratio is not None else "exit_pressure"

    @property
    def exits(self) -> tuple:
        """The exit values of the grid ([-] or [Pa])."""
        return self.area_ratio if self.area_ratio is not None else self.exit_pressure

    @property
    def dims(self) -> dict:
        """Grid dimension name -> values, in row order (last varies fastest)."""
        amb = ("altitude", self.altitude) if self.altitude is not None else \
            ("ambient_pressure", self.ambient_pressure)
        mixture = [] if self.propellant is not None else [("mixture_ratio", self.mixture_ratio)]
        return dict(mixture + [("chamber_pressure", self.chamber_pressure),
                               (self.exit_key, self.exits), amb, ("flow", self.flow)])

    @property
    def size(self) -> int:
        """Number of points [-]."""
        return math.prod(len(v) for v in self.dims.values())


def make_grid(oxidizer=None, fuel=None, *, mixture_ratio=None, chamber_pressure, area_ratio=None,
              exit_pressure=None, ambient_pressure=None, altitude=None, flow="shifting", confirm=False,
              separation=None, propellant=None, transport=False) -> SweepGrid:
    """Validate the lists of a sweep and build its :class:`SweepGrid`.

    Each list is checked by :func:`perfchain.inputs.grid`: one value, a sequence or numpy
    array, or text of comma-separated values and ``start:stop:step`` ranges; dimensioned
    values carry a unit (``"20 bar,50 bar"``, ``"20:100:20 bar"``) or, from Python, are SI
    numbers or pint Quantities.

    Parameters
    ----------
    oxidizer, fuel : str or Ingredient
        Bundled names, or records of the user's own.
    mixture_ratio : grid
        O/F values [-], > 0.
    propellant : str, Mapping or Ingredient, optional
        Instead of oxidizer, fuel and mixture_ratio: a formulation (``"AP=0.86, HTPB=0.14"``,
        ``{"AP": 0.86, "HTPB": 0.14}``) or a monopropellant (``"H2O2-98"``); it has no O/F
        axis, the other axes sweep as usual.
    chamber_pressure : grid
        [Pa]
    area_ratio : grid, optional
        [-], > 1; exactly one of area_ratio, exit_pressure.
    exit_pressure : grid, optional
        [Pa]
    ambient_pressure : grid, optional
        [Pa], >= 0; default 1 atm. Not with ``altitude``.
    altitude : grid, optional
        Geometric altitude [m], 0 to 86 km (US Standard Atmosphere 1976).
    flow : str or sequence
        Flow models.
    confirm : bool
        Allow grids above :data:`MAX_POINTS`.
    separation : str, optional
        Separation criterion: ``"summerfield"`` (default, k = 0.4), ``"summerfield:K"``
        or ``"schmucker"``.
    transport : bool
        Add the transport-property columns (off by default; see :class:`SweepGrid`).

    Examples
    --------
    The 1976 standard atmosphere gives 22 632 Pa at its 11 km' geopotential
    layer base, 11 019 m geometric (NOAA-S/T 76-1562; rounded to the pascal):

    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.2,2.6", chamber_pressure="70 bar",
    ...               area_ratio="10,40", altitude="0 km,11019 m")
    >>> g.size, [round(p) for p in g.ambient_pressure]
    (8, [101325, 22632])
    >>> make_grid(propellant="H2O2-98", chamber_pressure="10 bar,20 bar", area_ratio="10,40").dims.keys()
    dict_keys(['chamber_pressure', 'area_ratio', 'ambient_pressure', 'flow'])
    """
    from perfchain.atmosphere import pressure
    from perfchain.inputs import exactly_one, grid as axis, propellant_args
    from perfchain.performance.ambient import separation_rule

    def values(field, x):
        return tuple(axis(field, x).tolist())

    if propellant is not None:   # a formulation: no oxidizer, fuel or O/F axis
        checked = propellant_args(oxidizer, fuel, propellant, {"mixture_ratio": mixture_ratio})["propellant"]
        mr = (None,)
    else:
        if mixture_ratio is None:
            raise InputError("mixture_ratio", None, "O/F values (with oxidizer and fuel), or propellant "
                             "instead: a formulation or a monopropellant, which has no O/F axis")
        mr = values("mixture_ratio", mixture_ratio)
    pc = values("chamber_pressure", chamber_pressure)
    exactly_one("exit", area_ratio=area_ratio, exit_pressure=exit_pressure)
    eps = None if area_ratio is None else values("area_ratio", area_ratio)
    pe = None if exit_pressure is None else values("exit_pressure", exit_pressure)
    if altitude is not None and ambient_pressure is not None:
        raise InputError("ambient", "both", "one of ambient_pressure or altitude")
    alt = None
    if altitude is not None:
        alt = values("altitude", altitude)
        pa = tuple(float(pressure(z)) for z in alt)
    else:
        pa = values("ambient_pressure", ONE_ATM if ambient_pressure is None else ambient_pressure)
    flows = _flows(flow)
    if propellant is None:
        ox, fu, stated = _stated(oxidizer, "oxidizer"), _stated(fuel, "fuel"), None
    else:
        ox = fu = None
        stated = _stated_formulation(propellant, checked)
    rule = separation_rule(separation)
    spec = rule.criterion if rule.threshold in (None, separation_rule().threshold) else \
        f"{rule.criterion}:{rule.threshold:g}"
    if not isinstance(transport, bool):
        raise InputError("transport", transport, "true or false")
    grid = SweepGrid(ox, fu, mr, pc, eps, pe, pa, alt, flows, spec, stated, transport)
    for i in range(len(mr)):  # names and mixture checked once, before any work
        grid.propellant_at(i)
    if grid.size > MAX_POINTS and not confirm:
        raise InputError("grid", f"{grid.size} points",
                         f"at most {MAX_POINTS} points unless confirmed (--yes)")
    return grid
