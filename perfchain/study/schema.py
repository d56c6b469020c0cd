"""Study files: the TOML schema, loading with one-line errors, and saving.

A study file is data only. It is read with :mod:`tomllib` and checked with
pydantic; nothing in it is ever executed. Quantities carry units as text
(``"20 bar"``, ``"350 kg"``), checked by :func:`perfchain.inputs.value` and kept
as given, so a study saved with :func:`dump_study` reads back to an equal model.

Top-level sections: ``[study]`` (title), ``[[ingredient]]`` (custom ingredients),
``[[blend]]``, ``[[engine]]``, ``[[comparison]]``, ``[[vehicle]]`` (with
``[[vehicle.stage]]`` and an optional ``[vehicle.fixed_tank]``) and ``[output]``.
Every error is a :class:`~perfchain.errors.InputError` whose one line names the
key path (``engine[2].chamber_pressure``), the value and what is allowed; an
unknown key comes with the closest known keys.
"""

from __future__ import annotations

import os
import stat
import tomllib
from pathlib import Path
from typing import Literal

from pydantic import Field, ValidationError, model_validator

from perfchain.errors import InputError, suggest
from perfchain.study.fields import (Altitude, AmbientPressure, Angle, AreaRatio, BellLengthFraction, ConeAngle,
                                    ContractionRatio, Density, DensityOrZero, Diameter, Factor, Flow, Force,
                                    Fraction, Length, Mass, MassFraction, MassOrZero, MixtureRatio, MolarEnthalpy,
                                    Name, Positive, Pressure, Section, Speed, Temperature, Time, Volume,
                                    WallTemperature, Which, listed)
from perfchain.study.keys import check_keys, translate_error
from perfchain.study.names import first_duplicate, name_key
from perfchain.study.toml_text import emit_table
from perfchain.study.uncertainty_study import UncertaintySpec
from perfchain.units import to_si

__all__ = ["Study", "Engine", "Efficiency", "Thermal", "Comparison", "Vehicle", "StageSpec", "FixedTank",
           "Output", "CustomIngredientSpec", "BlendSpec", "load_study", "parse_study", "dump_study",
           "pair_names", "read_study_text", "MAX_STUDY_BYTES"]

MAX_STUDY_BYTES = 10 * 2**20   #: largest study file read [bytes]; a study is a few kB
OBJECTIVES = ("isp_vacuum", "isp_ambient", "density_isp", "density_isp_ambient")
RANKINGS = OBJECTIVES + ("cstar", "chamber_temperature", "bulk_density")


# --------------------------------------------------------------------------- sections
class StudyInfo(Section):
    """``[study]``: what the study is."""

    title: Name
    description: str = ""
    author: str = ""


class CustomIngredientSpec(Section):
    """``[[ingredient]]``: an ingredient of your own (see :func:`perfchain.propellants.records.custom_ingredient`)."""

    name: Name
    formula: dict[str, Positive]
    enthalpy: MolarEnthalpy
    temperature: Temperature = "298.15 K"
    density: Density | None = None
    phase: Literal["liquid", "gas", "solid"] = "liquid"


class BlendSpec(Section):
    """``[[blend]]``: a mass-fraction blend of ingredients (see :func:`perfchain.propellants.ingredients.blend`)."""

    name: Name
    parts: dict[str, MassFraction] = Field(min_length=1)
    density: Density | None = None


class Efficiency(Section):
    """Efficiency factors of :class:`perfchain.performance.losses.LossModel` (each in (0, 1], default 1)."""

    cstar_efficiency: Factor | None = None
    conical_half_angle: Angle | None = None
    bell_exit_angle: Angle | None = None
    divergence_factor: Factor | None = None
    boundary_layer: Factor | None = None
    kinetic: Factor | None = None
    two_phase: Factor | None = None
    cf_efficiency: Factor | None = None

    def loss_model(self, where: str = "efficiency"):
        """The :class:`~perfchain.performance.losses.LossModel` (angles in rad); errors name ``where``."""
        from perfchain.performance.losses import LossModel

        kwargs = {}
        for key, value in self.model_dump(exclude_none=True).items():
            kwargs[key] = to_si(value, "angle", f"{where}.{key}") if key.endswith("_angle") else value
        try:
            return LossModel(**kwargs)
        except InputError as exc:
            raise InputError(f"{where}.{exc.field}", exc.value, exc.allowed) from None


