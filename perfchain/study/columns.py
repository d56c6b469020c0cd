"""Output columns: the quantity kind of every result column, declared once, and the unit sets.

Results are SI floats everywhere inside perfchain; only a written table, a plot axis or a
report cell is converted, with :func:`convert_frame` / :func:`to_unit`. Every column's kind
is declared once here, beside the result records it comes from: :data:`STATION_KINDS` for
each :class:`~perfchain.nozzle.stations.Station` field (column ``<station>_<field>``),
:data:`RESULT_KINDS` for the scalar fields of :class:`~perfchain.performance.result.Performance`,
:data:`BLOCK_KINDS` and :data:`LOSS_GROUPS` for its optional blocks (column
``<block>_<key>``; the loss names come from :data:`~perfchain.performance.loss_model.LOSS_FACTORS`),
and :data:`STUDY_KINDS` for the columns the study runner, the vehicle and the trade tables add.
Every writer reads it: the sweep's unit metadata (CSV sidecar, JSON, Parquet, DataFrame
attrs), the study tables, the report and the plots. Nothing is guessed from a name.

=============  ==============  ==================  ==============
kind           SI (tables)     ``si`` output       ``us`` output
=============  ==============  ==================  ==============
pressure       Pa              bar                 psia
temperature    K               K                   degR
speed          m/s             m/s                 ft/s
mass           kg              kg                  lbm
force          N               N                   lbf
diameter       m               mm                  in
altitude       m               m                   ft
area           m^2             m^2                 in^2
mass_flow      kg/s            kg/s                lbm/s
volume_flow    m^3/s           m^3/s               ft^3/s
volume         m^3             m^3                 ft^3
density        kg/m^3          kg/m^3              lbm/ft^3
density_isp    kg s/m^3        kg s/m^3            lbm s/ft^3
enthalpy       J/kg            J/kg                BTU/lbm
entropy        J/(kg K)        J/(kg K)            BTU/(lbm degR)
specific_heat  J/(kg K)        J/(kg K)            BTU/(lbm degR)
time           s               s                   s
molar_mass     kg/kmol         kg/kmol             lbm/lbmol
percent        %               %                   %
viscosity      Pa s            Pa s                lbm/(ft s)
conductivity   W/(m K)         W/(m K)             BTU/(h ft degR)
=============  ==============  ==================  ==============

Besides these, a column is ``dimensionless`` (ratios, Mach numbers, factors, flags, ranks:
SI unit ``1``), ``text`` (no unit), or ``objective`` (``objective_value``: the unit of the
quantity its row's ``objective`` names). Molar mass in kg/kmol is numerically lbm/lbmol.
Temperatures in ``us`` are absolute (degR = 1.8 K), so every conversion is a plain factor.
"""

from __future__ import annotations

from functools import lru_cache

from perfchain.errors import InputError

__all__ = ["UNIT_SYSTEMS", "STATION_KINDS", "RESULT_KINDS", "BLOCK_KINDS", "LOSS_GROUPS", "STUDY_KINDS",
           "check_units", "declared_kind", "column_kind", "si_unit", "column_units", "unit_label", "factor",
           "to_unit", "convert_frame"]

UNIT_SYSTEMS = ("si", "us")
DIMENSIONLESS, TEXT, OBJECTIVE = "dimensionless", "text", "objective"

