"""Conditioned propellants: a liquid record moved to another storage temperature.

Cryogens are often stored subcooled or densified (LOX at 66-80 K, LCH4 near its triple
point) and self-pressurizing liquids such as N2O sit at whatever the tank temperature is.
:func:`conditioned` returns the bundled record at a chosen temperature, as the
**saturated liquid** at that temperature, with density and enthalpy from a real-fluid
(Helmholtz) equation of state evaluated by CoolProp. The enthalpy keeps the bundled
record's reference (formation enthalpy of the NASA convention):

    h(T) = h_record + [h_sat,liq(T) - h_sat,liq(T_record)]     (both from the EOS)

A subcooled liquid held above its vapour pressure has almost the same enthalpy and
density as the saturated liquid at its temperature (the pressure effect on a liquid far
from the critical point is a few tenths of a per cent in density); this module uses the
saturated state and says so in the record's sources.

Allowed storage temperatures: from the fluid's triple point up to, not including, its
critical temperature.
"""

from __future__ import annotations

import math
import threading
from dataclasses import replace
from functools import lru_cache
from types import MappingProxyType

from perfchain.errors import DataError, InputError
from perfchain.propellants.records import Ingredient, bundled_ingredient, list_ingredients
from perfchain.units import to_si

__all__ = ["conditioned", "saturated_liquid", "liquid_range", "conditionable", "CONDITIONABLE"]

#: Below the critical temperature by this much [K]: closer, the saturated liquid is not a
#: meaningful storage state and the equation of state's saturation solver loses accuracy.
CRITICAL_MARGIN = 0.5


#: Held around every call into CoolProp. Its C++ library loads each fluid's equation of state
#: into a process-wide table on first use and does not promise thread safety; studies and Dask
#: workers condition propellants from several threads. The results are cached, so the lock is
#: taken once per fluid and temperature.
COOLPROP_LOCK = threading.Lock()


def _coolprop():
    try:
        import CoolProp
        import CoolProp.CoolProp as CP
    except ImportError:  # pragma: no cover - CoolProp is a declared dependency
        raise DataError("CoolProp", "not installed",
                        "the CoolProp package for conditioned propellants (pip install CoolProp)") from None
    return CoolProp, CP


@lru_cache(maxsize=None)
def liquid_range(fluid: str) -> tuple[float, float]:
    """Temperatures [K] between which ``fluid`` can be stored as a saturated liquid.

    The triple point and the critical temperature less 0.5 K, from CoolProp.

    Examples
    --------
    Oxygen: triple point 54.361 K, critical point 154.581 K (Schmidt & Wagner 1985;
    NIST Chemistry WebBook; from memory):

    >>> lo, hi = liquid_range("Oxygen")
    >>> round(lo, 3), round(hi + 0.5, 1)
    (54.361, 154.6)
    """
    _, CP = _coolprop()
    with COOLPROP_LOCK:
        return float(CP.PropsSI("Ttriple", fluid)), float(CP.PropsSI("Tcrit", fluid)) - CRITICAL_MARGIN


@lru_cache(maxsize=256)
def saturated_liquid(fluid: str, temperature: float) -> tuple[float, float, float]:
    """Saturated liquid of ``fluid`` at ``temperature`` [K] from CoolProp.

    Returns
    -------
    tuple of float
        Molar enthalpy [J/mol] (CoolProp's reference state), density [kg/m^3],
        vapour pressure [Pa].

    Examples
    --------
    Nitrous oxide at 20 C: about 786 kg/m^3 and 50.5 bar (ESDU 91022; from memory):

    >>> h, rho, p = saturated_liquid("NitrousOxide", 293.15)
    >>> round(rho), round(p / 1e5, 1)
    (785, 50.5)
    """
    CoolProp, _ = _coolprop()
    with COOLPROP_LOCK:
        state = CoolProp.AbstractState("HEOS", fluid)
        state.update(CoolProp.QT_INPUTS, 0.0, float(temperature))
        return float(state.hmolar()), float(state.rhomass()), float(state.p())