class Thermal(Section):
    """``[engine.thermal]``: chamber geometry, contour and wall heat flux at the design point.

    See :func:`perfchain.chamber`: the engine's thrust (or ``throat_diameter``) sizes the throat;
    ``contraction_ratio`` defaults to the engine's; L* to the pair's typical value (common
    practice). Preliminary design estimates.
    """

    contraction_ratio: ContractionRatio | None = None
    characteristic_length: Length | None = None
    throat_diameter: Diameter | None = None
    contour: Literal["bell", "conical"] = "bell"
    nozzle_half_angle: ConeAngle | None = None
    bell_length_fraction: BellLengthFraction | None = None
    wall_temperature: WallTemperature = "800 K"
    stations: int = Field(default=60, ge=20, le=400)


def _one_of(obj, a: str, b: str, where: str):
    if (getattr(obj, a) is None) == (getattr(obj, b) is None):
        raise InputError(where, "both" if getattr(obj, a) is not None else "neither",
                         f"exactly one of {a} or {b}")


class Engine(Section):
    """``[[engine]]``: a propellant pair and its operating grid, or a formulation and its grid.

    The design point (sizing, delivered performance, separation, stages) is the
    first chamber pressure, exit, ambient and flow of the lists, at
    ``design_mixture_ratio`` (default: the optimum O/F for ``objective``). A
    formulation (``propellant = "AP=0.86, HTPB=0.14"`` or a table of mass fractions;
    a monopropellant by name) takes the place of ``oxidizer``, ``fuel`` and
    ``mixture_ratio``: it has no O/F, so no optimum either.
    """

    name: Name
    oxidizer: Name | None = None
    fuel: Name | None = None
    propellant: Name | dict[str, MassFraction] | None = None
    mixture_ratio: listed(MixtureRatio, "mixture_ratio") | None = None
    chamber_pressure: listed(Pressure, "chamber_pressure")
    area_ratio: listed(AreaRatio, "area_ratio") | None = None
    exit_pressure: listed(Pressure, "exit_pressure") | None = None
    ambient_pressure: listed(AmbientPressure, "ambient_pressure") | None = None
    altitude: listed(Altitude, "altitude") | None = None
    flow: listed(Flow) = ["shifting"]
    objective: Literal[OBJECTIVES] = "isp_vacuum"
    design_mixture_ratio: MixtureRatio | None = None
    contraction_ratio: ContractionRatio | None = None
    efficiency: Efficiency | None = None
    thrust: Force | None = None
    thrust_at: Which = "vacuum"
    uncertainty: UncertaintySpec | None = None
    thermal: Thermal | None = None

    @model_validator(mode="after")
    def _exits(self):
        _one_of(self, "area_ratio", "exit_pressure", "exit")
        if self.ambient_pressure is not None and self.altitude is not None:
            raise InputError("ambient", "both", "one of ambient_pressure or altitude")
        _propellant_keys(self)
        _thermal_keys(self)
        return self


def _thermal_keys(engine) -> None:
    """A thermal block needs a contraction ratio, an area ratio, and a thrust or a throat."""
    th = engine.thermal
    if th is None:
        return
    if th.contraction_ratio is None and engine.contraction_ratio is None:
        raise InputError("thermal.contraction_ratio", None, "a chamber/throat area ratio above 1 (here or as "
                         "the engine's contraction_ratio)")
    if engine.area_ratio is None:
        raise InputError("thermal", "an engine given by exit_pressure", "an engine given by area_ratio (the "
                         "contour is drawn to an area ratio)")
    if th.throat_diameter is None and engine.thrust is None:
        raise InputError("thermal.throat_diameter", None, "a diameter, or the engine's thrust")


