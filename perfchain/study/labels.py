"""Human labels of the output columns: one table read by the report, the plots and the readable CLI output.

Every column a result table can hold (the registry of :mod:`perfchain.study.columns`) has
a label a person reads, such as ``Vacuum Isp``, and its unit comes from the column's
declared kind, so ``label("isp_vacuum")`` is ``"Vacuum Isp (s)"`` and
``label("chamber_pressure", "us")`` is ``"Chamber pressure (psia)"``. The labels are
composed the way the columns are: a station's properties (``exit_mach`` ->
``Exit Mach number``), the optional blocks of a result (``sizing_throat_diameter`` ->
``Throat diameter``), the loss breakdown (one name per loss factor) and the columns the
study adds. Column names stay the stable keys of the files; only what a person reads
changes here.

A column with no label here is shown by :func:`label` in a readable form of its name (never
the raw key with underscores); ``tests/test_labels.py`` checks that every declared column
has its own label.
"""

from __future__ import annotations

from functools import lru_cache

from perfchain.study.columns import OBJECTIVE, column_kind, declared_kind, unit_label

__all__ = ["STATIONS", "STATION_LABELS", "RESULT_LABELS", "BLOCK_LABELS", "LOSS_LABELS", "STUDY_LABELS",
           "label", "name", "phrase", "unit", "station_label", "labels", "has_label", "value_label"]

#: the stations of a result, in flow order, and how a person names each
STATIONS = {"chamber": "Chamber", "throat": "Throat", "exit": "Exit"}

#: a station's properties (column ``<station>_<field>``); as a column of a per-station table
STATION_LABELS = {
    "pressure": "pressure", "temperature": "temperature", "density": "density",
    "enthalpy": "specific enthalpy", "entropy": "specific entropy", "molar_mass": "molar mass",
    "gamma": "isentropic exponent", "gamma_frozen": "frozen gamma", "cp": "cp (equilibrium)",
    "cp_frozen": "cp (frozen)", "sound_speed": "sound speed", "velocity": "velocity",
    "mach": "Mach number", "area_ratio": "area ratio A/At", "condensed_mass_fraction": "condensed mass fraction",
    "viscosity": "viscosity", "thermal_conductivity": "thermal conductivity (frozen)",
    "thermal_conductivity_equilibrium": "thermal conductivity (equilibrium)",
    "prandtl": "Prandtl number (frozen)", "prandtl_equilibrium": "Prandtl number (equilibrium)",
    "composition": "composition (mole fractions)",
}

#: the scalar fields of a result
RESULT_LABELS = {
    "propellant": "Propellant", "oxidizer": "Oxidizer", "fuel": "Fuel", "flow": "Flow model",
    "mixture_ratio": "Mixture ratio O/F", "stoichiometric_mixture_ratio": "Stoichiometric O/F",
    "equivalence_ratio": "Equivalence ratio", "fuel_percent": "Fuel share of mass",
    "chamber_pressure": "Chamber pressure", "ambient_pressure": "Ambient pressure",
    "reactant_enthalpy": "Reactant enthalpy", "bulk_density": "Bulk density",
    "oxidizer_density": "Oxidizer density", "fuel_density": "Fuel density", "area_ratio": "Area ratio Ae/At",
    "cstar": "Characteristic velocity c*", "cf_vacuum": "Vacuum thrust coefficient",
    "cf_ambient": "Ambient thrust coefficient", "isp_vacuum": "Vacuum Isp", "isp_ambient": "Ambient Isp",
    "exhaust_velocity_vacuum": "Vacuum exhaust velocity", "exhaust_velocity_ambient": "Ambient exhaust velocity",
    "altitude": "Altitude", "exit_ambient_pressure_ratio": "Exit to ambient pressure pe/pa",
    "separation_criterion": "Separation criterion", "flows_full": "Nozzle flows full",
    "ambient_model": "Ambient model", "separation_pressure": "Pressure at separation",
    "separation_area_ratio": "Area ratio at separation", "separation_velocity": "Velocity at separation",
    "separation_mach": "Mach number at separation", "ammonia_dissociation": "Ammonia dissociation",
    "notes": "Notes", "reactants": "Reactants",
}

