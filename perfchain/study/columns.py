"""Output unit sets for tables, plots and reports: SI inside, ``si`` or ``us`` at the edge.

Results are SI floats everywhere inside perfchain; only a written table, a plot axis
or a report cell is converted, with :func:`convert_frame` / :func:`to_unit`. The kind
of a column follows from its name (:func:`column_kind`).

=============  ==============  ==================
kind           ``si``          ``us``
=============  ==============  ==================
pressure       bar             psia
temperature    K               degR
speed          m/s             ft/s
mass           kg              lbm
force          N               lbf
diameter       mm              in
altitude       m               ft
area           m^2             in^2
mass_flow      kg/s            lbm/s
volume_flow    m^3/s           ft^3/s
volume         m^3             ft^3
density        kg/m^3          lbm/ft^3
density_isp    kg s/m^3        lbm s/ft^3
enthalpy       J/kg            BTU/lbm
entropy        J/(kg K)        BTU/(lbm degR)
=============  ==============  ==================

Times (Isp, burn time) stay in s, ratios and Mach numbers are unitless, molar mass
is kg/kmol (numerically equal to lbm/lbmol). Temperatures in ``us`` are absolute
(degR = 1.8 K), so every conversion is a plain factor.
"""

from __future__ import annotations

from functools import lru_cache

from perfchain.errors import InputError

__all__ = ["UNIT_SYSTEMS", "check_units", "column_kind", "unit_label", "factor", "to_unit",
           "convert_frame"]

UNIT_SYSTEMS = ("si", "us")

#: kind -> (SI unit in pint syntax, {system: (pint unit, label)})
_KINDS = {
    "pressure": ("Pa", {"si": ("bar", "bar"), "us": ("psi", "psia")}),
    "temperature": ("K", {"si": ("K", "K"), "us": ("degR", "degR")}),
    "speed": ("m/s", {"si": ("m/s", "m/s"), "us": ("ft/s", "ft/s")}),
    "mass": ("kg", {"si": ("kg", "kg"), "us": ("lb", "lbm")}),
    "force": ("N", {"si": ("N", "N"), "us": ("lbf", "lbf")}),
    "diameter": ("m", {"si": ("mm", "mm"), "us": ("inch", "in")}),
    "altitude": ("m", {"si": ("m", "m"), "us": ("ft", "ft")}),
    "area": ("m**2", {"si": ("m**2", "m^2"), "us": ("inch**2", "in^2")}),
    "mass_flow": ("kg/s", {"si": ("kg/s", "kg/s"), "us": ("lb/s", "lbm/s")}),
    "volume_flow": ("m**3/s", {"si": ("m**3/s", "m^3/s"), "us": ("ft**3/s", "ft^3/s")}),
    "volume": ("m**3", {"si": ("m**3", "m^3"), "us": ("ft**3", "ft^3")}),
    "density": ("kg/m**3", {"si": ("kg/m**3", "kg/m^3"), "us": ("lb/ft**3", "lbm/ft^3")}),
    "density_isp": ("kg*s/m**3", {"si": ("kg*s/m**3", "kg s/m^3"), "us": ("lb*s/ft**3", "lbm s/ft^3")}),
    "enthalpy": ("J/kg", {"si": ("J/kg", "J/kg"), "us": ("Btu/lb", "BTU/lbm")}),
    "entropy": ("J/(kg*K)", {"si": ("J/(kg*K)", "J/(kg K)"), "us": ("Btu/(lb*degR)", "BTU/(lbm degR)")}),
    "time": ("s", {"si": ("s", "s"), "us": ("s", "s")}),
    "molar_mass": ("kg/kmol", {"si": ("kg/kmol", "kg/kmol"), "us": ("kg/kmol", "lbm/lbmol")}),
    "percent": ("percent", {"si": ("percent", "%"), "us": ("percent", "%")}),
}

