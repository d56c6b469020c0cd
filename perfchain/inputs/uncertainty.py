"""Uncertain inputs as typed: ``name=spec`` texts (or a mapping) -> checked distributions in SI.

The syntax, the same on the command line (``--vary "mixture_ratio=+/-2%"``), in a study file
(an ``uncertainty`` table of ``name = "spec"``) and in Python (``vary={"mixture_ratio": "+/-2%"}``):

- ``+/-2%`` a tolerance relative to the nominal value, ``+/-0.1 bar`` an absolute one
  (``±`` works too): a normal whose 2 sigma is the tolerance; ``+/-2% at 3 sigma`` states
  another coverage, ``+/-2% uniform`` a uniform over nominal +/- tolerance.
- ``0.95..0.98`` or ``60..70 bar`` a range (uniform).
- ``normal(2.56, 0.03)``, ``uniform(0.95, 0.98)``, ``triangular(0.95, 0.97, 0.98)``
  (low, mode, high) with explicit parameters, each with a unit where the input has one.

Every distribution must keep its samples inside the input's allowed range (:data:`FIELDS
<perfchain.inputs.fields.FIELDS>`): the ends of a range or triangle, and 4 standard deviations
either side of a normal's mean (all but about 6 samples in 100,000; a rarer sample outside the
range is counted as failed, never used).
"""

from __future__ import annotations

import re

import numpy as np

from perfchain.errors import InputError, suggest
from perfchain.inputs.fields import FIELDS, count, number, typed
from perfchain.uncertainty.distributions import Distribution, normal, triangular, uniform

__all__ = ["distribution", "vary_items", "check_name", "check_draws", "inside", "NORMAL_REACH", "DEFAULT_SAMPLES",
           "MAX_SAMPLES"]

NORMAL_REACH = 4.0        #: a normal's samples are checked this many standard deviations from its mean
DEFAULT_SAMPLES = 4000    #: percentiles of Isp to about 0.1 s for a spread of a few seconds
MAX_SAMPLES = 10_000_000  #: most samples of one run (a vehicle's 10 million samples take a few GB with Sobol)
_TOL = re.compile(r"^(?:\+/-|\+-|±)\s*(?P<x>.+?)\s*(?P<pct>%)?\s*(?:(?P<uni>uniform)|at\s+(?P<k>\S+)\s*sigma)?\s*$",
                  re.IGNORECASE)
_RANGE = re.compile(r"^(?P<lo>.+?)\s*\.\.\s*(?P<hi>.+)$")
_CALL = re.compile(r"^(?P<kind>normal|uniform|triangular)\s*\((?P<args>.*)\)\s*$", re.IGNORECASE)
_FORMS = ("a tolerance '+/-2%' or '+/-0.1 bar' (normal, 2 sigma; add 'at 3 sigma' or 'uniform'), a range "
          "'0.95..0.98', or normal(mean, std), uniform(low, high), triangular(low, mode, high)")


def _raw(field: str, x, name: str) -> float:
    """A value of the field's kind in SI, without the field's bounds (checked on the whole distribution)."""
    from perfchain.units import to_si

    spec = FIELDS[field]
    if spec.kind is None:
        return number(x, name, spec.allowed or "a number")
    if spec.kind == "fraction":
        if isinstance(x, str) and x.strip().endswith("%"):
            return number(x.strip()[:-1], name, spec.allowed) / 100.0
        return number(x, name, spec.allowed)
    return to_si(x, spec.kind, name)


def _with_unit_of(lo: str, hi: str) -> str:
    """``"60"`` and ``"70 bar"`` -> ``"60 bar"`` (a range may state its unit once, at the end)."""
    from perfchain.units import split_number

    a, b = split_number(lo.strip()), split_number(hi.strip())
    if a and b and not a[1] and b[1]:
        return f"{a[0]} {b[1]}"
    return lo


def distribution(spec, field: str, nominal: float | None = None, *, name: str | None = None) -> Distribution:
    """One input's distribution from its text (or a ready Distribution), checked against the field.

    Parameters
    ----------
    spec : str or Distribution
        See the module docstring for the forms.
    field : str
        The key of :data:`~perfchain.inputs.fields.FIELDS` that gives the unit kind and bounds.
    nominal : float, optional
        The nominal value [SI]; needed by a tolerance.
    name : str, optional
        The input's name in messages (default ``field``).

    Returns
    -------
    Distribution
        In SI units.

    Examples
    --------
    A 2 % tolerance is 2 sigma: O/F 2.56 +/- 2 % has a standard deviation of 0.0256 (closed form):

    >>> d = distribution("+/-2%", "mixture_ratio", 2.56)
    >>> d.kind, round(d.mean, 6), round(d.std, 6)
    ('normal', 2.56, 0.0256)
    >>> distribution("60..70 bar", "chamber_pressure").describe()
    'uniform from 6e+06 to 7e+06'
    >>> distribution("0.95..1.02", "cstar_efficiency")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: cstar_efficiency: got '0.95..1.02'; allowed: a distribution whose samples stay inside a factor in (0, 1] (this one reaches 1.02)
    """
    name = name or field
    if isinstance(spec, Distribution):
        dist = spec
    elif not isinstance(spec, str) or not spec.strip():
        raise InputError(name, typed(spec), _FORMS)
    else:
        dist = _parse(spec.strip(), field, nominal, name)
    _check_inside(dist, field, name, spec)
    return dist


