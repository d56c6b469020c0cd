"""Study files: the TOML schema, loading with one-line errors, and saving.

A study file is data only. It is read with :mod:`tomllib` and checked with
pydantic; nothing in it is ever executed. Quantities carry units as text
(``"20 bar"``, ``"350 kg"``), checked by :func:`perfchain.units.to_si` and kept
as given, so a study saved with :func:`dump_study` reads back to an equal model.

Top-level sections: ``[study]`` (title), ``[[ingredient]]`` (custom ingredients),
``[[blend]]``, ``[[engine]]``, ``[[comparison]]``, ``[[vehicle]]`` (with
``[[vehicle.stage]]`` and an optional ``[vehicle.fixed_tank]``) and ``[output]``.
Every error is a :class:`~perfchain.errors.InputError` whose one line names the
key path (``engine[2].chamber_pressure``), the value and what is allowed; an
unknown key comes with the closest known keys.
"""

from __future__ import annotations

import math
import tomllib
import types
import typing
from pathlib import Path
from typing import Annotated, Literal, Union

from pydantic import BaseModel, BeforeValidator, ConfigDict, Field, ValidationError, model_validator

from perfchain.errors import InputError, suggest
from perfchain.units import to_si

__all__ = ["Study", "Engine", "Efficiency", "Comparison", "Vehicle", "StageSpec", "FixedTank",
           "Output", "CustomIngredientSpec", "BlendSpec", "load_study", "parse_study", "dump_study",
           "pair_names"]

OBJECTIVES = ("isp_vacuum", "isp_ambient", "density_isp", "density_isp_ambient")
RANKINGS = OBJECTIVES + ("cstar", "chamber_temperature", "bulk_density")


# --------------------------------------------------------------------------- field types
def _quantity(kind: str, **bounds):
    """Text with a unit of ``kind``; a bare number is refused (it could be any unit)."""
    def check(value):
        if isinstance(value, bool) or not isinstance(value, (str, int, float)):
            raise InputError(kind, value, f"a {kind} with a unit as text")
        text = str(value)
        to_si(text, kind, kind, **bounds)  # raises InputError; the path is added on translation
        return text
    return Annotated[str, BeforeValidator(check)]


def _listed(item):
    """A list of ``item``; a single value is taken as a list of one."""
    def wrap(value):
        return list(value) if isinstance(value, (list, tuple)) else [value]
    return Annotated[list[item], BeforeValidator(wrap), Field(min_length=1)]


def _fraction(value):
    """A fraction in (0, 1): a number or a percentage text (``"85 %"``)."""
    if isinstance(value, str) and value.strip().endswith("%"):
        try:
            value = float(value.strip()[:-1]) / 100.0
        except ValueError:
            raise InputError("fraction", value, "a number in (0, 1) or a percentage, e.g. '85 %'") from None
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not 0.0 < value < 1.0:
        raise InputError("fraction", value, "a number in (0, 1) or a percentage, e.g. '85 %'")
    return float(value)


Pressure = _quantity("pressure", minimum=0.0)
AmbientPressure = _quantity("pressure", minimum=0.0, exclusive=False)
Altitude = _quantity("length", minimum=0.0, exclusive=False, maximum=86000.0)
Mass = _quantity("mass", minimum=0.0)
MassOrZero = _quantity("mass", minimum=0.0, exclusive=False)
Force = _quantity("force", minimum=0.0)
Speed = _quantity("speed", minimum=0.0)
Time = _quantity("time", minimum=0.0)
Angle = _quantity("angle", minimum=0.0)
Volume = _quantity("volume", minimum=0.0)
Density = _quantity("density", minimum=0.0)
DensityOrZero = _quantity("density", minimum=0.0, exclusive=False)
Temperature = _quantity("temperature", minimum=0.0)
MolarEnthalpy = _quantity("molar_enthalpy")
Fraction = Annotated[float, BeforeValidator(_fraction)]
def _not_bool(value):
    """TOML true/false is not a number here (pydantic would read it as 1.0/0.0)."""
    if isinstance(value, bool):
        raise ValueError("a number, not true/false")
    return value


Positive = Annotated[float, BeforeValidator(_not_bool), Field(gt=0.0, allow_inf_nan=False)]
AreaRatio = Annotated[float, BeforeValidator(_not_bool), Field(gt=1.0, allow_inf_nan=False)]
Factor = Annotated[float, BeforeValidator(_not_bool), Field(gt=0.0, le=1.0)]
Flow = Literal["shifting", "frozen", "frozen-throat"]
Which = Literal["vacuum", "ambient"]
Name = Annotated[str, Field(min_length=1)]


class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True, strict=False)


# --------------------------------------------------------------------------- sections
class StudyInfo(_Model):
    """``[study]``: what the study is."""

    title: Name
    description: str = ""
    author: str = ""


class CustomIngredientSpec(_Model):
    """``[[ingredient]]``: an ingredient of your own (see :func:`perfchain.propellants.ingredients.custom_ingredient`)."""

    name: Name
    formula: dict[str, Positive]
    enthalpy: MolarEnthalpy
    temperature: Temperature = "298.15 K"
    density: Density | None = None
    phase: Literal["liquid", "gas", "solid"] = "liquid"