#: the optional blocks of a result (column ``<block>_<key>``)
BLOCK_LABELS = {
    "finite_chamber": {
        "contraction_ratio": "Contraction ratio Ac/At", "injector_pressure": "Injector-face pressure",
        "nozzle_inlet_stagnation_pressure": "Nozzle-inlet stagnation pressure",
        "nozzle_inlet_pressure": "Nozzle-inlet static pressure", "nozzle_inlet_temperature": "Nozzle-inlet temperature",
        "nozzle_inlet_velocity": "Nozzle-inlet velocity", "nozzle_inlet_mach": "Nozzle-inlet Mach number"},
    "delivered": {
        "cstar": "Delivered c*", "cf_vacuum": "Delivered vacuum thrust coefficient",
        "cf_ambient": "Delivered ambient thrust coefficient", "isp_vacuum": "Delivered vacuum Isp",
        "isp_ambient": "Delivered ambient Isp", "exhaust_velocity_vacuum": "Delivered vacuum exhaust velocity",
        "exhaust_velocity_ambient": "Delivered ambient exhaust velocity"},
    "losses": {"total_isp_vacuum_loss": "Vacuum Isp lost, all factors"},
    "separation": {
        "flag": "Separation likely", "criterion": "Separation criterion", "threshold": "Separation threshold pe/pa",
        "pressure_ratio": "Exit to ambient pressure pe/pa",
        "full_flow_ambient_pressure": "Highest ambient pressure for full flow",
        "full_flow_altitude": "Lowest altitude for full flow"},
    "sizing": {
        "throat_area": "Throat area", "throat_diameter": "Throat diameter", "exit_area": "Exit area",
        "exit_diameter": "Exit diameter", "mass_flow": "Total mass flow", "oxidizer_mass_flow": "Oxidizer mass flow",
        "fuel_mass_flow": "Fuel mass flow", "oxidizer_volume_flow": "Oxidizer volume flow",
        "fuel_volume_flow": "Fuel volume flow", "thrust": "Thrust", "thrust_at": "Thrust stated at"},
}

#: each loss factor (``losses_factors_<name>`` and ``losses_isp_vacuum_loss_<name>``)
LOSS_LABELS = {"cstar_efficiency": "c* efficiency", "divergence": "divergence", "boundary_layer": "boundary layer",
               "kinetic": "kinetics", "two_phase": "two-phase flow", "cf_efficiency": "Cf efficiency"}
_LOSS_GROUPS = {"factors": "Factor: {}", "isp_vacuum_loss": "Vacuum Isp lost to {}"}

#: the columns the sweep, the study runner, the vehicle and the trade tables add
STUDY_LABELS = {
    "status": "Status", "reason": "Reason", "note": "Note", "exit_pressure": "Exit pressure", "engine": "Engine",
    "objective": "Objective", "objective_value": "Objective value", "at_bound": "Optimum at a search bound",
    "comparison": "Comparison", "pair": "Propellants", "density_isp": "Density-Isp, vacuum",
    "density_isp_ambient": "Density-Isp, ambient", "rank": "Rank", "total_isp_vacuum_loss": "Vacuum Isp lost, all factors",
    "vehicle": "Vehicle", "payload_mass": "Payload", "total_delta_v": "Total delta-v", "liftoff_mass": "Lift-off mass",
    "payload_fraction": "Payload fraction", "target_delta_v": "Target delta-v",
    "max_payload": "Largest payload for the target", "stage": "Stage", "name": "Name",
    "initial_mass": "Initial mass", "burnout_mass": "Burnout mass", "mass_ratio": "Mass ratio",
    "delta_v": "Delta-v", "burn_time": "Burn time", "which": "Isp used", "isp": "Isp",
    "thrust": "Stage thrust", "thrust_to_weight": "Thrust-to-weight at ignition",
    "thrust_to_weight_burnout": "Thrust-to-weight at burnout",
    "exhaust_velocity": "Exhaust velocity", "dry_mass": "Dry mass", "propellant_mass": "Propellant mass",
    "bounds": "O/F search range", "delta_v_mixture_ratio": "O/F of best delta-v", "delta_v_max": "Best delta-v",
    "isp_at_delta_v_optimum": "Isp at best delta-v", "bulk_density_at_delta_v_optimum": "Bulk density at best delta-v",
    "isp_mixture_ratio": "O/F of best Isp", "isp_max": "Best Isp", "delta_v_at_isp_optimum": "Delta-v at best Isp",
    "delta_v_gain": "Delta-v gained over best-Isp O/F",
}

#: text values a person reads differently from how a file stores them (column values, not names)
_VALUES = {"shifting": "shifting equilibrium", "frozen": "frozen at the chamber",
           "frozen-throat": "frozen from the throat", "ok": "ok", "failed": "failed"}


@lru_cache(maxsize=1)
def _table() -> dict:
    """Column name -> label (no unit), composed like the column registry."""
    from perfchain.performance.loss_model import LOSS_FACTORS

    out = {}
    for st, head in STATIONS.items():
        out.update({f"{st}_{k}": f"{head} {v}" for k, v in STATION_LABELS.items()})
    out.update(RESULT_LABELS)
    for block, keys in BLOCK_LABELS.items():
        out.update({f"{block}_{k}": v for k, v in keys.items()})
    for group, text in _LOSS_GROUPS.items():
        out.update({f"losses_{group}_{n}": text.format(LOSS_LABELS.get(n, n.replace("_", " "))) for n in LOSS_FACTORS})
    out.update(STUDY_LABELS)
    return out