#: kind -> (SI unit in pint syntax, SI label, {system: (pint unit, label)})
_KINDS = {
    "pressure": ("Pa", "Pa", {"si": ("bar", "bar"), "us": ("psi", "psia")}),
    "temperature": ("K", "K", {"si": ("K", "K"), "us": ("degR", "degR")}),
    "speed": ("m/s", "m/s", {"si": ("m/s", "m/s"), "us": ("ft/s", "ft/s")}),
    "mass": ("kg", "kg", {"si": ("kg", "kg"), "us": ("lb", "lbm")}),
    "force": ("N", "N", {"si": ("N", "N"), "us": ("lbf", "lbf")}),
    "diameter": ("m", "m", {"si": ("mm", "mm"), "us": ("inch", "in")}),
    "altitude": ("m", "m", {"si": ("m", "m"), "us": ("ft", "ft")}),
    "area": ("m**2", "m^2", {"si": ("m**2", "m^2"), "us": ("inch**2", "in^2")}),
    "mass_flow": ("kg/s", "kg/s", {"si": ("kg/s", "kg/s"), "us": ("lb/s", "lbm/s")}),
    "volume_flow": ("m**3/s", "m^3/s", {"si": ("m**3/s", "m^3/s"), "us": ("ft**3/s", "ft^3/s")}),
    "volume": ("m**3", "m^3", {"si": ("m**3", "m^3"), "us": ("ft**3", "ft^3")}),
    "density": ("kg/m**3", "kg/m^3", {"si": ("kg/m**3", "kg/m^3"), "us": ("lb/ft**3", "lbm/ft^3")}),
    "density_isp": ("kg*s/m**3", "kg s/m^3",
                    {"si": ("kg*s/m**3", "kg s/m^3"), "us": ("lb*s/ft**3", "lbm s/ft^3")}),
    "enthalpy": ("J/kg", "J/kg", {"si": ("J/kg", "J/kg"), "us": ("Btu/lb", "BTU/lbm")}),
    "entropy": ("J/(kg*K)", "J/(kg K)",
                {"si": ("J/(kg*K)", "J/(kg K)"), "us": ("Btu/(lb*degR)", "BTU/(lbm degR)")}),
    "specific_heat": ("J/(kg*K)", "J/(kg K)",
                      {"si": ("J/(kg*K)", "J/(kg K)"), "us": ("Btu/(lb*degR)", "BTU/(lbm degR)")}),
    "time": ("s", "s", {"si": ("s", "s"), "us": ("s", "s")}),
    "molar_mass": ("kg/kmol", "kg/kmol", {"si": ("kg/kmol", "kg/kmol"), "us": ("kg/kmol", "lbm/lbmol")}),
    "percent": ("percent", "%", {"si": ("percent", "%"), "us": ("percent", "%")}),
    "viscosity": ("Pa*s", "Pa s", {"si": ("Pa*s", "Pa s"), "us": ("lb/(ft*s)", "lbm/(ft s)")}),
    "conductivity": ("W/(m*K)", "W/(m K)",
                     {"si": ("W/(m*K)", "W/(m K)"), "us": ("Btu/(hour*ft*degR)", "BTU/(h ft degR)")}),
}

_D, _T = DIMENSIONLESS, TEXT

#: kind of each :class:`~perfchain.nozzle.stations.Station` field (column ``<station>_<field>``)
STATION_KINDS = {
    "pressure": "pressure", "temperature": "temperature", "density": "density", "enthalpy": "enthalpy",
    "entropy": "entropy", "molar_mass": "molar_mass", "gamma": _D, "gamma_frozen": _D,
    "cp": "specific_heat", "cp_frozen": "specific_heat", "sound_speed": "speed", "velocity": "speed",
    "mach": _D, "area_ratio": _D, "condensed_mass_fraction": _D, "composition": _T,
    # gas transport properties (perfchain.performance.transport; sweep columns only when asked)
    "viscosity": "viscosity", "thermal_conductivity": "conductivity",
    "thermal_conductivity_equilibrium": "conductivity", "prandtl": _D, "prandtl_equilibrium": _D,
}

#: kind of each scalar field of :class:`~perfchain.performance.result.Performance`
RESULT_KINDS = {
    "propellant": _T, "oxidizer": _T, "fuel": _T, "flow": _T, "mixture_ratio": _D, "stoichiometric_mixture_ratio": _D,
    "equivalence_ratio": _D, "fuel_percent": "percent", "chamber_pressure": "pressure",
    "ambient_pressure": "pressure", "reactant_enthalpy": "enthalpy", "bulk_density": "density",
    "oxidizer_density": "density", "fuel_density": "density", "area_ratio": _D, "cstar": "speed",
    "cf_vacuum": _D, "cf_ambient": _D, "isp_vacuum": "time", "isp_ambient": "time",
    "exhaust_velocity_vacuum": "speed", "exhaust_velocity_ambient": "speed", "altitude": "altitude",
    # the ambient model (perfchain.performance.ambient)
    "exit_ambient_pressure_ratio": _D, "separation_criterion": _T, "flows_full": _D, "ambient_model": _T,
    "separation_pressure": "pressure", "separation_area_ratio": _D, "separation_velocity": "speed",
    "separation_mach": _D,
    # a hydrazine chamber of fixed composition, and what a point says about its model
    "ammonia_dissociation": _D, "notes": _T,
    "reactants": _T,   # a block of the point's JSON, never a table column (study.rows.NOT_IN_ROWS)
}