class BlendSpec(_Model):
    """``[[blend]]``: a mass-fraction blend of ingredients (see :func:`perfchain.propellants.ingredients.blend`)."""

    name: Name
    parts: dict[str, Factor] = Field(min_length=1)
    density: Density | None = None


class Efficiency(_Model):
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


def _one_of(obj, a: str, b: str, where: str):
    if (getattr(obj, a) is None) == (getattr(obj, b) is None):
        raise InputError(where, "both" if getattr(obj, a) is not None else "neither",
                         f"exactly one of {a} or {b}")


class Engine(_Model):
    """``[[engine]]``: a propellant pair and its operating grid.

    The design point (sizing, delivered performance, separation, stages) is the
    first chamber pressure, exit, ambient and flow of the lists, at
    ``design_mixture_ratio`` (default: the optimum O/F for ``objective``).
    """

    name: Name
    oxidizer: Name
    fuel: Name
    mixture_ratio: _listed(Positive)
    chamber_pressure: _listed(Pressure)
    area_ratio: _listed(AreaRatio) | None = None
    exit_pressure: _listed(Pressure) | None = None
    ambient_pressure: _listed(AmbientPressure) | None = None
    altitude: _listed(Altitude) | None = None
    flow: _listed(Flow) = ["shifting"]
    objective: Literal[OBJECTIVES] = "isp_vacuum"
    design_mixture_ratio: Positive | None = None
    contraction_ratio: Annotated[float, BeforeValidator(_not_bool), Field(gt=1.0, allow_inf_nan=False)] | None = None
    efficiency: Efficiency | None = None
    thrust: Force | None = None
    thrust_at: Which = "vacuum"

    @model_validator(mode="after")
    def _exits(self):
        _one_of(self, "area_ratio", "exit_pressure", "exit")
        if self.ambient_pressure is not None and self.altitude is not None:
            raise InputError("ambient", "both", "one of ambient_pressure or altitude")
        return self


class Comparison(_Model):
    """``[[comparison]]``: propellant pairs, each at its own optimum O/F, same chamber and nozzle."""

    name: Name
    pairs: list[Name] = Field(min_length=1)
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
        for p in self.pairs:
            pair_names(p, "pairs")
        return self


_MASS_SETS = ({"dry", "propellant"}, {"mass", "propellant_fraction"}, {"propellant", "structural_ratio"})


class StageSpec(_Model):
    """``[[vehicle.stage]]``, first stage first: an engine by name (or an Isp) and masses.

    Masses as the ``deltav`` command takes them: ``dry`` + ``propellant``, ``mass`` +
    ``propellant_fraction``, or ``propellant`` + ``structural_ratio``.
    """

    name: str = ""
    engine: Name | None = None
    isp: Time | None = None
    exhaust_velocity: Speed | None = None
    which: Which = "vacuum"
    mixture_ratio: Positive | None = None
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


class FixedTank(_Model):
    """``[vehicle.fixed_tank]``: delta-v against O/F for tanks of fixed volume, per engine.

    Each engine's mixture ratios, first chamber pressure, exit, ambient and flow;
    ideal exhaust velocity (no efficiencies), see :mod:`perfchain.study.tradeoff`.
    """

    engines: list[Name] = Field(min_length=1)
    tank_volume: Volume
    fixed_dry_mass: Mass
    tank_mass_per_volume: DensityOrZero
    which: Which = "vacuum"


class Vehicle(_Model):
    """``[[vehicle]]``: a payload and stages, and/or a fixed-tank trade."""

    name: Name
    payload: MassOrZero
    target: Speed | None = None
    stage: list[StageSpec] = []
    fixed_tank: FixedTank | None = None

    @model_validator(mode="after")
    def _checks(self):
        if not self.stage and self.fixed_tank is None:
            raise InputError("stage", "none", "at least one [[vehicle.stage]] or a [vehicle.fixed_tank]")
        if self.target is not None and not self.stage:
            raise InputError("target", self.target, "only with stages")
        return self


class Output(_Model):
    """``[output]``: what to write."""

    formats: list[Literal["parquet", "csv"]] = Field(default=["parquet", "csv"], min_length=1)
    units: Literal["si", "us"] = "si"
    plots: bool = True
    plot_formats: list[Literal["png", "svg"]] = Field(default=["png", "svg"], min_length=1)


class Study(_Model):
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
        _unique(self.engine, "engine")
        _unique(self.comparison, "comparison")
        _unique(self.vehicle, "vehicle")
        _unique(list(self.ingredient) + list(self.blend), "ingredient")
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
        return self


def _unique(items, section):
    seen = set()
    for item in items:
        if item.name in seen:
            raise InputError(f"{section}.name", item.name, "names used once in a study")
        seen.add(item.name)