def conditionable() -> MappingProxyType:
    """Bundled records that can be conditioned: name -> CoolProp fluid (also ``CONDITIONABLE``).

    Read on first use, so importing this module reads no data file.

    >>> conditionable()["LOX"]
    'Oxygen'
    """
    return MappingProxyType({i.name: i.fluid for i in list_ingredients() if i.fluid})


def __getattr__(name: str):
    if name == "CONDITIONABLE":   # the bundled records that can be conditioned (see conditionable())
        return conditionable()
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def conditioned(ingredient, temperature, field: str = "temperature") -> Ingredient:
    """The ingredient as a saturated liquid at another storage temperature.

    Parameters
    ----------
    ingredient : str or Ingredient
        A record with a real-fluid equation of state (``fluid``): LOX, LH2, LCH4,
        N2O, NH3 (see :func:`conditionable`).
    temperature : str or float
        Storage temperature, text with a unit (``"80 K"``, ``"-5 degC"``) or [K];
        between the triple point and the critical temperature (less 0.5 K).
    field : str
        Input name for error messages.

    Returns
    -------
    Ingredient
        Named ``"<name>@<T>K"``; enthalpy [J/kg] referred to the bundled record,
        density [kg/m^3] of the saturated liquid.

    Examples
    --------
    Densified LOX at 66 K is about 10 % denser than at its normal boiling point (the
    usual figure for densified LOX; common practice); the record's own temperature gives
    the record back:

    >>> lox = conditioned("LOX", "66 K")
    >>> lox.name, round(lox.density / bundled_ingredient("LOX").density, 2)
    ('LOX@66K', 1.1)
    >>> conditioned("LOX", "90.17 K").enthalpy == bundled_ingredient("LOX").enthalpy
    True
    >>> conditioned("LOX", "200 K")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: temperature: got '200 K'; allowed: a storage temperature of LOX as saturated liquid, 54.361 to 154.099 K
    """
    base = bundled_ingredient(ingredient)
    if not base.fluid:
        names = ", ".join(conditionable()) or "none"
        raise InputError(field, temperature, f"a storage temperature only for a liquid with an equation of "
                                             f"state ({names}); {base.name} has none")
    lo, hi = liquid_range(base.fluid)
    allowed = f"a storage temperature of {base.name} as saturated liquid, {lo:.6g} to {hi:.6g} K"
    try:
        t = to_si(temperature, "temperature", field)
    except InputError:
        raise InputError(field, temperature, f"{allowed}, with a unit (e.g. '80 K')") from None
    if not (math.isfinite(t) and lo <= t <= hi):
        raise InputError(field, temperature, allowed)
    return _conditioned(base, round(t, 9))


@lru_cache(maxsize=256)
def _conditioned(base: Ingredient, t: float) -> Ingredient:
    if t == base.temperature:
        return base
    h_t, rho, p_sat = saturated_liquid(base.fluid, t)
    h_ref, _, _ = saturated_liquid(base.fluid, base.temperature)
    h = base.enthalpy + (h_t - h_ref) * 1e3 / base.molar_mass   # J/mol -> J/kmol, per kg
    _, CP = _coolprop()
    with COOLPROP_LOCK:
        eos = CP.get_fluid_param_string(base.fluid, "BibTeX-EOS")
    how = (f"saturated liquid at {t:.6g} K (vapour pressure {p_sat / 1e5:.4g} bar) from the "
           f"{base.fluid} equation of state ({eos}) in CoolProp")
    sources = dict(base.sources)
    sources.update(enthalpy=f"{base.name} record plus h_sat,liq({t:.6g} K) - h_sat,liq({base.temperature:.6g} K), "
                            f"{how}", density=how)
    return replace(base, name=f"{base.name}@{t:.6g}K", enthalpy=h, temperature=t, density=rho,
                   phase="liquid (saturated)", aliases=(), sources=MappingProxyType(sources))
