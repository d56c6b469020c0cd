"""Study-file errors in one line: unknown keys with the closest known ones, pydantic errors translated.

Every problem becomes a :class:`~perfchain.errors.InputError` whose one line names the key
path (``engine[2].chamber_pressure``), the value and what is allowed. Works on any pydantic
model; the study's own models live in :mod:`perfchain.study.schema`.
"""

from __future__ import annotations

import types
import typing
from typing import Annotated, Union

from pydantic import BaseModel, ValidationError

from perfchain.errors import InputError, suggest

__all__ = ["check_keys", "translate_error"]


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


def check_keys(data, model: type[BaseModel], path: str):
    """Refuse unknown keys (with the closest known ones) before pydantic sees the data.

    Parameters
    ----------
    data : dict
        The plain data read from TOML.
    model : type of pydantic.BaseModel
        The model (and, through its field annotations, its sub-models) to check against.
    path : str
        Key path of ``data`` ('' at the top).

    Examples
    --------
    >>> from pydantic import BaseModel
    >>> class Nozzle(BaseModel):
    ...     area_ratio: float
    >>> try:
    ...     check_keys({"area_ration": 40}, Nozzle, "engine[1]")
    ... except InputError as exc:
    ...     print(exc.field)
    engine[1].area_ration
    """
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
                check_keys(item, sub, f"{where}[{i}]")
        elif not many:
            check_keys(value, sub, where)


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


_KIND_FIELDS = {"value", "fraction", "pressure", "length", "mass", "force", "speed", "time", "angle", "volume",
                "density", "temperature", "molar_enthalpy"}


#: strict types: what is allowed instead of text or another type (``"2.2"``, ``plots = "yes"``)
_STRICT = {"float_type": "a number (not in quotes)", "int_type": "a whole number (not in quotes)",
           "bool_type": "true or false (not in quotes)", "string_type": "text in quotes"}


def translate_error(err: ValidationError) -> InputError:
    """The first pydantic error as one InputError line naming the key path.

    Parameters
    ----------
    err : pydantic.ValidationError

    Returns
    -------
    InputError

    Examples
    --------
    >>> from pydantic import BaseModel, Field
    >>> class Nozzle(BaseModel):
    ...     area_ratio: float = Field(gt=1.0)
    >>> try:
    ...     Nozzle(area_ratio=0.5)
    ... except ValidationError as exc:
    ...     e = translate_error(exc)
    >>> e.field, e.value, e.allowed
    ('area_ratio', 0.5, 'a number greater than 1')
    """
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
    if first["type"] in _STRICT:
        return InputError(where, value, _STRICT[first["type"]])
    msg = first["msg"]
    msg = msg.replace("Input should be ", "")
    if msg.startswith(("greater", "less")):
        msg = "a number " + msg
    return InputError(where, value, " ".join(msg.split()))