def _propellant_keys(engine) -> None:
    """An engine states oxidizer, fuel and mixture_ratio, or a propellant (a formulation) instead."""
    if engine.propellant is not None:
        for key in ("oxidizer", "fuel", "mixture_ratio", "design_mixture_ratio"):
            if getattr(engine, key) is not None:
                raise InputError(key, getattr(engine, key), "only with oxidizer and fuel; a propellant "
                                 "(formulation) has none of oxidizer, fuel, mixture_ratio, design_mixture_ratio")
        return
    for key in ("oxidizer", "fuel", "mixture_ratio"):
        if getattr(engine, key) is None:
            raise InputError(key, "missing", "a required key (with oxidizer, fuel and mixture_ratio), or propellant "
                             "instead: a formulation such as 'AP=0.86, HTPB=0.14' or a monopropellant")


class Comparison(Section):
    """``[[comparison]]``: propellant pairs, each at its own optimum O/F, same chamber and nozzle;
    ``propellants`` (formulations, monopropellants) stand beside them as they are."""

    name: Name
    pairs: list[Name] = []
    propellants: list[Name | dict[str, MassFraction]] = []
    chamber_pressure: Pressure
    area_ratio: AreaRatio | None = None
    exit_pressure: Pressure | None = None
    ambient_pressure: AmbientPressure | None = None
    altitude: Altitude | None = None
    flow: Flow = "shifting"
    objective: Literal[OBJECTIVES] = "isp_vacuum"
    rank_by: Literal[RANKINGS] | None = None
    efficiency: Efficiency | None = None

    @model_validator(mode="after")
    def _checks(self):
        _one_of(self, "area_ratio", "exit_pressure", "exit")
        if self.ambient_pressure is not None and self.altitude is not None:
            raise InputError("ambient", "both", "one of ambient_pressure or altitude")
        if not self.pairs and not self.propellants:
            raise InputError("pairs", "none", "at least one OXIDIZER/FUEL pair, or propellants (formulations)")
        keys = [tuple(name_key(n) for n in pair_names(p, f"pairs[{j}]")) for j, p in enumerate(self.pairs, 1)]
        dup = first_duplicate(keys)
        if dup is not None:
            raise InputError(f"pairs[{dup[1] + 1}]", self.pairs[dup[1]],
                             f"pairs given once (pairs[{dup[0] + 1}] is {self.pairs[dup[0]]!r})")
        return self


_MASS_SETS = ({"dry", "propellant"}, {"mass", "propellant_fraction"}, {"propellant", "structural_ratio"})


class StageSpec(Section):
    """``[[vehicle.stage]]``, first stage first: an engine by name (or an Isp) and masses.

    Masses as the ``deltav`` command takes them: ``dry`` + ``propellant``, ``mass`` +
    ``propellant_fraction``, or ``propellant`` + ``structural_ratio``.
    """

    name: str = ""
    engine: Name | None = None
    isp: Time | None = None
    exhaust_velocity: Speed | None = None
    which: Which = "vacuum"
    mixture_ratio: MixtureRatio | None = None
    dry: Mass | None = None
    propellant: Mass | None = None
    mass: Mass | None = None
    propellant_fraction: Fraction | None = None
    structural_ratio: Fraction | None = None
    thrust: Force | None = None

    @model_validator(mode="after")
    def _checks(self):
        given = [k for k in ("engine", "isp", "exhaust_velocity") if getattr(self, k) is not None]
        if len(given) != 1:
            raise InputError("engine", " and ".join(given) or "none",
                             "exactly one of engine, isp, exhaust_velocity")
        if self.mixture_ratio is not None and self.engine is None:
            raise InputError("mixture_ratio", self.mixture_ratio, "only with engine")
        masses = {k for k in ("dry", "propellant", "mass", "propellant_fraction", "structural_ratio")
                  if getattr(self, k) is not None}
        if masses not in _MASS_SETS:
            raise InputError("masses", ", ".join(sorted(masses)) or "none",
                             "dry + propellant, or mass + propellant_fraction, or propellant + structural_ratio")
        return self


class FixedTank(Section):
    """``[vehicle.fixed_tank]``: delta-v against O/F for tanks of fixed volume, per engine.

    Each engine's mixture ratios, first chamber pressure, exit, ambient and flow;
    ideal exhaust velocity (no efficiencies), see :mod:`perfchain.study.tradeoff`.
    """

    engines: list[Name] = Field(min_length=1)
    tank_volume: Volume
    fixed_dry_mass: Mass
    tank_mass_per_volume: DensityOrZero
    which: Which = "vacuum"


