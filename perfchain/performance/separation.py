"""Flow-separation flag for over-expanded nozzles.

An over-expanded nozzle (exit pressure pe below ambient pa) still flows full
until pe/pa falls below a threshold; below it the boundary layer separates
from the wall, and the ideal Cf no longer applies. Criteria (registry
:data:`SEPARATION_CRITERIA`, chosen by name):

* ``summerfield``: separation when pe/pa < k, k about 0.35-0.4 (Summerfield,
  Foster & Swan, Jet Propulsion 24, 1954; from memory). Default k = 0.4, the
  conservative end; accepted range 0.25-0.5.
* ``schmucker``: separation when pe/pa < (1.88 Me - 1)^-0.64, Me the exit
  Mach number (Schmucker, 1973, as quoted in the nozzle-separation literature;
  from memory). Needs ``exit_mach``.

This module is the flag (and the highest ambient pressure at which the nozzle flows full); the
ambient thrust of a separated nozzle (the nozzle cut at its separation station) is
:mod:`perfchain.performance.ambient`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable, NamedTuple

from perfchain import atmosphere
from perfchain.constants import MAX_ALTITUDE
from perfchain.errors import InputError, suggest

__all__ = ["SeparationCriterion", "SEPARATION_CRITERIA", "list_separation_criteria",
           "Separation", "separation", "SUMMERFIELD_THRESHOLD", "SCHMUCKER_COEFFICIENTS"]

#: default Summerfield threshold on pe/pa [-] (range 0.35-0.4 in the source)
SUMMERFIELD_THRESHOLD = 0.4


class SeparationCriterion(NamedTuple):
    """A named criterion: threshold(exit_mach, threshold) -> critical pe/pa [-]."""

    description: str
    source: str
    needs_exit_mach: bool
    threshold: Callable[[float | None, float | None], float]


def _summerfield(exit_mach, threshold):
    return SUMMERFIELD_THRESHOLD if threshold is None else threshold


#: Schmucker's fit p_sep/p_a = (a M - 1)^b: (a, b)
SCHMUCKER_COEFFICIENTS = (1.88, -0.64)


def _schmucker(exit_mach, threshold):
    a, b = SCHMUCKER_COEFFICIENTS
    return (a * exit_mach - 1.0) ** b


SEPARATION_CRITERIA: dict[str, SeparationCriterion] = {
    "summerfield": SeparationCriterion(
        "separation when pe/pa < k (default 0.4; 0.35-0.4 in the source)",
        "Summerfield, Foster & Swan, Jet Propulsion 24 (1954) (from memory)",
        False, _summerfield),
    "schmucker": SeparationCriterion(
        "separation when pe/pa < (1.88 Me - 1)^-0.64",
        "Schmucker (1973) (from memory)", True, _schmucker),
}


def list_separation_criteria() -> dict[str, dict[str, object]]:
    """The separation criteria by name.

    Returns
    -------
    dict
        name -> {"description", "source", "needs_exit_mach"}.

    Examples
    --------
    >>> sorted(list_separation_criteria())
    ['schmucker', 'summerfield']
    """
    return {n: {"description": c.description, "source": c.source,
                "needs_exit_mach": c.needs_exit_mach} for n, c in SEPARATION_CRITERIA.items()}


@dataclass(frozen=True)
class Separation:
    """Result of a separation check (SI).

    ``full_flow_ambient_pressure`` [Pa] is the highest ambient pressure at which
    the nozzle still flows full (pe / threshold); ``full_flow_altitude`` [m] is
    the 1976-standard altitude with that pressure: 0.0 when the nozzle flows
    full at sea level, None when it only flows full above 86 km.
    """

    flag: bool
    criterion: str
    threshold: float
    pressure_ratio: float
    full_flow_ambient_pressure: float
    full_flow_altitude: float | None

    def to_dict(self) -> dict:
        """The fields as a plain dict."""
        return {k: getattr(self, k) for k in self.__dataclass_fields__}


def _pressure(name, value, positive):
    ok = isinstance(value, (int, float)) and not isinstance(value, bool) and math.isfinite(value)
    if not ok or value < 0.0 or (positive and value == 0.0):
        raise InputError(name, value, "a pressure above 0 Pa" if positive else "a pressure of 0 Pa or more")
    return float(value)


def separation(exit_pressure: float, ambient_pressure: float, criterion: str = "summerfield",
               exit_mach: float | None = None, *, threshold: float | None = None) -> Separation:
    """Flag flow separation of an over-expanded nozzle.

    Parameters
    ----------
    exit_pressure : float
        Ideal (full-flowing) exit pressure [Pa].
    ambient_pressure : float
        Ambient pressure [Pa]; 0 is vacuum (never separated).
    criterion : str, optional
        A name in :data:`SEPARATION_CRITERIA` (default ``"summerfield"``).
    exit_mach : float, optional
        Exit Mach number [-], above 1; needed by ``"schmucker"``.
    threshold : float, optional
        Summerfield threshold on pe/pa [-], 0.25 to 0.5 (default 0.4).

    Returns
    -------
    Separation

    Examples
    --------
    pe = 30 kPa at sea level: pe/pa = 0.296 < 0.4, separated (Summerfield criterion);
    full flow below pa = 30 kPa / 0.4 = 75 kPa, about 2.47 km in the 1976 atmosphere

    >>> s = separation(30.0e3, 101325.0)
    >>> s.flag, s.full_flow_ambient_pressure, round(s.full_flow_altitude, -1)
    (True, 75000.0, 2470.0)
    """
    if criterion not in SEPARATION_CRITERIA:
        hint = suggest(criterion, SEPARATION_CRITERIA)
        raise InputError("criterion", criterion,
                         "one of " + ", ".join(SEPARATION_CRITERIA) + (f" ({hint})" if hint else ""))
    pe = _pressure("exit_pressure", exit_pressure, True)
    pa = _pressure("ambient_pressure", ambient_pressure, False)
    spec = SEPARATION_CRITERIA[criterion]
    if threshold is not None:
        if criterion != "summerfield":
            raise InputError("threshold", threshold, "a threshold only with criterion 'summerfield'")
        if isinstance(threshold, bool) or not isinstance(threshold, (int, float)) \
                or not 0.25 <= threshold <= 0.5:
            raise InputError("threshold", threshold, "a pressure ratio from 0.25 to 0.5")
    if spec.needs_exit_mach:
        if isinstance(exit_mach, bool) or not isinstance(exit_mach, (int, float)) \
                or not (math.isfinite(exit_mach) and exit_mach > 1.0):
            raise InputError("exit_mach", exit_mach, f"an exit Mach number above 1 (criterion {criterion!r})")
    k = float(spec.threshold(exit_mach, threshold))
    ratio = math.inf if pa == 0.0 else pe / pa
    p_full = pe / k
    if p_full >= atmosphere.pressure(0.0):
        altitude = 0.0
    elif p_full < atmosphere.pressure(MAX_ALTITUDE):
        altitude = None
    else:
        altitude = float(atmosphere.altitude_for_pressure(p_full))
    return Separation(flag=ratio < k, criterion=criterion, threshold=k, pressure_ratio=ratio,
                      full_flow_ambient_pressure=p_full, full_flow_altitude=altitude)