# name fragment -> kind, first match wins (so "tank_mass_per_volume" is a density, not a mass)
_RULES = (
    ("mass_per_volume", "density"), ("density_isp", "density_isp"), ("density", "density"),
    ("mass_flow", "mass_flow"), ("volume_flow", "volume_flow"), ("molar_mass", "molar_mass"),
    ("diameter", "diameter"), ("altitude", "altitude"), ("pressure", "pressure"),
    ("temperature", "temperature"), ("enthalpy", "enthalpy"), ("entropy", "entropy"),
    ("cp", "entropy"), ("sound_speed", "speed"), ("velocity", "speed"), ("cstar", "speed"),
    ("delta_v", "speed"), ("shortfall", "speed"), ("isp", "time"), ("burn_time", "time"),
    ("thrust", "force"), ("_area", "area"), ("volume", "volume"), ("mass", "mass"),
    ("payload", "mass"), ("fuel_percent", "percent"),
)
_UNITLESS_ENDINGS = ("_ratio", "_mach", "_fraction", "_gamma", "_gamma_frozen", "_efficiency",
                     "_factor", "mach", "gamma", "rank", "_count", "evaluations")


def check_units(system) -> str:
    """Validate an output unit system name.

    >>> check_units("US")
    'us'
    """
    key = str(system).strip().lower()
    if key not in UNIT_SYSTEMS:
        raise InputError("units", system, "one of " + ", ".join(UNIT_SYSTEMS))
    return key


def column_kind(name: str) -> str | None:
    """The quantity kind of a result column, or None for text and unitless columns.

    >>> column_kind("chamber_temperature"), column_kind("throat_diameter"), column_kind("exit_mach")
    ('temperature', 'diameter', None)
    >>> column_kind("tank_mass_per_volume"), column_kind("fuel_mass_flow"), column_kind("area_ratio")
    ('density', 'mass_flow', None)
    """
    if name.endswith(_UNITLESS_ENDINGS) or name.endswith("_composition") or name.startswith("at_"):
        return None
    for fragment, kind in _RULES:
        if fragment in name:
            return kind
    return None


@lru_cache(maxsize=None)
def factor(kind: str, system: str) -> float:
    """Multiply an SI value of ``kind`` by this to get it in ``system`` units.

    One psi is 6894.757293168 Pa and one foot 0.3048 m exactly (NIST SP 811, 2008):

    >>> round(1 / factor("pressure", "us"), 6), round(1 / factor("speed", "us"), 4)
    (6894.757293, 0.3048)
    """
    from perfchain.units import registry

    si, targets = _KINDS[kind]
    return float(registry().Quantity(1.0, si).to(targets[check_units(system)][0]).magnitude)


def unit_label(kind: str | None, system: str) -> str:
    """Label of ``kind`` in ``system`` ('' for unitless).

    >>> unit_label("pressure", "us"), unit_label("density_isp", "si"), unit_label(None, "si")
    ('psia', 'kg s/m^3', '')
    """
    if kind is None:
        return ""
    return _KINDS[kind][1][check_units(system)][1]


def to_unit(value, kind: str | None, system: str):
    """An SI value (float or array) in ``system`` units; unitless kinds pass through.

    1000 psia and 300 K in US customary units (NIST SP 811: 1 K = 1.8 degR):

    >>> round(to_unit(6894757.293168, "pressure", "us"), 3), round(to_unit(300.0, "temperature", "us"), 6)
    (1000.0, 540.0)
    """
    if kind is None or value is None:
        return value
    return value * factor(kind, system)


def convert_frame(df, system: str):
    """A copy of a result table in ``system`` units, and ``{column: unit label}``.

    Column names are unchanged; numeric columns of a known kind are scaled.

    >>> import pandas as pd
    >>> t, units = convert_frame(pd.DataFrame({"chamber_pressure": [1e5], "flow": ["frozen"]}), "si")
    >>> float(t.chamber_pressure[0]), units
    (1.0, {'chamber_pressure': 'bar', 'flow': ''})
    """
    import pandas as pd

    system = check_units(system)
    out = df.copy()
    units = {}
    for col in out.columns:
        kind = column_kind(str(col))
        if kind is not None and pd.api.types.is_numeric_dtype(out[col]) \
                and not pd.api.types.is_bool_dtype(out[col]):
            out[col] = out[col] * factor(kind, system)
            units[col] = unit_label(kind, system)
        else:
            units[col] = ""
    out.attrs = {}
    return out, units