class Vehicle(Section):
    """``[[vehicle]]``: a payload and stages, and/or a fixed-tank trade."""

    name: Name
    payload: MassOrZero
    target: Speed | None = None
    stage: list[StageSpec] = []
    fixed_tank: FixedTank | None = None
    uncertainty: UncertaintySpec | None = None

    @model_validator(mode="after")
    def _checks(self):
        if not self.stage and self.fixed_tank is None:
            raise InputError("stage", "none", "at least one [[vehicle.stage]] or a [vehicle.fixed_tank]")
        if self.target is not None and not self.stage:
            raise InputError("target", self.target, "only with stages")
        return self


class Output(Section):
    """``[output]``: what to write."""

    formats: list[Literal["parquet", "csv"]] = Field(default=["parquet", "csv"], min_length=1)
    units: Literal["si", "us"] = "si"
    plots: bool = True
    plot_formats: list[Literal["png", "svg"]] = Field(default=["png", "svg"], min_length=1)


class Study(Section):
    """A whole study file."""

    study: StudyInfo
    ingredient: list[CustomIngredientSpec] = []
    blend: list[BlendSpec] = []
    engine: list[Engine] = []
    comparison: list[Comparison] = []
    vehicle: list[Vehicle] = []
    output: Output = Output()

    @model_validator(mode="after")
    def _references(self):
        if not (self.engine or self.comparison or self.vehicle):
            raise InputError("study", "no work", "at least one [[engine]], [[comparison]] or [[vehicle]]")
        _unique([("engine", self.engine)])
        _unique([("comparison", self.comparison)])
        _unique([("vehicle", self.vehicle)])
        _unique([("ingredient", self.ingredient), ("blend", self.blend)])
        engines = {e.name: e for e in self.engine}
        for i, v in enumerate(self.vehicle, 1):
            refs = [(f"vehicle[{i}].stage[{j}].engine", s.engine) for j, s in enumerate(v.stage, 1)
                    if s.engine is not None]
            if v.fixed_tank is not None:
                refs += [(f"vehicle[{i}].fixed_tank.engines", n) for n in v.fixed_tank.engines]
            for field, ref in refs:
                if ref not in engines:
                    hint = suggest(ref, engines)
                    raise InputError(field, ref, "the name of an [[engine]] of this study"
                                     + (f" ({hint})" if hint else f" ({', '.join(engines) or 'none defined'})"))
            _o_f_trades_need_pairs(i, v, engines)
        return self


def _o_f_trades_need_pairs(i: int, v, engines: dict) -> None:
    """A formulation engine has no O/F: a stage's ``mixture_ratio`` or a fixed-tank trade on it is
    refused when the study is read, before any grid is computed."""
    burns = {n: (p if isinstance(p, str) else ", ".join(f"{k}={w}" for k, w in p.items()))
             for n, p in ((n, e.propellant) for n, e in engines.items()) if p is not None}
    for j, s in enumerate(v.stage, 1):
        if s.engine in burns and s.mixture_ratio is not None:
            raise InputError(f"vehicle[{i}].stage[{j}].mixture_ratio", s.mixture_ratio, f"none: engine "
                             f"{s.engine} burns a formulation ({burns[s.engine]}), which has no O/F")
    for name in [n for n in (v.fixed_tank.engines if v.fixed_tank else []) if n in burns]:
        raise InputError(f"vehicle[{i}].fixed_tank.engines", name, f"engines with an oxidizer and a fuel: the "
                         f"fixed-tank trade varies O/F, and {name} burns a formulation ({burns[name]})")


def _unique(sections):
    """Names used once across the given sections, compared case-insensitively; the error names both."""
    places = [(f"{section}[{i}]", item.name) for section, items in sections for i, item in enumerate(items, 1)]
    dup = first_duplicate([name_key(name) for _, name in places])
    if dup is not None:
        (first, name1), (second, name2) = places[dup[0]], places[dup[1]]
        raise InputError(f"{second}.name", name2, f"a name used once in the study, case-insensitively "
                         f"({first}.name is {name1!r})")


