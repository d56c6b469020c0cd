"""Sweep grids: the validated lists of a sweep and their product, in row order.

The grid is the product of mixture ratios x chamber pressures x (area ratios or exit
pressures) x (ambient pressures or altitudes) x flow models, in that order (the last one
varies fastest). Lists are comma-separated text with units (``"20 bar,50 bar"``) or, from
Python, sequences of SI floats.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from perfchain.constants import ONE_ATM
from perfchain.errors import InputError
from perfchain.units import to_si

__all__ = ["SweepGrid", "make_grid", "MAX_POINTS"]

MAX_POINTS = 20_000   #: grids above this many points need ``confirm=True`` (CLI ``--yes``)


def _items(value, field):
    if isinstance(value, str):
        parts = [p.strip() for p in value.split(",")]
    elif isinstance(value, (int, float)) and not isinstance(value, bool):
        parts = [value]
    else:
        try:
            parts = list(value)
        except TypeError:
            raise InputError(field, value, "a comma-separated list of values") from None
        parts = [p.strip() if isinstance(p, str) else p for p in parts]
    if not parts or any(p == "" or p is None for p in parts):
        raise InputError(field, value, "a comma-separated list of values, none empty")
    return parts


def _distinct(values, field, raw):
    seen = set()
    for v in values:
        if v in seen:
            raise InputError(field, raw, f"distinct values ({v!r} is given twice)")
        seen.add(v)
    return tuple(values)


def _numbers(value, field, allowed, low, exclusive=True):
    out = []
    for p in _items(value, field):
        try:
            x = float(p) if not isinstance(p, bool) else math.nan
        except (TypeError, ValueError):
            raise InputError(field, p, allowed) from None
        if not math.isfinite(x) or x < low or (exclusive and x == low):
            raise InputError(field, p, allowed)
        out.append(x)
    return _distinct(out, field, value)


def _quantities(value, kind, field, **bounds):
    return _distinct([to_si(p, kind, field, **bounds) for p in _items(value, field)], field, value)


@dataclass(frozen=True)
class SweepGrid:
    """A validated grid of operating points, SI values, in row order.

    Attributes
    ----------
    oxidizer, fuel : str
        Ingredient names.
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
    """

    oxidizer: str
    fuel: str
    mixture_ratio: tuple
    chamber_pressure: tuple
    area_ratio: tuple | None
    exit_pressure: tuple | None
    ambient_pressure: tuple
    altitude: tuple | None
    flow: tuple

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
        return dict([("mixture_ratio", self.mixture_ratio), ("chamber_pressure", self.chamber_pressure),
                     (self.exit_key, self.exits), amb, ("flow", self.flow)])

    @property
    def size(self) -> int:
        """Number of points [-]."""
        return math.prod(len(v) for v in self.dims.values())


def make_grid(oxidizer, fuel, *, mixture_ratio, chamber_pressure, area_ratio=None, exit_pressure=None,
              ambient_pressure=None, altitude=None, flow="shifting", confirm=False) -> SweepGrid:
    """Validate the lists of a sweep and build its :class:`SweepGrid`.

    Each list is a sequence or comma-separated text; dimensioned values carry a
    unit (``"20 bar,50 bar"``) or, from Python, are SI floats.

    Parameters
    ----------
    oxidizer, fuel : str
    mixture_ratio : str or sequence
        O/F values [-], > 0.
    chamber_pressure : str or sequence
        [Pa]
    area_ratio : str or sequence, optional
        [-], > 1; exactly one of area_ratio, exit_pressure.
    exit_pressure : str or sequence, optional
        [Pa]
    ambient_pressure : str or sequence, optional
        [Pa], >= 0; default 1 atm. Not with ``altitude``.
    altitude : str or sequence, optional
        Geometric altitude [m], 0 to 86 km (US Standard Atmosphere 1976).
    flow : str or sequence
        Flow models.
    confirm : bool
        Allow grids above :data:`MAX_POINTS`.

    Examples
    --------
    The 1976 standard atmosphere gives 22 632 Pa at its 11 km' geopotential
    layer base, 11 019 m geometric (NOAA-S/T 76-1562; rounded to the pascal):

    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.2,2.6", chamber_pressure="70 bar",
    ...               area_ratio="10,40", altitude="0 km,11019 m")
    >>> g.size, [round(p) for p in g.ambient_pressure]
    (8, [101325, 22632])
    """
    from perfchain.atmosphere import pressure
    from perfchain.thermo.flow_models import check_flow
    from perfchain.propellants.mixture import make_propellant

    mr = _numbers(mixture_ratio, "mixture_ratio", "a list of O/F values above 0", 0.0)
    pc = _quantities(chamber_pressure, "pressure", "chamber_pressure", minimum=0.0)
    if (area_ratio is None) == (exit_pressure is None):
        raise InputError("exit", "both" if area_ratio is not None else "neither",
                         "exactly one of area_ratio or exit_pressure")
    eps = None if area_ratio is None else _numbers(area_ratio, "area_ratio",
                                                   "a list of exit/throat area ratios above 1", 1.0)
    pe = None if exit_pressure is None else _quantities(exit_pressure, "pressure", "exit_pressure",
                                                        minimum=0.0)
    if altitude is not None and ambient_pressure is not None:
        raise InputError("ambient", "both", "one of ambient_pressure or altitude")
    alt = None
    if altitude is not None:
        alt = _quantities(altitude, "length", "altitude", minimum=0.0, exclusive=False, maximum=86000.0)
        pa = tuple(float(pressure(z)) for z in alt)
    else:
        pa = _quantities(ONE_ATM if ambient_pressure is None else ambient_pressure, "pressure",
                         "ambient_pressure", minimum=0.0, exclusive=False)
    flows = _distinct([check_flow(f) for f in _items(flow, "flow")], "flow", flow)
    for r in mr:  # names and mixture checked once, before any work
        make_propellant(oxidizer, fuel, r)
    grid = SweepGrid(str(oxidizer), str(fuel), mr, pc, eps, pe, pa, alt, flows)
    if grid.size > MAX_POINTS and not confirm:
        raise InputError("grid", f"{grid.size} points",
                         f"at most {MAX_POINTS} points unless confirmed (--yes)")
    return grid
