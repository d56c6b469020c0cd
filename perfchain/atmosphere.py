"""U.S. Standard Atmosphere 1976, 0 to 86 km geometric altitude.

The lower atmosphere of the 1976 standard (NOAA/NASA/USAF, "U.S. Standard
Atmosphere, 1976", NOAA-S/T 76-1562) is seven layers of linear molecular-scale
temperature in *geopotential* altitude, from 0 to 84.852 km' (86 km geometric).
Base pressures are not copied from the document's table: they are integrated
here from the hydrostatic equation with the document's own constants,

* g0 = 9.80665 m/s^2, r0 = 6 356.766 km (the effective Earth radius used to
  convert geometric altitude z to geopotential H = r0 z / (r0 + z)),
* R* = 8 314.32 J/(kmol K) (the 1976 value, not CODATA),
* M0 = 28.9644 kg/kmol (sea-level mean molar mass),

and reproduce the published layer-base pressures to the printed digits.

Pressure, density and speed of sound depend on the molecular-scale
temperature T_M only. The kinetic temperature T differs from T_M above 80 km,
where the mean molar mass falls slightly: T = T_M (M/M0), with M/M0 from the
document's Table 8 (twelve values, 80 to 86 km, linearly interpolated here;
values from memory, they change T by at most 0.08 K).

All inputs are SI (m, Pa); scalar in gives float out, arrays give arrays.
"""

from __future__ import annotations

import numpy as np

from perfchain.constants import G0, MAX_ALTITUDE, ONE_ATM
from perfchain.errors import InputError

__all__ = [
    "MAX_ALTITUDE", "R0", "geopotential_altitude", "geometric_altitude",
    "pressure", "temperature", "density", "speed_of_sound",
    "altitude_for_pressure",
]

# The 1976 standard is defined with its own gas constant R* = 8314.32 J/(kmol K), not the
# CODATA value perfchain.constants.R_UNIVERSAL (8314.462618): its tables were computed with
# R*, so reproducing them to the printed digits needs R* here (a 1.7e-5 relative difference).
R_STAR = 8314.32        #: [J/(kmol K)] universal gas constant as defined by the 1976 document
M0 = 28.9644            #: [kg/kmol] sea-level mean molar mass
GAMMA = 1.40            #: ratio of specific heats of air used by the document
R0 = 6356766.0          #: [m] effective Earth radius for geopotential altitude

#: geopotential layer bases [m'] and molecular-temperature lapse rates [K/m']
_H_BASE = np.array([0.0, 11000.0, 20000.0, 32000.0, 47000.0, 51000.0, 71000.0])
_LAPSE = np.array([-6.5e-3, 0.0, 1.0e-3, 2.8e-3, 0.0, -2.8e-3, -2.0e-3])
_GMR = G0 * M0 / R_STAR  # [K/m'] hydrostatic constant


def _layer_bases():
    """Base molecular temperatures [K] and pressures [Pa] by hydrostatic integration."""
    t_base = [288.15]
    p_base = [ONE_ATM]
    for i in range(len(_H_BASE) - 1):
        dh = _H_BASE[i + 1] - _H_BASE[i]
        t0, lapse = t_base[-1], _LAPSE[i]
        t1 = t0 + lapse * dh
        if lapse == 0.0:
            p1 = p_base[-1] * np.exp(-_GMR * dh / t0)
        else:
            p1 = p_base[-1] * (t0 / t1) ** (_GMR / lapse)
        t_base.append(t1)
        p_base.append(p1)
    return np.array(t_base), np.array(p_base)


_T_BASE, _P_BASE = _layer_bases()

#: M/M0 against geometric altitude, 80 to 86 km (1976 document Table 8; from memory)
_Z_RATIO = np.arange(80000.0, MAX_ALTITUDE + 1.0, 500.0)
_M_RATIO = np.array([1.0, 0.999996, 0.999989, 0.999971, 0.999941, 0.999909, 0.999870,
                     0.999829, 0.999786, 0.999741, 0.999694, 0.999641, 0.999579])


def _check_altitude(z):
    arr = np.asarray(z, dtype=float)
    bad = ~np.isfinite(arr) | (arr < 0.0) | (arr > MAX_ALTITUDE)
    if np.any(bad):
        value = arr[bad].flat[0] if arr.ndim else float(arr)
        raise InputError("altitude", float(value), "an altitude from 0 to 86 km")
    return arr


def _out(arr, z):
    return float(arr) if np.ndim(z) == 0 else arr


def geopotential_altitude(z):
    """Geopotential altitude H = r0 z / (r0 + z).

    Parameters
    ----------
    z : float or array_like
        Geometric altitude [m].

    Returns
    -------
    float or ndarray
        Geopotential altitude [m'].

    Examples
    --------
    86 km geometric is the top of the seven layers, 84.852 km' (1976 document):

    >>> round(geopotential_altitude(86000.0))
    84852
    """
    arr = np.asarray(z, dtype=float)
    return _out(R0 * arr / (R0 + arr), z)