def pair_names(text: str, field: str = "pair") -> tuple[str, str]:
    """``"LOX/RP-1"`` -> ``("LOX", "RP-1")``.

    >>> pair_names("N2O4/MMH")
    ('N2O4', 'MMH')
    """
    from perfchain.inputs import pair

    return pair(str(text), field)


# --------------------------------------------------------------------------- load / save
def parse_study(text: str, source: str = "study") -> Study:
    """Parse and validate a study from TOML text.

    Examples
    --------
    >>> s = parse_study('''
    ... [study]
    ... title = "demo"
    ... [[engine]]
    ... name = "E1"
    ... oxidizer = "LOX"
    ... fuel = "RP-1"
    ... mixture_ratio = [2.2, 2.6]
    ... chamber_pressure = "70 bar"
    ... area_ratio = 40
    ... ''')
    >>> s.engine[0].chamber_pressure, s.engine[0].area_ratio
    (['70 bar'], [40.0])

    An unknown key is refused with the closest known keys:

    >>> try:
    ...     parse_study('[study]\\ntitle = "x"\\n[[engine]]\\nname = "E"\\nfeul = "RP-1"')
    ... except InputError as exc:
    ...     print(str(exc)[:66])
    engine[1].feul: got 'feul'; allowed: did you mean 'fuel', 'flow'?;
    """
    try:
        data = tomllib.loads(text)
        return study_from_dict(data)
    except tomllib.TOMLDecodeError as exc:
        raise InputError("study", source, f"valid TOML ({' '.join(str(exc).split())})") from None
    except RecursionError:   # tables or arrays nested thousands deep
        raise InputError("study", source, "TOML nested at most a few hundred levels deep") from None


def study_from_dict(data: dict) -> Study:
    """Validate a study already read into plain data (dicts, lists, strings, numbers)."""
    check_keys(data, Study, "")
    try:
        return Study.model_validate(data)
    except ValidationError as exc:
        raise translate_error(exc) from None


def read_study_text(path) -> str:
    """The text of a study file: a regular UTF-8 file of at most :data:`MAX_STUDY_BYTES`.

    A device, pipe or folder (``/dev/zero``), or a file too large to be a study, is refused
    before it is read; every problem is one :class:`InputError` line naming the file.

    Examples
    --------
    >>> try:
    ...     read_study_text("/dev/zero")
    ... except InputError as exc:
    ...     print(exc.allowed)
    a regular file (not a device, pipe or folder)
    """
    path = Path(path)
    try:
        with open(path, "rb") as fh:
            info = os.fstat(fh.fileno())
            if not stat.S_ISREG(info.st_mode):
                raise InputError("study", str(path), "a regular file (not a device, pipe or folder)")
            raw = fh.read(MAX_STUDY_BYTES + 1)
    except OSError as exc:
        raise InputError("study", str(path), f"a readable TOML file ({exc.strerror})") from None
    if len(raw) > MAX_STUDY_BYTES:
        raise InputError("study", str(path), f"a study file of at most {MAX_STUDY_BYTES // 2**20} MiB")
    try:
        return raw.decode("utf-8")
    except UnicodeDecodeError:
        raise InputError("study", str(path), "a UTF-8 text file") from None


def load_study(path) -> Study:
    """Read and validate a study file; every problem is one :class:`InputError` line."""
    return parse_study(read_study_text(path), source=str(path))



def dump_study(study: Study) -> str:
    """The study as TOML text (defaults left out); :func:`parse_study` reads it back equal.

    >>> s = parse_study('[study]\\ntitle = "t"\\n[[vehicle]]\\nname = "V"\\npayload = "1 t"\\n'
    ...                 '[[vehicle.stage]]\\nisp = "300 s"\\ndry = "1 t"\\npropellant = "9 t"\\n')
    >>> parse_study(dump_study(s)) == s
    True
    """
    data = study.model_dump(exclude_defaults=True)
    lines: list[str] = []
    for key in Study.model_fields:
        if key not in data:
            continue
        value = data[key]
        if isinstance(value, list):
            for item in value:
                emit_table(lines, key, item, True)
        else:
            emit_table(lines, key, value, False)
    return "\n".join(lines).rstrip() + "\n"