def _parse(text: str, field: str, nominal, name: str) -> Distribution:
    m = _TOL.match(text)
    if m:
        if nominal is None:
            raise InputError(name, text, f"a tolerance only where {name} has a nominal value; give one, or a "
                             "range 'low..high' or normal(mean, std)")
        x = number(m["x"], name, "a tolerance such as '2%'") / 100.0 * abs(nominal) if m["pct"] \
            else _raw(field, m["x"], name)
        if not x > 0:
            raise InputError(name, text, "a tolerance above 0")
        if m["uni"]:
            return uniform(nominal - x, nominal + x, text, name)
        k = 2.0 if m["k"] is None else number(m["k"], name, "a coverage 'at K sigma' with K above 0")
        if not k > 0:
            raise InputError(name, text, "a coverage 'at K sigma' with K above 0")
        return normal(nominal, x / k, text, name)
    m = _CALL.match(text)
    if m:
        kind, args = m["kind"].lower(), [a.strip() for a in m["args"].split(",")]
        need = 3 if kind == "triangular" else 2
        if len(args) != need:
            raise InputError(name, text, f"{kind} with {need} parameters: " + _FORMS.split(", or ")[1])
        values = [_raw(field, a, name) for a in args]
        return {"normal": normal, "uniform": uniform, "triangular": triangular}[kind](*values, text=text, name=name)
    m = _RANGE.match(text)
    if m:
        lo = _raw(field, _with_unit_of(m["lo"], m["hi"]), name)
        return uniform(lo, _raw(field, m["hi"], name), text, name)
    raise InputError(name, text, _FORMS)


def _check_inside(dist: Distribution, field: str, name: str, spec) -> None:
    low, high = dist.support()
    if dist.kind == "normal":
        low, high = dist.a - NORMAL_REACH * dist.b, dist.a + NORMAL_REACH * dist.b
    f = FIELDS[field]
    for end in (low, high):
        if not inside(field, np.array([end]))[0]:
            words = f.allowed or "the allowed range" + (f" (above {f.low:g})" if f.low is not None else "")
            what = f"samples within {NORMAL_REACH:g} standard deviations" if dist.kind == "normal" else "samples"
            raise InputError(name, typed(spec) if not isinstance(spec, Distribution) else dist.describe(),
                             f"a distribution whose {what} stay inside {words} (this one reaches {end:.6g})")


def inside(field: str, values) -> np.ndarray:
    """Which values lie in the field's allowed range (a mask, for samples of a distribution).

    >>> inside("cstar_efficiency", np.array([0.9, 1.0, 1.01])).tolist()
    [True, True, False]
    """
    f, v = FIELDS[field], np.asarray(values, dtype=float)
    ok = np.isfinite(v)
    if f.low is not None:
        ok &= (v > f.low) if f.low_open else (v >= f.low)
    if f.high is not None:
        ok &= (v < f.high) if f.high_open else (v <= f.high)
    return ok


def vary_items(vary, where: str = "vary") -> list:
    """``["mixture_ratio=+/-2%", ...]`` (the CLI), or a mapping name -> spec -> [(name, spec), ...].

    >>> vary_items(["mixture_ratio=+/-2%", " cstar_efficiency = 0.95..0.98"])
    [('mixture_ratio', '+/-2%'), ('cstar_efficiency', '0.95..0.98')]
    """
    if vary is None:
        return []
    if hasattr(vary, "items"):
        items = [(str(k).strip(), v) for k, v in vary.items()]
    else:
        items = []
        for text in ([vary] if isinstance(vary, str) else vary):
            key, sep, spec = str(text).partition("=")
            if not sep or not key.strip() or not spec.strip():
                raise InputError(where, text, "NAME=SPEC, e.g. 'mixture_ratio=+/-2%' or 'cstar_efficiency=0.95..0.98'")
            items.append((key.strip(), spec.strip()))
    seen = set()
    for key, _ in items:
        if key in seen:
            raise InputError(where, key, "each input varied once")
        seen.add(key)
    return items


def check_name(key: str, allowed, where: str = "vary") -> str:
    """``key`` if it is one of ``allowed``, else a one-line error with the closest names.

    >>> check_name("mixture_ratio", ["mixture_ratio", "chamber_pressure"])
    'mixture_ratio'
    """
    if key not in allowed:
        hint = suggest(key, allowed)
        raise InputError(where, key, "an input of this calculation: " + ", ".join(allowed) +
                         (f" ({hint})" if hint else ""))
    return key


def check_draws(samples, seed, method) -> tuple:
    """(samples, seed, method) checked: 8 to ``MAX_SAMPLES`` samples, a seed of 0 or more, ``sobol`` or ``local``.

    >>> check_draws("2000", None, "Sobol")
    (2000, 0, 'sobol')
    """
    from perfchain.inputs.fields import choice
    from perfchain.uncertainty.propagation import METHODS

    words = f"a whole number of samples from 8 to {MAX_SAMPLES:,}"
    n = DEFAULT_SAMPLES if samples is None else count(samples, "samples", words, 8)
    if n > MAX_SAMPLES:
        raise InputError("samples", typed(samples), words)
    s = 0 if seed is None else count(seed, "seed", "a whole number of 0 or more", 0)
    return n, s, choice(method, "sensitivity", METHODS)