def has_label(column: str) -> bool:
    """Whether a column has its own label in this table.

    >>> has_label("sizing_throat_diameter"), has_label("no_such_column")
    (True, False)
    """
    return column in _table()


def name(column: str) -> str:
    """A column's label without its unit.

    Parameters
    ----------
    column : str
        Column name (a key of the result tables and files).

    Returns
    -------
    str
        The label; for a column with none, its name with spaces, first letter capitalised.

    Examples
    --------
    >>> name("finite_chamber_nozzle_inlet_stagnation_pressure"), name("exit_mach")
    ('Nozzle-inlet stagnation pressure', 'Exit Mach number')
    >>> name("losses_isp_vacuum_loss_divergence"), name("some_new_column")
    ('Vacuum Isp lost to divergence', 'Some new column')
    """
    text = _table().get(column)
    if text is None:
        text = str(column).replace("_", " ").strip()
        text = text[:1].upper() + text[1:]
    return text


def phrase(column: str) -> str:
    """A column's label inside a sentence: first letter small unless it starts an acronym.

    >>> phrase("isp_vacuum"), phrase("density_isp"), phrase("cstar")
    ('vacuum Isp', 'density-Isp, vacuum', 'characteristic velocity c*')
    """
    text = name(column)
    return text[:1].lower() + text[1:] if text[1:2].islower() else text


def unit(column: str, units: str = "si", objective: str | None = None) -> str:
    """The unit a person reads for a column in ``units`` ('' for a pure number or text).

    ``objective_value`` has the unit of the quantity its ``objective`` names.

    >>> unit("chamber_pressure"), unit("chamber_pressure", "us"), unit("exit_mach")
    ('bar', 'psia', '')
    >>> unit("objective_value", objective="density_isp")
    'kg s/m^3'
    """
    if declared_kind(column) == OBJECTIVE:
        return unit_label(column_kind(objective), units) if objective else ""
    return unit_label(column_kind(column), units)


def label(column: str, units: str | None = "si", objective: str | None = None) -> str:
    """A column's label with its unit in parentheses, as a header or an axis reads.

    Parameters
    ----------
    column : str
        Column name.
    units : {"si", "us"} or None
        Output unit system; None leaves the unit out.
    objective : str, optional
        For ``objective_value``: the objective its row names (gives the label and the unit).

    Returns
    -------
    str

    Examples
    --------
    Isp in seconds in both systems (Isp = c/g0, g0 = 9.80665 m/s^2 by CGPM 1901):

    >>> label("isp_vacuum"), label("isp_vacuum", "us")
    ('Vacuum Isp (s)', 'Vacuum Isp (s)')
    >>> label("sizing_throat_diameter"), label("sizing_throat_diameter", "us"), label("exit_mach")
    ('Throat diameter (mm)', 'Throat diameter (in)', 'Exit Mach number')
    >>> label("objective_value", objective="isp_vacuum"), label("chamber_temperature", None)
    ('Vacuum Isp (s)', 'Chamber temperature')
    """
    text = name(objective) if (objective and declared_kind(column) == OBJECTIVE) else name(column)
    u = unit(column, units, objective) if units else ""
    return f"{text} ({u})" if u else text


def station_label(field: str, units: str | None = "si") -> str:
    """A station property as the column of a per-station table (one row per station).

    >>> station_label("temperature"), station_label("pressure", "us"), station_label("mach")
    ('Temperature (K)', 'Pressure (psia)', 'Mach number')
    """
    text = STATION_LABELS.get(field, field.replace("_", " "))
    text = text[:1].upper() + text[1:]
    u = unit(f"exit_{field}", units) if units else ""
    return f"{text} ({u})" if u else text


def labels(columns, units: str | None = "si") -> dict:
    """``{column: label}`` for many columns (:func:`label` of each).

    >>> labels(["pair", "isp_vacuum", "rank"])
    {'pair': 'Propellants', 'isp_vacuum': 'Vacuum Isp (s)', 'rank': 'Rank'}
    """
    return {c: label(c, units) for c in columns}


def value_label(value) -> str:
    """A text value as a person reads it: a column name (an objective) becomes its label.

    >>> value_label("density_isp"), value_label("frozen-throat"), value_label("Moth-M")
    ('Density-Isp, vacuum', 'frozen from the throat', 'Moth-M')
    """
    text = str(value)
    if text in _VALUES:
        return _VALUES[text]
    return name(text) if has_label(text) else text