def pair_names(text: str, field: str = "pair") -> tuple[str, str]:
    """``"LOX/RP-1"`` -> ``("LOX", "RP-1")``.

    >>> pair_names("N2O4/MMH")
    ('N2O4', 'MMH')
    """
    parts = [p.strip() for p in str(text).split("/")]
    if len(parts) != 2 or not all(parts):
        raise InputError(field, text, "OXIDIZER/FUEL, e.g. 'LOX/RP-1'")
    return parts[0], parts[1]


# --------------------------------------------------------------------------- unknown keys
def _submodel(annotation):
    """The model class (and whether it is a list of them) inside a field annotation."""
    origin = typing.get_origin(annotation)
    if origin is Annotated:
        return _submodel(typing.get_args(annotation)[0])
    if origin in (Union, types.UnionType):
        for arg in typing.get_args(annotation):
            found = _submodel(arg)
            if found[0] is not None:
                return found
        return None, False
    if origin is list:
        inner, _ = _submodel(typing.get_args(annotation)[0])
        return inner, True
    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return annotation, False
    return None, False


def _check_keys(data, model: type[BaseModel], path: str):
    """Refuse unknown keys (with the closest known ones) before pydantic sees the data."""
    if not isinstance(data, dict):
        return
    known = list(model.model_fields)
    for key, value in data.items():
        where = f"{path}.{key}" if path else key
        if key not in model.model_fields:
            hint = suggest(key, known)
            raise InputError(where, key, (hint + "; " if hint else "") + "one of " + ", ".join(known))
        sub, many = _submodel(model.model_fields[key].annotation)
        if sub is None:
            continue
        if many and isinstance(value, list):
            for i, item in enumerate(value, 1):
                _check_keys(item, sub, f"{where}[{i}]")
        elif not many:
            _check_keys(value, sub, where)


def _loc(loc) -> str:
    out = ""
    for part in loc:
        if isinstance(part, int):
            out += f"[{part + 1}]"
        elif part in ("function-after", "function-before") or "[" in str(part):
            continue
        else:
            out += ("." if out else "") + str(part)
    return out


_KIND_FIELDS = {"fraction", "pressure", "length", "mass", "force", "speed", "time", "angle", "volume",
                "density", "temperature", "molar_enthalpy"}


def _translate(err: ValidationError) -> InputError:
    """The first pydantic error as one InputError line naming the key path."""
    first = err.errors(include_url=False)[0]
    where = _loc(first["loc"]) or "study"
    cause = (first.get("ctx") or {}).get("error")
    if isinstance(cause, InputError):
        if cause.field in _KIND_FIELDS:
            name = where
        elif not first["loc"]:
            name = cause.field
        else:
            name = f"{where}.{cause.field}"
        return InputError(name, cause.value, cause.allowed)
    if first["type"] == "missing":
        return InputError(where, "missing", "a required key (see `perfchain new-study`)")
    value = first.get("input")
    msg = first["msg"]
    msg = msg.replace("Input should be ", "")
    if msg.startswith(("greater", "less")):
        msg = "a number " + msg
    return InputError(where, value, " ".join(msg.split()))


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
    except tomllib.TOMLDecodeError as exc:
        raise InputError("study", source, f"valid TOML ({' '.join(str(exc).split())})") from None
    return study_from_dict(data)


def study_from_dict(data: dict) -> Study:
    """Validate a study already read into plain data (dicts, lists, strings, numbers)."""
    _check_keys(data, Study, "")
    try:
        return Study.model_validate(data)
    except ValidationError as exc:
        raise _translate(exc) from None


def load_study(path) -> Study:
    """Read and validate a study file; every problem is one :class:`InputError` line."""
    path = Path(path)
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise InputError("study", str(path), f"a readable TOML file ({exc.strerror})") from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise InputError("study", str(path), "a UTF-8 text file") from None
    return parse_study(text, source=str(path))


def _toml_key(key: str) -> str:
    if key and all(c.isalnum() or c in "-_" for c in key) and key.isascii():
        return key
    return _toml_value(key)


def _toml_value(value) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if not math.isfinite(value):
            raise InputError("value", value, "a finite number")
        return repr(value)
    if isinstance(value, str):
        escaped = value.replace("\\", "\\\\").replace('"', '\\"').replace("\n", "\\n").replace("\t", "\\t")
        return f'"{escaped}"'
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{ " + ", ".join(f"{_toml_key(k)} = {_toml_value(v)}" for k, v in value.items()) + " }"
    raise TypeError(type(value).__name__)


def _emit_table(lines: list, header: str, table: dict, array: bool):
    lines.append(f"[[{header}]]" if array else f"[{header}]")
    nested = []
    for key, value in table.items():
        if isinstance(value, list) and value and all(isinstance(v, dict) for v in value):
            nested.append((key, value, True))
        elif isinstance(value, dict) and key in ("fixed_tank",):
            nested.append((key, value, False))
        else:
            lines.append(f"{_toml_key(key)} = {_toml_value(value)}")
    lines.append("")
    for key, value, many in nested:
        for item in (value if many else [value]):
            _emit_table(lines, f"{header}.{key}", item, many)


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
                _emit_table(lines, key, item, True)
        else:
            _emit_table(lines, key, value, False)
    return "\n".join(lines).rstrip() + "\n"