#: kind of each key of the optional dict blocks of a Performance (column ``<block>_<key>``)
BLOCK_KINDS = {
    "finite_chamber": {"contraction_ratio": _D, "injector_pressure": "pressure",
                       "nozzle_inlet_stagnation_pressure": "pressure", "nozzle_inlet_pressure": "pressure",
                       "nozzle_inlet_temperature": "temperature", "nozzle_inlet_velocity": "speed",
                       "nozzle_inlet_mach": _D},
    "delivered": {"cstar": "speed", "cf_vacuum": _D, "cf_ambient": _D, "isp_vacuum": "time",
                  "isp_ambient": "time", "exhaust_velocity_vacuum": "speed", "exhaust_velocity_ambient": "speed"},
    "losses": {"total_isp_vacuum_loss": "time"},
    "separation": {"flag": _D, "criterion": _T, "threshold": _D, "pressure_ratio": _D,
                   "full_flow_ambient_pressure": "pressure", "full_flow_altitude": "altitude"},
    "sizing": {"throat_area": "area", "throat_diameter": "diameter", "exit_area": "area",
               "exit_diameter": "diameter", "mass_flow": "mass_flow", "oxidizer_mass_flow": "mass_flow",
               "fuel_mass_flow": "mass_flow", "oxidizer_volume_flow": "volume_flow",
               "fuel_volume_flow": "volume_flow", "thrust": "force", "thrust_at": _T},
}

#: the loss breakdown: ``losses_<group>_<loss factor name>`` for every loss factor
LOSS_GROUPS = {"factors": _D, "isp_vacuum_loss": "time"}

#: columns the sweep, the study runner, the vehicle and the trade tables add
STUDY_KINDS = {
    "status": _T, "reason": _T, "note": _T, "exit_pressure": "pressure", "engine": _T, "objective": _T,
    "objective_value": OBJECTIVE, "at_bound": _D, "comparison": _T, "pair": _T, "density_isp": "density_isp",
    "density_isp_ambient": "density_isp", "rank": _D, "total_isp_vacuum_loss": "time",
    # vehicles and stages
    "vehicle": _T, "payload_mass": "mass", "total_delta_v": "speed", "liftoff_mass": "mass",
    "payload_fraction": _D, "target_delta_v": "speed", "max_payload": "mass", "stage": _D, "name": _T,
    "initial_mass": "mass", "burnout_mass": "mass", "mass_ratio": _D, "delta_v": "speed", "burn_time": "time",
    "thrust": "force", "thrust_to_weight": _D, "thrust_to_weight_burnout": _D,
    "which": _T, "isp": "time", "exhaust_velocity": "speed", "dry_mass": "mass", "propellant_mass": "mass",
    # the fixed-tank trade and its optima
    "bounds": _T, "delta_v_mixture_ratio": _D, "delta_v_max": "speed", "isp_at_delta_v_optimum": "time",
    "bulk_density_at_delta_v_optimum": "density", "isp_mixture_ratio": _D, "isp_max": "time",
    "delta_v_at_isp_optimum": "speed", "delta_v_gain": "speed",
}


@lru_cache(maxsize=1)
def _registry() -> dict:
    """Column name -> kind, built from the record definitions and the tables above."""
    from dataclasses import fields

    from perfchain.performance.loss_model import LOSS_FACTORS
    from perfchain.performance.result import Performance

    out = dict(STUDY_KINDS)
    for f in fields(Performance):
        if f.name in BLOCK_KINDS:
            out.update({f"{f.name}_{k}": kind for k, kind in BLOCK_KINDS[f.name].items()})
        elif f.name in RESULT_KINDS:
            out[f.name] = RESULT_KINDS[f.name]
        elif "Station" in str(f.type):
            out.update({f"{f.name}_{k}": kind for k, kind in STATION_KINDS.items()})
    for group, kind in LOSS_GROUPS.items():
        out.update({f"losses_{group}_{name}": kind for name in LOSS_FACTORS})
    return out


def check_units(system) -> str:
    """Validate an output unit system name.

    >>> check_units("US")
    'us'
    """
    key = str(system).strip().lower()
    if key not in UNIT_SYSTEMS:
        raise InputError("units", system, "one of " + ", ".join(UNIT_SYSTEMS))
    return key


def declared_kind(name: str) -> str | None:
    """The kind declared for a column (a unit kind, ``dimensionless``, ``text`` or ``objective``).

    Parameters
    ----------
    name : str
        Column name.

    Returns
    -------
    str or None
        None for a column nobody declared.

    Examples
    --------
    The Isp lost to the c* efficiency is a time, the factor itself a pure number:

    >>> declared_kind("losses_isp_vacuum_loss_cstar_efficiency"), declared_kind("losses_factors_cstar_efficiency")
    ('time', 'dimensionless')
    >>> declared_kind("exit_composition"), declared_kind("no_such_column")
    ('text', None)
    """
    return _registry().get(name)