def geometric_altitude(h):
    """Geometric altitude z = r0 H / (r0 - H), the inverse of :func:`geopotential_altitude`.

    Parameters
    ----------
    h : float or array_like
        Geopotential altitude [m'].

    Returns
    -------
    float or ndarray
        Geometric altitude [m].

    Examples
    --------
    The tropopause at 11 km' lies at 11.019 km geometric (1976 document, Table 4):

    >>> round(geometric_altitude(11000.0))
    11019
    """
    arr = np.asarray(h, dtype=float)
    return _out(R0 * arr / (R0 - arr), h)


def _layer_state(z):
    """(molecular-scale temperature [K], pressure [Pa]) at geometric altitude z [m]."""
    arr = _check_altitude(z)
    h = R0 * arr / (R0 + arr)
    i = np.clip(np.searchsorted(_H_BASE, h, side="right") - 1, 0, len(_H_BASE) - 1)
    tb, pb, lapse, dh = _T_BASE[i], _P_BASE[i], _LAPSE[i], h - _H_BASE[i]
    tm = tb + lapse * dh
    iso = lapse == 0.0
    safe = np.where(iso, 1.0, lapse)
    p = np.where(iso, pb * np.exp(-_GMR * dh / tb), pb * (tb / tm) ** (_GMR / safe))
    return tm, p


def pressure(z):
    """Static pressure of the 1976 standard atmosphere.

    Parameters
    ----------
    z : float or array_like
        Geometric altitude [m], 0 to 86 000.

    Returns
    -------
    float or ndarray
        Pressure [Pa].

    Examples
    --------
    Sea level and 86 km (1976 document, Table I; 86 km value from memory):

    >>> pressure(0.0)
    101325.0
    >>> round(pressure(86000.0), 4)
    0.3734
    """
    return _out(_layer_state(z)[1], z)


def temperature(z):
    """Kinetic temperature of the 1976 standard atmosphere.

    Parameters
    ----------
    z : float or array_like
        Geometric altitude [m], 0 to 86 000.

    Returns
    -------
    float or ndarray
        Temperature [K].

    Examples
    --------
    At 86 km the kinetic temperature is 186.87 K (1976 document; from memory):

    >>> round(temperature(86000.0), 2)
    186.87
    """
    tm = _layer_state(z)[0]
    arr = np.asarray(z, dtype=float)
    ratio = np.interp(arr, _Z_RATIO, _M_RATIO, left=1.0, right=_M_RATIO[-1])
    return _out(tm * ratio, z)


def density(z):
    """Mass density rho = p M0 / (R* T_M) of the 1976 standard atmosphere.

    Parameters
    ----------
    z : float or array_like
        Geometric altitude [m], 0 to 86 000.

    Returns
    -------
    float or ndarray
        Density [kg/m^3].

    Examples
    --------
    Sea-level density 1.2250 kg/m^3 (1976 document, Table I):

    >>> round(density(0.0), 4)
    1.225
    """
    tm, p = _layer_state(z)
    return _out(p * M0 / (R_STAR * tm), z)


def speed_of_sound(z):
    """Speed of sound a = sqrt(gamma R* T_M / M0), gamma = 1.4, as in the 1976 document.

    Parameters
    ----------
    z : float or array_like
        Geometric altitude [m], 0 to 86 000.

    Returns
    -------
    float or ndarray
        Speed of sound [m/s].

    Examples
    --------
    Sea level 340.294 m/s (1976 document, Table I):

    >>> round(speed_of_sound(0.0), 3)
    340.294
    """
    tm = _layer_state(z)[0]
    return _out(np.sqrt(GAMMA * R_STAR * tm / M0), z)


def altitude_for_pressure(p):
    """Geometric altitude at which the 1976 atmosphere has pressure ``p`` (inverse of :func:`pressure`).

    Used for "the altitude below which the nozzle flows full": pressure falls
    monotonically with altitude, so each pressure has one altitude.

    Parameters
    ----------
    p : float or array_like
        Pressure [Pa], from p(86 km) = 0.3734 Pa up to 101 325 Pa.

    Returns
    -------
    float or ndarray
        Geometric altitude [m].

    Raises
    ------
    InputError
        If a pressure is outside the range of the table.

    Examples
    --------
    The 11 km' layer base, 22 632.1 Pa (1976 document), lies at 11.019 km geometric:

    >>> round(altitude_for_pressure(22632.1))
    11019
    """
    arr = np.asarray(p, dtype=float)
    p_min = float(_layer_state(MAX_ALTITUDE)[1])
    bad = ~np.isfinite(arr) | (arr < p_min) | (arr > _P_BASE[0])
    if np.any(bad):
        value = arr[bad].flat[0] if arr.ndim else float(arr)
        raise InputError("pressure", float(value),
                         f"a pressure from {p_min:.4g} Pa (86 km) to 101325 Pa (sea level)")
    # layers ordered by altitude have decreasing base pressure
    i = np.clip(np.searchsorted(-_P_BASE, -arr, side="right") - 1, 0, len(_H_BASE) - 1)
    tb, pb, lapse = _T_BASE[i], _P_BASE[i], _LAPSE[i]
    iso = lapse == 0.0
    safe = np.where(iso, 1.0, lapse)
    dh = np.where(iso, -tb / _GMR * np.log(arr / pb),
                  tb / safe * ((arr / pb) ** (-safe / _GMR) - 1.0))
    h = _H_BASE[i] + dh
    z = np.minimum(R0 * h / (R0 - h), MAX_ALTITUDE)
    return _out(z, p)