def column_kind(name: str) -> str | None:
    """The unit kind of a result column, or None for text, dimensionless and undeclared columns.

    >>> column_kind("chamber_temperature"), column_kind("sizing_throat_diameter"), column_kind("exit_mach")
    ('temperature', 'diameter', None)
    >>> column_kind("isp_at_delta_v_optimum"), column_kind("sizing_fuel_mass_flow"), column_kind("area_ratio")
    ('time', 'mass_flow', None)
    """
    kind = declared_kind(name)
    return kind if kind in _KINDS else None


def si_unit(name: str) -> str:
    """The SI unit of a table column: ``"1"`` if dimensionless, ``""`` for text or undeclared.

    Parameters
    ----------
    name : str
        Column name.

    Returns
    -------
    str

    Examples
    --------
    >>> si_unit("exit_temperature"), si_unit("isp_vacuum"), si_unit("exit_mach"), si_unit("flow")
    ('K', 's', '1', '')
    >>> si_unit("objective_value")
    's or kg s/m^3 (as its objective)'
    """
    kind = declared_kind(name)
    if kind in _KINDS:
        return _KINDS[kind][1]
    if kind == OBJECTIVE:
        return "s or kg s/m^3 (as its objective)"
    return "1" if kind == DIMENSIONLESS else ""


def column_units(columns) -> dict:
    """``{column: SI unit}`` for table metadata (:func:`si_unit` of each).

    >>> column_units(["chamber_pressure", "cstar", "status"])
    {'chamber_pressure': 'Pa', 'cstar': 'm/s', 'status': ''}
    """
    return {c: si_unit(c) for c in columns}


@lru_cache(maxsize=None)
def factor(kind: str, system: str) -> float:
    """Multiply an SI value of ``kind`` by this to get it in ``system`` units.

    One psi is 6894.757293168 Pa and one foot 0.3048 m exactly (NIST SP 811, 2008):

    >>> round(1 / factor("pressure", "us"), 6), round(1 / factor("speed", "us"), 4)
    (6894.757293, 0.3048)
    """
    from perfchain.units import UNITS_LOCK, registry

    si, _, targets = _KINDS[kind]
    ureg = registry()
    with UNITS_LOCK:
        return float(ureg.Quantity(1.0, si).to(targets[check_units(system)][0]).magnitude)


def unit_label(kind: str | None, system: str) -> str:
    """Label of ``kind`` in ``system`` ('' for unitless).

    >>> unit_label("pressure", "us"), unit_label("density_isp", "si"), unit_label(None, "si")
    ('psia', 'kg s/m^3', '')
    """
    if kind is None or kind not in _KINDS:
        return ""
    return _KINDS[kind][2][check_units(system)][1]


def to_unit(value, kind: str | None, system: str):
    """An SI value (float or array) in ``system`` units; unitless kinds pass through.

    1000 psia and 300 K in US customary units (NIST SP 811: 1 K = 1.8 degR):

    >>> round(to_unit(6894757.293168, "pressure", "us"), 3), round(to_unit(300.0, "temperature", "us"), 6)
    (1000.0, 540.0)
    """
    if kind is None or value is None or kind not in _KINDS:
        return value
    return value * factor(kind, system)


def _convert_objective(out, col, system) -> str:
    """Scale ``objective_value`` row by row by the kind its ``objective`` names; its label(s)."""
    if "objective" not in out.columns:
        return ""
    kinds = [column_kind(str(o)) for o in out["objective"]]
    out[col] = out[col] * [factor(k, system) if k is not None else 1.0 for k in kinds]
    return " or ".join(dict.fromkeys(unit_label(k, system) for k in kinds if k is not None))


def convert_frame(df, system: str):
    """A copy of a result table in ``system`` units, and ``{column: unit label}``.

    Column names are unchanged; numeric columns of a declared unit kind are scaled.

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
        kind = declared_kind(str(col))
        numeric = pd.api.types.is_numeric_dtype(out[col]) and not pd.api.types.is_bool_dtype(out[col])
        if kind in _KINDS and numeric:
            out[col] = out[col] * factor(kind, system)
            units[col] = unit_label(kind, system)
        elif kind == OBJECTIVE and numeric:
            units[col] = _convert_objective(out, col, system)
        else:
            units[col] = ""
    out.attrs = {}
    return out, units
